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

Every movable activity whose every start touches the window also needs its own headcount on
at least one day, so the peak is at least its headcount.

The arrays are small (window days by the crew's activities), so numpy keeps a 10,000-activity
site's bound to a few milliseconds.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fieldlog.lookahead.fewest_problem import Problem


@dataclass(frozen=True)
class LowerBound:
    """A proven minimum for one crew's peak, and the argument that gives it."""

    people: int
    reason: str
    """``"must"`` (one day's must work), ``"energy"`` (an interval), ``"headcount"`` (one
    activity's own headcount) or ``"none"`` (nothing to do)."""
    first: int
    """Window-day index where the argument's days begin."""
    last: int
    """Window-day index where they end (inclusive)."""
    person_days: int
    """Person-days that must fall on those days (the day's people for ``"must"``)."""
    work_days: int
    """Days in that span on which the crew can work."""


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
    if single > best.people:
        best = LowerBound(single, "headcount", 0, n - 1, single, 1)
    return best


def _row(run: tuple[int, ...], n: int) -> np.ndarray:
    row = np.zeros(n, dtype=np.int64)
    row[list(run)] = 1
    return row
