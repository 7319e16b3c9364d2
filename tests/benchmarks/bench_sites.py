"""Benchmark: the office roll-up (`fieldlog sites`) and the SQLite export over 100 small sites.

Run as a script: ``.venv/bin/python tests/benchmarks/bench_sites.py [N]``. Every command is a
fresh process, as in the office. Prints wall times and ratios against a reference measured in
the same run on the same folders: a process that reads every site's TOML files with tomllib
and does nothing else (the cost of looking at the files at all). Cold = an empty fieldlog cache
folder; warm = the cache the cold run left. Target: `fieldlog sites` on 100 sites <= 5 s.
Data is invented (tests/helpers/office_sites.py).
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path[:0] = [str(ROOT), str(ROOT / "tests")]

from tests.helpers.office_sites import make_sites  # noqa: E402

REFERENCE = """
import sys, tomllib
from pathlib import Path
jobs = Path(sys.argv[1])
for p in sorted(jobs.glob("*/*.toml")) + sorted(jobs.glob("*/log/*.toml")):
    tomllib.loads(p.read_text(encoding="utf-8"))
"""


def run(argv: list[str], home: Path) -> float:
    env = dict(os.environ, FIELDLOG_HOME=str(home))
    t0 = time.perf_counter()
    done = subprocess.run(argv, env=env, capture_output=True, check=False)
    took = time.perf_counter() - t0
    if done.returncode not in (0, 1):
        raise SystemExit(f"{argv[:3]} failed: {done.stderr.decode()[:400]}")
    return took


def main() -> None:
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 100
    exe = [sys.executable, "-m", "fieldlog"]
    with tempfile.TemporaryDirectory() as tmp:
        base = Path(tmp)
        make_sites(base / "jobs", count, base / "gen-home")
        jobs, home, db = base / "jobs", base / "home", base / "office.db"
        ref = run([sys.executable, "-c", REFERENCE, str(jobs)], home)
        rows = [
            ("sites, cold cache", run([*exe, "sites", str(jobs)], home)),
            ("sites, warm cache", run([*exe, "sites", str(jobs)], home)),
            ("export, new database", run([*exe, "export", str(jobs), "--sqlite", str(db)], home)),
            (
                "export, nothing changed",
                run([*exe, "export", str(jobs), "--sqlite", str(db)], home),
            ),
        ]
    print(f"{count} sites; reference (tomllib read of every file, one process): {ref:.2f} s")
    for name, took in rows:
        print(f"  {name:<26} {took:6.2f} s   {took / ref:5.1f}x reference")
    worst = max(t for name, t in rows if name.startswith("sites"))
    print(f"fieldlog sites: {'OK' if worst <= 5 else 'OVER'} the 5 s target ({worst:.2f} s)")


QUICK_ARGS = ("10",)  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    main()
