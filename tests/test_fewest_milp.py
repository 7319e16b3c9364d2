"""Fewest people on windows too big to enumerate, against scipy's MILP solver (HiGHS).

The brute force in tests/test_fewest_people.py checks what may move and where (the problem)
as well as the answer, but only on a handful of activities. Here the same problem, as built by
fieldlog.lookahead.fewest_problem (every start each movable activity may take, the window
days each start works, every link as "this predecessor start needs that successor start or
later"), is handed to an outside solver as a 0-1 program:

    x[i, k] = 1 when activity i takes its k-th start; sum_k x[i, k] = 1;
    for each link: sum_k start_s[k] x[s, k] >= sum_k floor[k] x[p, k];
    for each crew and window day: fixed load + sum r_i x[i, k] (k's run works that day) <= cap.

scipy.optimize.milp (HiGHS; scipy 1.17 docs: "milp ... integrality ... bounds ...
constraints") minimises the crew's peak P. Checked, crew by crew in the order answered, under
the same limits fieldlog keeps (crews already answered at their answers, the others within
their headcount or early peak):

* the answer is never below the solver's optimum (it would have to break a limit);
* the lower bound is never above it;
* an answer marked optimal equals it.
"""

from __future__ import annotations

import random
from datetime import date, timedelta

import numpy as np
import pytest
from test_lookahead_oracle import act, make_site

from fieldlog.cpm import compute_schedule
from fieldlog.lookahead import build_lookahead
from fieldlog.lookahead.fewest_problem import Problem, build_problem
from fieldlog.model import Link

optimize = pytest.importorskip("scipy.optimize")
sparse = pytest.importorskip("scipy.sparse")

START = date(2026, 3, 2)


def busy_site(seed: int, n: int = 24):
    """An invented yard: ``n`` jobs of 2-5 days for two crews (some need both), sparse
    finish-to-start links, a required finish two to four weeks out."""
    rng = random.Random(seed)
    acts = []
    for k in range(n):
        crew = {"formers": rng.randint(1, 6)}
        if rng.random() < 0.3:
            crew["fixers"] = rng.randint(1, 4)
        acts.append(act(f"J{k:02d}", rng.randint(2, 5), crew=crew))
    links = [Link(f"J{i:02d}", f"J{j:02d}") for j in range(n) for i in range(j)
             if rng.random() < 0.04]
    return make_site(acts, links, crews={"formers": 30, "fixers": 8}, start=START,
                     finish_by=START + timedelta(days=rng.randint(12, 26)))


def milp_minimum(problem: Problem, crew: str, caps: dict[str, int]) -> int:
    """The smallest peak of ``crew`` under ``caps`` for the other crews, by HiGHS."""
    index = [(i, k) for i, m in enumerate(problem.movables) for k in range(len(m.starts))]
    col = {v: j for j, v in enumerate(index)}
    peak = len(index)
    rows = len(problem.movables) + len(problem.ties) + problem.days * len(problem.crews)
    a = sparse.lil_matrix((rows, peak + 1))
    lo, hi = [], []
    r = 0
    for i, m in enumerate(problem.movables):
        for k in range(len(m.starts)):
            a[r, col[(i, k)]] = 1
        lo.append(1)
        hi.append(1)
        r += 1
    for t in problem.ties:
        for k, s in enumerate(problem.movables[t.succ].starts):
            a[r, col[(t.succ, k)]] += s
        for k, f in enumerate(t.floor):
            a[r, col[(t.pred, k)]] -= f
        lo.append(0)
        hi.append(np.inf)
        r += 1
    for c in problem.crews:
        for d in range(problem.days):
            for i, m in enumerate(problem.movables):
                for k, run in enumerate(m.runs):
                    if d in run and m.crew.get(c):
                        a[r, col[(i, k)]] += m.crew[c]
            if c == crew:
                a[r, peak] = -1
                limit = -problem.fixed_load[c][d]
            else:
                limit = caps[c] - problem.fixed_load[c][d]
            lo.append(-np.inf)
            hi.append(limit)
            r += 1
    cost = np.zeros(peak + 1)
    cost[peak] = 1
    res = optimize.milp(cost, constraints=optimize.LinearConstraint(a.tocsr(), lo, hi),
                        integrality=np.ones(peak + 1),
                        bounds=optimize.Bounds(np.zeros(peak + 1),
                                               np.r_[np.ones(peak), np.inf]))
    assert res.status == 0, res.message
    return round(res.fun)


@pytest.mark.parametrize("seed", [1, 3, 4])
def test_answers_against_the_milp_optimum(seed: int) -> None:
    site = busy_site(seed)
    result = compute_schedule(site, START - timedelta(days=1))
    la = build_lookahead(result, suggest_levelling=False)
    assert la.fewest is not None
    problem = build_problem(result, la.days, la.rows)
    early = {load.crew: max(load.early, default=0) for load in la.crews}
    caps = {c: max(site.crews[c].available, early[c]) for c in site.crews}
    for answer in la.fewest.crews:
        best = milp_minimum(problem, answer.crew, caps)
        assert answer.bound.people <= best <= answer.peak, answer.crew
        if answer.optimal:
            assert answer.peak == best, answer.crew
        caps[answer.crew] = answer.peak
