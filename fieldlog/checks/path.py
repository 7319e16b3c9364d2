"""DCMA checks 12-14: does the critical path drive the finish, and is the job keeping pace?

* 12, critical path test: delay one critical activity by a large number of working days and
  recompute; the job's finish must move by as much. If it does not, logic or a date
  constraint breaks the path and the float the office reads is not real.
* 13, CPLI (critical path length index) = (CPL + TF) / CPL, where CPL is the working days from
  the data date to the finish and TF the finish's float against its target (DAU Acquipedia,
  "Critical Path Length Index"; 1.00 on target, below 1.00 unfavourable).
* 14, BEI (baseline execution index) = activities finished / activities the baseline had
  finishing by the status date.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from datetime import date, timedelta

from fieldlog.checks.baseline import Baseline
from fieldlog.checks.dates import due_by_status_date
from fieldlog.checks.result import CheckResult, Outcome, Threshold, at_least
from fieldlog.checks.sources import BEI_SHEET, DAU_CPLI, DCMA_RECALLED
from fieldlog.engine.progress import Status
from fieldlog.engine.result import ScheduleResult
from fieldlog.site.model import Site

CRITICAL_PATH_DELAY = 600
"""Working days added in the critical path test (recalled value of the DCMA test)."""
MIN_CPLI = 0.95
MIN_BEI = 0.95

Reschedule = Callable[[Site], ScheduleResult]
"""Recompute a changed site with the same status date and field progress."""


def cpli(length: int, total_float: int) -> float:
    """(CPL + TF) / CPL; DAU's worked example: CPL 720, TF -60 gives 0.917."""
    if length <= 0:
        raise ValueError(f"critical path length must be positive, got {length}")
    return (length + total_float) / length


def pick_test_activity(site: Site, result: ScheduleResult) -> str | None:
    """The first not-started, non-milestone activity of the lowest-float set, in schedule order.

    The test takes its activity from the float-based critical set, not the driving path: the
    point is to find a "critical" activity that does not in fact drive the finish.
    """
    critical = set(result.lowest_float)
    for r in result.activities:
        if (
            r.id in critical
            and r.status is Status.NOT_STARTED
            and not site.activity(r.id).is_milestone
        ):
            return r.id
    return None


def finish_milestone(site: Site, result: ScheduleResult) -> str | None:
    """The job's end milestone: the latest-dated milestone nothing follows (None if none).

    The test watches this milestone, as the DCMA test watches the end milestone, rather than
    the latest date of any work: delayed dead-end work would otherwise "move the finish" by
    becoming the last thing on site.
    """
    followed = {k.pred for k in site.links}
    ends = [
        r for r in result.activities if site.activity(r.id).is_milestone and r.id not in followed
    ]
    return max(ends, key=lambda r: r.early_finish).id if ends else None


def _finish_of(result: ScheduleResult, end: str | None) -> date:
    return result.finish if end is None else result.by_id[end].early_finish


def check_critical_path(site: Site, result: ScheduleResult, reschedule: Reschedule) -> CheckResult:
    """Check 12: add :data:`CRITICAL_PATH_DELAY` working days to one critical activity.

    The slip of the end milestone (:func:`finish_milestone`; the job's finish when there is
    none) is counted in working days of the delayed activity's calendar. A path that crosses
    onto another calendar can land the finish on a day that calendar does not work, so one
    working day short still passes (our allowance, not the guidance's).
    """
    threshold = Threshold(f"finish slips {CRITICAL_PATH_DELAY} days", DCMA_RECALLED, recalled=True)
    what = "working days the finish slips when one critical activity is delayed"
    aid = pick_test_activity(site, result)
    if aid is None:
        return CheckResult(
            12,
            "Critical path test",
            Outcome.NOT_APPLICABLE,
            None,
            0,
            0,
            threshold,
            what,
            note="no unstarted critical work to delay",
            unit="days",
        )
    act = site.activity(aid)
    delayed = tuple(
        replace(a, duration=a.duration + CRITICAL_PATH_DELAY) if a.id == aid else a
        for a in site.activities
    )
    slipped = reschedule(replace(site, activities=delayed))
    end = finish_milestone(site, result)
    before, after = _finish_of(result, end), _finish_of(slipped, end)
    cal = slipped.calendars[act.calendar]
    slip = cal.count(before + timedelta(days=1), after + timedelta(days=1))
    passed = slip >= CRITICAL_PATH_DELAY - 1
    return CheckResult(
        12,
        "Critical path test",
        Outcome.PASS if passed else Outcome.FAIL,
        float(slip),
        slip,
        CRITICAL_PATH_DELAY,
        threshold,
        what,
        (aid,),
        note=f"{aid} delayed {CRITICAL_PATH_DELAY} working days; {end or 'the finish'} "
        f"{before} -> {after}",
        unit="days",
    )


def check_cpli(site: Site, result: ScheduleResult, baseline: Baseline) -> CheckResult:
    """Check 13: CPLI of the job's finish, on the site's default calendar.

    TF is the float against the required finish (``finish_by``) when the site has one,
    otherwise against the baseline finish.
    """
    cal = result.calendars[site.calendar]
    length = cal.count(result.data_date, result.finish + timedelta(days=1))
    if site.finish_by is not None and result.finish_float is not None:
        target, tf = f"required finish {site.finish_by}", result.finish_float
    else:
        target = f"baseline finish {baseline.finish} ({baseline.source})"
        tf = cal.count(result.finish + timedelta(days=1), baseline.finish + timedelta(days=1))
    threshold = Threshold(">= 0.95", DAU_CPLI)
    what = "(critical path length + finish float) / critical path length"
    if length <= 0:
        return CheckResult(
            13,
            "CPLI",
            Outcome.NOT_APPLICABLE,
            None,
            tf,
            length,
            threshold,
            what,
            note="no work left after the data date",
            unit="ratio",
        )
    value = cpli(length, tf)
    return CheckResult(
        13,
        "CPLI",
        at_least(value, MIN_CPLI),
        value,
        tf,
        length,
        threshold,
        what,
        note=f"CPL {length} working days to {result.finish}, float {tf:+d} against the {target}",
        unit="ratio",
    )


def check_bei(site: Site, result: ScheduleResult, baseline: Baseline) -> CheckResult:
    """Check 14: BEI = finished activities / activities due by the status date.

    Both counts leave out milestones and work the baseline does not have, so like is compared
    with like; work finished early counts in the numerator (as the index is defined).
    """
    due = due_by_status_date(site, result, baseline)
    done = [
        r.id
        for r in result.activities
        if r.status is Status.FINISHED
        and r.id in baseline.activities
        and not site.activity(r.id).is_milestone
    ]
    value = len(done) / len(due) if due else None
    missing = tuple(r.id for r in due if r.status is not Status.FINISHED)
    return CheckResult(
        14,
        "BEI",
        at_least(value, MIN_BEI),
        value,
        len(done),
        len(due),
        Threshold(">= 0.95", BEI_SHEET),
        "activities finished / activities due by the status date",
        missing,
        note=f"baseline: {baseline.source}",
        unit="ratio",
    )
