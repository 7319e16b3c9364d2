"""Proven lower bounds on a crew's peak: no plan that keeps the dates needs fewer people.

Two arguments, both about work that cannot get out of the way:

* **must work**: on any day, work that stays on its dates plus the part of each movable
  activity that every allowed start covers (its compulsory part: the days between its latest
  start and its earliest finish) must all be done that day; the crew's peak is at least the
  busiest such day;
* **energy over an interval** (energetic reasoning, common practice in resource-constrained
  scheduling): for days ``a..b`` of the window, each activity puts at least some person-days
  into them whatever start it takes. Sliding a run of fixed length across an interval, the
  overlap rises, levels off, then falls, so the smallest overlap is at the earliest or the
  latest start. That energy has to fit on the days in ``a..b`` on which the crew can work at
  all, so the peak is at least the energy divided by those days, rounded up.

* **energy over chosen days**: the same argument holds for any set of days, not only a run of
  them: each activity puts at least its smallest overlap with the set into it, whatever start
  it takes. Two busy days with a quiet one between can need more people than any interval
  shows (an activity can dodge one of the two days, never both). When the crew can work on at
  most :data:`SUBSET_DAYS` of the window's days, every set of them is tried (2^14 - 1 sets,
  counted with a bit table), so this bound is never below the interval one.

Every movable activity whose every start touches the window also needs its own headcount on
at least one day, so the peak is at least its headcount.

The arrays are small (window days by the crew's activities), so numpy keeps a 10,000-activity
site's bound to a few milliseconds.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

import numpy as np

from fieldlog.lookahead.fewest_problem import Problem

_TABLE_BITS = 14
SUBSET_DAYS = _TABLE_BITS
"""Most work days of a crew in the window for which every set of them is tried (2^14 sets:
milliseconds per activity; a longer window keeps the interval bound only)."""


@dataclass(frozen=True)
class LowerBound:
    """A proven minimum for one crew's peak, and the argument that gives it."""

    people: int
    reason: str
    """``"must"`` (one day's must work), ``"energy"`` (an interval), ``"days"`` (a set of days
    that is not an interval), ``"headcount"`` (one activity's own headcount) or ``"none"``
    (nothing to do)."""
    first: int
    """Window-day index where the argument's days begin."""
    last: int
    """Window-day index where they end (inclusive)."""
    person_days: int
    """Person-days that must fall on those days (the day's people for ``"must"``)."""
    work_days: int
    """Days in that span on which the crew can work."""
    days: tuple[int, ...] = ()
    """For ``"days"``: the window-day indices of the chosen set (empty for the others)."""


def lower_bound(problem: Problem, crew: str) -> LowerBound:
    """The best of the bounds above for ``crew``."""
    n = problem.days
    fixed = np.asarray(problem.fixed_load[crew], dtype=np.int64)
    early_rows, late_rows, rates = [], [], []
    can_work = fixed > 0
    single = 0
    for m in problem.movables:
        rate = m.crew.get(crew, 0)
        if not rate:
            continue
        early, late = _row(m.runs[0], n), _row(m.runs[-1], n)
        early_rows.append(early)
        late_rows.append(late)
        rates.append(rate)
        for run in m.runs:
            can_work[list(run)] = True
        if all(m.runs):
            single = max(single, rate)
    best = LowerBound(0, "none", 0, n - 1, 0, 0)
    if not fixed.any() and not rates:
        return best
    # prefix sums over days: column j counts days 0..j-1
    fixed_prefix = np.concatenate(([0], np.cumsum(fixed)))
    work_prefix = np.concatenate(([0], np.cumsum(can_work.astype(np.int64))))
    if rates:
        r = np.asarray(rates, dtype=np.int64)[:, None]
        ep = np.concatenate(
            (np.zeros((len(rates), 1), np.int64), np.cumsum(np.asarray(early_rows), axis=1)), axis=1
        )
        lp = np.concatenate(
            (np.zeros((len(rates), 1), np.int64), np.cumsum(np.asarray(late_rows), axis=1)), axis=1
        )
    for a in range(n):
        ends = np.arange(a + 1, n + 1)
        energy = fixed_prefix[ends] - fixed_prefix[a]
        if rates:
            least = np.minimum(ep[:, ends] - ep[:, [a]], lp[:, ends] - lp[:, [a]])
            energy = energy + (r * least).sum(axis=0)
        days = work_prefix[ends] - work_prefix[a]
        with np.errstate(divide="ignore", invalid="ignore"):
            need = np.where(days > 0, -(-energy // np.maximum(days, 1)), 0)
        k = int(np.argmax(need))
        if int(need[k]) > best.people:
            # report the span from its first to its last day the crew can work
            span = [d for d in range(a, a + k + 1) if can_work[d]]
            lo, hi = span[0], span[-1]
            best = LowerBound(
                int(need[k]), "must" if lo == hi else "energy", lo, hi, int(energy[k]), int(days[k])
            )
    work = [d for d in range(n) if can_work[d]]
    if len(work) <= min(SUBSET_DAYS, _TABLE_BITS):
        chosen = _over_day_sets(fixed, work, problem, crew)
        if chosen is not None and chosen.people > best.people:
            best = chosen
    if single > best.people:
        best = LowerBound(single, "headcount", 0, n - 1, single, 1)
    return best


def _over_day_sets(
    fixed: np.ndarray, work: list[int], problem: Problem, crew: str
) -> LowerBound | None:
    """The best energy bound over every non-empty set of the crew's work days (bit ``j`` of a
    set stands for day ``work[j]``)."""
    m = len(work)
    if not m:
        return None
    sets = np.arange(1, 1 << m, dtype=np.int64)
    bits = (sets[:, None] >> np.arange(m)) & 1
    energy = bits @ fixed[work]
    bit_of = {d: j for j, d in enumerate(work)}
    count = _bit_count()
    for mv in problem.movables:
        rate = mv.crew.get(crew, 0)
        if not rate:
            continue
        least = None
        for run in mv.runs:
            mask = sum(1 << bit_of[d] for d in run)
            overlap = count[sets & mask]
            least = overlap if least is None else np.minimum(least, overlap)
        assert least is not None  # every movable activity has at least one start
        energy = energy + rate * least.astype(np.int64)
    size = count[sets].astype(np.int64)
    need = -(-energy // size)
    k = int(np.argmax(need))
    chosen = tuple(work[j] for j in range(m) if (int(sets[k]) >> j) & 1)
    if chosen == tuple(d for d in work if chosen[0] <= d <= chosen[-1]):  # an interval
        reason = "must" if len(chosen) == 1 else "energy"
        chosen_days: tuple[int, ...] = ()
    else:
        reason, chosen_days = "days", chosen
    return LowerBound(
        int(need[k]), reason, chosen[0], chosen[-1], int(energy[k]), len(chosen), chosen_days
    )


@cache
def _bit_count() -> np.ndarray:
    """Set bits of every number below 2^14 (numpy 1.26 has no bit count)."""
    n = np.arange(1 << _TABLE_BITS, dtype=np.int64)
    table = np.zeros(1 << _TABLE_BITS, dtype=np.int8)
    for b in range(_TABLE_BITS):
        table += ((n >> b) & 1).astype(np.int8)
    return table


def _row(run: tuple[int, ...], n: int) -> np.ndarray:
    row = np.zeros(n, dtype=np.int64)
    row[list(run)] = 1
    return row
