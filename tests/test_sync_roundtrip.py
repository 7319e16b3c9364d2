"""Sync round trips: an office folder and two field devices, each with its own data folder.

Checks the main promises of ``fieldlog sync``: entries written on either device reach the
office and the other device, a new office revision reaches both devices, and a second sync
changes nothing at all (both folders byte for byte the same, nothing reported).

The printed summary is compared with a golden file in tests/golden/; regenerate it with
``FIELDLOG_UPDATE_GOLDEN=1 .venv/bin/pytest tests/test_sync_roundtrip.py`` and review the diff.
"""

from __future__ import annotations

import json
from datetime import date
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.commands.sync import PROGRESS_MIN_FILES
from fieldlog.journal import device_id, read_journal
from fieldlog.sync.revision import RevisionStatus
from fieldlog.sync.summary import render_text
from tests.helpers.golden_files import assert_golden
from tests.helpers.sync_helpers import append_entry, make_site, schedule_toml, sync, tree

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


class Device:
    """A laptop or tablet: its own data folder (device id) and its copy of the site."""

    def __init__(self, home: Path, site: Path) -> None:
        self.home, self.site = home, site
        self.id = device_id(home)

    def log(self, day: date, text: str) -> Path:
        """Record a note through the journal, as this device."""
        return append_entry(self.site, day, None, text, home=self.home)


@pytest.fixture
def devices(tmp_path: Path) -> tuple[Path, Device, Device]:
    """An empty office folder and two devices, each with its own FIELDLOG_HOME-style folder."""
    office = tmp_path / "office" / "test-yard"
    office.mkdir(parents=True)
    a = Device(tmp_path / "home-laptop", make_site(tmp_path / "laptop" / "test-yard"))
    b = Device(tmp_path / "home-tablet", make_site(tmp_path / "tablet" / "test-yard"))
    assert a.id != b.id
    return office, a, b


def journal_files(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted((folder / "log").glob("*.toml"))}


def test_entries_from_both_devices_reach_all_three(devices):
    office, a, b = devices
    site_a, site_b, dev_a, dev_b = a.site, b.site, a.id, b.id
    a.log(MON, "A10 started")
    b.log(MON, "crew of 4 groundworkers")

    first = sync(site_a, office, home=a.home)
    assert first.seeded == ("site.toml", "schedule.toml")
    assert [c.name for c in first.sent] == [f"2026-03-02_{dev_a}.toml"]
    assert sync(site_b, office, home=b.home).exit_code == 0
    a.log(TUE, "A10 remaining 3")
    a.log(MON, "late note for Monday")  # the Monday file grows
    grown = sync(site_a, office, home=a.home)
    assert sorted((c.name, c.grown) for c in grown.sent) == [
        (f"2026-03-02_{dev_a}.toml", True),
        (f"2026-03-03_{dev_a}.toml", False),
    ]
    assert [c.name for c in grown.received] == [f"2026-03-02_{dev_b}.toml"]
    assert grown.exit_code == 0 and not grown.restored and grown.receipt
    assert sync(site_b, office, home=b.home).exit_code == 0

    office_files = journal_files(office)
    assert office_files == journal_files(site_a) == journal_files(site_b)
    assert len(office_files) == 3
    assert office_files[f"2026-03-02_{dev_a}.toml"].count(b"[[entry]]") == 2
    assert not (office / "conflicts").exists()
    for folder in (office, site_a, site_b):  # the journal reads every entry, intact
        journal = read_journal(folder)
        assert not journal.findings and len(journal.entries) == 4


def test_new_revision_reaches_both_devices_and_old_one_is_kept(devices):
    office, a, b = devices
    site_a, site_b = a.site, b.site
    old_schedule = (site_a / "schedule.toml").read_bytes()
    sync(site_a, office, home=a.home)
    sync(site_b, office, home=b.home)
    (office / "schedule.toml").write_text(schedule_toml(2, ("A10", "A20", "A30", "A40")))

    for device in (a, b):
        site = device.site
        summary = sync(site, office, home=device.home)
        assert summary.revision.status is RevisionStatus.BROUGHT_IN
        assert (summary.revision.site_revision, summary.revision.target_revision) == (1, 2)
        assert (site / "schedule.toml").read_bytes() == (office / "schedule.toml").read_bytes()
        assert (site / "schedule_history" / "schedule.r1.toml").read_bytes() == old_schedule
        assert summary.revision.kept_as == "schedule_history/schedule.r1.toml"
        assert summary.exit_code == 0
    again = sync(site_a, office, home=a.home)
    assert again.revision.status is RevisionStatus.SAME


def test_second_sync_changes_nothing(devices):
    office, a, b = devices
    site_a, site_b = a.site, b.site
    a.log(MON, "A10 started")
    b.log(TUE, "weather: rain")
    sync(site_a, office, home=a.home)
    sync(site_b, office, home=b.home)
    sync(site_a, office, home=a.home)
    before = (tree(site_a), tree(office))
    again = sync(site_a, office, home=a.home)
    assert (tree(site_a), tree(office)) == before
    assert not again.changed_anything and not again.has_problems
    assert (again.sent, again.received, again.unchanged) == ((), (), 2)
    assert render_text(again).splitlines()[-1] == (
        "result     nothing to do: both sides already match"
    )


def test_site_folder_that_does_not_load_is_bad_input(tmp_path, capsys):
    site = make_site(tmp_path / "site")
    (site / "schedule.toml").write_text("revision = \n")
    office = tmp_path / "office"
    office.mkdir()
    assert main(["sync", str(site), str(office)]) == 2
    err = capsys.readouterr().err
    assert "schedule.toml, line 1: TOML syntax error" in err
    assert "Traceback" not in err
    assert list(office.iterdir()) == []


@pytest.mark.parametrize("target_kind", ["missing", "same", "folder of sites"])
def test_unusable_target_is_bad_input(tmp_path, capsys, target_kind):
    site = make_site(tmp_path / "north")
    target = {"missing": tmp_path / "nowhere", "same": site, "folder of sites": tmp_path}[
        target_kind
    ]
    assert main(["sync", str(site), str(target)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("fieldlog: ") and "Fix:" in err
    assert not (tmp_path / "nowhere").exists()


def test_cli_summary_matches_golden_file(tmp_path, capsys, _isolated_home):
    """One sync with every kind of line: seeded, sent, grown, conflict, refusal, receipt."""
    (_isolated_home / "device.toml").write_text('device = "lap-north"\n')
    site = make_site(tmp_path / "site")
    office = tmp_path / "office"
    make_site(office)
    append_entry(site, MON, "tab-north", "A10 started")
    append_entry(office, MON, "tab-north", "A10 started")
    append_entry(site, MON, "tab-north", "A10 remaining 4")  # grown on the site
    append_entry(site, TUE, "tab-north", "A10 remaining 3")
    append_entry(site, TUE, "tab-south", "crew: 3 carpenters")
    append_entry(office, TUE, "tab-south", "crew: 5 carpenters")  # a true conflict
    append_entry(office, TUE, "lap-office", "visitor: engineer")  # received
    (office / "log" / "notes.txt").write_text("not a journal")  # refused
    code = main(["sync", str(site), str(office)])
    out = capsys.readouterr().out
    assert code == 1
    assert_golden("sync_summary.txt", out)


def test_cli_json_and_exit_codes(tmp_path, capsys):
    site = make_site(tmp_path / "site")
    office = tmp_path / "office"
    office.mkdir()
    append_entry(site, MON, "tab-north", "A10 started")
    assert main(["sync", str(site), str(office), "--format", "json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert [f["name"] for f in data["sent"]] == ["2026-03-02_tab-north.toml"]
    assert data["schedule"]["status"] == "same" and data["problems"] is False
    assert main(["sync", str(site), str(office)]) == 0
    assert "nothing to do" in capsys.readouterr().out


def test_office_folder_is_a_valid_site_folder_after_sync(devices, capsys):
    """The office's folder reads like any site: every device's entries, intact."""
    office, a, b = devices
    a.log(MON, "A10 started")
    b.log(TUE, "weather: rain")
    for device in (a, b, a):
        sync(device.site, office, home=device.home)
    assert main(["verify", str(office)]) == 0
    assert "2 entries" in capsys.readouterr().out
    assert main(["schedule", str(office), "--format", "json"]) == 0


def test_progress_is_shown_on_stderr_for_long_transfers(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr("fieldlog.commands.sync.PROGRESS_EVERY_S", 0.0)
    site = make_site(tmp_path / "site")
    office = tmp_path / "office"
    office.mkdir()
    for n in range(PROGRESS_MIN_FILES):
        append_entry(site, date(2026, 3, 2 + n), "tab-north", f"day {n}")
    assert main(["sync", str(site), str(office)]) == 0
    captured = capsys.readouterr()
    assert f"copied {PROGRESS_MIN_FILES} of {PROGRESS_MIN_FILES} files" in captured.err
    assert "fieldlog: sync:" not in captured.out


def test_own_damaged_journal_file_is_not_sent(tmp_path):
    """A day file edited by hand on the laptop fails the journal's check: the office never
    gets it, and the summary says so."""
    site = make_site(tmp_path / "site")
    office = tmp_path / "office"
    office.mkdir()
    path = append_entry(site, MON, "tab-north", "poured 12 m3")
    path.write_bytes(path.read_bytes().replace(b"12 m3", b"21 m3"))
    summary = sync(site, office)
    (refusal,) = summary.refused
    assert (refusal.side, refusal.path) == ("site", f"log/{path.name}")
    assert "edited" in refusal.reason
    assert not (office / "log" / path.name).exists() and summary.exit_code == 1
