"""This device's memory of its last entry: what ``verify`` on the device says with it.

Found by attack: on a site that never synced, deleting the newest day file left ``verify``
saying "log intact" (plus "not yet vouched for"). A hash chain shows an entry removed from
the middle, never one removed from the end (common practice for hash chains: only a record
held elsewhere shows a shortened chain). The device's own data folder is that record for
the entries it wrote itself.
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.home import LAST_ENTRY_DIR, fieldlog_home, last_entry_part
from fieldlog.journal import read_journal
from tests.test_verify_unvouched import NOTE

TODAY = "2026-09-28"


def record_note(site: Path, text: str, on: str = TODAY) -> str:
    """Record a note on this device; its entry id."""
    assert main(["record", str(site), "note", text, "--on", on, "--today", TODAY]) == 0
    return next(e.id for e in read_journal(site).entries if e.fields.get("text") == text)


def verify(site: Path, capsys) -> tuple[int, list[str]]:
    capsys.readouterr()
    code = main(["verify", str(site)])
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err
    return code, captured.out.splitlines()


def memory_file(site: Path) -> Path:
    return fieldlog_home() / last_entry_part(site)


def test_a_deleted_newest_day_file_of_this_device_is_named(sample_site, capsys):
    record_note(sample_site, "gate left open")
    last = record_note(sample_site, "skip swapped")
    code, lines = verify(sample_site, capsys)
    assert code == 0 and lines[-1].startswith(NOTE)  # kept, and intact
    (day_file,) = (sample_site / "log").glob(f"{TODAY}_*.toml")
    day_file.unlink()
    code, lines = verify(sample_site, capsys)
    assert code == 1
    (line,) = [ln for ln in lines if f"entry {last}," in ln]
    assert line.startswith(f"{day_file.name}: entry {last}, written 2026-")
    assert "by this device" in line and "is missing from the log" in line
    assert lines[-1].startswith("1 integrity finding(s)")


def test_the_last_entry_cut_from_its_day_file_is_named(sample_site, capsys):
    record_note(sample_site, "gate left open")
    last = record_note(sample_site, "skip swapped")
    (day_file,) = (sample_site / "log").glob(f"{TODAY}_*.toml")
    data = day_file.read_bytes()
    day_file.write_bytes(data[: data.rindex(b"[[entry]]")].rstrip(b"\n") + b"\n")
    assert [e.id for e in read_journal(sample_site).entries if e.id == last] == []
    code, lines = verify(sample_site, capsys)
    assert code == 1 and any(f"entry {last}," in ln and "missing" in ln for ln in lines)


def test_an_entry_held_under_the_id_with_another_hash_is_named(sample_site, capsys):
    """The log holds the remembered id, but not what this device wrote (here the memory
    is altered instead of the log: the same comparison, seen from the other side)."""
    last = record_note(sample_site, "skip swapped")
    assert verify(sample_site, capsys)[0] == 0  # and the report is kept for these inputs
    path = memory_file(sample_site)
    text = path.read_text(encoding="utf-8")
    old = read_journal(sample_site).by_id(last).hash
    path.write_text(text.replace(old, "0" * 64), encoding="utf-8")
    code, lines = verify(sample_site, capsys)  # a changed memory is not the kept report
    assert code == 1 and any(f"entry {last}," in ln and "is different" in ln for ln in lines)


def test_on_another_machine_there_is_no_memory_and_verify_is_as_before(
    sample_site, capsys, tmp_path, monkeypatch
):
    record_note(sample_site, "skip swapped")
    for day_file in (sample_site / "log").glob(f"{TODAY}_*.toml"):
        day_file.unlink()
    other = tmp_path / "other-home"
    other.mkdir()
    monkeypatch.setenv("FIELDLOG_HOME", str(other))
    code, lines = verify(sample_site, capsys)
    assert code == 0 and lines[-1].startswith(NOTE)
    assert not any("memory" in ln for ln in lines)


@pytest.mark.parametrize(
    ("damage", "says"),
    [
        (b"not toml at all", "is damaged"),
        (b"\xff\xfe\x00", "is damaged"),
        (b'site = "x"\n', "is damaged"),
        (b"", "is damaged"),
        # nested deeper than Python's recursion limit: refused by the pre-scan, not a traceback
        pytest.param(b"a = " + b"[" * 20000 + b"]" * 20000, "is damaged", id="nested"),
        (None, "cannot be read"),  # a folder where the file should be
        (b"x" * (1 << 20), "cannot be read"),  # past the size any small file may have
    ],
)
def test_a_damaged_memory_is_named_in_one_line_and_the_good_log_stays_good(
    sample_site, capsys, damage, says
):
    record_note(sample_site, "skip swapped")
    path = memory_file(sample_site)
    path.unlink()
    if damage is None:
        path.mkdir()
    else:
        path.write_bytes(damage)
    code, lines = verify(sample_site, capsys)
    assert code == 0 and lines[-1].startswith(NOTE)
    (note,) = [ln for ln in lines if "memory of its last entry" in ln]
    assert note.startswith("note: ") and says in note and "set aside" in note


def test_a_memory_of_another_site_folder_is_set_aside(sample_site, capsys, tmp_path):
    other = tmp_path / "other-site"
    shutil.copytree(sample_site, other)
    record_note(other, "on the other site")
    os.replace(memory_file(other), memory_file(sample_site))
    code, lines = verify(sample_site, capsys)
    assert code == 0
    (note,) = [ln for ln in lines if "memory of its last entry" in ln]
    assert "is of another site folder" in note and str(other.resolve()) in note


def test_a_memory_that_cannot_be_written_is_a_warning_and_the_entry_stays(sample_site, capsys):
    folder = fieldlog_home() / LAST_ENTRY_DIR
    folder.parent.mkdir(parents=True, exist_ok=True)
    folder.write_bytes(b"")  # a file where the folder should be
    capsys.readouterr()
    assert main(["record", str(sample_site), "note", "pump", "--today", TODAY]) == 0
    err = capsys.readouterr().err
    assert "could not keep its memory" in err
    assert any(e.fields.get("text") == "pump" for e in read_journal(sample_site).entries)
