"""Repair search: slide single starts until no day is over its cap (the heuristic half).

The branch and bound of :mod:`fieldlog.lookahead.fewest_search` places work in network order
and proves answers on small windows, but on a busy fortnight its first choices can be wrong in
ways it only finds out much deeper. This search starts from a plan that keeps every link (the
best one so far) and repairs it instead: it takes the most overbooked day, and among the
activities working that day moves the one whose new start removes the most overbooking,
within the starts its neighbours allow right now (after each predecessor's bound, before each
successor's). Moves that make nothing worse are allowed so it can walk along a plateau; a
fixed-seed random choice breaks ties and, now and then, picks a move at random, so the same
site always gives the same plan.

It never proves anything: a failed repair only means "not found". Every start it weighs counts
against the same node budget as the branch and bound.
"""

from __future__ import annotations

import random
from collections.abc import Mapping, Sequence

from fieldlog.lookahead.fewest_problem import Problem

RANDOM_MOVE = 0.1
"""Share of steps that take a random improving-or-not move, to leave a local minimum."""
SEED = 20_260_301


def repair(
    problem: Problem, caps: Mapping[str, int], plan: Sequence[int], budget: int, round_no: int = 0
) -> tuple[tuple[int, ...] | None, int]:
    """A plan within ``caps`` found by sliding starts from ``plan``, and the starts weighed.

    ``round_no`` varies the fixed seed, so a retry walks another way. Returns
    ``(None, weighed)`` when the budget ran out first.
    """
    movables = problem.movables
    crews = [c for c in problem.crews if c in caps]
    cap = {c: caps[c] for c in crews}
    chosen = list(plan)
    load = {c: list(problem.fixed_load[c]) for c in crews}
    for m, k in zip(movables, chosen, strict=True):
        for c, r in m.crew.items():
            if c in cap:
                for d in m.runs[k]:
                    load[c][d] += r
    into: list[list[tuple[int, tuple[int, ...]]]] = [[] for _ in movables]
    out: list[list[tuple[int, tuple[int, ...]]]] = [[] for _ in movables]
    for t in problem.ties:
        into[t.succ].append((t.pred, t.floor))
        out[t.pred].append((t.succ, t.floor))
    needs = [[(c, r) for c, r in m.crew.items() if c in cap] for m in movables]
    by_crew = {c: [i for i, m in enumerate(movables) if needs[i] and c in m.crew] for c in crews}
    rng = random.Random(SEED + round_no)
    weighed = 0

    def delta(i: int, k_from: int, k_to: int) -> int:
        """Change in total overbooking when activity ``i`` goes from start ``k_from`` to
        ``k_to``."""
        old, new = set(movables[i].runs[k_from]), set(movables[i].runs[k_to])
        change = 0
        for c, r in needs[i]:
            row, top = load[c], cap[c]
            for d in old - new:
                change += max(0, row[d] - r - top) - max(0, row[d] - top)
            for d in new - old:
                change += max(0, row[d] + r - top) - max(0, row[d] - top)
        return change

    def allowed(i: int) -> range:
        m = movables[i]
        lo = m.starts[0]
        for pred, floor in into[i]:
            lo = max(lo, floor[chosen[pred]])
        first = lo - m.starts[0]
        last = len(m.starts) - 1
        for succ, floor in out[i]:
            at = movables[succ].starts[chosen[succ]]
            while last > first and floor[last] > at:
                last -= 1
        return range(first, last + 1)

    while True:
        worst = None
        for c in crews:
            for d, v in enumerate(load[c]):
                if v > cap[c] and (worst is None or v - cap[c] > worst[0]):
                    worst = (v - cap[c], c, d)
        if worst is None:
            return tuple(chosen), weighed
        _, crew, day = worst
        moves = []
        for i in by_crew[crew]:
            k = chosen[i]
            if day not in movables[i].runs[k]:
                continue
            for k_to in allowed(i):
                if k_to != k:
                    if weighed == budget:
                        return None, weighed
                    weighed += 1
                    moves.append((delta(i, k, k_to), rng.random(), i, k_to))
        if not moves:
            return None, weighed
        if rng.random() < RANDOM_MOVE:
            _, _, i, k_to = rng.choice(moves)
        else:
            best = min(moves)
            if best[0] > 0:
                _, _, i, k_to = rng.choice(moves)  # stuck: shake it up
            else:
                _, _, i, k_to = best
        k = chosen[i]
        for c, r in needs[i]:
            for d in movables[i].runs[k]:
                load[c][d] -= r
            for d in movables[i].runs[k_to]:
                load[c][d] += r
        chosen[i] = k_to
