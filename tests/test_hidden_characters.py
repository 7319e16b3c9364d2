"""Characters a reader never sees as themselves are refused where text comes in.

Found by attack: an activity name holding ``\\u001b[2J`` (the terminal's "clear screen"
escape) was accepted from schedule.toml and printed raw by the daily report, the CSV and the
calendar file; a name with a right-to-left override (U+202E) showed its words in another
order than stored; ``SITE-010`` and ``site-010`` were two activities. The hidden set is the
C0 and C1 controls, DEL and the bidirectional overrides and isolates (U+202A-U+202E,
U+2066-U+2069): the usual "Trojan Source" set (common practice in source and text review;
Unicode categories from Python's ``unicodedata``, a reference library).
"""

from __future__ import annotations

import json
import unicodedata

import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldlog.app.app import make_app
from fieldlog.app.screens.form import FormScreen
from fieldlog.bounds import HIDDEN_CHARS, RECORD_HIDDEN
from fieldlog.cli import main
from fieldlog.errors import EntryRefused
from fieldlog.journal import read_journal, verify
from fieldlog.journal import rules as journal_rules
from fieldlog.site import bulk
from tests.helpers.journal_helpers import TODAY, log_bytes, make_site, rec
from tests.test_app_site import save_form, screen_text
from tests.test_app_today import TUE, entries_of, started_site
from tests.test_hostile_files import run_hostile

HIDDEN = ["\x00", "\x1b", "\x7f", "\x9b", "\u202e", "\u2066"]
SHOWN = ["\u00a0", "e\u0301", "\u05e9\u05dc\u05d5\u05dd", "\U0001f468\u200d\U0001f469", "\u00e9"]


def test_the_hidden_set_is_every_control_and_bidi_override():
    """Against unicodedata: every Cc character is hidden, and of the Cf (format) characters
    exactly the ten embedding, override and isolate controls (Unicode's Bidi_Control list
    less the marks LRM, RLM, ALM, which change no order on their own: from memory)."""
    for code in range(0x3000):
        ch = chr(code)
        hidden = HIDDEN_CHARS.fullmatch(ch) is not None
        bidi_controls = ("LRE", "RLE", "LRO", "RLO", "PDF", "LRI", "RLI", "FSI", "PDI")
        expected = (
            unicodedata.category(ch) == "Cc" or unicodedata.bidirectional(ch) in bidi_controls
        )
        assert hidden is expected, hex(code)
        # A new entry: the same set less the C0 controls, which the reader refuses itself.
        assert (RECORD_HIDDEN.fullmatch(ch) is not None) == (hidden and code >= 0x20), hex(code)


def _escaped(ch: str) -> str:
    return f"\\u{ord(ch):04x}"


@pytest.mark.parametrize("ch", HIDDEN, ids=[f"U+{ord(c):04X}" for c in HIDDEN])
@pytest.mark.parametrize(
    ("file", "old", "new"),
    [
        ("schedule.toml", 'name = "Excavate base"', 'name = "Excavate {} base"'),
        ("site.toml", 'name = "Pump house', 'name = "Pump {} house'),
        ("site.toml", "[crews.groundworks]", '[crews."ground{}works"]'),
    ],
    ids=["activity name", "site name", "crew name"],
)
def test_a_hidden_character_in_a_site_file_is_one_line_naming_it(
    tmp_path, capsys, ch, file, old, new
):
    site = make_site(tmp_path / "site")
    text = (site / file).read_text(encoding="utf-8")
    assert old in text
    (site / file).write_text(text.replace(old, new.format(_escaped(ch)), 1), encoding="utf-8")
    assert main(["schedule", str(site)]) == 2
    out, err = capsys.readouterr()
    (line,) = err.strip().splitlines()
    assert line.startswith(f"fieldlog: {site / file}") and f"U+{ord(ch):04X}" in line
    assert "Fix: retype the text" in line and out == ""
    assert not HIDDEN_CHARS.search(line[len("fieldlog: ") :])  # the message itself is clean


@pytest.mark.parametrize("text", SHOWN)
def test_accents_hebrew_emoji_and_no_break_spaces_stay_welcome(tmp_path, capsys, text):
    site = make_site(tmp_path / "site")
    path = site / "schedule.toml"
    path.write_text(
        path.read_text("utf-8").replace("Excavate base", f"Excavate {text} base"), "utf-8"
    )
    assert main(["schedule", str(site), "--format", "json"]) == 0
    rows = json.loads(capsys.readouterr().out)["activities"]
    assert f"Excavate {text} base" in [r["name"] for r in rows]


def test_ids_that_differ_only_in_case_are_refused_naming_both_lines(tmp_path, capsys):
    site = make_site(tmp_path / "site")
    path = site / "schedule.toml"
    path.write_text(path.read_text("utf-8").replace('id = "BLD-010"', 'id = "exc-010"'), "utf-8")
    assert main(["schedule", str(site)]) == 2
    (line,) = capsys.readouterr().err.strip().splitlines()
    assert "activity id 'exc-010' differs only in case from 'EXC-010' (line " in line
    assert "Fix: give every activity an id of its own" in line


def test_through_the_hostile_harness_one_line_fast_and_small(tmp_path):
    site = make_site(tmp_path / "site")
    path = site / "schedule.toml"
    path.write_text(path.read_text("utf-8").replace("Excavate base", "Ex \\u001b]0;x\\u0007"))
    done = run_hostile(tmp_path, "report", str(site), "--day", "2026-09-08")
    assert done.returncode == 2 and "U+001B" in done.stderr and "\x1b" not in done.stderr


# -- the journal: refused when recorded, still read when stored -----------------------------


@pytest.fixture
def folder(tmp_path, monkeypatch):
    monkeypatch.setenv("FIELDLOG_HOME", str(tmp_path / "home"))
    return make_site(tmp_path / "site")


@pytest.mark.parametrize("ch", HIDDEN, ids=[f"U+{ord(c):04X}" for c in HIDDEN])
def test_a_new_entry_with_a_hidden_character_is_refused_and_nothing_written(folder, ch):
    before = log_bytes(folder)
    with pytest.raises(EntryRefused) as caught:
        rec(folder, "note", TODAY, text=f"crane {ch} booked")
    assert (
        "control characters" in caught.value.message or f"U+{ord(ch):04X}" in caught.value.message
    )
    assert log_bytes(folder) == before


def test_lines_tabs_and_every_script_are_recorded_as_typed(folder):
    text = "pump on hire\n\tback Thursday " + " ".join(SHOWN)
    assert rec(folder, "note", TODAY, text=text).fields["text"] == text


def test_a_correction_reason_with_an_override_is_refused(folder):
    e = rec(folder, "note", TODAY, text="crane booked")
    with pytest.raises(EntryRefused, match="U\\+202E"):
        rec(folder, "correction", None, supersedes=e.id, reason="typo \u202e", text="crane off")


def test_a_stored_entry_an_older_fieldlog_wrote_stays_readable(folder, monkeypatch):
    monkeypatch.setattr(journal_rules, "check_hidden", lambda kind, fields: None)
    rec(folder, "note", TODAY, text="old \u202e entry \x7f")
    monkeypatch.undo()
    assert [e.fields["text"] for e in read_journal(folder).entries] == ["old \u202e entry \x7f"]
    assert verify(folder) == []


async def test_the_app_says_so_under_the_note_and_writes_nothing(tmp_path):
    """Pasting text copied from a web page can carry a direction override."""
    folder = started_site(tmp_path)
    before = log_bytes(folder)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("n")
        await save_form(app, pilot, text="crane \u202ebooked")
        assert isinstance(app.screen, FormScreen)
        assert "hidden character U+202E" in screen_text(app)
        assert log_bytes(folder) == before
        await save_form(app, pilot, text="crane booked")
    assert [e.fields["text"] for e in entries_of(folder, "note")] == ["crane booked"]


@given(st.lists(st.from_regex(r"[A-Ca-c0-1._-]{1,3}", fullmatch=True), unique=True, max_size=12))
def test_case_twins_agree_with_every_pair_compared(ids):
    """The bulk path's quick test against brute force over every pair of ids."""
    pairs = any(a != b and a.lower() == b.lower() for a in ids for b in ids)
    assert bulk._case_twins(ids) is pairs
