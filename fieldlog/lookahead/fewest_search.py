"""Branch and bound: is there a plan with at most so many people per crew, and which one?

:func:`find_plan` answers the decision question for a set of caps (people per crew per day):
a start for every movable activity that keeps every link and never books a crew above its cap
on a window day. It places activities in network order (every predecessor first), so each
activity's earliest start is known from the starts already chosen, and its latest start was
pulled in beforehand (see :mod:`fieldlog.lookahead.fewest_problem`) so that links never block
a later choice.

What keeps the search small:

* **must work is booked up front**: the load starts as the fixed work plus every movable
  activity's compulsory part (the days all its starts cover); placing an activity only adds
  the days its chosen run covers beyond that, and a day over its cap is pruned at once;
* **work without a crew goes as early as it can**: starting it later only raises its
  successors' earliest starts, so earlier is never worse (no branching);
* **least-loaded start first**: the starts of an activity are tried in order of the busiest
  day they would add to (then earliest), so the first descent is a good greedy plan;
* a **node budget**: every start tried counts; when the budget runs out the search stops and
  says so, so an answer always comes back fast. A search that ends inside its budget without a
  plan proves that none exists.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from enum import Enum

from fieldlog.lookahead.fewest_problem import Problem


class Outcome(Enum):
    """How a search ended."""

    FOUND = "found"
    NONE = "none"
    """Searched everything: no plan keeps the caps."""
    BUDGET = "budget"
    """Stopped at the node budget without a plan; nothing is proven."""


@dataclass(frozen=True)
class Search:
    """The result of one :func:`find_plan`."""

    outcome: Outcome
    starts: tuple[int, ...] | None
    """Start index (into each :attr:`Movable.starts`) per movable activity, when found."""
    nodes: int


def compulsory(run_first: tuple[int, ...], run_last: tuple[int, ...]) -> tuple[int, ...]:
    """Days every start covers: the overlap of the earliest and the latest run (runs of one
    activity are equally long and slide with the start, so those two bound all others)."""
    last = set(run_last)
    return tuple(d for d in run_first if d in last)


def find_plan(problem: Problem, caps: Mapping[str, int], budget: int) -> Search:
    """A plan that books no crew above ``caps`` on any window day, or why there is none.

    Args:
        problem: the movable work.
        caps: people per day per crew; a crew left out is not limited.
        budget: the most starts to try.
    """
    n = problem.days
    movables = problem.movables
    capped = [c for c in problem.crews if c in caps]
    load = {c: list(problem.fixed_load[c]) for c in capped}
    cap = {c: caps[c] for c in capped}
    # per activity: the capped crews it needs, the days beyond its compulsory part per start
    needs: list[list[tuple[str, int]]] = []
    extra: list[list[tuple[int, ...]]] = []
    for m in movables:
        need = [(c, k) for c, k in m.crew.items() if c in cap]
        needs.append(need)
        must = compulsory(m.runs[0], m.runs[-1])
        must_set = set(must)
        extra.append([tuple(d for d in run if d not in must_set) for run in m.runs])
        for c, k in need:
            for d in must:
                load[c][d] += k
    for c in capped:
        if any(v > cap[c] for v in load[c][:n]):
            return Search(Outcome.NONE, None, 0)

    ties_into: list[list[tuple[int, tuple[int, ...]]]] = [[] for _ in movables]
    for t in problem.ties:
        ties_into[t.succ].append((t.pred, t.floor))
    chosen = [0] * len(movables)
    nodes = 0

    def options(i: int) -> list[int]:
        m = movables[i]
        lo = m.starts[0]
        for pred, floor in ties_into[i]:
            lo = max(lo, floor[chosen[pred]])
        first = lo - m.starts[0]
        if not needs[i]:
            return [first]  # no crew: as early as it can
        scored = []
        for k in range(first, len(m.starts)):
            worst = 0
            ok = True
            for c, r in needs[i]:
                row, top = load[c], cap[c]
                for d in extra[i][k]:
                    v = row[d] + r
                    if v > top:
                        ok = False
                        break
                    worst = max(worst, v)
                if not ok:
                    break
            if ok:
                scored.append((worst, k))
        scored.sort()
        return [k for _, k in scored]

    def book(i: int, k: int, sign: int) -> None:
        for c, r in needs[i]:
            row = load[c]
            for d in extra[i][k]:
                row[d] += sign * r

    # Depth-first, iterative (a fortnight of a big site can hold thousands of activities,
    # deeper than Python's recursion limit).
    count = len(movables)
    tries: list[list[int]] = [[] for _ in range(count + 1)]
    at = [0] * (count + 1)
    i = 0
    if count:
        tries[0] = options(0)
    while 0 <= i < count:
        if at[i] < len(tries[i]):
            k = tries[i][at[i]]
            at[i] += 1
            if nodes == budget:
                return Search(Outcome.BUDGET, None, nodes)
            nodes += 1
            chosen[i] = k
            book(i, k, +1)
            i += 1
            if i < count:
                tries[i], at[i] = options(i), 0
        else:
            i -= 1
            if i >= 0:
                book(i, chosen[i], -1)
    if i == count:
        return Search(Outcome.FOUND, tuple(chosen), nodes)
    return Search(Outcome.NONE, None, nodes)
