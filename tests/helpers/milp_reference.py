"""The fewest-people problem as a 0-1 program, solved by scipy's MILP solver (HiGHS).

Run as a child process by tests/test_fewest_milp.py (JSON in on stdin, JSON out on stdout) so
that scipy is never loaded into the test process: a child forked from a bigger parent reports
a bigger peak memory, and other tests measure their children's.

    x[i, k] = 1 when activity i takes its k-th start; sum_k x[i, k] = 1;
    for each link: sum_k start_s[k] x[s, k] >= sum_k floor[k] x[p, k];
    for each crew and window day: fixed load + sum r_i x[i, k] (k's run works that day) <= cap,
    the crew asked about with cap P, which is minimised.

scipy.optimize.milp with integrality and bounds as in the scipy 1.17 documentation.
"""

from __future__ import annotations

import json
import sys

import numpy as np
from scipy import optimize, sparse


def minimum(problem: dict, crew: str, caps: dict[str, int]) -> int:
    """The smallest peak of ``crew`` with every other crew within ``caps``."""
    movables, ties, days, crews = (
        problem["movables"],
        problem["ties"],
        problem["days"],
        problem["crews"],
    )
    index = [(i, k) for i, m in enumerate(movables) for k in range(len(m["starts"]))]
    col = {v: j for j, v in enumerate(index)}
    peak = len(index)
    a = sparse.lil_matrix((len(movables) + len(ties) + days * len(crews), peak + 1))
    lo: list[float] = []
    hi: list[float] = []
    r = 0
    for i, m in enumerate(movables):
        for k in range(len(m["starts"])):
            a[r, col[(i, k)]] = 1
        lo.append(1)
        hi.append(1)
        r += 1
    for pred, succ, floor in ties:
        for k, s in enumerate(movables[succ]["starts"]):
            a[r, col[(succ, k)]] += s
        for k, f in enumerate(floor):
            a[r, col[(pred, k)]] -= f
        lo.append(0)
        hi.append(np.inf)
        r += 1
    for c in crews:
        for d in range(days):
            for i, m in enumerate(movables):
                rate = m["crew"].get(c, 0)
                for k, run in enumerate(m["runs"]):
                    if rate and d in run:
                        a[r, col[(i, k)]] += rate
            fixed = problem["fixed"][c][d]
            if c == crew:
                a[r, peak] = -1
                limit = -fixed
            else:
                limit = caps[c] - fixed
            lo.append(-np.inf)
            hi.append(limit)
            r += 1
    cost = np.zeros(peak + 1)
    cost[peak] = 1
    res = optimize.milp(
        cost,
        constraints=optimize.LinearConstraint(a.tocsr(), lo, hi),
        integrality=np.ones(peak + 1),
        bounds=optimize.Bounds(np.zeros(peak + 1), np.r_[np.ones(peak), np.inf]),
    )
    if res.status != 0:
        raise RuntimeError(f"HiGHS did not solve it: {res.message}")
    return round(res.fun)


if __name__ == "__main__":
    jobs = json.load(sys.stdin)
    json.dump([minimum(j["problem"], j["crew"], j["caps"]) for j in jobs], sys.stdout)
