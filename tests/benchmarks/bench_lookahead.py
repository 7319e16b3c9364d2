"""Benchmark: the two-week lookahead for a 10,000-activity site, against the CPM recompute.

Run as a script (not collected by pytest)::

    .venv/bin/python tests/benchmarks/bench_lookahead.py          # 10k activities
    .venv/bin/python tests/benchmarks/bench_lookahead.py 50000    # another size

The site is :mod:`synthetic`'s layered network with crews added (four invented crews, one to
six people per activity), stood mid-job: everything the plan had finished by the status date is
recorded finished, everything under way is in progress with its remaining days. Every timing is
the best of several runs; the reference is the CPM recompute of the same site with its
per-activity rows built (the engine defers them until first read, and the lookahead reads
them), measured in the same run, so the ratios hold on a slow or busy machine.

Target: the lookahead (classification, reasons, crew load and the levelling suggestion) for
10,000 activities in under 100 ms.
"""

from __future__ import annotations

import dataclasses
import random
import sys
import time
from collections.abc import Callable
from datetime import timedelta
from pathlib import Path
from types import MappingProxyType

sys.path.insert(0, str(Path(__file__).resolve().parent))
from synthetic import START, synthetic_site  # noqa: E402

from fieldlog.engine.compiled import compile_site  # noqa: E402
from fieldlog.engine.cpm import compute_schedule  # noqa: E402
from fieldlog.engine.progress import Progress, Status  # noqa: E402
from fieldlog.lookahead import build_lookahead  # noqa: E402
from fieldlog.reports.lookahead_data import render_csv, render_json  # noqa: E402
from fieldlog.reports.lookahead_text import render_text  # noqa: E402
from fieldlog.site.model import Crew, Site  # noqa: E402

CREWS = {"groundworks": 40, "concrete": 30, "carpenters": 30, "steelfixers": 25}
TARGET_MS = 100.0


def best_of(n: int, run: Callable[[], object]) -> tuple[float, float]:
    """Best wall time and best CPU time of ``n`` runs, in milliseconds.

    On a busy 2-core machine the wall time includes waiting for a core; the CPU time of this
    process does not, so both are shown.
    """
    wall = cpu = float("inf")
    for _ in range(n):
        t0, c0 = time.perf_counter(), time.process_time()
        run()
        wall = min(wall, time.perf_counter() - t0)
        cpu = min(cpu, time.process_time() - c0)
    return wall * 1000, cpu * 1000


def crewed_site(n: int) -> Site:
    """The synthetic site with a crew on every activity that takes time."""
    site = synthetic_site(n)
    rng = random.Random(11)
    names = list(CREWS)
    acts = []
    for a in site.activities:
        crew = {rng.choice(names): rng.randint(1, 6)} if a.duration else {}
        acts.append(dataclasses.replace(a, crew=MappingProxyType(crew)))
    return dataclasses.replace(
        site,
        activities=tuple(acts),
        crews=MappingProxyType({c: Crew(c, k) for c, k in CREWS.items()}),
    )


def mid_job_progress(site: Site, status) -> dict[str, Progress]:
    """Progress as if the plan had been followed up to ``status``."""
    plan = compute_schedule(site, START - timedelta(days=1))
    progress = {}
    for r in plan.activities:
        if r.early_finish <= status:
            progress[r.id] = Progress(actual_start=r.early_start, actual_finish=r.early_finish)
        elif r.early_start <= status:
            cal = plan.calendars[r.calendar]
            left = cal.count(status + timedelta(days=1), r.early_finish + timedelta(days=1))
            progress[r.id] = Progress(
                actual_start=r.early_start, remaining=max(left, 1), remaining_as_of=status
            )
    return progress


def mid_job(n: int):
    """The crewed site of ``n`` activities stood 90 days in: site, status, progress, result."""
    site = crewed_site(n)
    status = START + timedelta(days=90)
    progress = mid_job_progress(site, status)
    return site, status, progress, compute_schedule(site, status, progress)


def main(argv: list[str]) -> None:
    n = int(argv[1]) if len(argv) > 1 else 10_000
    site, status, progress, result = mid_job(n)
    la = build_lookahead(result)
    open_rows = len(la.rows)
    running = sum(1 for r in result.activities if r.status is Status.IN_PROGRESS)
    shown = sum(1 for r in la.rows if r.active)
    lev = la.levelling
    print(
        f"{n} activities, status {status}: {open_rows} open ({running} in progress), "
        f"{shown} with MUST/MAY days in the window"
    )
    if lev is not None:
        print(
            f"levelling: crews over {', '.join(lev.crews)}; {len(lev.moves)} moves, "
            f"{lev.passes} passes, sum of squares {lev.sum_of_squares_before} -> "
            f"{lev.sum_of_squares_after}"
        )

    reps = 15
    site = compile_site(site)  # compiled once, as the workspace does
    passes = best_of(reps, lambda: compute_schedule(site, status, progress))
    cpm = best_of(reps, lambda: compute_schedule(site, status, progress).activities[0])
    plain = best_of(reps, lambda: build_lookahead(result, suggest_levelling=False))
    full = best_of(reps, lambda: build_lookahead(result))
    both = best_of(reps, lambda: build_lookahead(compute_schedule(site, status, progress)))
    text = best_of(reps, lambda: render_text(la, 80))
    wide = best_of(reps, lambda: render_text(la, 132))
    js = best_of(reps, lambda: render_json(la))
    cs = best_of(reps, lambda: render_csv(la))
    rows = [
        ("CPM passes (rows deferred)", passes),
        ("CPM with rows (reference)", cpm),
        ("lookahead, no levelling", plain),
        ("lookahead with levelling", full),
        ("CPM + lookahead, fresh", both),
        ("text sheet, 80 columns", text),
        ("text sheet, 132 columns", wide),
        ("json", js),
        ("csv", cs),
    ]
    print(f"{'step':<28} {'wall ms':>8} {'x CPM':>7} {'cpu ms':>8} {'x CPM':>7}")
    for label, (wall, cpu) in rows:
        print(f"{label:<28} {wall:8.1f} {wall / cpm[0]:7.2f} {cpu:8.1f} {cpu / cpm[1]:7.2f}")
    verdict = "OK" if full[0] < TARGET_MS else "OVER"
    print(
        f"target: lookahead with levelling under {TARGET_MS:.0f} ms for {n} activities: "
        f"{full[0]:.1f} ms wall ({full[1]:.1f} ms cpu) {verdict}"
    )


QUICK_ARGS = ("2000",)  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    main(sys.argv)
