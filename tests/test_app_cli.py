"""``fieldlog open`` and ``fieldlog demo`` around the app: errors, the demo's day, clean-up.

The app itself is not started here (it needs a terminal); ``open_site`` is replaced by a
recorder, or the command fails before the app would start.
"""

from __future__ import annotations

import subprocess
import sys
import time
from datetime import date
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.commands import demo
from fieldlog.commands.open import plain_wanted
from tests.test_app_site import fix_device, log, write_site


def _cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "fieldlog", *args], capture_output=True, text=True, timeout=60
    )


def test_open_a_broken_site_says_what_the_other_commands_say(tmp_path: Path) -> None:
    folder = write_site(tmp_path / "site")
    schedule = folder / "schedule.toml"
    schedule.write_text(schedule.read_text().replace('after = ["CON-010"]', 'after = ["CON-999"]'))
    opened, listed = _cli("open", str(folder)), _cli("schedule", str(folder))
    assert opened.returncode == listed.returncode == 2
    assert opened.stdout == ""
    assert opened.stderr == listed.stderr
    assert "unknown activity 'CON-999'" in opened.stderr
    assert "\x1b[" not in opened.stderr  # the terminal was never taken over


def test_open_a_missing_folder_exits_2(tmp_path: Path, capsys: pytest.CaptureFixture) -> None:
    assert main(["open", str(tmp_path / "nowhere"), "--today", "2026-03-03"]) == 2
    assert "not a site folder" in capsys.readouterr().err


@pytest.mark.parametrize(
    ("logged", "expected"),
    [
        ([], date(2026, 3, 2)),  # empty log: the first working day
        ([date(2026, 3, 2)], date(2026, 3, 3)),  # Monday logged: Tuesday
        ([date(2026, 3, 6)], date(2026, 3, 9)),  # Friday logged: the next Monday
    ],
)
def test_demo_opens_on_the_working_day_after_the_last_logged_day(
    tmp_path: Path, logged: list[date], expected: date
) -> None:
    fix_device()
    folder = write_site(tmp_path / "site")
    for day in logged:
        log(folder, "note", day, {"text": "logged"}, today=day)
    assert demo.demo_day(folder) == (expected, logged[-1] if logged else None)


@pytest.mark.parametrize("keep", [False, True])
def test_demo_runs_on_a_scratch_copy_and_says_so(
    monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture, keep: bool
) -> None:
    seen = {}

    def fake_open(folder: str, today: date, notice: str = "", *, plain: bool = False) -> int:
        seen.update(
            folder=Path(folder),
            today=today,
            notice=notice,
            copied=(Path(folder) / "site.toml").is_file(),
        )
        (Path(folder) / "log").mkdir(exist_ok=True)  # the app writes in the copy only
        return 0

    monkeypatch.setattr("fieldlog.commands.open.open_site", fake_open)
    args = ["demo", "--keep"] if keep else ["demo"]
    assert main(args) == 0
    sample = demo.sample_folder()
    day, last = demo.demo_day(sample)
    assert seen["copied"] and seen["today"] == day
    assert seen["folder"].resolve() != sample.resolve()
    assert f"opened on {day:%a %d %b %Y}" in seen["notice"]
    err = capsys.readouterr().err
    assert f"opening on {day:%a %d %b %Y}" in err
    assert seen["folder"].exists() == keep
    if keep:
        assert "kept at" in err
        import shutil

        shutil.rmtree(seen["folder"].parent)


def test_open_without_a_terminal_refuses_at_once(tmp_path: Path) -> None:
    """Output to a file (a cron job, ``> out.txt``): one line on stderr, exit 2, no spinning."""
    folder = write_site(tmp_path / "site")
    started = time.monotonic()
    done = subprocess.run(
        [sys.executable, "-m", "fieldlog", "open", str(folder), "--today", "2026-03-03"],
        stdin=subprocess.DEVNULL,
        capture_output=True,
        text=True,
        timeout=30,
    )
    assert time.monotonic() - started < 30
    assert done.returncode == 2
    assert done.stdout == ""
    assert done.stderr.count("\n") == 1 and "needs a terminal" in done.stderr
    assert "\x1b[" not in done.stderr  # the terminal was never taken over


@pytest.mark.parametrize(
    ("env", "asked", "plain"),
    [
        ({}, False, False),
        ({"TERM": "xterm-256color"}, False, False),
        ({"TERM": "xterm-256color"}, True, True),  # --ascii
        ({"TERM": "xterm-256color", "NO_COLOR": "1"}, False, True),  # no-color.org
        ({"TERM": "xterm", "NO_COLOR": ""}, False, False),  # empty means unset (no-color.org)
        ({"TERM": "dumb"}, False, True),
        ({"TERM": "vt100"}, False, True),
        ({"TERM": "xterm-mono"}, False, True),  # terminfo's monochrome variant
    ],
)
def test_plain_mode_is_chosen_by_flag_no_color_or_term(
    env: dict[str, str], asked: bool, plain: bool
) -> None:
    assert plain_wanted(env, asked) is plain
