"""Sync against a hostile or careless office folder: skip, report, carry on; write nothing out.

* A file that does not parse (a TOML syntax error, brackets nested deeper than any file
  fieldlog writes, over the size bound) is refused and reported; the good files beside it
  still go through, and the run ends with exit 1.
* Links anywhere sync reads or writes (log/, conflicts/, receipts/, schedule_history/) are
  refused and never followed: nothing lands outside the site and office folders.
* The clean-up of temporary files left by an interrupted sync never removes another writer's
  file because a clock is wrong: only this machine's files whose process is gone, and only
  when older than a day.

All data is invented.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from datetime import date
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.sync import transfer
from fieldlog.sync.revision import RevisionStatus
from fieldlog.sync.scan import MAX_FILE_BYTES
from tests.helpers.sync_helpers import append_entry, make_site, schedule_toml, sync, tree

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


@pytest.fixture
def pair(tmp_path: Path) -> tuple[Path, Path]:
    """A site with two days of entries, synced once with its office folder."""
    site = make_site(tmp_path / "site")
    for day in (MON, TUE):
        append_entry(site, day, "tab-north", f"note for {day}")
    office = tmp_path / "office"
    office.mkdir()
    assert sync(site, office).exit_code == 0
    return site, office


def run_cli(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    assert "Traceback" not in out + err
    return code, out, err


def test_files_that_do_not_parse_are_skipped_and_the_rest_goes_through(pair, capsys):
    site, office = pair
    log = office / "log"
    append_entry(office, TUE, "lap-office", "the good file beside the bad ones")
    (log / "2026-03-04_lap-office.toml").write_text("[[entry]\nbroken = ")  # syntax
    (log / "2026-03-05_lap-office.toml").write_text("x = " + "[" * 40 + "]" * 40)  # 40 deep
    (log / "2026-03-06_lap-office.toml").write_text("x = " + "[" * 50_000 + "]" * 50_000)
    with (log / "2026-03-09_lap-office.toml").open("wb") as f:  # too big
        f.truncate(MAX_FILE_BYTES + 1)
    (office / "receipts" / "lap-office.toml").write_text("x = " + "{a = " * 3000)  # receipts
    code, out, _ = run_cli(capsys, "sync", str(site), str(office))
    assert code == 1
    assert "received   1 journal file (1 new, 0 grown)" in out
    assert (site / "log" / "2026-03-02_lap-office.toml").exists() is False
    assert (site / "log" / "2026-03-03_lap-office.toml").is_file()
    for day in ("04", "05", "06", "09"):
        assert f"target log/2026-03-{day}_lap-office.toml: " in out
        assert not (site / "log" / f"2026-03-{day}_lap-office.toml").exists()
    assert "office receipts/lap-office.toml: is not TOML: " in out and "nested" in out


def test_deeply_nested_office_schedule_is_refused(pair, capsys):
    site, office = pair
    (office / "schedule.toml").write_text("revision = 2\nx = " + "[" * 50_000 + "]" * 50_000)
    code, out, _ = run_cli(capsys, "sync", str(site), str(office))
    assert code == 1 and "schedule   PROBLEM: " in out and "nested more than 32 deep" in out


def test_links_in_the_office_folder_are_never_followed(pair, tmp_path, capsys):
    site, office = pair
    outside = tmp_path / "outside"
    outside.mkdir()
    (outside / "secret.toml").write_text('[[entry]]\nsecret = "not the office"\n')
    for name in ("receipts", "conflicts"):
        target = office / name
        if target.exists():
            for p in target.iterdir():
                p.unlink()
            target.rmdir()
        target.symlink_to(outside, target_is_directory=True)
    (office / "log" / "2026-03-10_lap-office.toml").symlink_to(outside / "secret.toml")
    append_entry(site, TUE, "tab-north", "a new entry to send")
    (office / "log" / "2026-03-03_tab-north.toml").write_bytes(b"# other\n")  # a conflict
    before = tree(outside)
    code, out, _ = run_cli(capsys, "sync", str(site), str(office))
    assert tree(outside) == before
    assert code == 1
    assert "target log/2026-03-10_lap-office.toml: is a link" in out
    assert "target conflicts: the folder is a link" in out
    assert "office receipts: the folder is a link; links are never followed" in out
    assert not (site / "log" / "2026-03-10_lap-office.toml").exists()


def test_links_in_the_site_folder_are_never_written_through(pair, tmp_path, capsys):
    site, office = pair
    outside = tmp_path / "outside"
    outside.mkdir()
    (site / "schedule_history").symlink_to(outside, target_is_directory=True)
    for p in (site / "receipts").iterdir():
        p.unlink()
    (site / "receipts").rmdir()
    (site / "receipts").symlink_to(outside, target_is_directory=True)
    (office / "schedule.toml").write_text(schedule_toml(2, ("A10", "A20", "A30", "A40")))
    append_entry(site, TUE, "tab-north", "a new entry: a new receipt")
    summary = sync(site, office)
    assert tree(outside) == {}
    assert summary.revision.status is RevisionStatus.REFUSED
    assert "schedule_history in the site folder is a link" in summary.revision.message
    assert summary.receipt is not None and summary.exit_code == 1
    assert any("links are never followed" in p for p in summary.receipt_problems)


def _temp(folder: Path, host: str, pid: int, mtime: float) -> Path:
    tag = f"{len(list(folder.iterdir())):08x}"  # a new name for each temp
    path = folder / f"{transfer.TEMP_PREFIX}{host}-{pid}-{tag}{transfer.TEMP_SUFFIX}"
    path.write_bytes(b"half a file")
    os.utime(path, (mtime, mtime))
    return path


def _dead_pid() -> int:
    """The pid of a process that has exited (it is not reused this quickly in practice)."""
    child = subprocess.run(
        [sys.executable, "-c", "import os; print(os.getpid())"],
        capture_output=True,
        text=True,
        check=True,
    )
    return int(child.stdout)


def test_temp_cleanup_never_removes_another_writers_file_on_a_skewed_clock(pair):
    site, office = pair
    log, now, day = office / "log", time.time(), 86400.0
    dead = _dead_pid()
    assert not transfer.process_alive(dead)
    other_host = _temp(log, "office-server", dead, now - 30 * day)  # not this machine
    alive = _temp(log, transfer.THIS_HOST, os.getpid(), now - 30 * day)  # still running
    ahead = _temp(log, transfer.THIS_HOST, dead, now + 3 * day)  # writer's clock ahead
    young = _temp(log, transfer.THIS_HOST, dead, now - 3600)  # an hour old
    legacy = log / ".fieldlog-sync-0123456789ab.tmp"  # name without an owner
    legacy.write_bytes(b"old format")
    stale = _temp(log, transfer.THIS_HOST, dead, now - 2 * day)  # ours, dead, old
    summary = sync(site, office, now=now)
    assert summary.cleaned == 1 and not stale.exists()
    assert [p.name for p in (other_host, alive, ahead, young, legacy) if not p.exists()] == []
    assert summary.exit_code == 0


def test_own_temp_names_carry_host_and_pid(tmp_path):
    tmp = transfer.write_temp(tmp_path, b"x", transfer.sha256_bytes(b"x"))
    assert tmp.name.startswith(f"{transfer.TEMP_PREFIX}{transfer.THIS_HOST}-{os.getpid()}-")
    assert transfer.clean_stale_temps(tmp_path, time.time() + 10 * 86400.0) == 0  # pid alive


@pytest.mark.parametrize("where", ["office", "site"])
def test_a_receipts_folder_that_is_a_file_is_reported_not_a_traceback(pair, where):
    site, office = pair
    folder = (office if where == "office" else site) / "receipts"
    for p in folder.iterdir():
        p.unlink()
    folder.rmdir()
    folder.write_text("not a folder")
    append_entry(site, TUE, "tab-north", "a new entry: a new receipt")
    summary = sync(site, office)
    assert summary.exit_code == 1
    assert any(
        "is a file, not a folder" in p or "not a plain file" in p for p in summary.receipt_problems
    ), summary.receipt_problems
    assert folder.read_text() == "not a folder"
