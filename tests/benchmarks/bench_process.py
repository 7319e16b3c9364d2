"""Benchmark: the whole ``fieldlog schedule`` process against a tomllib + networkx process.

Run as a script (not collected by pytest)::

    .venv/bin/python tests/benchmarks/bench_process.py            # 10,000 activities
    .venv/bin/python tests/benchmarks/bench_process.py 2000 10000 # other sizes

For each size it writes a synthetic site folder and times, best of 5 and interleaved so that
a busy machine slows every contender alike:

* the reference: a process that only parses the two TOML files with tomllib and asks networkx
  for the longest path (the same reference as bench_cpm.py);
* ``fieldlog schedule SITE --format json`` and ``--format text``, each with a cold cache
  (a fresh, empty ``FIELDLOG_HOME`` every run: parse, validate, store) and a warm one (the
  validated site already in the cache, as on every command after the first of a revision).

It prints each time and the ratio reference/fieldlog (above 1.00x: fieldlog is faster).
Target: warm, at 10,000 activities, no slower than the reference (ratio >= 1.00x).
It also checks that cold and warm runs print the same bytes.
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_cpm import REFERENCE_PROCESS  # noqa: E402  (the same reference as bench_cpm)
from synthetic import synthetic_site, write_site_folder  # noqa: E402

REPEATS = 5


def timed(cmd: list[str], home: Path) -> tuple[float, bytes]:
    """Wall time of one process run with ``FIELDLOG_HOME=home``, and its stdout."""
    env = {**os.environ, "FIELDLOG_HOME": str(home)}
    t0 = time.perf_counter()
    out = subprocess.run(cmd, check=True, capture_output=True, env=env).stdout
    return time.perf_counter() - t0, out


def bench(n: int, tmp: Path) -> dict[str, float]:
    folder = write_site_folder(synthetic_site(n), tmp / f"site{n}")
    ref_cmd = [sys.executable, "-c", REFERENCE_PROCESS, str(folder)]
    ours = {
        fmt: [sys.executable, "-m", "fieldlog", "schedule", str(folder), "--format", fmt]
        for fmt in ("json", "text")
    }
    warm_home = tmp / "home-warm"
    printed = {fmt: timed(cmd, warm_home)[1] for fmt, cmd in ours.items()}  # fills the cache
    best: dict[str, float] = {}

    def keep(name: str, seconds: float) -> None:
        best[name] = min(best.get(name, float("inf")), seconds)

    for r in range(REPEATS):
        keep("reference", timed(ref_cmd, warm_home)[0])
        for fmt, cmd in ours.items():
            seconds, out = timed(cmd, tmp / f"home-cold-{n}-{fmt}-{r}")
            assert out == printed[fmt], f"cold {fmt} output differs from warm"
            keep(f"{fmt} cold", seconds)
            seconds, out = timed(cmd, warm_home)
            assert out == printed[fmt], f"warm {fmt} output differs"
            keep(f"{fmt} warm", seconds)
    ref = best["reference"]
    print(f"{n} activities, best of {REPEATS}: tomllib + networkx reference {ref * 1e3:6.0f} ms")
    for name in ("json cold", "json warm", "text cold", "text warm"):
        print(
            f"  fieldlog schedule --format {name:<9} {best[name] * 1e3:6.0f} ms   "
            f"reference/fieldlog {ref / best[name]:4.2f}x"
        )
    return best


def main(argv: list[str]) -> None:
    sizes = [int(a) for a in argv] or [10_000]
    with tempfile.TemporaryDirectory() as tmp:
        results = {n: bench(n, Path(tmp)) for n in sizes}
    if 10_000 in results:
        b = results[10_000]
        worst = max(b["json warm"], b["text warm"])
        verdict = "met" if worst <= b["reference"] else "MISSED"
        print(
            f"target at 10k (warm cache no slower than the reference): {verdict} "
            f"({b['reference'] / worst:.2f}x for the slower format)"
        )


QUICK_ARGS = ("1000",)  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    main(sys.argv[1:])
