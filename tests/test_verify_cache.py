"""A warm `fieldlog verify` (fieldlog/commands/verify_cache.py) prints the kept report of an
unchanged site, and checks the full way as soon as any input differs by one byte.

The oracle is the full way itself (fieldlog/commands/verify_report.py, run with the cache
switched off), which the other verify tests check against their own references.
"""

from __future__ import annotations

import hashlib
import shutil
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.commands import verify_report
from fieldlog.sync.conflicts import conflicts_folder, copy_name


@pytest.fixture
def full_runs(monkeypatch: pytest.MonkeyPatch) -> list[str]:
    """One item per verify that checked the full way."""
    calls: list[str] = []
    real = verify_report.make_report

    def spy(site: str, office: str | None):
        calls.append(site)
        return real(site, office)

    monkeypatch.setattr(verify_report, "make_report", spy)
    return calls


def verify(site: Path, capsys: pytest.CaptureFixture[str], *more: str) -> tuple[int, str]:
    code = main(["verify", str(site), *more])
    return code, capsys.readouterr().out


@pytest.fixture(autouse=True)
def _device_known(_isolated_home):
    """The test home's device.toml with its device id: the first verify on a device that has
    none yet gives it one, which changes an input (so that report is not kept)."""
    from fieldlog.journal.device import device_id

    device_id(_isolated_home)


def test_an_unchanged_site_prints_the_kept_report(sample_site, capsys, full_runs):
    cold = verify(sample_site, capsys)
    assert cold[0] == 0 and "log intact" in cold[1]
    assert verify(sample_site, capsys) == cold
    assert verify(sample_site, capsys) == cold
    assert len(full_runs) == 1


def _edit_entry(site: Path) -> None:
    path = sorted((site / "log").glob("*.toml"))[0]
    data = path.read_bytes()
    at = data.index(b'author = "') + len(b'author = "')
    path.write_bytes(data[:at] + bytes([data[at] ^ 0x20]) + data[at + 1 :])  # one letter's case


def _truncate(site: Path) -> None:
    path = sorted((site / "log").glob("*.toml"))[0]  # its device wrote on after it
    data = path.read_bytes()
    path.write_bytes(data[: data.rindex(b"[[entry]]")])


def _remove_file(site: Path) -> None:
    sorted((site / "log").glob("*.toml"))[1].unlink()


def _key_file(site: Path) -> None:
    sorted((site / "devices").glob("*.toml"))[0].unlink()


def _conflict(site: Path) -> None:
    original = sorted((site / "log").glob("*.toml"))[0]
    data = original.read_bytes() + b"\n# a different copy\n"
    folder = conflicts_folder(site)
    folder.mkdir()
    shutil.copyfile(original, folder / copy_name(original.name, hashlib.sha256(data).hexdigest()))


def _link(site: Path) -> None:
    (site / "log" / "2026-09-30_site-laptop-1.toml").symlink_to(site / "site.toml")


@pytest.mark.parametrize(
    "change", [_edit_entry, _truncate, _remove_file, _key_file, _conflict, _link]
)
def test_any_change_is_checked_the_full_way(sample_site, capsys, full_runs, change):
    assert verify(sample_site, capsys)[0] == 0
    change(sample_site)
    code, out = verify(sample_site, capsys)
    assert len(full_runs) == 2
    assert code == 1 and "log intact" not in out
    assert verify(sample_site, capsys) == (code, out)  # the damaged report is kept too
    assert len(full_runs) == 2


def test_a_planted_report_is_never_shown(sample_site, capsys, full_runs, _isolated_home):
    verify(sample_site, capsys)
    _edit_entry(sample_site)
    bad = verify(sample_site, capsys)
    assert bad[0] == 1
    (kept,) = (_isolated_home / "cache").glob("verify-*.pack")
    data = kept.read_bytes()
    kept.write_bytes(data.replace(b"integrity finding", b"integrity findinG"))  # HMAC now wrong
    assert verify(sample_site, capsys) == bad
    assert len(full_runs) == 3


def test_with_the_office_it_always_checks_the_full_way(synced_sample, capsys, full_runs):
    site, office = synced_sample
    first = verify(site, capsys, "--office", str(office))
    assert verify(site, capsys, "--office", str(office)) == first
    assert len(full_runs) == 2


def test_this_devices_receipt_copies_are_an_input(synced_sample, capsys, full_runs):
    site, _ = synced_sample
    first = verify(site, capsys)
    for copy in (site / "receipts").glob("*.toml"):
        copy.write_bytes(copy.read_bytes() + b"\n")
    verify(site, capsys)
    assert len(full_runs) == 2
    assert first[1]
