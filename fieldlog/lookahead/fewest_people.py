"""Fewest people: the smallest crew that still does the window's work without moving the finish.

Levelling (:mod:`fieldlog.lookahead.levelling`) flattens the daily headcount. A foreman's
question is sharper: "can carpenters do the fortnight with 8 people instead of 10, and which
starts do I move?". For each crew over its headcount or near it (within a tenth of it, at
least one person) in the window, this module finds the smallest peak headcount on the window's
days that keeps every link, every late finish and the forecast finish, and the start days that
reach it; what may move is set out in :mod:`fieldlog.lookahead.fewest_problem`.

How the answer is found and how sure it is:

* a proven **lower bound** first (:mod:`fieldlog.lookahead.fewest_bounds`: must work per day,
  and work that must fall inside an interval, or any set of days, over the days in it);
* then ask for one person fewer than the best plan so far (from the early-start plan): a quick
  **branch and bound** (:mod:`fieldlog.lookahead.fewest_search`), then the **repair search**
  (:mod:`fieldlog.lookahead.fewest_repair`) that slides starts off the busiest day, then the
  branch and bound with the rest of the budget, until the search proves that no plan has that
  few, or the best plan meets the bound. Either way the answer is **optimal**. If the
  node budget runs out first, the best plan found is given with the bound beside it ("8
  people; no plan needs fewer than 7");
* **several crews** are settled one after another, the most over first: each is as small as it
  can be while the crews already settled keep their answers and every other crew stays within
  its headcount (or its early-start peak, if that is higher). An activity that needs two crews
  counts for both. So a crew settled later, or one not asked about, may end above its
  early-start peak (never above its headcount) to make room for a crew settled before it; the
  plan lists every such crew (:class:`Raised`) so the sheet can say so;
* the node budget is a count of starts tried, not a clock, so the same site always gives the
  same answer (printed sheets and golden files stay stable).

A smaller crew is a suggestion, not a safe staffing level: every renderer says so beside the
answer.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import date

from fieldlog.engine.result import ScheduleResult
from fieldlog.lookahead.crew_load import near_headcount
from fieldlog.lookahead.fewest_bounds import LowerBound, lower_bound
from fieldlog.lookahead.fewest_problem import Problem, build_problem
from fieldlog.lookahead.fewest_repair import repair
from fieldlog.lookahead.fewest_search import Outcome, find_plan
from fieldlog.lookahead.levelling import Move
from fieldlog.lookahead.positions import Network

METHOD = "branch and bound with must-work and energy lower bounds"
NODE_BUDGET = 100_000
"""Starts the searches may try or weigh over all crews of one lookahead: about 0.3 s of CPU
when all of it is spent on a 10,000-activity site's first fortnight (200 movable activities,
tests/benchmarks/bench_fewest.py)."""

QUICK_NODES = 500
"""Starts the branch and bound may take in a probe's first round."""
REPAIR_STEPS = 1_000
REPAIR_STEPS_EACH = 100
"""Starts the repair search may weigh in a probe's first round: 100 per movable activity, at
least 1,000; each later round doubles it (and quadruples the branch and bound's nodes). A small
window spends little on repair when the branch and bound proves faster that no plan has fewer
people; a busy one gets several tries at sliding."""

CAUTION = (
    "A smaller crew is a suggestion, not a safe staffing level: the people needed for safe "
    "work, supervision, lifting and access are set by the competent people on site, local codes "
    "and the contract."
)


@dataclass(frozen=True)
class CrewAnswer:
    """The fewest people one crew needs on the window's busiest day."""

    crew: str
    available: int
    early_peak: int
    """Peak on the window's days with everything on its early dates."""
    peak: int
    """Peak with the plan's moves made."""
    bound: LowerBound
    """No plan keeping the dates needs fewer than ``bound.people``."""
    optimal: bool
    """Proven: the bound is met, or the search showed that no plan needs fewer."""
    load: tuple[int, ...]
    """People per window day with the plan's moves made."""


@dataclass(frozen=True)
class Raised:
    """A crew whose plan peak is above its early-start peak: it takes work moved to make room
    for crews settled before it, and stays within its headcount."""

    crew: str
    early_peak: int
    peak: int
    available: int
    room_for: tuple[str, ...]
    """The crews settled before it (for a crew not asked about: every crew settled)."""


@dataclass(frozen=True)
class FewestPeople:
    """The plan for the crews asked about, and how sure it is."""

    method: str
    crews: tuple[CrewAnswer, ...]
    """In the order they were settled (the most over its headcount first)."""
    moves: tuple[Move, ...]
    """Starts the plan moves later (levelling's :class:`Move`; work without a crew too, when a
    link pushes it), sorted by new start, then id."""
    nodes: int
    """Starts tried by the search."""
    budget: int
    finish: date
    """Forecast finish, which the plan keeps."""
    raised: tuple[Raised, ...] = ()
    """Crews the plan puts above their early-start peak, in settling order, then by name."""


def fewest_people(
    result: ScheduleResult,
    days: Sequence[date],
    early_peaks: Mapping[str, int],
    open_by_start: Sequence,
    *,
    budget: int = NODE_BUDGET,
    network: Network | None = None,
) -> FewestPeople | None:
    """The fewest-people plan for the crews over or near their headcount (None: no such crew).

    Args:
        result: the schedule.
        days: the window's days.
        early_peaks: per crew, the peak on the window's days with everything early.
        open_by_start: the open activities in early-start order (the lookahead's rows).
        budget: starts the search may try, over all crews.
        network: a :class:`Network` of ``result`` already built, if the caller has one.
    """
    if budget < 0:
        raise ValueError(f"the search budget cannot be negative, got {budget}")
    available = {c: k.available for c, k in result.site.crews.items()}
    targets = sorted(
        (c for c in available if near_headcount(available[c], early_peaks.get(c, 0))),
        key=lambda c: (available[c] - early_peaks.get(c, 0), c),
    )
    if not targets:
        return None
    problem = build_problem(result, days, open_by_start, network)
    plan = (0,) * len(problem.movables)
    early = {c: max(v, default=0) for c, v in loads_of(problem, plan).items()}
    caps = {c: max(available[c], early[c]) for c in problem.crews}
    left = budget
    answers = []
    for crew in targets:
        bound = lower_bound(problem, crew)
        peak = max(loads_of(problem, plan)[crew], default=0)
        optimal = peak <= bound.people
        while not optimal and left > 0:
            target = {**caps, crew: peak - 1}
            found, proven_none, used = _try(problem, target, plan, left)
            left -= used
            if found is not None:
                plan = found
                peak = max(loads_of(problem, plan)[crew], default=0)
                optimal = peak <= bound.people
            else:
                optimal = proven_none
                break
        caps[crew] = peak
        answers.append((crew, early[crew], peak, bound, optimal))
    final = loads_of(problem, plan)
    settled = [c for c, *_ in answers]
    raised = tuple(
        Raised(c, early[c], top, available[c], tuple(settled[: settled.index(c)]))
        if c in settled
        else Raised(c, early[c], top, available[c], tuple(settled))
        for c in [*settled, *sorted(set(problem.crews) - set(settled))]
        if (top := max(final[c], default=0)) > early[c]
    )
    return FewestPeople(
        METHOD,
        tuple(
            CrewAnswer(c, available[c], e, p, b, o, tuple(final[c])) for c, e, p, b, o in answers
        ),
        _moves(problem, plan),
        budget - left,
        budget,
        result.finish,
        raised,
    )


def _try(
    problem: Problem, caps: Mapping[str, int], plan: tuple[int, ...], left: int
) -> tuple[tuple[int, ...] | None, bool, int]:
    """One probe at ``caps``, in rounds of growing size until the budget is spent: the branch
    and bound (it ends easy cases, and proves when no plan exists), then the repair search
    from ``plan`` with a fresh seed. Small windows end in the first rounds; busy ones get
    several repairs.

    Returns the plan found (or None), whether none can exist, and the starts used.
    """
    used = 0
    nodes, steps = QUICK_NODES, max(REPAIR_STEPS, REPAIR_STEPS_EACH * len(problem.movables))
    round_no = 0
    while used < left:
        search = find_plan(problem, caps, min(left - used, nodes))
        used += search.nodes
        if search.outcome is not Outcome.BUDGET:
            return search.starts, search.outcome is Outcome.NONE, used
        repaired, weighed = repair(problem, caps, plan, min(left - used, steps), round_no)
        used += weighed
        if repaired is not None:
            return repaired, False, used
        if not search.nodes and not weighed:
            break  # neither search can take a step: nothing more to learn
        nodes, steps, round_no = max(nodes * 4, 1), steps * 2, round_no + 1
    return None, False, used


def loads_of(problem: Problem, plan: Sequence[int]) -> dict[str, list[int]]:
    """People per crew and window day when each movable activity takes its start in ``plan``
    (an index into its :attr:`Movable.starts`)."""
    load = {c: list(v) for c, v in problem.fixed_load.items()}
    for m, k in zip(problem.movables, plan, strict=True):
        for c, r in m.crew.items():
            row = load[c]
            for d in m.runs[k]:
                row[d] += r
    return load


def _moves(problem: Problem, plan: Sequence[int]) -> tuple[Move, ...]:
    moves = []
    for m, k in zip(problem.movables, plan, strict=True):
        if k == 0:
            continue
        p = problem.placed[m.id]
        s = m.starts[k]
        moves.append(
            Move(
                m.id,
                p.result.name,
                p.result.early_start,
                p.first_day(s),
                p.last_day(s),
                k,
                dict(m.crew),
            )
        )
    moves.sort(key=lambda mv: (mv.start, mv.activity))
    return tuple(moves)
