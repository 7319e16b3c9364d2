"""Sync carries device key files: a new one is copied, the same one is fine, a different one
for the same device is a reported conflict and neither side's file is ever replaced."""

from __future__ import annotations

from datetime import date

from fieldlog.journal import verify
from tests.helpers.sync_helpers import append_entry, make_site, sync

MON = date(2026, 3, 2)


def key_file(folder, device="tab-north"):
    return folder / "devices" / f"{device}.toml"


def test_a_new_key_file_goes_to_the_office_and_then_verifies_there(tmp_path):
    site, office = make_site(tmp_path / "site"), tmp_path / "office"
    office.mkdir()
    append_entry(site, MON, "tab-north", "A10 started")
    summary = sync(site, office)
    assert summary.devices.sent == ("tab-north.toml",) and summary.exit_code == 0
    assert key_file(office).read_bytes() == key_file(site).read_bytes()
    assert verify(office) == []  # the office can check the device's signatures
    again = sync(site, office)
    assert again.devices.sent == () and not again.changed_anything and again.exit_code == 0


def test_a_key_file_comes_back_from_the_office(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    append_entry(office, MON, "lap-office", "from the office laptop")
    summary = sync(site, office)
    assert summary.devices.received == ("lap-office.toml",)
    assert verify(site) == []


def test_two_different_key_files_for_one_device_are_a_conflict_never_overwritten(tmp_path):
    site, office = make_site(tmp_path / "site"), make_site(tmp_path / "office")
    append_entry(site, MON, "tab-north", "A10 started")
    key_file(office).parent.mkdir()
    planted = key_file(site).read_text().replace("Test Foreman", "Someone Else")
    key_file(office).write_text(planted)
    before = (key_file(site).read_bytes(), key_file(office).read_bytes())
    summary = sync(site, office)
    assert (key_file(site).read_bytes(), key_file(office).read_bytes()) == before
    (clash,) = summary.devices.conflicts
    assert clash.startswith("devices/tab-north.toml: ") and summary.exit_code == 1
    assert "KEY CLASH" in summary_text(summary)


def test_a_file_that_is_not_a_key_file_is_refused_and_left(tmp_path):
    site, office = make_site(tmp_path / "site"), tmp_path / "office"
    office.mkdir()
    (site / "devices").mkdir()
    (site / "devices" / "tab-north.toml").write_text("public_key = 'x'\n")
    summary = sync(site, office)
    (refusal,) = summary.devices.refused
    assert refusal.path == "devices/tab-north.toml" and "not a valid device key" in refusal.reason
    assert not key_file(office).exists() and summary.exit_code == 1


def test_a_key_file_edited_after_it_was_sealed_does_not_travel(tmp_path):
    site, office = make_site(tmp_path / "site"), tmp_path / "office"
    office.mkdir()
    append_entry(site, MON, "tab-north", "A10 started")
    key_file(site).write_text(key_file(site).read_text().replace("Test Foreman", "Someone Else"))
    summary = sync(site, office)
    (refusal,) = summary.devices.refused
    assert refusal.path == "devices/tab-north.toml"
    assert "its seal does not match" in refusal.reason
    assert not key_file(office).exists() and summary.exit_code == 1


def summary_text(summary) -> str:
    from fieldlog.sync.summary import render_text

    return render_text(summary)
