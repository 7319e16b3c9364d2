"""The kept tail of the log (fieldlog/journal/tail.py): a one-shot record reads no log, and
falls back to the full read whenever any file changed behind it.

The oracle for every kept value is the full way itself: reading, verifying and replaying
the whole log (read_journal + replay), which the rest of the journal tests check against
their own references.
"""

from __future__ import annotations

import os
from datetime import date
from pathlib import Path

import pytest

from fieldlog.errors import EntryRefused
from fieldlog.journal import read_journal, record, replay
from fieldlog.journal.context import EntryContext
from fieldlog.journal.tail import TailLink, snapshot
from fieldlog.site.files import load_site
from tests.helpers.journal_helpers import AUTHOR, DEVICE, OTHER, TODAY, FixedClock, make_site, rec


@pytest.fixture
def full_reads(monkeypatch: pytest.MonkeyPatch) -> list[int]:
    """One item per record that read the whole log the full way."""
    calls: list[int] = []
    real = record.read_journal

    def spy(folder):
        calls.append(1)
        return real(folder)

    monkeypatch.setattr(record, "read_journal", spy)
    return calls


def rec_tail(folder: Path, kind: str, day: date | None, device: str = DEVICE, **fields):
    """Record as ``fieldlog record`` does: the site and the log's facts from the tail."""
    link = TailLink.open(folder)
    return record.record_entry(
        folder,
        link.site,
        kind,
        day,
        fields,
        today=TODAY,
        author=AUTHOR,
        device=device,
        clock=FixedClock(),
        tail=link,
    )


def kept_matches_full_read(folder: Path) -> bool:
    """The kept record, if any, holds what the full read gives now; True when one is kept."""
    kept = TailLink.open(folder).kept
    if kept is None:
        return False
    site = load_site(folder)
    journal = read_journal(folder)
    assert kept.context == EntryContext.of(replay(site, journal, date.max))
    highest: dict[str, int] = {}
    for e in journal.entries:
        highest[e.device] = max(highest.get(e.device, 0), e.seq)
    assert dict(kept.highest) == highest
    assert dict(kept.files) == snapshot(folder)
    return True


def test_the_second_record_reads_no_log(tmp_path, full_reads):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")  # registers the key
    rec_tail(site, "note", date(2026, 9, 9), text="first")
    assert len(full_reads) == 2  # the first kept record is built the full way
    rec_tail(site, "note", date(2026, 9, 9), text="second")
    rec_tail(site, "weather", date(2026, 9, 10), conditions="rain", stopped=True)
    assert len(full_reads) == 2
    assert kept_matches_full_read(site)


def test_every_kept_step_is_what_a_full_replay_gives(tmp_path):
    """A shift's worth of entries of every kind the checks read; after each one the kept
    record, carried over from the last, is compared with the full read."""
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 7), text="site set up")
    rec_tail(site, "note", date(2026, 9, 7), text="toolbox talk")
    steps = [
        ("started", date(2026, 9, 8), {"activity": "EXC-010"}),
        ("remaining", date(2026, 9, 9), {"activity": "EXC-010", "days": 2}),
        ("percent", date(2026, 9, 9), {"activity": "EXC-010", "percent": 60}),
        (
            "need",
            date(2026, 9, 9),
            {"activity": "BLD-010", "what": "rebar", "category": "material"},
        ),
        ("remaining", date(2026, 9, 10), {"activity": "EXC-010", "days": 1}),
        ("finished", date(2026, 9, 11), {"activity": "EXC-010"}),
        ("started", date(2026, 9, 14), {"activity": "BLD-010"}),
        ("lost-time", date(2026, 9, 15), {"cause": "weather", "whole_day": True}),
        ("finished", date(2026, 9, 10), {"activity": "BLD-010"}),  # before its start: refused
        ("started", date(2026, 9, 14), {"activity": "BLD-010"}),  # twice: refused
    ]
    for kind, day, fields in steps:
        try:
            rec_tail(site, kind, day, **fields)
        except EntryRefused:
            assert kind in ("started", "finished")
        assert kept_matches_full_read(site)  # carried over, never rebuilt
    need = next(e for e in read_journal(site).entries if e.kind == "need")
    rec_tail(site, "cleared", date(2026, 9, 16), item=need.id)
    assert kept_matches_full_read(site)
    with pytest.raises(EntryRefused, match="already cleared"):
        rec_tail(site, "cleared", date(2026, 9, 16), item=need.id)


def test_a_step_replay_might_read_differently_is_rebuilt_the_full_way(tmp_path, full_reads):
    site = make_site(tmp_path / "site")
    rec(site, "started", date(2026, 9, 8), activity="EXC-010")
    rec_tail(site, "remaining", date(2026, 9, 10), activity="EXC-010", days=1)
    rec_tail(site, "finished", date(2026, 9, 10), activity="EXC-010")  # same day as a measure
    assert TailLink.open(site).current()[0] is None  # the record kept is for the old bytes
    before = len(full_reads)
    rec_tail(site, "note", date(2026, 9, 11), text="backfill starts Monday")
    assert len(full_reads) == before + 1
    assert kept_matches_full_read(site)


def _tamper(site: Path) -> None:
    path = site / "log" / "2026-09-08_test-laptop-1.toml"
    path.write_bytes(path.read_bytes().replace(b"set-out checked", b"set-out skipped"))


def _truncate(site: Path) -> None:
    path = site / "log" / "2026-09-08_test-laptop-1.toml"
    data = path.read_bytes()
    path.write_bytes(data[: data.rindex(b"[[entry]]")])


def _remove(site: Path) -> None:
    (site / "log" / "2026-09-08_test-laptop-1.toml").unlink()


def _other_device(site: Path) -> None:
    rec(site, "started", date(2026, 9, 9), device=OTHER, activity="EXC-010")


def _key_file(site: Path) -> None:
    path = site / "devices" / f"{DEVICE}.toml"
    path.write_bytes(path.read_bytes() + b"\n")


def _schedule(site: Path) -> None:
    path = site / "schedule.toml"
    path.write_bytes(path.read_bytes() + b"\n# revised\n")


@pytest.mark.parametrize(
    "change", [_tamper, _truncate, _remove, _other_device, _key_file, _schedule]
)
def test_a_file_changed_behind_the_record_means_the_full_read(tmp_path, full_reads, change):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec(site, "note", date(2026, 9, 8), text="levels taken")
    rec_tail(site, "note", date(2026, 9, 9), text="kept from here")
    assert TailLink.open(site).kept is not None
    change(site)
    before = len(full_reads)
    rec_tail(site, "note", date(2026, 9, 10), text="after the change")
    assert len(full_reads) == before + 1
    if change in (_tamper, _truncate, _remove):  # the full read still names what was done
        problems = {f.problem for f in read_journal(site).findings}
        assert problems & {"edited", "forged", "removed"}, problems


def test_a_start_another_device_logged_meanwhile_is_refused(tmp_path):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec_tail(site, "note", date(2026, 9, 8), text="kept from here")
    _other_device(site)  # a synced file: new bytes the kept record was not built from
    with pytest.raises(EntryRefused, match="EXC-010 already started"):
        rec_tail(site, "started", date(2026, 9, 10), activity="EXC-010")


def test_a_damaged_or_planted_record_is_ignored(tmp_path, full_reads, _isolated_home):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec_tail(site, "note", date(2026, 9, 8), text="kept from here")
    (path,) = (_isolated_home / "cache").glob("tail-*.pack")
    data = path.read_bytes()
    path.write_bytes(data[:-1] + bytes([data[-1] ^ 1]))  # one bit of the payload flipped
    assert TailLink.open(site).kept is None
    before = len(full_reads)
    rec_tail(site, "note", date(2026, 9, 9), text="still recorded")
    assert len(full_reads) == before + 1
    assert kept_matches_full_read(site)


def test_a_log_with_a_damaged_file_keeps_no_record(tmp_path):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    (site / "log" / f"2026-09-09_{OTHER}.toml").write_bytes(b"[[entry]\nseq = 9\n")
    rec_tail(site, "note", date(2026, 9, 10), text="recorded beside it")
    assert TailLink.open(site).kept is None


@pytest.mark.parametrize("odd", ["link", "folder", "fifo"])
def test_anything_but_a_plain_file_in_the_log_means_the_full_read(tmp_path, full_reads, odd):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec_tail(site, "note", date(2026, 9, 8), text="kept from here")
    stray = site / "log" / f"2026-09-09_{OTHER}.toml"
    if odd == "link":
        stray.symlink_to(site / "site.toml")
    elif odd == "folder":
        stray.mkdir()
    else:
        os.mkfifo(stray)  # never opened for reading: a read would hang
    assert snapshot(site) is None
    before = len(full_reads)
    rec_tail(site, "note", date(2026, 9, 10), text="after the stray")
    assert len(full_reads) == before + 1


def test_a_day_file_the_record_vouches_for_is_appended_to_unparsed(
    tmp_path, full_reads, monkeypatch
):
    """The kept tip (count and last hash of the file just appended to) gives the next
    entry's position and ``prev``; the oracle is the full read, whose chain check
    (fieldlog/journal/filecheck.py) refuses any wrong ``prev`` or order."""
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec_tail(site, "note", date(2026, 9, 9), text="first of the day")  # full way, parsed
    parsed: list[str] = []
    real = record.checked

    def spy(name, data):
        parsed.append(name)
        return real(name, data)

    monkeypatch.setattr(record, "checked", spy)
    written = [rec_tail(site, "note", date(2026, 9, 9), text=f"note {n}") for n in range(4)]
    assert parsed == [] and len(full_reads) == 2
    journal = read_journal(site)
    assert journal.findings == ()
    day = [e for e in journal.entries if e.file == written[0].file]
    assert [e.id for e in day][-4:] == [e.id for e in written]
    assert [e.position for e in day] == list(range(len(day)))
    assert [e.prev for e in day[1:]] == [e.hash for e in day[:-1]]
    assert kept_matches_full_read(site)


def test_an_edit_keeping_size_and_mtime_is_caught_before_the_next_append(tmp_path, full_reads):
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec_tail(site, "note", date(2026, 9, 9), text="levels taken")
    last = rec_tail(site, "note", date(2026, 9, 9), text="kerbs set")  # the kept tip
    path = site / "log" / last.file
    info = path.stat()
    data = path.read_bytes()
    path.write_bytes(data.replace(b"kerbs set", b"kerbs cut"))  # same size
    os.utime(path, ns=(info.st_atime_ns, info.st_mtime_ns))  # same mtime
    assert path.stat().st_size == info.st_size
    assert path.stat().st_mtime_ns == info.st_mtime_ns
    before = len(full_reads)
    rec_tail(site, "note", date(2026, 9, 9), text="after the edit")
    assert len(full_reads) == before + 1
    problems = {f.problem for f in read_journal(site).findings}
    assert problems & {"edited", "forged"}, problems


@pytest.mark.parametrize("relative", [True, False])
def test_the_digests_are_those_of_each_file_read_whole(tmp_path, monkeypatch, relative):
    """Opened relative to the folder (POSIX) or by path (elsewhere), the digests are those
    of hashlib's sha256 over each file's bytes as pathlib reads them (the reference)."""
    import hashlib

    from fieldlog.journal import tail

    monkeypatch.setattr(tail, "_AT", relative and tail._AT)
    site = make_site(tmp_path / "site")
    rec(site, "note", date(2026, 9, 8), text="set-out checked")
    rec(site, "note", date(2026, 9, 9), text="levels taken")
    (site / "log" / "empty.toml").write_bytes(b"")
    expected = {
        p.name: hashlib.sha256(p.read_bytes()).hexdigest()
        for p in (site / "log").iterdir()
        if not p.name.startswith(".")
    }
    assert snapshot(site) == expected
    (site / "log" / "linked.toml").symlink_to(site / "site.toml")
    assert snapshot(site) is None
