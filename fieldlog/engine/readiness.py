"""Readiness items: what an activity needs before it can start (drawings, a delivery, a permit).

The journal opens and clears them; the lookahead and the CPM read the ones still open at the
status date. An open item with an expected date holds its activity back as if it had a
start-not-before on that date; an item with no expected date, or one whose date has passed, is
flagged so someone chases it.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date, timedelta

READINESS_KINDS = ("drawings", "material", "inspection", "permit", "access", "equipment", "other")


@dataclass(frozen=True)
class OpenItem:
    """A readiness item still open at the status date."""

    activity: str
    what: str
    """What is needed, in the foreman's words ("rebar shop drawings rev B")."""
    kind: str
    """One of :data:`READINESS_KINDS`."""
    expected: date | None
    """When it is expected to be cleared; None when nobody knows."""
    opened: date
    entry_id: str = ""

    def holds_until(self, status_date: date) -> date | None:
        """The first day the activity may start because of this item, or None if no hold.

        An item expected on day E is cleared during E, so work can start on E + 1.
        A date that is unknown or already past holds nothing (it is flagged instead).
        """
        if self.expected is None or self.expected <= status_date:
            return None
        return self.expected + timedelta(days=1)

    def flag(self, status_date: date) -> str | None:
        """Why this item needs chasing, or None."""
        if self.expected is None:
            return f"needs {self.what}: no expected date"
        if self.expected <= status_date:
            return f"needs {self.what}: expected {self.expected.isoformat()}, still open"
        return None


def holds(items: Iterable[OpenItem], status_date: date) -> dict[str, date]:
    """Per activity, the latest start-not-before date that open items impose."""
    out: dict[str, date] = {}
    for item in items:
        until = item.holds_until(status_date)
        if until is not None and (item.activity not in out or until > out[item.activity]):
            out[item.activity] = until
    return out
