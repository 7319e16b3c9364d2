"""The benchmark runner (tests/benchmarks/run.py): finds scripts by name, never imports them.

Fast checks only: the benchmarks themselves are not run here (they take minutes and live
outside the normal run).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from benchmarks import run as bench_run

RUNNER = Path(__file__).parent / "benchmarks" / "run.py"


def _write(folder: Path, name: str, body: str) -> None:
    (folder / name).write_text(body, encoding="utf-8")


def test_scripts_are_found_by_name_pattern_and_read_without_importing(tmp_path) -> None:
    _write(
        tmp_path,
        "bench_alpha.py",
        '"""Benchmark: alpha.\n\nMore."""\nraise SystemExit("imported")\nQUICK_ARGS = ("10",)\n',
    )
    _write(tmp_path, "bench_beta.py", "x = 1\n")
    _write(tmp_path, "synthetic.py", '"""Not a benchmark."""\n')
    scripts = bench_run.discover(tmp_path)
    assert [(s.name, s.summary, s.quick_args) for s in scripts] == [
        ("alpha", "Benchmark: alpha.", ("10",)),
        ("beta", "(no docstring)", None),
    ]
    alpha, beta = scripts
    assert bench_run.command(alpha, quick=True)[1:] == [str(alpha.path), "10"]
    assert bench_run.command(beta, quick=True)[1:] == [str(beta.path)]
    assert bench_run.command(alpha, quick=False)[1:] == [str(alpha.path)]


def test_names_are_checked_with_a_one_line_error(tmp_path) -> None:
    _write(tmp_path, "bench_alpha.py", '"""a"""\n')
    scripts = bench_run.discover(tmp_path)
    assert [s.name for s in bench_run.choose(scripts, ["bench_alpha.py"])] == ["alpha"]
    with pytest.raises(bench_run.BadInput, match="no benchmark named 'gamma'.*: alpha$"):
        bench_run.choose(scripts, ["gamma"])
    _write(tmp_path, "bench_bad.py", "QUICK_ARGS = (1,)\n")
    with pytest.raises(bench_run.BadInput, match="bench_bad.py: QUICK_ARGS must be"):
        bench_run.discover(tmp_path)


def test_every_benchmark_in_the_tree_is_listed() -> None:
    out = subprocess.run(
        [sys.executable, str(RUNNER), "--list"], capture_output=True, text=True, check=True
    ).stdout
    names = {line.split()[0] for line in out.splitlines()}
    on_disk = {p.stem.removeprefix("bench_") for p in RUNNER.parent.glob("bench_*.py")}
    assert names == on_disk and "fewest" in names


@pytest.mark.parametrize(
    ("args", "message"), [(["nope"], "no benchmark"), (["--timeout", "0"], "out of bounds")]
)
def test_bad_input_exits_2(args, message) -> None:
    done = subprocess.run([sys.executable, str(RUNNER), *args], capture_output=True, text=True)
    assert done.returncode == 2
    assert message in done.stderr and done.stdout == ""
