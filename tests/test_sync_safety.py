"""Sync never loses or overwrites an entry: interruptions, conflicts, hostile folders.

* An interrupted copy (a failure half-way through writing a file, or a process killed before
  it could clean up) leaves both folders valid; the next run finishes the job with nothing lost
  and nothing duplicated.
* Two different versions of one journal file are both kept and reported, on both sides.
* A target folder holding hostile content (names that leave the folder, links, garbage,
  oversized files) has all of it refused, and the site folder is left byte for byte as it was.
* Names that differ only in case are one file on Windows and FAT sticks (common practice;
  library notes 4.2 measured it on FAT32 and exFAT), so they are a conflict, never two files.
"""

from __future__ import annotations

import errno
import os
from datetime import date
from pathlib import Path

import pytest

from fieldlog.errors import SyncError
from fieldlog.sync import list_conflicts, transfer
from fieldlog.sync.revision import RevisionStatus
from fieldlog.sync.scan import MAX_FILE_BYTES
from fieldlog.sync.summary import render_text
from tests.helpers.sync_helpers import (
    append_entry,
    journal_name,
    make_site,
    schedule_toml,
    sync,
    tree,
)

MON, TUE, WED = date(2026, 3, 2), date(2026, 3, 3), date(2026, 3, 4)


@pytest.fixture
def pair(tmp_path: Path) -> tuple[Path, Path]:
    """A site with a week of entries from one device, and an empty office folder."""
    site = make_site(tmp_path / "site")
    for n in range(5):
        day = date(2026, 3, 2 + n)
        for k in range(3):
            append_entry(site, day, "tab-north", f"day {n} entry {k}")
    office = tmp_path / "office"
    office.mkdir()
    return site, office


def journal_files(folder: Path) -> dict[str, bytes]:
    """Every visible file in log/ (the journal's lock files are hidden working files)."""
    return {
        p.name: p.read_bytes()
        for p in sorted((folder / "log").iterdir())
        if not p.name.startswith(".")
    }


# --- interrupted copies -----------------------------------------------------------------------


def _fail_mid_file(monkeypatch: pytest.MonkeyPatch, on_call: int, exc: BaseException) -> None:
    """Make the ``on_call``-th file write put half its bytes on disk, then fail."""
    calls = {"n": 0}
    real = transfer._write_all

    def half_then_fail(f, data: bytes) -> None:
        calls["n"] += 1
        if calls["n"] == on_call:
            f.write(data[: len(data) // 2])
            f.flush()
            raise exc
        real(f, data)

    monkeypatch.setattr(transfer, "_write_all", half_then_fail)


def test_failure_mid_file_then_rerun_loses_and_duplicates_nothing(pair, monkeypatch):
    site, office = pair
    site_before = tree(site)
    _fail_mid_file(
        monkeypatch,
        on_call=5,  # 2 seeded site files + 3rd journal file
        exc=OSError(errno.EIO, "Input/output error"),
    )
    with pytest.raises(SyncError, match="run sync again"):
        sync(site, office)
    # Both sides valid: every journal file in the office is complete, none half-written.
    landed = journal_files(office)
    assert 0 < len(landed) < 5
    assert all(data == (site / "log" / name).read_bytes() for name, data in landed.items())
    assert not any(n.endswith(".tmp") for n in os.listdir(office / "log"))
    assert tree(site) == site_before

    monkeypatch.undo()
    summary = sync(site, office)
    assert len(summary.sent) == 5 - len(landed)
    assert journal_files(office) == journal_files(site)
    assert sum(d.count(b"[[entry]]") for d in journal_files(office).values()) == 15
    assert summary.exit_code == 0 and not summary.conflicts
    assert tree(site, receipts=False) == site_before  # the sync kept its receipt copy there


def test_killed_process_leaves_a_hidden_temp_that_a_later_sync_removes(pair, monkeypatch):
    """A kill gives no chance to clean up: the half file stays under a hidden temp name."""
    site, office = pair
    _fail_mid_file(monkeypatch, on_call=4, exc=KeyboardInterrupt())  # 2 seeds + 2
    monkeypatch.setattr(transfer, "remove_quietly", lambda tmp: None)  # killed: no clean-up
    with pytest.raises(KeyboardInterrupt):
        sync(site, office)
    temps = [n for n in os.listdir(office / "log") if n.endswith(".tmp")]
    assert len(temps) == 1 and temps[0].startswith(".")
    monkeypatch.undo()
    monkeypatch.setattr(transfer, "process_alive", lambda pid: False)  # the killed writer

    young = os.stat(office / "log" / temps[0]).st_mtime
    rerun = sync(site, office, now=young + 60)  # another sync may still be writing it
    assert rerun.cleaned == 0 and journal_files(office) == journal_files(site)
    assert len([n for n in os.listdir(office / "log") if n.endswith(".tmp")]) == 1
    later = sync(site, office, now=young + transfer.STALE_AFTER_S + 1)
    assert later.cleaned == 1 and not later.sent
    assert sorted(os.listdir(office / "log")) == [*journal_files(office)]  # no temp left
    assert journal_files(office) == journal_files(site)


def test_interrupted_revision_keeps_the_old_schedule_and_a_rerun_finishes(pair, monkeypatch):
    site, office = pair
    sync(site, office)
    old = (site / "schedule.toml").read_bytes()
    (office / "schedule.toml").write_text(schedule_toml(2))

    def pulled_out(tmp, dest):
        raise SyncError("cannot rename into place: No such device", file=dest)

    monkeypatch.setattr("fieldlog.sync.revision.replace", pulled_out)
    with pytest.raises(SyncError):
        sync(site, office)
    assert (site / "schedule.toml").read_bytes() == old
    assert not [n for n in os.listdir(site) if n.endswith(".tmp")]
    monkeypatch.undo()
    summary = sync(site, office)
    assert summary.revision.status is RevisionStatus.BROUGHT_IN
    assert os.listdir(site / "schedule_history") == ["schedule.r1.toml"]
    assert (site / "schedule_history" / "schedule.r1.toml").read_bytes() == old


def test_file_written_during_sync_is_skipped_not_overwritten(pair):
    """The app appends an entry while sync runs: the newer bytes win, next sync sends them."""
    site, office = pair
    grew: list[str] = []

    def app_writes(done: int, total: int, copied: int) -> None:
        if done == 1:
            grew.append(append_entry(site, date(2026, 3, 6), "tab-north", "late entry").name)

    summary = sync(site, office, progress=app_writes)
    assert summary.skipped == (f"log/{grew[0]}",) and summary.exit_code == 1
    assert not (office / "log" / grew[0]).exists()
    assert sync(site, office).exit_code == 0
    assert journal_files(office) == journal_files(site)


# --- conflicts --------------------------------------------------------------------------------


def test_conflicting_versions_are_both_kept_and_reported(tmp_path):
    site = make_site(tmp_path / "site")
    office = make_site(tmp_path / "office")
    append_entry(site, MON, "tab-north", "A10 started")
    append_entry(office, MON, "tab-north", "A10 started")
    append_entry(site, MON, "tab-north", "A10 remaining 4")  # diverged: 4 days here ...
    append_entry(office, MON, "tab-north", "A10 remaining 2")  # ... 2 days at the office
    name = journal_name(MON, "tab-north")
    ours, theirs = (site / "log" / name).read_bytes(), (office / "log" / name).read_bytes()

    summary = sync(site, office)
    assert summary.exit_code == 1
    assert [c.name for c in summary.conflicts] == [name]
    assert (site / "log" / name).read_bytes() == ours  # nothing overwritten
    assert (office / "log" / name).read_bytes() == theirs
    (kept_here,) = list_conflicts(site)
    (kept_there,) = list_conflicts(office)
    assert kept_here.path.read_bytes() == theirs and kept_here.original == name
    assert kept_there.path.read_bytes() == ours
    assert "decide which is the record" in kept_here.describe()

    before = (tree(site), tree(office))
    again = sync(site, office)
    assert (tree(site), tree(office)) == before  # reported again, nothing written
    assert again.exit_code == 1 and len(again.conflicts) == 1


def test_same_size_different_content_is_a_conflict_not_a_copy(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    append_entry(site, MON, "tab-north", "rain AM")
    append_entry(office, MON, "tab-north", "rain PM")
    summary = sync(site, office)
    assert len(summary.conflicts) == 1 and not summary.sent and not summary.received


def test_garbage_version_of_a_known_file_is_refused_and_ours_kept_aside_there(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    append_entry(site, MON, "tab-north", "A10 started")
    name = journal_name(MON, "tab-north")
    (office / "log" / name).write_bytes(b"[[entry]\nbroken = ")
    site_before = tree(site)
    summary = sync(site, office)
    assert tree(site) == site_before
    assert [r.path for r in summary.refused] == [f"log/{name}"]
    assert [c.original for c in list_conflicts(office)] == [name]
    assert list_conflicts(site) == ()


# --- hostile target content -------------------------------------------------------------------


def test_hostile_target_content_is_refused_and_the_site_untouched(pair, tmp_path):
    site, office = pair
    sync(site, office)
    outside = tmp_path / "outside.toml"
    outside.write_text('[[entry]]\nsecret = "outside the office folder"\n')
    log = office / "log"
    (log / "..\\..\\evil.toml").write_text("[[entry]]\n")  # leaves on Windows
    (log / "2026-03-09_lap-office.toml").symlink_to(outside)  # a link
    (log / "2026-03-10_lap-office.toml").write_bytes(b"\x00\xffnot toml [[")  # garbage
    with (log / "2026-03-11_lap-office.toml").open("wb") as f:  # oversized (sparse)
        f.truncate(MAX_FILE_BYTES + 1)
    (log / "2026-03-12_lap:office.toml").write_text("[[entry]]\n")  # ':' on FAT
    (log / "con.toml").write_text("[[entry]]\n")  # reserved name
    (log / "2026-03-13_sub-folder").mkdir()  # a folder
    hostile = tree(office)
    site_before = tree(site)

    summary = sync(site, office)
    assert tree(site) == site_before
    assert tree(office) == hostile  # refused files are left where they are
    assert summary.exit_code == 1 and not summary.received
    reasons = {r.path: r.reason for r in summary.refused}
    assert set(reasons) == {
        "log/..\\..\\evil.toml",
        "log/2026-03-09_lap-office.toml",
        "log/2026-03-10_lap-office.toml",
        "log/2026-03-11_lap-office.toml",
        "log/2026-03-12_lap:office.toml",
        "log/con.toml",
        "log/2026-03-13_sub-folder",
    }
    assert "leave the folder" in reasons["log/..\\..\\evil.toml"]
    assert "link" in reasons["log/2026-03-09_lap-office.toml"]
    assert "not a valid journal file" in reasons["log/2026-03-10_lap-office.toml"]
    assert "over the 5 MB limit" in reasons["log/2026-03-11_lap-office.toml"]
    assert "':'" in reasons["log/2026-03-12_lap:office.toml"]
    assert "reserves" in reasons["log/con.toml"]
    assert "folder" in reasons["log/2026-03-13_sub-folder"]
    assert all(r.side == "target" for r in summary.refused)


def test_linked_log_folder_or_schedule_on_the_target_is_refused(pair, tmp_path):
    site, office = pair
    elsewhere = make_site(tmp_path / "elsewhere", revision=9)
    append_entry(elsewhere, MON, "lap-office", "from elsewhere")
    make_site(office)
    (office / "schedule.toml").unlink()
    (office / "schedule.toml").symlink_to(elsewhere / "schedule.toml")
    os.rmdir(office / "log")
    (office / "log").symlink_to(elsewhere / "log")
    site_before, elsewhere_before = tree(site), tree(elsewhere)
    summary = sync(site, office)
    assert tree(site) == site_before
    assert tree(elsewhere) == elsewhere_before  # nothing written through the link
    assert [r.path for r in summary.refused] == ["log"]
    assert not summary.sent
    assert summary.revision.status is RevisionStatus.REFUSED
    assert summary.exit_code == 1


def test_linked_conflicts_folder_on_the_target_is_not_written_through(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    append_entry(site, MON, "tab-north", "rain AM")
    append_entry(office, MON, "tab-north", "rain PM")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (office / "conflicts").symlink_to(elsewhere)
    summary = sync(site, office)
    assert list(elsewhere.iterdir()) == []
    assert [(r.side, r.path) for r in summary.refused] == [("target", "conflicts")]
    (conflict,) = summary.conflicts
    assert conflict.kept == (
        f"site conflicts/{list_conflicts(site)[0].path.name} (the target's version)",
    )


def test_log_that_is_a_file_on_the_target_is_refused(pair):
    site, office = pair
    (office / "log").write_text("not a folder")
    summary = sync(site, office)
    assert (office / "log").read_text() == "not a folder"
    assert [(r.side, r.path) for r in summary.refused] == [("target", "log")]
    assert not summary.sent and summary.exit_code == 1


def test_revision_that_does_not_load_with_the_site_is_refused(pair):
    site, office = pair
    sync(site, office)
    bad = (
        schedule_toml(2) + '\n[[activity]]\nid = "A40"\nname = "Rebar"\nduration = 2\n'
        "crew = { steelfixers = 4 }\n"
    )
    (office / "schedule.toml").write_text(bad)
    site_before = tree(site)
    summary = sync(site, office)
    assert tree(site) == site_before
    assert summary.revision.status is RevisionStatus.REFUSED
    assert str(office / "schedule.toml") in summary.revision.message
    assert "unknown crew 'steelfixers'" in summary.revision.message
    assert summary.exit_code == 1


@pytest.mark.parametrize(
    ("office_revision", "status"), [(0, RevisionStatus.TARGET_BEHIND), (1, RevisionStatus.DIFFERS)]
)
def test_older_or_same_numbered_different_office_schedule_changes_nothing(
    pair, office_revision, status
):
    site, office = pair
    make_site(office, revision=office_revision, ids=("A10", "A20"))
    site_before = tree(site)
    summary = sync(site, office)
    assert summary.revision.status is status and summary.exit_code == 1
    assert tree(site, receipts=False) == site_before


def test_same_revision_saved_by_notepad_is_not_a_difference(pair):
    """A BOM and CRLF line ends change the bytes, not the schedule."""
    site, office = pair
    make_site(office)
    text = (site / "schedule.toml").read_text()
    (office / "schedule.toml").write_bytes(b"\xef\xbb\xbf" + text.replace("\n", "\r\n").encode())
    assert sync(site, office).revision.status is RevisionStatus.SAME


# --- names that differ only in case -----------------------------------------------------------


def test_case_only_name_collision_is_a_conflict(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    append_entry(site, MON, "tab-north", "A10 started")
    (office / "log" / "2026-03-02_TAB-NORTH.toml").write_text('[[entry]]\nnote = "upper"\n')
    site_before, office_before = tree(site), tree(office)
    summary = sync(site, office)
    assert summary.devices.sent == ("tab-north.toml",)  # the device's key file travels
    office_logs = {k: v for k, v in tree(office).items() if not k.startswith("devices/")}
    assert (tree(site), office_logs) == (site_before, office_before)
    (conflict,) = summary.conflicts
    assert "differ only in case" in conflict.reason
    assert "2026-03-02_TAB-NORTH.toml" in conflict.reason
    assert not summary.sent and not summary.received and summary.exit_code == 1


def test_case_only_collision_inside_one_folder(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    (office / "log" / "2026-03-02_lap-office.toml").write_text("[[entry]]\n")
    if (office / "log" / "2026-03-02_LAP-OFFICE.toml").exists():
        pytest.skip("this file system ignores case")
    (office / "log" / "2026-03-02_LAP-OFFICE.toml").write_text("[[entry]]\nx = 1\n")
    summary = sync(site, office)
    assert len(summary.conflicts) == 1 and not summary.received


# --- orphaned entries -------------------------------------------------------------------------


def test_revision_removing_an_activity_with_entries_reports_them_as_orphaned(tmp_path):
    site = make_site(tmp_path / "site")
    office = tmp_path / "office"
    office.mkdir()
    append_entry(site, MON, "tab-north", "", kind="started", fields={"activity": "A10"})
    append_entry(
        site, TUE, "tab-north", "", kind="remaining", fields={"activity": "A10", "days": 3}
    )
    append_entry(site, TUE, "tab-north", "dry day")
    sync(site, office)
    log_before = journal_files(site)
    (office / "schedule.toml").write_text(schedule_toml(2, ("A20", "A30")))  # A10 is gone

    summary = sync(site, office)
    assert summary.revision.status is RevisionStatus.BROUGHT_IN
    assert summary.revision.removed == ("A10",)
    assert len(summary.revision.orphaned) == 2
    assert all("A10" in m for m in summary.revision.orphaned)
    assert any("tab-north.1" in m for m in summary.revision.orphaned)
    assert journal_files(site) == log_before  # the entries stay in the journal
    assert journal_files(office) == log_before
    assert summary.exit_code == 0
    text = render_text(summary)
    assert "orphaned   2 journal entries name activities" in text and "A10" in text
