"""Replay rules: later days win, file order within a day, corrections, contradictions kept.

Entries are built in memory here (not through ``record_entry``) so that logs that fieldlog
itself would refuse to write, such as two devices disagreeing on a start, can be replayed:
those arrive by sync from two machines and must be reported, never dropped.
"""

from __future__ import annotations

import random
from datetime import UTC, date, datetime, timedelta
from types import MappingProxyType

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.journal import Entry, replay
from fieldlog.site.files import load_site
from fieldlog.workspace import load_state
from tests.helpers.journal_helpers import make_site, rec

D = date(2026, 9, 1)


def day(n: int) -> date:
    """Day n of September 2026."""
    return D.replace(day=n)


class Log:
    """Builds entries with running per-device numbers and file positions."""

    def __init__(self) -> None:
        self.entries: list[Entry] = []
        self.seq: dict[str, int] = {}
        self.pos: dict[tuple[date, str], int] = {}

    def add(self, kind: str, on: date, device: str = "laptop-a", **fields) -> Entry:
        n = self.seq[device] = self.seq.get(device, 0) + 1
        p = self.pos[(on, device)] = self.pos.get((on, device), -1) + 1
        if kind == "correction":
            target = self.by_id(fields["supersedes"])
            while target.kind == "correction":
                target = self.by_id(target.fields["supersedes"])
            fields["corrects"] = target.kind
        e = Entry(
            id=f"{device}.{n}",
            seq=n,
            kind=kind,
            day=on,
            written=datetime(2026, 9, 30, tzinfo=UTC) + timedelta(minutes=len(self.entries)),
            author="T",
            device=device,
            fields=MappingProxyType(fields),
            file=f"{on}_{device}.toml",
            position=p,
        )
        self.entries.append(e)
        return e

    def by_id(self, entry_id: str) -> Entry:
        return next(e for e in self.entries if e.id == entry_id)


def site(tmp_path):
    return load_site(make_site(tmp_path / "site"))


def test_later_days_win_and_later_days_are_ignored(tmp_path):
    s, log = site(tmp_path), Log()
    log.add("started", day(7), activity="EXC-010")
    log.add("remaining", day(8), activity="EXC-010", days=5)
    log.add("remaining", day(10), activity="EXC-010", days=3)
    log.add("finished", day(14), activity="EXC-010")
    p = replay(s, log.entries, day(9)).progress["EXC-010"]
    assert (p.actual_start, p.remaining, p.remaining_as_of, p.actual_finish) == (
        day(7),
        5,
        day(8),
        None,
    )
    p = replay(s, log.entries, day(13)).progress["EXC-010"]
    assert (p.remaining, p.remaining_as_of, p.actual_finish) == (3, day(10), None)
    assert replay(s, log.entries, day(14)).progress["EXC-010"].actual_finish == day(14)
    assert "EXC-010" not in replay(s, log.entries, day(6)).progress


def test_within_a_day_file_order_wins_and_devices_go_in_id_order(tmp_path):
    s, log = site(tmp_path), Log()
    log.add("started", day(7), activity="EXC-010")
    log.add("remaining", day(8), "tablet-b", activity="EXC-010", days=9)
    log.add("remaining", day(8), "laptop-a", activity="EXC-010", days=4)
    log.add("remaining", day(8), "laptop-a", activity="EXC-010", days=6)
    # laptop-a sorts before tablet-b, so tablet-b's entry is the last word of that day.
    assert replay(s, log.entries, day(8)).progress["EXC-010"].remaining == 9


@settings(max_examples=30, deadline=None)
@given(st.randoms(use_true_random=False))
def test_replay_does_not_depend_on_the_order_entries_arrive_in(tmp_path_factory, rnd):
    s = load_site(make_site(tmp_path_factory.mktemp("s") / "site"))
    log = Log()
    log.add("started", day(7), "tablet-b", activity="EXC-010")
    log.add("started", day(8), "laptop-a", activity="EXC-010")
    for n, dev in ((9, "laptop-a"), (9, "tablet-b"), (10, "laptop-a")):
        log.add("remaining", day(n), dev, activity="EXC-010", days=n)
    log.add("lost-time", day(9), cause="weather", whole_day=True)
    first = replay(s, log.entries, day(10))
    shuffled = list(log.entries)
    rnd.shuffle(shuffled)
    again = replay(s, shuffled, day(10))
    assert again.progress == first.progress
    assert again.lost_days == first.lost_days
    assert again.problems == first.problems


def test_correction_replaces_in_place_and_can_move_a_day(tmp_path):
    s, log = site(tmp_path), Log()
    start = log.add("started", day(8), activity="EXC-010")
    rem = log.add("remaining", day(9), activity="EXC-010", days=5)
    log.add("remaining", day(9), activity="EXC-010", days=4)
    # Fixing the first figure must not override the later figure of the same day.
    log.add("correction", day(9), supersedes=rem.id, reason="miscounted", days=6)
    log.add("correction", day(7), supersedes=start.id, reason="started a day earlier")
    rp = replay(s, log.entries, day(9))
    assert rp.progress["EXC-010"].remaining == 4
    assert rp.progress["EXC-010"].actual_start == day(7)
    assert set(rp.superseded) == {rem.id, start.id}
    assert replay(s, log.entries, day(7)).progress["EXC-010"].actual_start == day(7)
    assert not rp.problems


def test_withdrawal_and_withdrawing_a_withdrawal(tmp_path):
    s, log = site(tmp_path), Log()
    start = log.add("started", day(8), activity="EXC-010")
    w = log.add("correction", day(8), supersedes=start.id, reason="wrong activity", withdraw=True)
    assert "EXC-010" not in replay(s, log.entries, day(9)).progress
    log.add("correction", day(8), supersedes=w.id, reason="it was right after all", withdraw=True)
    assert replay(s, log.entries, day(9)).progress["EXC-010"].actual_start == day(8)


def test_a_correction_of_a_correction_refines_it(tmp_path):
    s, log = site(tmp_path), Log()
    w = log.add("weather", day(8), conditions="rain", high=12.0, low=5.0, unit="C")
    c1 = log.add("correction", day(8), supersedes=w.id, reason="misread", high=14.0)
    log.add("correction", day(8), supersedes=c1.id, reason="misread again", low=6.0)
    (eff,) = [e for e in replay(s, log.entries, day(8)).effective if e.kind == "weather"]
    assert (eff.fields["high"], eff.fields["low"]) == (14.0, 6.0)


def test_a_correction_dated_after_the_status_date_is_not_yet_applied(tmp_path):
    s, log = site(tmp_path), Log()
    start = log.add("started", day(8), activity="EXC-010")
    log.add("correction", day(10), supersedes=start.id, reason="really started on the 10th")
    assert replay(s, log.entries, day(9)).progress["EXC-010"].actual_start == day(8)
    assert replay(s, log.entries, day(10)).progress["EXC-010"].actual_start == day(10)


def test_contradictions_are_reported_with_both_entries(tmp_path):
    s, log = site(tmp_path), Log()
    a = log.add("started", day(8), "laptop-a", activity="EXC-010")
    b = log.add("started", day(9), "tablet-b", activity="EXC-010")
    f = log.add("finished", day(10), activity="BLD-010")
    g = log.add("started", day(11), activity="BLD-010")
    h = log.add("finished", day(11), activity="EXC-010")
    r = log.add("remaining", day(14), activity="EXC-010", days=2)
    x = log.add("note", day(14), text="moved the spoil heap", activity="OLD-999")
    c1 = log.add("correction", day(14), supersedes=f.id, reason="a")
    c2 = log.add("correction", day(14), supersedes=f.id, reason="b", withdraw=True)
    u = Entry(
        **{
            **c1.__dict__,
            "id": "laptop-a.99",
            "seq": 99,
            "fields": MappingProxyType(
                {"supersedes": "laptop-a.98", "reason": "?", "corrects": "note"}
            ),
        }
    )
    rp = replay(s, [*log.entries, u], day(20))
    by_ids = {p.entry_ids: p.message for p in rp.problems}
    assert by_ids[(a.id, b.id)].startswith("EXC-010: two different actual starts")
    assert rp.progress["EXC-010"].actual_start == day(9)  # the later day is used
    assert (h.id, r.id) in by_ids and "not applied" in by_ids[(h.id, r.id)]
    assert rp.progress["EXC-010"].remaining is None
    assert "OLD-999" in by_ids[(x.id,)]
    assert (c1.id, c2.id) in by_ids
    assert "not in the log" in by_ids[(u.id,)]
    # c2 (the later correction) withdrew BLD-010's finish, so no finish-before-start remains.
    assert not any(g.id in ids for ids in by_ids)
    assert rp.progress["BLD-010"].actual_finish is None


def test_finish_before_start_names_both(tmp_path):
    s, log = site(tmp_path), Log()
    st_ = log.add("started", day(10), activity="EXC-010")
    fi = log.add("finished", day(9), "tablet-b", activity="EXC-010")
    (p,) = replay(s, log.entries, day(12)).problems
    assert set(p.entry_ids) == {st_.id, fi.id} and "before start" in p.message


def test_lost_days_per_calendar(tmp_path):
    s, log = site(tmp_path), Log()
    log.add("lost-time", day(8), cause="weather", whole_day=True)
    log.add("lost-time", day(9), cause="access", whole_day=True, calendars=["weekdays"])
    log.add("lost-time", day(10), cause="materials", whole_day=False, hours=3.0)
    bad = log.add("lost-time", day(11), cause="other", whole_day=True, calendars=["nights"])
    rp = replay(s, log.entries, day(11))
    assert rp.lost_days == {"allweek": frozenset({day(8)}), "weekdays": frozenset({day(8), day(9)})}
    assert [p.entry_ids for p in rp.problems] == [(bad.id,)]
    assert replay(s, log.entries, day(8)).lost_days["weekdays"] == frozenset({day(8)})


def test_readiness_items_open_and_clear(tmp_path):
    s, log = site(tmp_path), Log()
    n1 = log.add(
        "need",
        day(8),
        activity="CON-010",
        what="pump booking",
        category="equipment",
        expected=day(15),
    )
    n2 = log.add(
        "need", day(8), activity="WAL-010", what="wall drawings rev B", category="drawings"
    )
    c = log.add("correction", day(8), supersedes=n1.id, reason="date moved", expected=day(16))
    log.add("cleared", day(11), item=n1.id)  # the original id still finds the corrected item
    rp = replay(s, log.entries, day(10))
    assert {(i.activity, i.expected, i.entry_id) for i in rp.readiness} == {
        ("CON-010", day(16), c.id),
        ("WAL-010", None, n2.id),
    }
    rp = replay(s, log.entries, day(11))
    assert [i.entry_id for i in rp.readiness] == [n2.id]
    twice = log.add("cleared", day(12), item=c.id)
    rp = replay(s, log.entries, day(12))
    assert any(twice.id in p.entry_ids and "twice" in p.message for p in rp.problems)


def test_a_lost_day_moves_the_forecast_by_one_working_day(tmp_path):
    """Checked against numpy.busday_offset, the outside reference for working-day arithmetic:
    the lost day is passed to numpy as a holiday."""
    folder = make_site(tmp_path / "site")
    rec(folder, "started", day(7), activity="EXC-010")
    before = load_state(folder, day(8)).schedule.by_id["EXC-010"].early_finish
    rec(folder, "lost-time", day(8), cause="weather", whole_day=True, activities=["EXC-010"])
    after = load_state(folder, day(8)).schedule.by_id["EXC-010"].early_finish
    # 4 days from the 7th; the 7th worked, the 8th lost: the last day is 3 working days after
    # the 7th skipping the 8th.
    ref = np.busday_offset(np.datetime64(day(7)), 3, roll="forward", holidays=[day(8)])
    assert after == ref.astype(date) and before == date(2026, 9, 10)


def test_last_day_is_the_latest_day_described(tmp_path):
    folder = make_site(tmp_path / "site")
    from fieldlog.journal import read_journal

    assert read_journal(folder).last_day is None
    rec(folder, "note", day(11), text="a")
    rec(folder, "note", day(9), text="b")
    assert read_journal(folder).last_day == day(11)
    assert [e.day for e in read_journal(folder).entries] == [day(9), day(11)]


def test_replay_of_a_random_log_is_stable(tmp_path):
    """Smoke: a hundred random entries replay without error and identically twice."""
    s, log, rnd = site(tmp_path), Log(), random.Random(7)
    for _ in range(100):
        aid = rnd.choice(["EXC-010", "BLD-010", "CON-010"])
        kind = rnd.choice(["started", "finished", "remaining", "percent"])
        fields = {"activity": aid}
        if kind == "remaining":
            fields["days"] = rnd.randint(1, 9)
        if kind == "percent":
            fields["percent"] = float(rnd.randint(0, 100))
        log.add(kind, day(rnd.randint(7, 25)), rnd.choice(["laptop-a", "tablet-b"]), **fields)
    assert replay(s, log.entries, day(25)) == replay(s, log.entries, day(25))
