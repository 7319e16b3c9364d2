"""Run the benchmark scripts: all of them or some by name, at their full or a quick size.

    .venv/bin/python tests/benchmarks/run.py --list          # what there is, one line each
    .venv/bin/python tests/benchmarks/run.py                 # every benchmark, full size
    .venv/bin/python tests/benchmarks/run.py fewest cpm      # by name (bench_<name>.py)
    .venv/bin/python tests/benchmarks/run.py --quick         # small sizes: a smoke run
    .venv/bin/python -m tests.benchmarks --quick lookahead   # the same runner

Why a runner and not a list in a README: engineers add benchmarks all the time, so the scripts
are found by name (every ``tests/benchmarks/bench_*.py``), never from a list kept here. Each
one runs in a child process of the same interpreter, so one script's imports, caches and
garbage never slow the next, and its output streams through unchanged (each script prints its
own ratios against a reference measured in the same run; this runner adds nothing to them).

A script says how to run it small with a module-level constant, read here with :mod:`ast` so
that the script is never imported by the runner::

    QUICK_ARGS = ("1000",)  # tests/benchmarks/run.py --quick

A script without it runs at its own default size under ``--quick``, and the runner says so.
The one-line description printed by ``--list`` is the first line of the script's docstring.

Exit 0 when every script exited 0, 1 when one failed or ran out of time, 2 on bad input (an
unknown name, a time limit out of bounds).
"""

from __future__ import annotations

import argparse
import ast
import os
import subprocess
import sys
import time
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

HERE = Path(__file__).resolve().parent
PATTERN = "bench_*.py"
TIMEOUT_S = (1, 24 * 3600)
"""Bounds of ``--timeout``: a second to a day per script."""
DEFAULT_TIMEOUT_S = 3600


@dataclass(frozen=True)
class Script:
    """One benchmark script as found on disk."""

    name: str
    """``bench_fewest.py`` is ``fewest``."""
    path: Path
    summary: str
    quick_args: tuple[str, ...] | None
    """None: the script declares no quick size."""


class BadInput(Exception):
    """A name or value given on the command line that cannot be used (exit 2)."""


def discover(folder: Path = HERE) -> list[Script]:
    """Every ``bench_*.py`` in ``folder``, by name."""
    return [_read(path) for path in sorted(folder.glob(PATTERN))]


def _read(path: Path) -> Script:
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    doc = ast.get_docstring(tree) or ""
    summary = doc.strip().splitlines()[0] if doc.strip() else "(no docstring)"
    quick = None
    for node in tree.body:
        if (
            isinstance(node, ast.Assign)
            and len(node.targets) == 1
            and isinstance(node.targets[0], ast.Name)
            and node.targets[0].id == "QUICK_ARGS"
        ):
            value = ast.literal_eval(node.value)
            if not isinstance(value, tuple | list) or not all(isinstance(a, str) for a in value):
                raise BadInput(f"{path.name}: QUICK_ARGS must be a tuple of strings, got {value!r}")
            quick = tuple(value)
    return Script(path.name[len("bench_") : -len(".py")], path, summary, quick)


def choose(scripts: Sequence[Script], names: Sequence[str]) -> list[Script]:
    """The scripts asked for (all when ``names`` is empty), in the order asked."""
    if not names:
        return list(scripts)
    by_name = {s.name: s for s in scripts}
    chosen = []
    for name in names:
        key = name.removeprefix("bench_").removesuffix(".py")
        if key not in by_name:
            known = ", ".join(sorted(by_name))
            raise BadInput(f"no benchmark named {name!r}; the benchmarks are: {known}")
        chosen.append(by_name[key])
    return chosen


def command(script: Script, quick: bool) -> list[str]:
    """The child process's command line."""
    args = list(script.quick_args or ()) if quick else []
    return [sys.executable, str(script.path), *args]


@dataclass(frozen=True)
class Outcome:
    name: str
    code: int | None
    """None: stopped at the time limit."""
    seconds: float


def run(scripts: Sequence[Script], quick: bool, timeout: float) -> list[Outcome]:
    """Run each script in turn, its output going straight to ours."""
    outcomes = []
    for script in scripts:
        cmd = command(script, quick)
        note = ""
        if quick and script.quick_args is None:
            note = " (declares no QUICK_ARGS: its default size)"
        print(f"== {script.name}: {' '.join(cmd[1:])}{note}", flush=True)
        start = time.perf_counter()
        try:
            code: int | None = subprocess.run(
                cmd, cwd=HERE.parent.parent, env=_env(), timeout=timeout, check=False
            ).returncode
        except subprocess.TimeoutExpired:
            code = None
            print(f"== {script.name}: stopped after the {timeout:.0f} s limit", flush=True)
        outcomes.append(Outcome(script.name, code, time.perf_counter() - start))
    return outcomes


def _env() -> dict[str, str]:
    env = dict(os.environ)
    root = str(HERE.parent.parent)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (root, env.get("PYTHONPATH", "")) if p)
    return env


def summary(outcomes: Sequence[Outcome]) -> str:
    """One line per script: name, how it ended, wall seconds."""
    width = max([len("benchmark"), *(len(o.name) for o in outcomes)])
    rows = [f"{'benchmark':<{width}}  result      wall"]
    for o in outcomes:
        result = "timed out" if o.code is None else ("ok" if o.code == 0 else f"exit {o.code}")
        rows.append(f"{o.name:<{width}}  {result:<9} {o.seconds:7.1f} s")
    return "\n".join(rows)


def parse(argv: Sequence[str]) -> argparse.Namespace:
    parser = argparse.ArgumentParser(
        prog="tests/benchmarks/run.py",
        description="Run fieldlog's benchmark scripts (tests/benchmarks/bench_*.py).",
    )
    parser.add_argument("names", nargs="*", help="benchmarks to run (default: all)")
    parser.add_argument("--list", action="store_true", help="list the benchmarks and exit")
    parser.add_argument("--quick", action="store_true", help="run each at its QUICK_ARGS size")
    parser.add_argument(
        "--timeout",
        type=float,
        default=DEFAULT_TIMEOUT_S,
        help=f"seconds per script, {TIMEOUT_S[0]} to {TIMEOUT_S[1]} (default {DEFAULT_TIMEOUT_S})",
    )
    return parser.parse_args(argv)


def main(argv: Sequence[str] | None = None) -> int:
    args = parse(sys.argv[1:] if argv is None else argv)
    try:
        if not TIMEOUT_S[0] <= args.timeout <= TIMEOUT_S[1]:
            raise BadInput(
                f"--timeout {args.timeout:g} is out of bounds: give {TIMEOUT_S[0]} to "
                f"{TIMEOUT_S[1]} seconds"
            )
        scripts = choose(discover(), args.names)
    except BadInput as e:
        print(f"error: {e}", file=sys.stderr)
        return 2
    if args.list:
        width = max((len(s.name) for s in scripts), default=4)
        for s in scripts:
            quick = " ".join(s.quick_args) if s.quick_args is not None else "-"
            print(f"{s.name:<{width}}  quick: {quick:<10}  {s.summary}")
        return 0
    outcomes = run(scripts, args.quick, args.timeout)
    print(summary(outcomes))
    return 0 if all(o.code == 0 for o in outcomes) else 1


if __name__ == "__main__":
    sys.exit(main())
