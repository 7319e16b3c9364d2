"""Tamper evidence: verify names the file and entry of every edit, removal and reordering.

Each test writes a real log through ``record_entry``, damages one file the way a person with
a text editor would, and checks both ``verify`` (the whole folder) and ``check_journal_bytes``
(one file, as sync uses it).
"""

from __future__ import annotations

import hashlib
from datetime import date

import pytest

from fieldlog.errors import JournalError
from fieldlog.journal import check_journal_bytes, verify
from fieldlog.journal.chain import canonical, entry_hash
from tests.helpers.journal_helpers import DEVICE, make_site, rec, run_cli

DAY_FILE = f"2026-09-08_{DEVICE}.toml"
SEP = "\n[[entry]]\n"


@pytest.fixture
def site(tmp_path):
    folder = make_site(tmp_path / "site")
    rec(folder, "started", date(2026, 9, 7), activity="EXC-010")  # .1, other file
    for text in ["first", "second", "third", "fourth"]:  # .2 - .5
        rec(folder, "note", date(2026, 9, 8), text=text)
    rec(folder, "note", date(2026, 9, 9), text="later")  # .6, other file
    assert verify(folder) == []
    return folder


def blocks(folder) -> tuple[str, list[str]]:
    """The day file split into its header and its entry blocks."""
    text = (folder / "log" / DAY_FILE).read_text(encoding="utf-8")
    head, *rest = text.split(SEP)
    return head, rest


def write_blocks(folder, head: str, rest: list[str]) -> bytes:
    data = SEP.join([head, *rest]).encode("utf-8")
    (folder / "log" / DAY_FILE).write_bytes(data)
    return data


def problems(folder) -> set[tuple[str, str, str]]:
    return {(f.file, f.entry_id, f.problem) for f in verify(folder)}


def test_one_changed_byte_is_named(site):
    path = site / "log" / DAY_FILE
    data = path.read_bytes()
    i = data.index(b'"third"') + 1
    path.write_bytes(data[:i] + b"T" + data[i + 1 :])  # "third" -> "Third": one byte
    assert problems(site) == {
        (DAY_FILE, f"{DEVICE}.4", "edited"),
        (DAY_FILE, f"{DEVICE}.4", "forged"),
    }
    with pytest.raises(JournalError, match=f"entry {DEVICE}.4: edited"):
        check_journal_bytes(DAY_FILE, path.read_bytes())


def test_a_removed_entry_is_named(site):
    head, rest = blocks(site)
    data = write_blocks(site, head, rest[:1] + rest[2:])  # drop .3 ("second")
    found = problems(site)
    assert ("", f"{DEVICE}.3", "removed") in found  # its number is missing
    assert (DAY_FILE, f"{DEVICE}.4", "removed") in found  # its successor's chain is broken
    with pytest.raises(JournalError, match="removed"):
        check_journal_bytes(DAY_FILE, data)


def test_removing_the_last_entry_of_a_file_is_still_seen(site):
    head, rest = blocks(site)
    write_blocks(site, head, rest[:-1])  # drop .5, which nothing in its file follows
    assert problems(site) == {("", f"{DEVICE}.5", "removed")}


def test_two_swapped_entries_are_named_and_nothing_else(site):
    head, rest = blocks(site)
    rest[1], rest[2] = rest[2].rstrip("\n") + "\n", rest[1]
    data = write_blocks(site, head, rest)
    assert problems(site) == {
        (DAY_FILE, f"{DEVICE}.3", "reordered"),
        (DAY_FILE, f"{DEVICE}.4", "reordered"),
    }
    with pytest.raises(JournalError, match="reordered"):
        check_journal_bytes(DAY_FILE, data)


def test_an_edit_with_a_recomputed_hash_breaks_the_next_link(site):
    """Someone who edits a value and recomputes that entry's hash is caught by the next one."""
    import tomllib

    head, rest = blocks(site)
    row = tomllib.loads("[[entry]]\n" + rest[1])["entry"][0]
    old_hash = row["hash"]
    row["text"] = "SECOND"
    new_hash = hashlib.sha256(canonical(row)).hexdigest()
    assert new_hash == entry_hash(row)
    rest[1] = rest[1].replace('"second"', '"SECOND"').replace(old_hash, new_hash)
    write_blocks(site, head, rest)
    # The chain names the next entry; the signature, made over the old hash, names this one.
    assert problems(site) == {
        (DAY_FILE, f"{DEVICE}.4", "removed"),
        (DAY_FILE, f"{DEVICE}.3", "forged"),
    }


def test_stray_and_broken_files_are_named(site):
    log = site / "log"
    (log / "notes.txt").write_text("hello")
    (log / "2026-09-10_Laptop.toml").write_text("")
    (log / f"2026-09-31_{DEVICE}.toml").write_text("")
    (log / f"2026-09-11_{DEVICE}.toml").write_text("[[entry]\nid = 1\n")
    (log / ".~leftover.tmp").write_text("half an entr")  # a working file: ignored
    found = problems(site)
    assert {
        ("notes.txt", "", "bad name"),
        ("2026-09-10_Laptop.toml", "", "bad name"),
        (f"2026-09-31_{DEVICE}.toml", "", "bad name"),
        (f"2026-09-11_{DEVICE}.toml", "", "not TOML"),
    } == found


def test_a_misfiled_entry_is_named(site):
    src = site / "log" / f"2026-09-09_{DEVICE}.toml"
    dst = site / "log" / f"2026-09-10_{DEVICE}.toml"
    src.rename(dst)
    assert problems(site) == {(dst.name, f"{DEVICE}.6", "misfiled")}


def test_line_end_changes_alone_still_verify(site):
    """The hash is over values, so a copy that gained CRLF line ends (a Windows tool) is
    still the same record."""
    path = site / "log" / DAY_FILE
    path.write_bytes(path.read_bytes().replace(b"\n", b"\r\n"))
    assert verify(site) == []
    check_journal_bytes(DAY_FILE, path.read_bytes())


def test_check_journal_bytes_accepts_an_intact_file_and_refuses_a_bad_name(site):
    data = (site / "log" / DAY_FILE).read_bytes()
    check_journal_bytes(DAY_FILE, data)
    with pytest.raises(JournalError, match="not a journal file name"):
        check_journal_bytes("2026-09-08_site:laptop.toml", data)
    with pytest.raises(JournalError, match="misfiled"):
        check_journal_bytes("2026-09-08_test-laptop-2.toml", data)


def test_verify_command_exit_codes(site, tmp_path):
    home = tmp_path / "home"
    r = run_cli("verify", str(site), home=home)
    assert r.returncode == 0 and "log intact" in r.stdout
    path = site / "log" / DAY_FILE
    path.write_bytes(path.read_bytes().replace(b'"first"', b'"frist"'))
    r = run_cli("verify", str(site), home=home)
    assert r.returncode == 1
    assert f"log/{DAY_FILE}" in r.stdout and f"entry {DEVICE}.2: edited" in r.stdout
