"""Benchmark: whole ``fieldlog`` processes on a signed log, with the journal cache cold and warm.

Run as a script (not collected by pytest)::

    .venv/bin/python tests/benchmarks/bench_journal_cache.py            # 3 months and 2 years
    .venv/bin/python tests/benchmarks/bench_journal_cache.py 500        # one length only

For each log length (working days; 63 is about three months, 500 about two years) a site
folder is generated with the 116-activity sample network and a signed log of 40 entries a
working day from two devices (tests/benchmarks/journal_logs.py; invented data). Then, as
separate processes, each timed from start to exit:

* ``verify`` with the cache emptied before every run (cold), with it filled and the site
  unchanged (warm: the kept report), and right after one more entry was recorded (+1 entry:
  the per-file checks are kept, the log is loaded and replayed again);
* ``history`` (every logged day) and ``record`` (one note appended) with the cache warm;
* the reference, in the same run and paired with every measurement: a process that reads
  the same day files and parses them with ``tomllib`` only (no checks, no signatures).

Each figure is the median of 5 paired runs, printed with its ratio to the reference; with
both lengths, the last lines say how each grows from the first length to the second.
Targets on the two-year log: record <= 0.15 s, verify warm <= 0.5 s, history <= 3 s.
Python writes its byte code here as an installed fieldlog would (``PYTHONDONTWRITEBYTECODE``
is cleared for the child processes), so import time is what a user sees.
"""

from __future__ import annotations

import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from journal_logs import signed_log  # noqa: E402

RUNS = 5
TOMLLIB_ONLY = (
    "import sys, tomllib, pathlib\n"
    "for p in sorted(pathlib.Path(sys.argv[1], 'log').glob('*.toml')):\n"
    "    tomllib.loads(p.read_text(encoding='utf-8'))\n"
)
QUICK_ARGS = ("20",)  # tests/benchmarks/run.py --quick
TARGETS = {"record": 0.15, "verify warm": 0.5, "history": 3.0}


def timed(args: list[str], env: dict[str, str]) -> float:
    t = time.perf_counter()
    done = subprocess.run(args, env=env, capture_output=True, check=False)
    took = time.perf_counter() - t
    if done.returncode != 0:
        raise SystemExit(f"{' '.join(args)} failed: {done.stderr.decode()[-400:]}")
    return took


def case(days: int) -> dict[str, tuple[float, float]]:
    with tempfile.TemporaryDirectory() as tmp:
        site = Path(tmp) / "site"
        n = signed_log(site, days)
        home = Path(tmp) / "home"
        env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        env["FIELDLOG_HOME"] = str(home)
        fieldlog = [sys.executable, "-m", "fieldlog"]
        reference = [sys.executable, "-c", TOMLLIB_ONLY, str(site)]
        record_site = Path(tmp) / "record"
        shutil.copytree(site, record_site)
        note = ["note", "set-out checked", "--author", "Bench Foreman"]
        commands = {
            "verify cold": [*fieldlog, "verify", str(site)],
            "verify warm": [*fieldlog, "verify", str(site)],
            "verify +1 entry": [*fieldlog, "verify", str(record_site)],
            "history": [*fieldlog, "history", str(site)],
            "record": [*fieldlog, "record", str(record_site), *note],
        }
        one_more = [*fieldlog, "record", str(record_site), *note]
        for args in commands.values():  # byte code written, caches filled
            timed(args, env)
        results: dict[str, tuple[float, float]] = {}
        for name, args in commands.items():
            mine, ref = [], []
            for _ in range(RUNS):
                if name == "verify cold":
                    shutil.rmtree(home / "cache", ignore_errors=True)
                if name == "verify +1 entry":
                    timed(one_more, env)
                ref.append(timed(reference, env))
                mine.append(timed(args, env))
            results[name] = (statistics.median(mine), statistics.median(ref))
        print(f"[{days} working days] {n} signed entries in {len(list(site.glob('log/*')))} files")
        for name, (mine, ref) in results.items():
            target = TARGETS.get(name)
            verdict = ""
            if target is not None and days >= 500:
                verdict = f"  target <= {target:g} s: {'ok' if mine <= target else 'MISSED'}"
            print(
                f"  {name:<15} {mine:6.2f} s   tomllib-only read {ref:5.2f} s   "
                f"ratio {mine / ref:5.2f}x{verdict}"
            )
        return results


def growth(lengths: list[int], runs: list[dict[str, tuple[float, float]]]) -> None:
    """How each command grows from the first length to the last, beside the reference."""
    first, last = runs[0], runs[-1]
    print(f"[growth {lengths[0]} -> {lengths[-1]} working days]")
    for name, (mine, ref) in last.items():
        was, was_ref = first[name]
        print(
            f"  {name:<15} x{mine / was:5.2f} ({was:5.2f} -> {mine:5.2f} s); "
            f"tomllib-only read x{ref / was_ref:5.2f}"
        )


if __name__ == "__main__":
    lengths = [int(a) for a in sys.argv[1:]] or [63, 500]
    runs = [case(length) for length in lengths]
    if len(runs) > 1:
        growth(lengths, runs)
