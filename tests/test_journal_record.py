"""Recording entries: what is refused (and then nothing is written), what is stored, the CLI.

Every refusal test checks the log folder byte for byte before and after: a refused entry must
leave no trace.
"""

from __future__ import annotations

import re
import tomllib
from datetime import date, time

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fieldlog.bounds import RECORD_HIDDEN
from fieldlog.cli import main
from fieldlog.errors import EntryRefused
from fieldlog.journal import KINDS, device_id, read_journal, record_entry, verify
from fieldlog.journal.device import new_device_id
from fieldlog.journal.names import DEVICE_RE, file_name, parse_file_name
from fieldlog.site.files import load_site
from tests.helpers.journal_helpers import (
    AUTHOR,
    DEVICE,
    TODAY,
    FixedClock,
    log_bytes,
    make_site,
    rec,
    run_cli,
)


@pytest.fixture
def folder(tmp_path, monkeypatch):
    monkeypatch.setenv("FIELDLOG_HOME", str(tmp_path / "home"))
    return make_site(tmp_path / "site")


def d(n: int) -> date:
    return date(2026, 9, n)


def test_an_entry_is_stored_with_the_contract_fields(folder):
    e = rec(folder, "started", d(8), activity="EXC-010")
    assert e.id == f"{DEVICE}.1" and e.file == f"2026-09-08_{DEVICE}.toml"
    data = tomllib.loads((folder / "log" / e.file).read_text(encoding="utf-8"))
    (row,) = data["entry"]
    assert {"id", "kind", "day", "written", "author", "device", "prev", "hash"} <= set(row)
    assert row["day"] == d(8) and row["written"].utcoffset().total_seconds() == 0
    assert row["prev"] == "" and re.fullmatch(r"[0-9a-f]{64}", row["hash"])
    e2 = rec(folder, "remaining", d(8), activity="EXC-010", days=3)
    rows = tomllib.loads((folder / "log" / e.file).read_text(encoding="utf-8"))["entry"]
    assert rows[1]["prev"] == rows[0]["hash"] and e2.id == f"{DEVICE}.2"
    assert verify(folder) == []


def test_entry_numbers_run_on_across_day_files(folder):
    ids = [rec(folder, "note", d(n), text=f"day {n}").id for n in (9, 7, 9, 8)]
    assert ids == [f"{DEVICE}.{n}" for n in (1, 2, 3, 4)]
    assert sorted(log_bytes(folder)) == [f"2026-09-0{n}_{DEVICE}.toml" for n in (7, 8, 9)]


REFUSED = [
    # (kind, day, fields, words in the message)
    ("started", d(8), {"activity": "EXC-01"}, "unknown activity 'EXC-01'"),
    ("started", d(26), {"activity": "EXC-010"}, "after today"),
    ("remaining", d(9), {"activity": "EXC-010", "days": -1}, "below 1"),
    ("remaining", d(9), {"activity": "EXC-010", "days": 0}, "below 1"),
    ("remaining", d(9), {"activity": "EXC-010", "days": "2.5"}, "whole number"),
    ("remaining", d(9), {"activity": "BLD-010", "days": 2}, "no actual start"),
    ("percent", d(9), {"activity": "EXC-010", "percent": 101}, "above 100"),
    ("percent", d(9), {"activity": "EXC-010", "percent": "lots"}, "not a number"),
    ("finished", d(7), {"activity": "EXC-010"}, "before its start"),
    ("started", d(9), {"activity": "EXC-010"}, "already started on 2026-09-08"),
    ("weather", d(9), {"conditions": "rain", "high": 5, "low": 9}, "above high"),
    ("weather", d(9), {"conditions": "rain", "hours_lost": 25}, "above 24"),
    ("crew", d(9), {"trade": "groundworks", "headcount": 2, "hours": 60}, "more than"),
    ("lost-time", d(9), {"cause": "rain", "whole_day": True}, "not one of"),
    (
        "lost-time",
        d(9),
        {"cause": "weather", "whole_day": True, "calendars": ["nights"]},
        "unknown calendar",
    ),
    ("lost-time", d(9), {"cause": "weather"}, "whole day, or the hours"),
    ("need", d(9), {"activity": "CON-010", "what": "pump", "category": "pump"}, "not one of"),
    (
        "need",
        d(9),
        {"activity": "CON-010", "what": "pump", "category": "equipment", "expected": d(8)},
        "before",
    ),
    ("cleared", d(9), {"item": f"{DEVICE}.77"}, "not a readiness item"),
    ("note", d(9), {"text": "   "}, "must be text"),
    ("note", d(9), {"text": "x", "colour": "red"}, "no field 'colour'"),
    ("instruction", d(9), {"text": "stop", "given_by": "client", "form": "shouted"}, "not one of"),
    ("visitor", d(9), {}, "needs name"),
    ("started", d(8), {"activity": "BLD-010", "note": "x"}, "no field"),
]


@pytest.mark.parametrize(
    ("kind", "day", "fields", "words"), REFUSED, ids=[f"{r[0]}-{r[3][:20]}" for r in REFUSED]
)
def test_bad_input_is_refused_and_nothing_is_written(folder, kind, day, fields, words):
    rec(folder, "started", d(8), activity="EXC-010")
    before = log_bytes(folder)
    with pytest.raises(EntryRefused, match=re.escape(words)):
        rec(folder, kind, day, **fields)
    assert log_bytes(folder) == before


def test_remaining_days_on_a_finished_activity_are_refused(folder):
    rec(folder, "started", d(8), activity="EXC-010")
    rec(folder, "finished", d(10), activity="EXC-010")
    before = log_bytes(folder)
    with pytest.raises(EntryRefused, match="finished on 2026-09-10"):
        rec(folder, "remaining", d(11), activity="EXC-010", days=2)
    rec(folder, "remaining", d(9), activity="EXC-010", days=2)  # catching up on the 9th: fine
    assert len(log_bytes(folder)) == len(before) + 1


def test_corrections(folder):
    start = rec(folder, "started", d(8), activity="EXC-010")
    rem = rec(folder, "remaining", d(9), activity="EXC-010", days=3)
    with pytest.raises(EntryRefused, match="nothing to correct"):
        rec(folder, "correction", None, supersedes=rem.id, reason="?")
    with pytest.raises(EntryRefused, match="no entry"):
        rec(folder, "correction", None, supersedes=f"{DEVICE}.99", reason="?")
    with pytest.raises(EntryRefused, match="remaining entry has no field 'percent'"):
        rec(folder, "correction", None, supersedes=rem.id, reason="?", percent="4")
    with pytest.raises(EntryRefused, match="cannot start on 2026-09-10"):
        rec(folder, "correction", d(10), supersedes=start.id, reason="?")  # after the 9th's
    c = rec(folder, "correction", None, supersedes=rem.id, reason="miscounted", days="4")
    assert c.day == rem.day and c.fields["corrects"] == "remaining" and c.fields["days"] == 4
    with pytest.raises(EntryRefused, match=f"already corrected by {c.id}"):
        rec(folder, "correction", None, supersedes=rem.id, reason="again", days=5)
    moved = rec(folder, "correction", d(7), supersedes=start.id, reason="started a day early")
    assert moved.file.startswith("2026-09-07")
    # Re-recording a start is refused with the correction to use instead.
    with pytest.raises(EntryRefused, match=f"correct {moved.id}"):
        rec(folder, "started", d(7), activity="EXC-010")
    assert verify(folder) == []


def test_clearing_a_readiness_item(folder):
    need = rec(
        folder,
        "need",
        d(8),
        activity="CON-010",
        what="pump booking",
        category="equipment",
        expected=d(15),
    )
    with pytest.raises(EntryRefused, match="opened on 2026-09-08"):
        rec(folder, "cleared", d(7), item=need.id)
    rec(folder, "cleared", d(9), item=need.id)
    with pytest.raises(EntryRefused, match="already cleared"):
        rec(folder, "cleared", d(10), item=need.id)


def test_every_kind_can_be_recorded_and_read_back(folder):
    samples = {
        "weather": {
            "conditions": "showers",
            "high": 14,
            "low": 8,
            "precip_mm": 3.5,
            "wind": "light",
            "stopped": False,
        },
        "crew": {
            "trade": "groundworks",
            "company": "Tarn Civils (invented)",
            "headcount": 5,
            "hours": 42.5,
            "activities": "EXC-010",
        },
        "lost-time": {
            "cause": "design",
            "hours": 2,
            "activities": ["EXC-010"],
            "note": "waiting for levels",
        },
        "need": {"activity": "CON-010", "what": "pump", "category": "equipment"},
        "delivery": {"what": "rebar", "quantity": "4 t", "supplier": "Hollin Steel (invented)"},
        "inspection": {"what": "formation", "result": "passed", "inspector": "engineer"},
        "visitor": {
            "name": "A. Client",
            "purpose": "progress walk",
            "time_in": "09:15",
            "time_out": "11:40",
        },
        "plant": {
            "what": "13 t excavator",
            "count": 1,
            "hours_worked": 5,
            "broken_down": True,
            "hours_down": 3,
            "supplier": "Brack Plant Hire (invented)",
            "activity": "EXC-010",
            "note": "hydraulic hose split",
        },
        "instruction": {
            "text": "hold the pour",
            "given_by": "resident engineer",
            "form": "verbal",
            "reference": "none yet",
        },
        "incident": {"text": "cut hand", "injury": True, "reported_to": "site manager"},
        "safety": {"text": "edge protection missing", "action": "barrier placed"},
        "note": {"text": 'line one\nline two with "quotes" and a tab\t'},
    }
    assert set(samples) | {
        "started",
        "finished",
        "remaining",
        "percent",
        "cleared",
        "correction",
    } == set(KINDS)
    for kind, fields in samples.items():
        rec(folder, kind, d(8), **fields)
    entries = read_journal(folder).entries
    assert [e.kind for e in entries] == list(samples)
    assert entries[0].fields["unit"] == "C"  # temperatures without a unit are Celsius
    assert entries[-1].fields["text"].startswith("line one\nline two")
    visitor = next(e for e in entries if e.kind == "visitor")
    assert (visitor.fields["time_in"], visitor.fields["time_out"]) == (time(9, 15), time(11, 40))
    assert verify(folder) == []


@pytest.mark.parametrize(
    ("kind", "fields", "words"),
    [
        ("visitor", {"name": "A", "time_in": "11:00", "time_out": "09:00"}, "before time_in"),
        ("visitor", {"name": "A", "time_in": "25:00"}, "not a time like 07:30"),
        ("visitor", {"name": "A", "time_in": "9"}, "not a time like 07:30"),
        ("plant", {"what": "pump", "hours_down": 2}, "say broken_down too"),
        (
            "plant",
            {"what": "pump", "hours_worked": 20, "broken_down": True, "hours_down": 6},
            "more than a day",
        ),
        ("plant", {"what": "pump", "count": 0}, "below 1"),
        ("plant", {"what": "pump", "count": 501}, "above 500"),
        ("lost-time", {"cause": "plant-breakdown", "hours": 25}, "above 24"),
        ("remaining", {"activity": "EXC-010", "days": "1e9"}, "not a whole number"),
        ("percent", {"activity": "EXC-010", "percent": "2,5"}, "not a number like 2.5"),
    ],
)
def test_new_fields_have_bounds(folder, kind, fields, words):
    rec(folder, "started", d(7), activity="EXC-010")
    with pytest.raises(EntryRefused, match=words):
        rec(folder, kind, d(8), **fields)


def test_a_day_long_before_the_site_start_is_refused(folder):
    """A day more than a year before the site start is a mistyped year (day_words bounds)."""
    with pytest.raises(EntryRefused, match="a year before the site start"):
        rec(folder, "note", date(2024, 9, 8), text="wrong year")


def test_device_id_is_made_once_outside_the_site(tmp_path, monkeypatch):
    monkeypatch.setenv("FIELDLOG_HOME", str(tmp_path / "home"))
    first = device_id()
    assert DEVICE_RE.match(first) and device_id() == first
    assert (tmp_path / "home" / "device.toml").exists()
    folder = make_site(tmp_path / "site")
    e = record_entry(
        folder,
        load_site(folder),
        "note",
        d(8),
        {"text": "x"},
        today=TODAY,
        author=AUTHOR,
        clock=FixedClock(),
    )
    assert e.device == first


@pytest.mark.parametrize("host", ["", "SITE OFFICE #2", "a" * 80, "---", "laptop.local"])
def test_new_device_ids_are_valid(host):
    assert DEVICE_RE.match(new_device_id(host))


@pytest.mark.parametrize("name", ["2026-09-18_site-laptop-1.toml", "2026-02-28_abcdef.toml"])
def test_file_names_are_portable(name):
    """Windows/FAT rules as listed in the library notes (section 4.3): no < > : " / \\ | ? *,
    no control characters, no trailing dot or space, not a reserved device name, lower case."""
    day, device = parse_file_name(name)
    assert file_name(day, device) == name
    assert not re.search(r'[<>:"/\\|?*\x00-\x1f]', name) and name[-1] not in " ."
    assert name.split(".")[0].upper() not in {"CON", "PRN", "AUX", "NUL"}
    assert name == name.lower() and len(name) <= 255


def _main(capsys, *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def test_cli_record_forms(folder, capsys):
    """Every form, run in-process through the real parser (fast); see the next test for a
    real process."""
    s = str(folder)
    today = ["--today", "2026-09-25", "--author", "R. Tester"]
    ok = [
        ["started", "EXC-010", "--on", "2026-09-08"],
        ["remaining", "EXC-010", "3", "--on", "2026-09-08"],
        ["percent", "EXC-010", "40", "--on", "2026-09-08"],
        [
            "weather",
            "--on",
            "2026-09-09",
            "--conditions",
            "rain",
            "--high",
            "12",
            "--low",
            "6",
            "--precip-mm",
            "14",
            "--wind",
            "gusty",
            "--stopped",
            "--hours-lost",
            "6",
        ],
        [
            "lost-day",
            "--on",
            "2026-09-09",
            "--cause",
            "weather",
            "--activities",
            "EXC-010",
            "--calendars",
            "weekdays",
        ],
        ["lost-time", "--on", "2026-09-10", "--cause", "materials", "--hours", "2"],
        [
            "crew",
            "--on",
            "2026-09-08",
            "--trade",
            "groundworks",
            "--headcount",
            "5",
            "--hours",
            "40",
        ],
        [
            "need",
            "CON-010",
            "pump booking",
            "--kind",
            "equipment",
            "--expected",
            "2026-09-18",
            "--on",
            "2026-09-08",
        ],
        ["delivery", "rebar", "--quantity", "4 t", "--on", "2026-09-08"],
        ["inspection", "formation", "--result", "passed", "--on", "2026-09-08"],
        ["visitor", "A. Client", "--on", "2026-09-08"],
        [
            "instruction",
            "hold the pour",
            "--from",
            "engineer",
            "--form",
            "verbal",
            "--on",
            "2026-09-08",
        ],
        ["incident", "cut hand", "--injury", "--on", "2026-09-08"],
        ["safety", "edge protection", "--action", "fixed", "--on", "2026-09-08"],
        ["note", "quiet day", "--on", "2026-09-08"],
        [
            "plant",
            "pump",
            "--hours-worked",
            "5",
            "--broken-down",
            "--hours-down",
            "2",
            "--on",
            "2026-09-08",
        ],
        [
            "visitor",
            "B. Surveyor",
            "--time-in",
            "08:00",
            "--time-out",
            "9.30",
            "--on",
            "2026-09-08",
        ],
        ["lost-day", "--on", "2026-09-09", "--cause", "labour", "--hours", "3"],
        ["finished", "EXC-010", "--on", "2026-09-11"],
    ]
    ids = []
    for args in ok:
        code, out, err = _main(capsys, "record", s, *args, *today)
        # stderr only echoes the day, in full with its year (stdout is the entry id alone).
        assert code == 0 and re.fullmatch(
            r"fieldlog: recorded \S+ for \w{3} \d\d \w{3} 2026\n", err
        ), (args, err)
        ids.append(out.strip())
    entries = read_journal(folder).entries
    lost = {e.fields["cause"]: e.fields for e in entries if e.kind == "lost-time"}
    assert lost["weather"]["whole_day"] is True and lost["materials"]["whole_day"] is False
    code, _, err = _main(capsys, "record", s, "cleared", ids[7], "--on", "2026-09-12", *today)
    assert code == 0, err
    code, _, err = _main(
        capsys, "record", s, "correct", ids[1], "--reason", "miscounted", "--set", "days=4", *today
    )
    assert code == 0, err
    before = log_bytes(folder)
    for bad in (
        ["started", "NOPE", "--on", "2026-09-08"],
        ["remaining", "EXC-010", "-2", "--on", "2026-09-09"],
        ["finished", "BLD-010", "--on", "2026-09-30"],
        ["correct", ids[0], "--reason", "x", "--set", "nonsense"],
    ):
        code, out, err = _main(capsys, "record", s, *bad, *today)
        assert code == 2 and out == "" and len(err.splitlines()) == 1, bad
    assert log_bytes(folder) == before
    assert _main(capsys, "verify", s)[0] == 0


@pytest.mark.parametrize(
    "words",
    [
        ["record", "site", "note", "quiet day", "--on", "yesterday"],
        ["record", "note", "started", "EXC-010"],  # a site folder named like a form
        ["record", "started", "note", "a note on a site named 'started'"],
        ["record", "site", "lost-time", "--cause", "materials", "--hours", "2"],
        ["record", "site", "lost-day", "--cause", "weather", "--activities", "EXC-010"],
        ["record", "site", "correct", "dev-1.4", "--reason", "x", "--set", "days=4"],
        ["record", "site", "weather", "--conditions", "rain", "--stopped", "--high", "12"],
    ],
)
def test_record_builds_only_the_named_forms_and_parses_the_same(words):
    """The reference is the parser with every entry form built (brute force: all of them)."""
    from fieldlog.cli import build_parser

    every = build_parser("record")
    named = build_parser("record", words)
    assert vars(named.parse_args(words)) == vars(every.parse_args(words))

    def record_help(parser):
        return parser._subparsers._group_actions[0].choices["record"].format_help()

    assert record_help(named) == record_help(every)


def test_cli_in_a_real_process(folder, tmp_path):
    home = tmp_path / "home"
    args = (
        "record",
        str(folder),
        "started",
        "EXC-010",
        "--on",
        "2026-09-08",
        "--today",
        "2026-09-25",
    )
    r = run_cli(*args, home=home)  # a fresh device, no terminal, no --author
    assert r.returncode == 2 and r.stdout == "" and r.stderr.count("\n") == 1
    assert "--author NAME" in r.stderr and not (folder / "log").exists()
    r = run_cli(*args, "--author", "Q. Leadhand", home=home)
    assert r.returncode == 0 and re.fullmatch(r"[a-z0-9-]+\.1\n", r.stdout), r.stderr
    assert 'author = "Q. Leadhand"' in (home / "device.toml").read_text()  # kept: asked once
    before = log_bytes(folder)
    r = run_cli(
        "record",
        str(folder),
        "started",
        "EXC-010",
        "--on",
        "2026-09-30",
        "--today",
        "2026-09-25",
        home=home,
    )
    assert r.returncode == 2 and r.stdout == ""
    assert r.stderr.count("\n") == 1 and "after today" in r.stderr
    assert log_bytes(folder) == before


@settings(
    max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(
    text=st.text(
        alphabet=st.characters(blacklist_categories=("Cs",)), min_size=1, max_size=200
    ).filter(lambda t: t.strip())
)
def test_any_note_text_reads_back_exactly(folder, text):
    """Whatever a foreman types (quotes, backslashes, accents, emoji) survives the TOML
    round trip and keeps the chain intact; control characters and direction overrides are
    refused (tests/test_hidden_characters.py)."""
    clean = text.strip()
    if any(ord(c) < 32 and c not in "\n\t" for c in clean) or RECORD_HIDDEN.search(clean):
        with pytest.raises(EntryRefused):
            rec(folder, "note", d(8), text=text)
        return
    e = rec(folder, "note", d(8), text=text)
    assert read_journal(folder).by_id(e.id).fields["text"] == text.strip()


def test_the_sample_journal_is_what_the_generator_writes(tmp_path):
    """The sample site's log was written through record_entry by make_sample_log.py: running
    it again on a copy of the site gives the same bytes, and the log verifies."""
    import shutil
    import sys

    from tests.helpers.journal_helpers import ROOT

    sample = ROOT / "sample_sites" / "kestrel-yard"
    copy = tmp_path / "kestrel-yard"
    copy.mkdir()
    for name in ("site.toml", "schedule.toml"):
        shutil.copy(sample / name, copy / name)
    sys.path.insert(0, str(ROOT / "sample_sites"))
    try:
        import make_sample_log
    finally:
        sys.path.remove(str(ROOT / "sample_sites"))
    assert make_sample_log.write(copy) > 90
    assert log_bytes(copy) == log_bytes(sample)
    devices = sorted((sample / "devices").iterdir())
    assert [p.name for p in devices] == ["site-laptop-1.toml", "tablet-2.toml"]
    assert all(p.read_bytes() == (copy / "devices" / p.name).read_bytes() for p in devices)
    assert not any(b"PRIVATE" in p.read_bytes() for p in devices)  # public halves only
    assert verify(sample) == []
    journal = read_journal(sample)
    assert journal.unsigned == 0 and journal.signed == len(journal.entries) > 90


def test_a_milestone_is_reached_not_started(sample_site):
    """A milestone has no duration: 'started' is refused with the command that records it."""
    site = load_site(sample_site)
    assert site.activity("KEY-900").is_milestone
    before = sorted((sample_site / "log").glob("*.toml"))
    with pytest.raises(EntryRefused, match="is a milestone") as info:
        record_entry(
            sample_site,
            site,
            "started",
            date(2026, 9, 25),
            {"activity": "KEY-900"},
            today=date(2026, 9, 25),
        )
    assert "finished KEY-900 --on 2026-09-25" in info.value.message
    assert sorted((sample_site / "log").glob("*.toml")) == before
