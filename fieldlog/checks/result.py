"""What one schedule health check found: a plain value the renderers and the command read.

A check counts items (activities or links) out of a population and compares the share, or a
ratio, with a published threshold. Thresholds are a starting point for a conversation with
the scheduler, not a verdict: the GAO Schedule Assessment Guide says the DCMA 14-point
thresholds "are not compliance triggers".
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from enum import StrEnum


class Outcome(StrEnum):
    """How a check came out."""

    PASS = "pass"
    FAIL = "fail"
    INFO = "info"
    """Reported for reading only: the guidance sets no pass mark."""
    NOT_APPLICABLE = "n/a"
    """Nothing to count yet (for example no work was due by the status date)."""


@dataclass(frozen=True)
class Threshold:
    """A pass mark and where it comes from.

    ``recalled`` is True when the value was recalled rather than read in the guidance, so a
    reader knows to confirm it before relying on it.
    """

    text: str
    """The mark as printed, e.g. ``"<= 5%"``."""
    source: str
    """The published guidance it comes from."""
    recalled: bool = False


@dataclass(frozen=True)
class CheckResult:
    """One check's finding.

    ``value`` is a share in percent for counting checks and a ratio for index checks (CPLI,
    BEI); ``count`` / ``population`` say what it was computed from.
    """

    number: int
    """Position in the DCMA 14-point list."""
    name: str
    outcome: Outcome
    value: float | None
    count: int
    population: int
    threshold: Threshold
    what: str
    """What was counted, in plain words."""
    items: tuple[str, ...] = ()
    """Activity ids (or ``PRED->SUCC`` for links) behind the count, in schedule order."""
    note: str = ""
    """How the value was found where that needs saying (baseline used, activity delayed)."""
    unit: str = "%"
    """``"%"`` for a share, ``"ratio"`` for an index, ``"days"`` for working days."""

    @property
    def failed(self) -> bool:
        """True when the check is outside its pass mark."""
        return self.outcome is Outcome.FAIL


def share(count: int, population: int) -> float | None:
    """``count`` as a percentage of ``population``; None when there is nothing to count."""
    return None if population == 0 else 100.0 * count / population


def at_most(value: float | None, limit: float) -> Outcome:
    """PASS when ``value`` <= ``limit`` (at the mark passes), N/A when there is no value."""
    if value is None:
        return Outcome.NOT_APPLICABLE
    return Outcome.PASS if value <= limit + 1e-9 else Outcome.FAIL


def at_least(value: float | None, limit: float) -> Outcome:
    """PASS when ``value`` >= ``limit`` (at the mark passes), N/A when there is no value."""
    if value is None:
        return Outcome.NOT_APPLICABLE
    return Outcome.PASS if value >= limit - 1e-9 else Outcome.FAIL


def none_allowed(count: int, population: int) -> Outcome:
    """PASS when nothing was counted, N/A when there was nothing to count, else FAIL."""
    if population == 0:
        return Outcome.NOT_APPLICABLE
    return Outcome.PASS if count == 0 else Outcome.FAIL


@dataclass(frozen=True)
class Counting:
    """The fixed parts of a counting check: its place in the list, name, pass mark and wording.

    The check modules keep a table of these beside their functions, so a check's function only
    finds its items and its population; the share, the outcome and the result are built here,
    the same way for every check. The mark is ``most_pct`` (share at most), ``least_pct`` (share
    at least), ``info`` (no mark: reported for reading) or, with none of them, none allowed.
    """

    number: int
    """Position in the DCMA 14-point list."""
    name: str
    threshold: Threshold
    what: str
    """What was counted, in plain words."""
    most_pct: float | None = None
    least_pct: float | None = None
    info: bool = False

    def result(
        self,
        items: Sequence[str],
        population: int,
        *,
        count: int | None = None,
        note: str = "",
    ) -> CheckResult:
        """The finding for ``items`` out of ``population``.

        ``count`` is given where what is counted is not what is listed (check 4 counts the
        finish-to-start links and lists the others for review); by default it is the items.
        """
        counted = len(items) if count is None else count
        value = share(counted, population)
        if self.info:
            outcome = Outcome.INFO
        elif self.most_pct is not None:
            outcome = at_most(value, self.most_pct)
        elif self.least_pct is not None:
            outcome = at_least(value, self.least_pct)
        else:
            outcome = none_allowed(counted, population)
        return CheckResult(
            self.number,
            self.name,
            outcome,
            value,
            counted,
            population,
            self.threshold,
            self.what,
            tuple(items),
            note=note,
        )
