"""DCMA 14-point checks on hand-made schedules: one passing at the mark, one just past it.

Pass marks, as used here (sources named beside each test):
* 1 logic <= 5%: GAO Schedule Assessment Guide (GAO-16-89G), page "DOD Defense Contract
  Management Agency".
* 2 leads 0, 3 lags <= 5%, 4 FS >= 90%, 5 hard constraints <= 5%, 6 float over 44 days <= 5%,
  7 negative float 0, 8 duration over 44 days <= 5%, 9 invalid dates 0: DCMA-EA PAM 200.1 as
  given in several published summaries that agree (read in those summaries, not the pamphlet).
* 11 missed tasks <= 5% and 12 the 600-day delay of the critical path test: from memory.
* 13 CPLI = (CPL + TF) / CPL, DAU Acquipedia, worked example 720 / -60 -> 0.917; 14 BEI =
  finished / due, published schedule-metric sheet; 0.95 for both as widely cited.

All sites are invented. Each network is small and built from the model's values directly.
"""

from __future__ import annotations

from datetime import date, timedelta

import pytest

from fieldlog.checks import dates, logic, path
from fieldlog.checks.baseline import planned_baseline
from fieldlog.checks.result import Outcome
from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.engine.result import ScheduleResult
from fieldlog.site.model import Site
from tests.helpers.engine_helpers import MONDAY, make_site

BEFORE = MONDAY - timedelta(days=1)


def network(
    chain: int,
    parallels: tuple[int, ...] = (),
    dangling: int = 0,
    *,
    link_type: str = "FS",
    lags: int = 0,
    leads: int = 0,
    other_types: int = 0,
    extra: dict[str, dict] | None = None,
    finish_by: date | None = None,
) -> Site:
    """Start milestone S, a chain C1..Cn of 5-day work, finish milestone F; optional parallel
    work P_j (S -> P_j -> F, given durations) and dangling work D_k (S -> D_k, no successor).

    The first ``lags`` chain links get a +1 lag, the next ``leads`` a -1 lead, the next
    ``other_types`` become SS. Seven-day calendar, so days are plain days.
    """
    extra = extra or {}
    acts = [("S", 0)]
    acts += [(f"C{i}", 5, None, extra.get(f"C{i}", {})) for i in range(1, chain + 1)]
    acts += [(f"P{j}", d, None, extra.get(f"P{j}", {})) for j, d in enumerate(parallels, 1)]
    acts += [(f"D{k}", 2) for k in range(1, dangling + 1)]
    acts.append(("F", 0))
    ids = ["S"] + [f"C{i}" for i in range(1, chain + 1)] + ["F"]
    links: list[tuple] = []
    for n, (a, b) in enumerate(zip(ids, ids[1:], strict=False)):
        if n < lags:
            links.append((a, b, "FS", 1))
        elif n < lags + leads:
            links.append((a, b, "FS", -1))
        elif n < lags + leads + other_types:
            links.append((a, b, "SS"))
        else:
            links.append((a, b, link_type))
    for j in range(1, len(parallels) + 1):
        links += [("S", f"P{j}"), (f"P{j}", "F")]
    links += [("S", f"D{k}") for k in range(1, dangling + 1)]
    return make_site(acts, links, finish_by=finish_by)


def schedule(
    site: Site, as_of: date = BEFORE, progress: dict[str, Progress] | None = None
) -> ScheduleResult:
    return compute_schedule(site, as_of, progress or {})


# --- 1-5: logic -------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("dangling", "outcome"),
    [
        (1, Outcome.PASS),  # 1 of 20 = 5%: at the mark (GAO-16-89G: no more than 5%)
        (2, Outcome.FAIL),  # 2 of 20 = 10%
    ],
)
def test_logic_at_and_past_the_mark(dangling: int, outcome: Outcome) -> None:
    site = network(18 - dangling, dangling=dangling)
    assert len(site.activities) == 20
    found = logic.check_logic(site, schedule(site))
    assert (found.outcome, found.count, found.population) == (outcome, dangling, 20)
    assert found.items == tuple(f"D{k}" for k in range(1, dangling + 1))


def test_logic_exempts_start_and_finish_milestones_only() -> None:
    """Common practice: the open ends of the job's start and finish milestones are meant."""
    site = make_site([("S", 0), ("A", 2), ("M", 0), ("F", 0)], [("S", "A"), ("A", "F")])
    assert logic.check_logic(site, schedule(site)).items == ("M",)  # a milestone tied to nothing


@pytest.mark.parametrize(("leads", "outcome"), [(0, Outcome.PASS), (1, Outcome.FAIL)])
def test_leads_none_allowed(leads: int, outcome: Outcome) -> None:
    """DCMA 14-point, widely cited: zero leads."""
    site = network(19, leads=leads)
    found = logic.check_leads(site, schedule(site))
    assert (found.outcome, found.count, found.population) == (outcome, leads, 20)


@pytest.mark.parametrize(("lags", "outcome"), [(1, Outcome.PASS), (2, Outcome.FAIL)])
def test_lags_at_and_past_five_percent(lags: int, outcome: Outcome) -> None:
    """DCMA 14-point, widely cited: at most 5% of links with a lag (1 of 20 is 5%)."""
    site = network(19, lags=lags)
    found = logic.check_lags(site, schedule(site))
    assert (found.outcome, found.count, found.population) == (outcome, lags, 20)


@pytest.mark.parametrize(("others", "outcome"), [(2, Outcome.PASS), (3, Outcome.FAIL)])
def test_relationship_types_at_and_past_ninety_percent(others: int, outcome: Outcome) -> None:
    """DCMA 14-point, widely cited: at least 90% finish-to-start (18 of 20 is 90%)."""
    site = network(19, other_types=others)
    found = logic.check_relationship_types(site, schedule(site))
    assert (found.outcome, found.count, found.population) == (outcome, 20 - others, 20)
    assert len(found.items) == others


@pytest.mark.parametrize(("pinned", "outcome"), [(1, Outcome.PASS), (2, Outcome.FAIL)])
def test_hard_constraints_at_and_past_five_percent(pinned: int, outcome: Outcome) -> None:
    """DCMA 14-point, widely cited: at most 5% of unfinished work with a hard constraint."""
    late = {"finish_not_after": MONDAY + timedelta(days=400)}
    soft = {"start_not_before": MONDAY + timedelta(days=1)}  # soft: never counted
    extra = {f"C{i}": late for i in range(1, pinned + 1)} | {"C10": soft}
    site = network(18, extra=extra)
    found = logic.check_hard_constraints(site, schedule(site))
    assert (found.outcome, found.count, found.population) == (outcome, pinned, 20)


# --- 6-11: float, duration, dates, progress ---------------------------------------------------


@pytest.mark.parametrize(
    ("parallel", "counted"),
    [
        (46, 0),  # chain 90 days; 46-day branch has 44 days' float: at the 44-day mark, not high
        (45, 1),  # 45 days' float: high
    ],
)
def test_high_float_day_mark(parallel: int, counted: int) -> None:
    site = network(18, (parallel,))
    found = dates.check_high_float(schedule(site))
    assert found.count == counted


@pytest.mark.parametrize(("high", "outcome"), [(1, Outcome.PASS), (2, Outcome.FAIL)])
def test_high_float_share(high: int, outcome: Outcome) -> None:
    """DCMA 14-point, widely cited: at most 5% of unfinished work over 44 days' float."""
    site = network(18 - high, (1,) * high)
    found = dates.check_high_float(schedule(site))
    assert (found.outcome, found.count, found.population) == (outcome, high, 20)


@pytest.mark.parametrize(("days_short", "outcome"), [(0, Outcome.PASS), (1, Outcome.FAIL)])
def test_negative_float(days_short: int, outcome: Outcome) -> None:
    """DCMA 14-point, widely cited: no negative float. The chain ends on day 50."""
    finish = MONDAY + timedelta(days=49)
    site = network(10, finish_by=finish - timedelta(days=days_short))
    found = dates.check_negative_float(schedule(site))
    assert found.outcome is outcome
    assert found.count == (0 if days_short == 0 else 12)


@pytest.mark.parametrize(
    ("durations", "outcome", "count"),
    [
        ((44,), Outcome.PASS, 0),  # 44 days is at the mark, not over it
        ((45,), Outcome.PASS, 1),  # 1 of 20 over: 5%
        ((45, 45), Outcome.FAIL, 2),  # 2 of 20 over: 10%
    ],
)
def test_high_duration(durations: tuple[int, ...], outcome: Outcome, count: int) -> None:
    """DCMA 14-point, widely cited: at most 5% with a baseline duration over 44 days."""
    site = network(18 - len(durations) + 2, durations)
    assert len(site.activities) == 22  # 20 non-milestones + S and F
    found = dates.check_high_duration(site, schedule(site), planned_baseline(site, "plan"))
    assert (found.outcome, found.count, found.population) == (outcome, count, 20)


def test_invalid_dates_catch_an_actual_after_the_status_date() -> None:
    """DCMA 14-point (and GAO-16-89G): no actual date after the status date."""
    site = network(3)
    assert dates.check_invalid_dates(schedule(site)).outcome is Outcome.PASS
    future = {"C1": Progress(actual_start=MONDAY + timedelta(days=3))}
    found = dates.check_invalid_dates(schedule(site, MONDAY, future))
    assert (found.outcome, found.items) == (Outcome.FAIL, ("C1",))


def test_resources_is_reported_without_a_mark() -> None:
    site = make_site(
        [("A", 2, None, {"crew": {"groundworks": 2}}), ("B", 3), ("M", 0)], [("A", "B"), ("B", "M")]
    )
    found = dates.check_resources(site, schedule(site))
    assert (found.outcome, found.items, found.population) == (Outcome.INFO, ("B",), 2)


def _finished_chain(n: int, late: int, open_: int) -> tuple[Site, ScheduleResult]:
    """n one-day activities in a row; the first ``late`` finish a day after plan, the last
    ``open_`` are not finished; the status date is after every planned finish."""
    ids = [f"A{i:02}" for i in range(n)]
    site = make_site([(a, 1) for a in ids], list(zip(ids, ids[1:], strict=False)))
    progress = {}
    shift = 0
    for i, aid in enumerate(ids[: n - open_]):
        if i < late:
            shift = late
        day = MONDAY + timedelta(days=i + shift) if i < late else MONDAY + timedelta(days=i + late)
        progress[aid] = Progress(actual_start=day, actual_finish=day)
    as_of = MONDAY + timedelta(days=n + late + 1)
    return site, schedule(site, as_of, progress)


@pytest.mark.parametrize(("open_", "outcome"), [(1, Outcome.PASS), (2, Outcome.FAIL)])
def test_missed_tasks_share(open_: int, outcome: Outcome) -> None:
    """From memory: at most 5% of the work due by the status date missed its finish."""
    site, result = _finished_chain(20, 0, open_)
    found = dates.check_missed_tasks(site, result, planned_baseline(site, "plan"))
    assert (found.outcome, found.count, found.population) == (outcome, open_, 20)


def test_missed_tasks_finish_on_plan_is_not_missed_a_day_late_is() -> None:
    site = make_site([("A", 1), ("B", 1)], [("A", "B")])
    plan = planned_baseline(site, "plan")
    on_time = {
        "A": Progress(MONDAY, MONDAY),
        "B": Progress(MONDAY + timedelta(days=1), MONDAY + timedelta(days=1)),
    }
    a_day_late = on_time | {"B": Progress(MONDAY + timedelta(days=2), MONDAY + timedelta(days=2))}
    as_of = MONDAY + timedelta(days=5)
    assert dates.check_missed_tasks(site, schedule(site, as_of, on_time), plan).count == 0
    assert dates.check_missed_tasks(site, schedule(site, as_of, a_day_late), plan).items == ("B",)


# --- 12-14: critical path test, CPLI, BEI ----------------------------------------------------


def _reschedule(as_of: date = BEFORE):
    return lambda changed: compute_schedule(changed, as_of, {})


def test_critical_path_test_passes_on_a_connected_chain() -> None:
    site = network(5, (3,))
    found = path.check_critical_path(site, schedule(site), _reschedule())
    assert (found.outcome, found.count) == (Outcome.PASS, path.CRITICAL_PATH_DELAY)
    assert found.items == ("C1",)


def test_critical_path_test_fails_when_a_constraint_makes_dead_end_work_critical() -> None:
    """A hard finish date makes dangling work 'critical' by float; delaying it does not move
    the finish, which is what the test is there to catch."""
    pinned = {"finish_not_after": MONDAY}
    site = make_site(
        [("S", 0), ("X", 2, None, pinned), ("C1", 5), ("C2", 5), ("F", 0)],
        [("S", "X"), ("S", "C1"), ("C1", "C2"), ("C2", "F")],
    )
    result = schedule(site)
    assert path.pick_test_activity(site, result) == "X"
    found = path.check_critical_path(site, result, _reschedule())
    assert (found.outcome, found.count) == (Outcome.FAIL, 0)


def test_cpli_worked_example() -> None:
    """DAU Acquipedia "Critical Path Length Index": CPL 720, TF -60 -> 0.917."""
    assert path.cpli(720, -60) == pytest.approx(0.917, abs=5e-4)
    with pytest.raises(ValueError, match="positive"):
        path.cpli(0, 0)


@pytest.mark.parametrize(
    ("days_short", "outcome"),
    [
        (1, Outcome.PASS),  # (20 - 1) / 20 = 0.95: at the mark
        (2, Outcome.FAIL),  # (20 - 2) / 20 = 0.90
    ],
)
def test_cpli_on_a_site(days_short: int, outcome: Outcome) -> None:
    site = network(4, finish_by=MONDAY + timedelta(days=19 - days_short))
    found = path.check_cpli(site, schedule(site), planned_baseline(site, "plan"))
    assert (found.outcome, found.population, found.count) == (outcome, 20, -days_short)


@pytest.mark.parametrize(("open_", "outcome"), [(1, Outcome.PASS), (2, Outcome.FAIL)])
def test_bei_at_and_past_the_mark(open_: int, outcome: Outcome) -> None:
    """BEI = finished / due (schedule-metric sheet); 19 / 20 = 0.95 is at the mark."""
    site, result = _finished_chain(20, 0, open_)
    found = path.check_bei(site, result, planned_baseline(site, "plan"))
    assert found.outcome is outcome
    assert found.value == pytest.approx((20 - open_) / 20)


def test_bei_not_applicable_before_anything_is_due() -> None:
    site = network(3)
    found = path.check_bei(site, schedule(site), planned_baseline(site, "plan"))
    assert found.outcome is Outcome.NOT_APPLICABLE
