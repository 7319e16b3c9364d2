"""Benchmark: whole ``fieldlog`` processes against reference processes measured in the same run.

Run as a script (not collected by pytest)::

    .venv/bin/python tests/benchmarks/bench_process.py             # 10,000 activities
    .venv/bin/python tests/benchmarks/bench_process.py 2000 10000  # other sizes
    .venv/bin/python tests/benchmarks/bench_process.py --200k      # time, peak memory, stages
    .venv/bin/python tests/benchmarks/bench_process.py --startup   # the sample site vs numpy

Every figure is the median of 5 paired rounds: each round runs the reference and then every
contender, so a busy machine slows all of them alike, and the ratio is fieldlog's median time
over the reference's median time from the same run (below 1.00x: fieldlog is faster).

* sizes: the reference is a process that only parses the two TOML files with tomllib and asks
  networkx for the longest path (the same reference as bench_cpm.py); the contenders are
  ``fieldlog schedule`` and ``fieldlog lookahead``, each with a cold cache (a fresh, empty
  ``FIELDLOG_HOME`` every run: parse, validate, store) and a warm one (the validated site
  already cached, as on every command after the first of a revision). Target at 10,000:
  every one <= 0.50x. Cold and warm runs must print the same bytes.
* ``--200k``: ``fieldlog schedule`` on 200,000 activities, cold and warm, with each process's
  peak memory (``ru_maxrss`` from ``wait4``); targets 4 s and 400 MB. Then, in this process,
  the time of each stage: read, parse, validate, compile, passes, rows, render.
* ``--startup``: ``fieldlog schedule`` on the sample site against ``python -c "import numpy"``;
  target <= 1.50x.
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
sys.path.insert(0, str(HERE))
from bench_cpm import REFERENCE_PROCESS  # noqa: E402  (the same reference as bench_cpm)
from synthetic import synthetic_site, write_site_folder  # noqa: E402

ROUNDS = 5
SAMPLE = ROOT / "sample_sites" / "kestrel-yard"


def run_with_peak(cmd: list[str], home: Path) -> tuple[float, bytes, float]:
    """Wall time, stdout and peak memory (MB, the child's own, from ``wait4``) of one run."""
    # Byte code is written and read, as for an installed fieldlog (and as numpy's own is):
    # with PYTHONDONTWRITEBYTECODE inherited, every fieldlog run compiled all its modules.
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    env["FIELDLOG_HOME"] = str(home)
    t0 = time.perf_counter()
    with tempfile.TemporaryFile() as out_file:
        child = subprocess.Popen(cmd, stdout=out_file, stderr=subprocess.DEVNULL, env=env)
        _, status, usage = os.wait4(child.pid, 0)
        seconds = time.perf_counter() - t0
        child.returncode = os.waitstatus_to_exitcode(status)
        if child.returncode != 0:
            raise SystemExit(f"{' '.join(cmd)} exited {child.returncode}")
        out_file.seek(0)
        return seconds, out_file.read(), usage.ru_maxrss / 1024


def paired(
    contenders: dict[str, Callable[[int], tuple[float, float]]], rounds: int = ROUNDS
) -> dict[str, tuple[float, float]]:
    """Median seconds and peak MB of each contender, run in turn in each of ``rounds``."""
    times: dict[str, list[float]] = {name: [] for name in contenders}
    peaks: dict[str, list[float]] = {name: [] for name in contenders}
    for r in range(rounds):
        for name, run in contenders.items():
            seconds, peak = run(r)
            times[name].append(seconds)
            peaks[name].append(peak)
    return {n: (statistics.median(times[n]), max(peaks[n])) for n in contenders}


def fieldlog_cmd(command: str, folder: Path, *extra: str) -> list[str]:
    return [sys.executable, "-m", "fieldlog", command, str(folder), *extra]


def bench_size(n: int, tmp: Path) -> dict[str, float]:
    """Reference vs schedule/lookahead, cold and warm, at ``n`` activities; ratios by name."""
    folder = write_site_folder(synthetic_site(n), tmp / f"site{n}")
    warm_home = tmp / f"home-warm-{n}"
    commands = {
        "schedule": fieldlog_cmd("schedule", folder, "--format", "json"),
        "lookahead": fieldlog_cmd("lookahead", folder, "--format", "json"),
    }
    printed = {name: run_with_peak(cmd, warm_home)[1] for name, cmd in commands.items()}

    def ours(name: str, warm: bool) -> Callable[[int], tuple[float, float]]:
        def run(r: int) -> tuple[float, float]:
            home = warm_home if warm else tmp / f"home-cold-{n}-{name}-{r}"
            seconds, out, peak = run_with_peak(commands[name], home)
            assert out == printed[name], (
                f"{name} printed other bytes ({'warm' if warm else 'cold'})"
            )
            return seconds, peak

        return run

    ref_cmd = [sys.executable, "-c", REFERENCE_PROCESS, str(folder)]
    contenders: dict[str, Callable[[int], tuple[float, float]]] = {
        "reference": lambda r: _drop_out(run_with_peak(ref_cmd, warm_home)),
    }
    for name in commands:
        contenders[f"{name} cold"] = ours(name, warm=False)
        contenders[f"{name} warm"] = ours(name, warm=True)
    result = paired(contenders)
    ref = result["reference"][0]
    print(f"{n} activities, medians of {ROUNDS} paired rounds:")
    print(f"  tomllib + networkx reference        {ref * 1e3:7.0f} ms")
    ratios = {}
    for name, (seconds, peak) in result.items():
        if name == "reference":
            continue
        ratios[name] = seconds / ref
        print(
            f"  fieldlog {name:<15} {seconds * 1e3:7.0f} ms  {peak:5.0f} MB   "
            f"fieldlog/reference {ratios[name]:4.2f}x"
        )
    return ratios


def _drop_out(measured: tuple[float, bytes, float]) -> tuple[float, float]:
    return measured[0], measured[2]


def bench_200k(tmp: Path) -> None:
    """200,000 activities: whole-process time and peak memory, then the stages in-process."""
    n = 200_000
    folder = write_site_folder(synthetic_site(n), tmp / "site200k")
    size_mb = (folder / "schedule.toml").stat().st_size / 1e6
    cmd = fieldlog_cmd("schedule", folder)
    warm_home = tmp / "home-warm-200k"
    run_with_peak(cmd, warm_home)  # fills the cache
    ref_cmd = [sys.executable, "-c", REFERENCE_PROCESS, str(folder)]
    rounds = 3
    result = paired(
        {
            "reference": lambda r: _drop_out(run_with_peak(ref_cmd, warm_home)),
            "schedule cold": lambda r: _drop_out(run_with_peak(cmd, tmp / f"home-200k-{r}")),
            "schedule warm": lambda r: _drop_out(run_with_peak(cmd, warm_home)),
        },
        rounds=rounds,
    )
    ref = result["reference"][0]
    print(f"200,000 activities ({size_mb:.0f} MB schedule.toml), medians of {rounds} rounds:")
    for name, (seconds, peak) in result.items():
        verdict = ""
        if name != "reference":
            met = seconds <= 4.0 and peak <= 400
            verdict = f"  fieldlog/reference {seconds / ref:4.2f}x  target 4 s, 400 MB: " + (
                "met" if met else "MISSED"
            )
        print(f"  {name:<15} {seconds:6.2f} s  {peak:5.0f} MB{verdict}")
    stages(folder)


def stages(folder: Path) -> None:
    """Seconds of each stage of one cold ``fieldlog schedule``, measured in this process."""
    from datetime import timedelta

    from fieldlog.engine.compiled import compile_site
    from fieldlog.engine.cpm import compute_schedule
    from fieldlog.reports.schedule_sheet import render_schedule
    from fieldlog.site.schema import build_site
    from fieldlog.site.toml_file import SCHEDULE_FILE, SITE_FILE, parse_toml, read_file_bytes

    marks: list[tuple[str, float]] = []
    t = time.perf_counter()

    def mark(name: str) -> None:
        nonlocal t
        now = time.perf_counter()
        marks.append((name, now - t))
        t = now

    site_raw = read_file_bytes(folder / SITE_FILE)
    schedule_raw = read_file_bytes(folder / SCHEDULE_FILE)
    mark("read")
    files = (
        parse_toml(folder / SITE_FILE, site_raw),
        parse_toml(folder / SCHEDULE_FILE, schedule_raw),
    )
    mark("parse")
    site = build_site(*files)
    del files
    mark("validate")
    comp = compile_site(site)
    mark("compile")
    result = compute_schedule(comp, site.start - timedelta(days=1))
    mark("passes")
    rows = result.activities
    mark("rows")
    render_schedule(result, "text")
    mark("render")
    assert len(rows) == len(site.activities)
    total = sum(s for _, s in marks)
    print(
        "  stages of one cold schedule in-process: "
        + ", ".join(f"{name} {seconds:.2f} s" for name, seconds in marks)
        + f" (total {total:.2f} s)"
    )


def bench_startup(tmp: Path) -> None:
    """The sample site's ``fieldlog schedule`` (cache warm) vs ``python -c "import numpy"``."""
    home = tmp / "home-startup"
    cmd = fieldlog_cmd("schedule", SAMPLE)
    run_with_peak(cmd, home)
    numpy_cmd = [sys.executable, "-c", "import numpy"]
    result = paired(
        {
            "import numpy": lambda r: _drop_out(run_with_peak(numpy_cmd, home)),
            "schedule": lambda r: _drop_out(run_with_peak(cmd, home)),
        }
    )
    ref, ours_s = result["import numpy"][0], result["schedule"][0]
    verdict = "met" if ours_s <= 1.5 * ref else "MISSED"
    print(
        f"start-up, medians of {ROUNDS} paired rounds: python -c 'import numpy' "
        f"{ref * 1e3:5.0f} ms | fieldlog schedule (sample) {ours_s * 1e3:5.0f} ms | "
        f"{ours_s / ref:4.2f}x (target 1.50x: {verdict})"
    )


def main(argv: list[str]) -> None:
    with tempfile.TemporaryDirectory() as name:
        tmp = Path(name)
        if "--startup" in argv:
            bench_startup(tmp)
            return
        if "--200k" in argv:
            bench_200k(tmp)
            return
        sizes = [int(a) for a in argv] or [10_000]
        results = {n: bench_size(n, tmp) for n in sizes}
    if 10_000 in results:
        worst = max(results[10_000].values())
        verdict = "met" if worst <= 0.5 else "MISSED"
        print(f"target at 10k (every contender <= 0.50x the reference): {verdict} ({worst:.2f}x)")


if __name__ == "__main__":
    main(sys.argv[1:])
