"""Entries removed from the end of a log after a sync are found: the office receipts.

A hash chain shows an edited or removed entry in the middle of a file, not one removed from
the end (nothing was chained after it). After a sync the office holds a receipt of each
device's highest entry, and this device keeps copies of it; every tail-removal case below is
done to a copy of the sample site after one sync and must be named (device, entry expected,
file) by ``fieldlog verify`` against the device's copies, against the office's chain
(``--office``, with the device's own copies gone too), and when done to the office's log.

Oracle: what each case removes is read from the untouched sample files with the standard
library's ``tomllib`` (not with fieldlog's reader), so the expected device, entry number and
file come from outside the code under test.
"""

from __future__ import annotations

import os
import shutil
import tomllib
from collections.abc import Callable
from dataclasses import replace
from datetime import date
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.journal.key_seal import seal
from fieldlog.journal.keys import public_hex
from fieldlog.journal.registry import DeviceRecord, key_file_bytes
from fieldlog.sync.audit import known_device
from fieldlog.sync.receipt_files import home_folder
from tests.helpers.sync_helpers import append_entry, fixed_key, sync


def key_file(device: str) -> bytes:
    """A device key file as fieldlog writes it, for the key ``append_entry`` signs with."""
    key = fixed_key(device)
    record = DeviceRecord(
        device, public_hex(key.public_key()), "Test Foreman", date(2026, 9, 28), 1
    )
    return key_file_bytes(replace(record, seal=seal(key, record)))


def last_entries(site: Path) -> dict[str, tuple[int, str]]:
    """Per device, the highest ``seq`` and the file it is in, read with plain tomllib."""
    out: dict[str, tuple[int, str]] = {}
    for path in sorted((site / "log").glob("*.toml")):
        for row in tomllib.loads(path.read_text(encoding="utf-8"))["entry"]:
            if row["seq"] > out.get(row["device"], (0, ""))[0]:
                out[row["device"]] = (row["seq"], path.name)
    return out


def drop_last_entries(path: Path, n: int) -> None:
    """Remove the last ``n`` ``[[entry]]`` blocks of a journal file, as a text editor would."""
    blocks = path.read_text(encoding="utf-8").split("\n[[entry]]\n")
    assert len(blocks) > n
    path.write_text("\n[[entry]]\n".join(blocks[:-n]), encoding="utf-8")


def device_files(site: Path, device: str) -> list[Path]:
    return sorted((site / "log").glob(f"*_{device}.toml"))


LAPTOP, TABLET = "site-laptop-1", "tablet-2"

CASES: dict[str, tuple[Callable[[Path], None], tuple[str, ...]]] = {
    "last entry": (lambda s: drop_last_entries(device_files(s, LAPTOP)[-1], 1), (LAPTOP,)),
    "last 3 entries": (lambda s: drop_last_entries(device_files(s, LAPTOP)[-1], 3), (LAPTOP,)),
    "last day file": (lambda s: device_files(s, LAPTOP)[-1].unlink(), (LAPTOP,)),
    "all of one device's files": (
        lambda s: [p.unlink() for p in device_files(s, TABLET)],
        (TABLET,),
    ),
    "whole log": (lambda s: shutil.rmtree(s / "log"), (LAPTOP, TABLET)),
}


@pytest.fixture
def synced(sample_site: Path, tmp_path: Path) -> tuple[Path, Path, dict[str, tuple[int, str]]]:
    """The sample site after one clean sync with an empty office folder."""
    office = tmp_path / "office"
    office.mkdir()
    expected = last_entries(sample_site)
    summary = sync(sample_site, office)
    assert summary.exit_code == 0 and summary.receipt == "receipt 1 in " + (
        f"receipts/{own_chain(office).name}"
    )
    # The sample's own devices sync with the office too, as every real device does, so the
    # office knows the devices whose keys are in devices/ (a key it never heard of is named).
    for device in (LAPTOP, TABLET):
        home = tmp_path / f"home-{device}"
        home.mkdir()
        (home / "device.toml").write_text(f'device = "{device}"\n')
        assert sync(sample_site, office, home=home).exit_code == 0
    summary = sync(sample_site, office)  # this device's next receipt knows them
    assert summary.exit_code == 0
    return sample_site, office, expected


def own_chain(office: Path) -> Path:
    """This device's receipt chain in the office folder."""
    return office / "receipts" / f"{known_device(Path(os.environ['FIELDLOG_HOME']))}.toml"


def own_copy(site: Path) -> Path:
    """This device's copy of its receipt chain in the site folder."""
    this = known_device(Path(os.environ["FIELDLOG_HOME"]))
    (copy,) = (site / "receipts").glob(f"{this}.*.toml")
    return copy


def verify(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str]:
    code = main(["verify", *map(str, args)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err
    return code, captured.out


def assert_named(out: str, expected: dict[str, tuple[int, str]], devices: tuple[str, ...]):
    """Every removed device's highest entry is named with its file; nothing else is."""
    for device in devices:
        seq, file = expected[device]
        assert (f"log/{file}: entry {device}.{seq} was removed after a sync") in out, out
    for device in set(expected) - set(devices):
        assert f"entry {device}." not in out.split("Against the office receipts")[-1]


def test_intact_after_sync(synced, capsys):
    site, office, _ = synced
    assert verify(capsys, site)[0] == 0
    assert verify(capsys, site, "--office", office)[0] == 0
    assert verify(capsys, office)[0] == 0


@pytest.mark.parametrize("side", ["site", "office"])
@pytest.mark.parametrize("case", list(CASES))
def test_tail_removal_is_found_against_the_receipts_that_folder_holds(synced, capsys, case, side):
    """The site against this device's copies; the office against its own chains."""
    site, office, expected = synced
    folder = site if side == "site" else office
    tamper, devices = CASES[case]
    tamper(folder)
    code, out = verify(capsys, folder)
    assert code == 1
    assert_named(out, expected, devices)


@pytest.mark.parametrize("case", list(CASES))
def test_tail_removal_is_found_against_the_office_copy(synced, capsys, case, _isolated_home):
    site, office, expected = synced
    tamper, devices = CASES[case]
    tamper(site)
    shutil.rmtree(site / "receipts")  # this device's copies gone too
    shutil.rmtree(home_folder(_isolated_home, site))
    assert verify(capsys, site)[0] == 0  # with its copies gone, nothing here vouches
    code, out = verify(capsys, site, "--office", office)
    assert code == 1
    assert_named(out, expected, devices)
    assert "office receipts/" in out


def test_edited_receipt_is_a_finding_everywhere_it_is_kept(synced, capsys):
    site, office, _ = synced
    chain = own_chain(office)
    text = chain.read_text(encoding="utf-8")
    chain.write_text(text.replace("seq = 3\n", "seq = 2\n"), encoding="utf-8")  # tablet-2
    code, out = verify(capsys, office)
    assert code == 1 and f"receipts/{chain.name}: receipt 1: edited" in out
    code, out = verify(capsys, site, "--office", office)
    assert code == 1 and f"office receipts/{chain.name}: receipt 1: edited" in out
    copy = own_copy(site)
    copy.write_text(copy.read_text(encoding="utf-8").replace("number = 1", "number = 2"))
    code, out = verify(capsys, site)
    assert code == 1 and f"receipts/{copy.name}: receipt 2: edited" in out


def test_receipts_removed_from_the_end_of_the_office_chain(synced, capsys):
    site, office, _ = synced
    chain = own_chain(office)
    one_receipt = chain.read_bytes()
    append_entry(site, date(2026, 9, 28), None, "late delivery noted")  # receipt 3 follows
    assert sync(site, office).receipt.startswith("receipt 3 in ")
    chain.write_bytes(one_receipt)
    code, out = verify(capsys, site, "--office", office)
    assert code == 1
    assert f"office receipts/{chain.name}: holds 2 receipts" in out
    assert "receipts 3 to 3 were removed from it" in out
    again = sync(site, office)
    assert again.exit_code == 1
    assert any("had lost receipts 3 to 3" in p for p in again.receipt_problems)
    assert verify(capsys, site, "--office", office)[0] == 0


def test_office_missing_file_named_by_verify_office(synced, capsys):
    site, office, _ = synced
    shutil.rmtree(office / "receipts")
    code, out = verify(capsys, site, "--office", office)
    assert code == 1 and "missing, yet this device holds 1 receipts" in out


def test_missing_office_folder_is_bad_input(synced, capsys, tmp_path):
    site, _, _ = synced
    code = main(["verify", str(site), "--office", str(tmp_path / "nowhere")])
    err = capsys.readouterr().err
    assert code == 2 and "office folder does not exist" in err and "Fix:" in err


def test_a_device_key_the_office_never_heard_from_is_named(
    synced, capsys, tmp_path, _isolated_home
):
    """A key planted in devices/ verifies its own entries; only the office can tell."""
    site, office, _ = synced
    devices = site / "devices"
    this = known_device(_isolated_home)
    assert this is not None
    (devices / f"{this}.toml").write_bytes(key_file(this))
    (devices / "tab-planted-1.toml").write_bytes(key_file("tab-planted-1"))
    for args in ((site,), (site, "--office", office)):
        code, out = verify(capsys, *args)
        assert code == 1
        assert "devices/tab-planted-1.toml: device tab-planted-1 is not known to the office" in out
        assert f"device {this} is not known" not in out
    # A device that syncs with the office itself becomes known, and the next receipt says so.
    other_home = tmp_path / "home-planted"
    other_home.mkdir()
    (other_home / "device.toml").write_text('device = "tab-planted-1"\n')
    other = tmp_path / "other-copy"
    shutil.copytree(site, other)
    shutil.rmtree(other / "receipts")
    append_entry(other, date(2026, 9, 28), None, "crane booked", home=other_home)
    assert sync(other, office, home=other_home).exit_code == 0
    assert verify(capsys, site, "--office", office)[0] == 0
    assert sync(site, office).receipt is not None  # receives the entry, knows the device
    assert verify(capsys, site)[0] == 0


def test_a_site_that_never_synced_names_no_device(sample_site, capsys):
    (sample_site / "devices" / "tab-planted-1.toml").write_bytes(key_file("tab-planted-1"))
    assert verify(capsys, sample_site)[0] == 0
