"""Fewest people on windows too big to enumerate, against scipy's MILP solver (HiGHS).

The brute force in tests/test_fewest_people.py checks what may move and where (the problem)
as well as the answer, but only on a handful of activities. Here the same problem, as built by
fieldlog.lookahead.fewest_problem, is handed to an outside solver as a 0-1 program
(tests/helpers/milp_reference.py, run in a child process). Checked, crew by crew in the order
answered, under the same limits fieldlog keeps (crews already answered at their answers, the others
within their headcount or early peak):

* the answer is never below the solver's optimum (it would have to break a limit);
* the lower bound is never above it;
* an answer marked optimal equals it.
"""

from __future__ import annotations

import importlib.util
import json
import random
import subprocess
import sys
from datetime import date, timedelta
from pathlib import Path

import pytest
from test_lookahead_oracle import act, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.lookahead import build_lookahead
from fieldlog.lookahead.fewest_problem import Problem, build_problem
from fieldlog.site.model import Link

pytestmark = pytest.mark.skipif(
    importlib.util.find_spec("scipy") is None, reason="scipy (test extra) is not installed"
)
REFERENCE = Path(__file__).parent / "helpers" / "milp_reference.py"
SEEDS = (1, 3, 4)

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
    links = [
        Link(f"J{i:02d}", f"J{j:02d}") for j in range(n) for i in range(j) if rng.random() < 0.04
    ]
    return make_site(
        acts,
        links,
        crews={"formers": 30, "fixers": 8},
        start=START,
        finish_by=START + timedelta(days=rng.randint(12, 26)),
    )


def as_json(problem: Problem) -> dict:
    return {
        "days": problem.days,
        "crews": list(problem.crews),
        "fixed": {c: list(v) for c, v in problem.fixed_load.items()},
        "movables": [
            {"crew": dict(m.crew), "starts": list(m.starts), "runs": [list(r) for r in m.runs]}
            for m in problem.movables
        ],
        "ties": [[t.pred, t.succ, list(t.floor)] for t in problem.ties],
    }


def test_answers_against_the_milp_optimum() -> None:
    jobs, answers = [], []
    for seed in SEEDS:
        site = busy_site(seed)
        result = compute_schedule(site, START - timedelta(days=1))
        la = build_lookahead(result, suggest_levelling=False)
        assert la.fewest is not None
        problem = as_json(build_problem(result, la.days, la.rows))
        early = {load.crew: max(load.early, default=0) for load in la.crews}
        caps = {c: max(site.crews[c].available, early[c]) for c in site.crews}
        for answer in la.fewest.crews:
            jobs.append({"problem": problem, "crew": answer.crew, "caps": dict(caps)})
            answers.append((seed, answer))
            caps[answer.crew] = answer.peak
    done = subprocess.run(
        [sys.executable, str(REFERENCE)],
        input=json.dumps(jobs),
        capture_output=True,
        text=True,
        timeout=120,
        check=True,
    )
    for (seed, answer), best in zip(answers, json.loads(done.stdout), strict=True):
        assert answer.bound.people <= best <= answer.peak, (seed, answer.crew)
        if answer.optimal:
            assert answer.peak == best, (seed, answer.crew)
