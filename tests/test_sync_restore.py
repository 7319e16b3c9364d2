"""Sync never quietly restores a shrunk log: it restores it from the other side and says so.

A journal file that is an exact beginning of the other side's copy is normally just behind
(new entries arrive). When the receipts say the shorter side already held those entries, or
when the copy fills a hole in a device's numbering, the copy is a restore of removed entries:
it is still made (nothing may stay lost) and reported as a finding (exit 1).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.sync.receipt_files import home_folder
from tests.helpers.sync_helpers import sync, tree
from tests.test_receipts import CASES, LAPTOP, device_files, last_entries


def logs(folder: Path) -> dict[str, bytes]:
    return {k: v for k, v in tree(folder).items() if k.startswith("log/2")}  # type: ignore[misc]


@pytest.mark.parametrize("case", list(CASES))
def test_shrunk_site_is_restored_and_reported(synced_sample, case):
    site, office = synced_sample
    expected = last_entries(site)
    tamper, devices = CASES[case]
    tamper(site)
    summary = sync(site, office)
    assert summary.exit_code == 1
    assert summary.restored and all(r.startswith("site log/") for r in summary.restored)
    for device in devices:
        seq, file = expected[device]
        assert any(
            f"entry {device}.{seq} was removed after a sync" in r and file in r
            for r in summary.restored
        ), summary.restored
    assert logs(site) == logs(office)
    assert not summary.lost
    again = sync(site, office)
    assert again.exit_code == 0 and not again.changed_anything


@pytest.mark.parametrize("case", ["last entry", "last day file", "whole log"])
def test_shrunk_office_is_restored_and_reported(synced_sample, case):
    site, office = synced_sample
    CASES[case][0](office)
    summary = sync(site, office)
    assert summary.exit_code == 1
    assert summary.restored and all(r.startswith("target log/") for r in summary.restored)
    assert logs(site) == logs(office)


def test_entries_lost_on_both_sides_are_reported_as_lost(synced_sample, capsys):
    site, office = synced_sample
    for folder in (site, office):
        device_files(folder, LAPTOP)[-1].unlink()
    code = main(["sync", str(site), str(office)])
    out, err = capsys.readouterr()
    assert code == 1
    assert "lost       2 receipted entries are on neither side" in out
    assert "site log/2026-09-25_site-laptop-1.toml: entry site-laptop-1.103" in out
    assert "target log/2026-09-25_site-laptop-1.toml: entry site-laptop-1.103" in out
    assert "2 lost" in err and "Traceback" not in err


def test_a_hole_is_a_restore_even_without_receipts(synced_sample, _isolated_home):
    site, office = synced_sample
    shutil.rmtree(site / "receipts")
    shutil.rmtree(home_folder(_isolated_home, site))
    shutil.rmtree(office / "receipts")
    middle = device_files(site, LAPTOP)[3]
    middle.unlink()
    summary = sync(site, office)
    assert summary.exit_code == 1
    assert len(summary.restored) == 1 and summary.restored[0].startswith(
        f"site log/{middle.name}: restored from the target: entry {LAPTOP}."
    )
    assert "although site-laptop-1.103 written after it is still there" in summary.restored[0]


def test_new_entries_from_another_device_are_not_a_restore(synced_sample, tmp_path, _isolated_home):
    """The office is ahead for a device this site never had: plain receiving, exit 0."""
    site, office = synced_sample
    other = tmp_path / "other-copy"
    shutil.copytree(site, other)
    shutil.rmtree(other / "receipts")
    from datetime import date

    from tests.helpers.sync_helpers import append_entry

    append_entry(other, date(2026, 9, 28), "tab-east-9", "crane booked")
    assert sync(other, office, home=tmp_path / "other-home").exit_code == 0
    summary = sync(site, office)
    assert [c.name for c in summary.received] == ["2026-09-28_tab-east-9.toml"]
    assert summary.exit_code == 0 and not summary.restored
