"""What a value must be to be *recorded now*, on top of what the reader accepts.

The reader (:func:`fieldlog.journal.entries.check_fields`) keeps accepting every entry that was
legal when it was written: a legal record stays readable. A few values it accepts are still
not what anyone means when they type them today; they are normalised or refused here, at
record time only, for the command line and the app's forms alike (both record through
:func:`fieldlog.journal.record.record_entry`):

- a negative zero (``-0``, ``-0.0``) in any number field is stored as ``0.0``: TOML keeps the
  sign, and a log saying ``-0.0`` mm of rain is neither what the person meant nor what a
  screen shows;
- lost time of 0 hours is no lost time and is refused; more than a day's 24 hours is refused
  with the way to record a whole lost day.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from fieldlog.journal.entries import KINDS, check_fields
from fieldlog.journal.fields import FieldProblem

LOST_HOURS_HIGH = 24
"""A lost-time entry's ``hours`` at most: a day (the reader's own upper bound)."""


def recordable(kind: str, fields: Mapping[str, Any]) -> dict[str, Any]:
    """``fields`` checked by the reader's rules, then by the record-time rules above.

    For a correction the replacement values follow the rules of the kind corrected.

    Raises:
        FieldProblem: one line naming the field, the value and what to give instead.
    """
    try:
        clean = check_fields(kind, fields)
    except FieldProblem:
        target = fields.get("corrects", kind) if kind == "correction" else kind
        _over_a_day(target, fields.get("hours"))
        raise
    target = clean.get("corrects", kind) if kind == "correction" else kind
    floats = {s.name for s in KINDS.get(target, ()) if s.type == "float"}
    for name in floats & clean.keys():
        if clean[name] == 0:
            clean[name] = 0.0  # -0.0 == 0, so this drops the sign; every other zero is 0.0
    hours = clean.get("hours")
    if target == "lost-time" and hours is not None and hours <= 0:
        raise FieldProblem(
            f"hours {hours:g} is no time lost: give the hours lost (more than 0, at most "
            f"{LOST_HOURS_HIGH}), or record no lost time"
        )
    return clean


def _over_a_day(kind: str, raw: Any) -> None:
    """Lost hours typed past a day: the reader's bound refuses them ("hours 30 is above
    24"); this says what to do instead."""
    if kind != "lost-time" or raw is None or isinstance(raw, bool):
        return
    try:
        hours = float(str(raw).strip()) if isinstance(raw, str) else float(raw)
    except ValueError:
        return
    if hours > LOST_HOURS_HIGH:
        raise FieldProblem(
            f"hours {hours:g} is above {LOST_HOURS_HIGH}, more than a day: for a whole lost "
            "day leave the hours out (the day becomes a non-working day)"
        )
