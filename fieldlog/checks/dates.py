"""DCMA checks 6-11: float, durations, dates and progress against the baseline.

High float and negative float read the forecast (total float in working days of each
activity's own calendar); high duration and missed tasks read the baseline
(:mod:`fieldlog.checks.baseline`); invalid dates read the status date. "Resources" has no pass
mark in the guidance and is reported for reading only.
"""

from __future__ import annotations

from fieldlog.checks.baseline import Baseline
from fieldlog.checks.result import CheckResult, Counting, Threshold
from fieldlog.checks.sources import DCMA_RECALLED, DCMA_SECONDARY
from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.site.model import Site

HIGH_FLOAT_DAYS = 44
"""Check 6: total float above 44 working days (about two months) is high."""
MAX_HIGH_FLOAT_PCT = 5.0
HIGH_DURATION_DAYS = 44
"""Check 8: a baseline duration above 44 working days is high."""
MAX_HIGH_DURATION_PCT = 5.0
MAX_MISSED_PCT = 5.0
"""Check 11: at most 5% of the work due by the status date missed its baseline finish."""

HIGH_FLOAT = Counting(
    6,
    "High float",
    Threshold("<= 5% over 44 days", DCMA_SECONDARY),
    "unfinished activities with total float over 44 working days",
    most_pct=MAX_HIGH_FLOAT_PCT,
)
NEGATIVE_FLOAT = Counting(
    7,
    "Negative float",
    Threshold("0%", DCMA_SECONDARY),
    "unfinished activities with total float below zero",
)
HIGH_DURATION = Counting(
    8,
    "High duration",
    Threshold("<= 5% over 44 days", DCMA_SECONDARY),
    "unfinished activities with a baseline duration over 44 working days",
    most_pct=MAX_HIGH_DURATION_PCT,
)
INVALID_DATES = Counting(
    9,
    "Invalid dates",
    Threshold("0", DCMA_SECONDARY),
    "activities with a forecast before the data date or an actual after the status date",
)
RESOURCES = Counting(
    10,
    "Resources",
    Threshold("no mark", DCMA_RECALLED, recalled=True),
    "unfinished activities (not milestones) with no crew",
    info=True,
)
MISSED_TASKS = Counting(
    11,
    "Missed tasks",
    Threshold("<= 5%", DCMA_RECALLED, recalled=True),
    "work due by the status date in the baseline that finished late or is not finished",
    most_pct=MAX_MISSED_PCT,
)
"""Checks 6-11, one row each: the functions below find the items, these say how to judge them."""


def _open(result: ScheduleResult) -> list[ActivityResult]:
    return [r for r in result.activities if r.is_open]


def check_high_float(result: ScheduleResult) -> CheckResult:
    """Check 6: unfinished activities with total float above 44 working days.

    Much float usually means missing successors rather than real freedom.
    """
    population = [r for r in _open(result) if r.total_float is not None]
    high = [
        r.id for r in population if r.total_float is not None and r.total_float > HIGH_FLOAT_DAYS
    ]
    return HIGH_FLOAT.result(high, len(population))


def check_negative_float(result: ScheduleResult) -> CheckResult:
    """Check 7: unfinished activities with negative total float (the job is behind)."""
    population = [r for r in _open(result) if r.total_float is not None]
    late = [r.id for r in population if r.late]
    return NEGATIVE_FLOAT.result(late, len(population))


def check_high_duration(site: Site, result: ScheduleResult, baseline: Baseline) -> CheckResult:
    """Check 8: unfinished work whose baseline duration is over 44 working days.

    Long activities are hard to status and hide the sequence inside them. An activity the
    baseline does not have is judged by its current duration. Milestones are not work and are
    not counted.
    """
    population = [r for r in _open(result) if not site.activity(r.id).is_milestone]
    long = []
    for r in population:
        planned = baseline.activities.get(r.id)
        duration = planned.duration if planned is not None else r.duration
        if duration > HIGH_DURATION_DAYS:
            long.append(r.id)
    return HIGH_DURATION.result(long, len(population), note=f"baseline: {baseline.source}")


def check_invalid_dates(result: ScheduleResult) -> CheckResult:
    """Check 9: a forecast before the data date, or an actual date after the status date.

    Either means the schedule was not statused properly: work cannot be planned in the past,
    nor can it have happened in the future. fieldlog's own engine never produces the first;
    the check still reads the result, so a defect there would show.
    """
    population = list(result.activities)
    bad = []
    for r in population:
        forecast_past = r.is_open and r.early_start < result.data_date
        actual_future = any(
            d is not None and d > result.as_of for d in (r.actual_start, r.actual_finish)
        )
        if forecast_past or actual_future:
            bad.append(r.id)
    return INVALID_DATES.result(bad, len(population))


def check_resources(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 10: unfinished work with no crew assigned (for reading; no pass mark)."""
    population = [r for r in _open(result) if not site.activity(r.id).is_milestone]
    bare = [r.id for r in population if not site.activity(r.id).crew]
    return RESOURCES.result(bare, len(population))


def check_missed_tasks(site: Site, result: ScheduleResult, baseline: Baseline) -> CheckResult:
    """Check 11: work due by the status date in the baseline that finished late or not at all.

    Population: activities (not milestones) whose baseline finish is on or before the status
    date; counted: those not finished by then, or finished after their baseline finish.
    """
    population, missed = due_by_status_date(site, result, baseline), []
    for r in population:
        planned = baseline.activities[r.id]
        finished_by = r.actual_finish if r.status is Status.FINISHED else None
        if finished_by is None or finished_by > planned.finish:
            missed.append(r.id)
    return MISSED_TASKS.result(missed, len(population), note=f"baseline: {baseline.source}")


def due_by_status_date(
    site: Site, result: ScheduleResult, baseline: Baseline
) -> list[ActivityResult]:
    """Activities (not milestones) the baseline has finishing on or before the status date."""
    due = []
    for r in result.activities:
        planned = baseline.activities.get(r.id)
        if planned is None or site.activity(r.id).is_milestone:
            continue
        if planned.finish <= result.as_of:
            due.append(r)
    return due
