"""The command's exit (``cli.entry``): a one-shot command ends with ``os._exit`` once its
output is flushed, and nothing it printed, no exit code and no error report is lost.

Every case runs the real command in a fresh interpreter, as a user's shell does, and compares
what arrives with what the same command gives through the normal interpreter exit
(``sys.exit(main())``, the way every command ended before), byte for byte. The pipe cases use
block-buffered output (``PYTHONUNBUFFERED`` cleared), where a skipped flush would show as
missing bytes, and an output several times the size of a pipe's buffer (64 KiB on Linux,
from memory), read only after the command has had time to block on the full pipe.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
import tomllib
from datetime import date
from pathlib import Path

import pytest

from tests.conftest import ROOT
from tests.helpers.site_builder import chain, schedule_toml, site_toml, write_site

NORMAL_EXIT = "import sys\nfrom fieldlog.cli import main\nsys.exit(main())\n"
"""The command ended the way it did before ``entry``: the interpreter's full shutdown."""


def _env(home: Path, buffered: bool = True) -> dict[str, str]:
    env = {**os.environ, "FIELDLOG_HOME": str(home), "PYTHONPATH": str(ROOT)}
    if buffered:
        env.pop("PYTHONUNBUFFERED", None)
    return env


def run(
    args: list[str], home: Path, *, normal: bool = False, buffered: bool = True
) -> subprocess.CompletedProcess[bytes]:
    """``python -m fieldlog ARGS`` (or the normal-exit way), stdout and stderr captured."""
    head = [sys.executable, "-c", NORMAL_EXIT] if normal else [sys.executable, "-m", "fieldlog"]
    return subprocess.run(
        [*head, *args], capture_output=True, env=_env(home, buffered), check=False, timeout=120
    )


@pytest.fixture
def big_site(tmp_path: Path) -> Path:
    """An invented 1,500-activity chain: each float list is two pipe buffers long or more."""
    ids = [f"W-{n:04d}" for n in range(1500)]
    site = site_toml("Larkspur Depot", date(2026, 3, 2))
    return write_site(tmp_path / "big", site, schedule_toml(1, chain(ids, duration=2)))


def test_console_script_and_module_both_end_through_entry():
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    assert project["project"]["scripts"]["fieldlog"] == "fieldlog.cli:entry"
    assert "entry()" in (ROOT / "fieldlog" / "__main__.py").read_text(encoding="utf-8")


@pytest.mark.parametrize("fmt", ["text", "json", "csv"])
def test_output_through_a_pipe_is_complete(big_site, tmp_path, fmt):
    args = ["schedule", str(big_site), "--format", fmt]
    home = tmp_path / "home"
    before = run(args, home, normal=True)
    assert before.returncode == 0 and len(before.stdout) > 2 * 65536, before.stderr
    for buffered in (True, False):
        now = run(args, home, buffered=buffered)
        assert (now.returncode, now.stdout, now.stderr) == (0, before.stdout, before.stderr)


def test_a_slow_reader_still_gets_every_byte(big_site, tmp_path):
    args = [sys.executable, "-m", "fieldlog", "schedule", str(big_site), "--format", "json"]
    home = tmp_path / "home"
    expected = run(args[3:], home, normal=True).stdout
    child = subprocess.Popen(args, stdout=subprocess.PIPE, env=_env(home))
    time.sleep(1.0)  # the command fills the pipe and waits on it
    got, _ = child.communicate(timeout=120)
    assert child.returncode == 0
    assert got == expected


def test_exit_codes_and_stderr_lines_are_kept(sample_site, tmp_path):
    home = tmp_path / "home"
    home.mkdir()
    (home / "device.toml").write_text('author = "T. Foreman"\n', encoding="utf-8")
    cases = [
        (["schedule", str(sample_site)], 0),
        (["check", str(sample_site)], 1),  # the sample's health check finds problems
        (["schedule", str(tmp_path / "no-such-site")], 2),
        (["schedule", str(sample_site), "--as-of", "2026-13-01"], 2),  # argparse's own exit
        (["record", str(sample_site), "started", "NO-SUCH-ID"], 2),  # refused, nothing written
        (["--version"], 0),
        (["schedule", "--help"], 0),
    ]
    for args, code in cases:
        before = run(args, home, normal=True)
        now = run(args, home)
        assert before.returncode == code, (args, before.stderr)
        assert (now.returncode, now.stdout, now.stderr) == (code, before.stdout, before.stderr)
        if code == 2:
            assert now.stderr.decode().count("\n") == 1, now.stderr  # one line, no traceback
            assert now.stderr.startswith(b"fieldlog: ")


def test_a_recorded_entry_prints_its_id_and_is_in_the_log(sample_site, tmp_path):
    home = tmp_path / "home"
    args = ["record", str(sample_site), "note", "gate chained", "--author", "T. Foreman"]
    done = run(args, home)
    assert done.returncode == 0, done.stderr
    entry_id = done.stdout.decode().strip()
    assert done.stderr.decode().startswith("fieldlog: recorded note for ")
    log = b"".join(p.read_bytes() for p in (sample_site / "log").glob("*.toml"))
    assert f'id = "{entry_id}"'.encode() in log
    verify = run(["verify", str(sample_site)], home)
    assert verify.returncode == 0, verify.stdout + verify.stderr


def _probe(tmp_path: Path, before_entry: str, args: list[str]) -> subprocess.CompletedProcess:
    code = f"import sys\nsys.argv[1:] = {args!r}\n{before_entry}\nfrom fieldlog.cli import entry\n"
    code += "entry()\n"
    return subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        env=_env(tmp_path / "home"),
        check=False,
        timeout=120,
    )


def test_an_error_that_escapes_is_still_a_traceback_and_exit_1(sample_site, tmp_path):
    boom = (
        "import fieldlog.commands.schedule as s\n"
        "def run(args):\n"
        "    print('partial line', end='')\n"
        "    raise RuntimeError('boom in the probe')\n"
        "s.run = run\n"
    )
    done = _probe(tmp_path, boom, ["schedule", str(sample_site)])
    assert done.returncode == 1
    assert done.stdout == b"partial line"
    assert b"Traceback" in done.stderr and b"RuntimeError: boom in the probe" in done.stderr


def test_pending_atexit_callbacks_and_threads_get_the_normal_exit(sample_site, tmp_path):
    # The thread starts as the command's work ends, so it is surely still running then.
    pending = (
        "import atexit, threading, time\n"
        "import fieldlog.commands.schedule as s\n"
        "atexit.register(lambda: print('atexit ran', flush=True))\n"
        "work = s.run\n"
        "def run(args):\n"
        "    code = work(args)\n"
        "    later = lambda: (time.sleep(0.3), print('thread done', flush=True))\n"
        "    threading.Thread(target=later).start()\n"
        "    return code\n"
        "s.run = run\n"
    )
    done = _probe(tmp_path, pending, ["schedule", str(sample_site)])
    assert done.returncode == 0, done.stderr
    out = done.stdout.decode()
    assert out.endswith("thread done\natexit ran\n")
    assert "TF/FF" in out  # the float list itself came first, whole


def test_an_output_that_cannot_be_written_is_still_reported(sample_site, tmp_path):
    if not Path("/dev/full").exists():
        pytest.skip("needs /dev/full (Linux)")
    with open("/dev/full", "wb") as full:
        done = subprocess.run(
            [sys.executable, "-m", "fieldlog", "schedule", str(sample_site)],
            stdout=full,
            stderr=subprocess.PIPE,
            env=_env(tmp_path / "home"),
            check=False,
            timeout=120,
        )
    assert done.returncode != 0
    assert b"No space left on device" in done.stderr
