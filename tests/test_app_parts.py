"""The app's pure parts, without a terminal: keys, forms, lists, printing, words on screen.

Fast tests; the Pilot tests (``test_app_today`` and friends) drive the same code through keys.
"""

from __future__ import annotations

import subprocess
from datetime import date
from pathlib import Path

import pytest

from fieldlog.app.float_filter import FILTERS, NEAR_CRITICAL_DAYS, driver_text, filtered
from fieldlog.app.forms import (
    CHOICE,
    DAY,
    LINES,
    NUMBER,
    WHOLE,
    YES_NO,
    DayContext,
    Field,
    Form,
    initial_text,
    placeholder_text,
    read_field,
    read_form,
)
from fieldlog.app.history_rows import history_rows, summarize
from fieldlog.app.keymap import AREAS, KEYS, VIEWS, key, key_words, keys_for
from fieldlog.app.printing import Printer, deliver_sheet, find_printer, send_to_printer
from fieldlog.app.recording import KIND_TITLES, entry_form
from fieldlog.app.session import SiteSession
from fieldlog.app.shift import DONE_TODAY, READY, RUNNING, shift_rows
from fieldlog.journal import KINDS
from fieldlog.journal.entries import Entry, FieldSpec
from fieldlog.journal.entries import spec as spec_of
from tests.test_app_site import fix_device, log, write_site

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)
RECORD_VIEWS = ("today", "lookahead", "float")
"""The views that answer the record keys (keymap area "record")."""

# -- keys ----------------------------------------------------------------------------------------


class TestKeymap:
    def test_ids_are_unique_and_name_their_area(self) -> None:
        ids = [k.id for k in KEYS]
        assert len(ids) == len(set(ids))
        assert all(k.area in AREAS for k in KEYS)

    @pytest.mark.parametrize("area", ["today", "lookahead", "float", "journal", "sync", "forecast"])
    def test_no_two_actions_share_a_key_on_one_view(self, area: str) -> None:
        # A view answers its own keys and the keys of "views" (plus Textual's Ctrl+Q/Ctrl+P).
        taken: dict[str, str] = {"ctrl+q": "quit", "ctrl+p": "palette", "ctrl+c": "quit"}
        shared = list(keys_for("record")) if area in RECORD_VIEWS else []
        for k in [*keys_for("views"), *shared, *keys_for(area)]:
            if not k.bound:
                continue
            for name in k.keys.split(","):
                assert name not in taken, f"{name} is {taken[name]} and {k.id}"
                taken[name] = k.id

    def test_the_record_keys_are_bound_on_every_list_view(self) -> None:
        from fieldlog.app.screens.float_list import FloatScreen
        from fieldlog.app.screens.lookahead import LookaheadScreen
        from fieldlog.app.screens.today import TodayScreen

        record = {k.id for k in keys_for("record")}
        for screen in (TodayScreen, LookaheadScreen, FloatScreen):
            ids = {
                b.id
                for cls in screen.__mro__
                for b in getattr(cls, "BINDINGS", [])
                if hasattr(b, "id")
            }
            assert record <= ids, screen.__name__

    def test_every_view_has_a_number_key(self) -> None:
        assert [key(f"views.{v}").keys for v in VIEWS] == ["1", "2", "3", "4", "5", "6", "7"]

    @pytest.mark.parametrize(
        ("keys", "words"),
        [
            ("question_mark,f1", "? F1"),
            ("ctrl+p", "Ctrl+p"),
            ("slash", "/"),
            ("pageup,pagedown", "PgUp PgDn"),
        ],
    )
    def test_key_words(self, keys: str, words: str) -> None:
        assert key_words(keys) == words


# -- forms ---------------------------------------------------------------------------------------


DAYS = FieldSpec("days", "int", low=1)
PERCENT = FieldSpec("percent", "float", low=0, high=100)
MON_28 = DayContext(date(2026, 9, 28), earliest=date(2025, 9, 6))  # a Monday


class TestForms:
    @pytest.mark.parametrize(
        ("field", "raw", "value"),
        [
            (Field("n", "Days", WHOLE, spec=DAYS), "3", 3),
            (Field("n", "Days", WHOLE), " 12 ", 12),
            (Field("n", "Days", WHOLE, default=4, spec=DAYS), "", 4),  # empty keeps the value
            (Field("n", "Days", WHOLE, default=4, spec=DAYS), "3", 3),  # typing replaces it
            (Field("x", "Rain", NUMBER), "2.5", 2.5),
            (Field("x", "Rain", NUMBER), ".5", 0.5),
            (Field("d", "On", DAY), "2026-09-25", date(2026, 9, 25)),
            (Field("d", "On", DAY), "fri", date(2026, 9, 25)),
            (Field("c", "Cause", CHOICE, choices=("weather", "access")), "access", "access"),
            (Field("b", "Stopped", YES_NO), True, True),
            (Field("b", "Stopped", YES_NO), None, False),
            (Field("t", "Note"), "", None),  # empty optional field: left out
            (Field("t", "Note", LINES), "line one\nline two", "line one\nline two"),
        ],
    )
    def test_reads(self, field: Field, raw: object, value: object) -> None:
        assert read_field(field, raw, MON_28) == value

    @pytest.mark.parametrize(
        ("field", "raw", "words"),
        [
            (Field("n", "Days left", WHOLE, spec=DAYS), "0", "Days left: 0 is below 1"),
            (Field("n", "Percent", NUMBER, spec=PERCENT), "101", "Percent: 101.0 is above 100"),
            (Field("n", "Percent", NUMBER, spec=PERCENT), "1e9", "not a number like 2.5"),
            (Field("n", "Days", WHOLE), "2.5", "whole number"),
            (Field("n", "Rain", NUMBER), "2,5", "not a number like 2.5"),  # never read as 25
            (Field("n", "Rain", NUMBER), "nan", "not a number"),
            (Field("n", "Rain", NUMBER), "1_000", "not a number"),
            (Field("d", "On", DAY), "02/03/2026", "not a day"),
            (Field("d", "On", DAY), "+1", "has not happened yet"),
            (Field("c", "Cause", CHOICE, choices=("weather",)), "rain", "choose one of: weather"),
            (Field("t", "What", required=True), "  ", "What is needed"),
        ],
    )
    def test_refuses_with_words(self, field: Field, raw: object, words: str) -> None:
        with pytest.raises(ValueError, match=words):
            read_field(field, raw, MON_28)

    def test_the_form_bounds_are_the_journal_bounds(self) -> None:
        """One set of ranges: the form field carries the journal's own spec object."""
        form = entry_form("remaining", defaults={"days": 4})
        days = next(f for f in form.fields if f.name == "days")
        assert days.spec is spec_of("remaining", "days")
        assert initial_text(days) == "" and "4 now" in placeholder_text(days)

    def test_a_form_reads_whole_or_names_every_problem(self) -> None:
        form = Form("t", (Field("a", "A", WHOLE, required=True), Field("b", "B", NUMBER)))
        assert read_form(form, {"a": "2", "b": ""}).values == {"a": 2, "b": None}
        reading = read_form(form, {"a": "", "b": "x"})
        assert not reading.ok and set(reading.problems) == {"a", "b"}

    @pytest.mark.parametrize("kind", sorted(KINDS))
    def test_every_entry_kind_has_a_form_and_a_title(self, kind: str) -> None:
        form = entry_form(kind)
        assert kind in KIND_TITLES
        # Every field the journal asks for is on the form, except the ones fieldlog fills in.
        asked = {f.name for f in form.fields}
        for spec in KINDS[kind]:
            filled_in = spec.type == "entry" or (kind, spec.name) == ("correction", "corrects")
            assert (spec.name in asked) != filled_in, spec.name


# -- lists ---------------------------------------------------------------------------------------


@pytest.fixture
def site(tmp_path: Path) -> Path:
    fix_device()
    folder = write_site(tmp_path / "site")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    return folder


class TestLists:
    def test_shift_rows_running_then_ready_then_done(self, site: Path) -> None:
        log(site, "started", TUE, {"activity": "DRN-010"}, today=TUE)
        log(site, "finished", TUE, {"activity": "EXC-010"}, today=TUE)
        snap = SiteSession(site, TUE).load()
        rows = shift_rows(snap.state.schedule, TUE)
        assert [(r.id, r.group, r.state) for r in rows] == [
            ("DRN-010", RUNNING, "started"),
            ("CON-010", READY, "ready"),
            ("START", READY, "ready"),
            ("EXC-010", DONE_TODAY, "finished"),
        ]

    def test_float_filters(self, site: Path) -> None:
        schedule = SiteSession(site, TUE).load().state.schedule
        assert {r.id for r in filtered(schedule, "near")} == {"DRN-010"}
        assert NEAR_CRITICAL_DAYS == 5 and str(NEAR_CRITICAL_DAYS) in FILTERS["near"]
        assert [r.id for r in filtered(schedule, "all", "pour")] == ["CON-010"]
        assert [r.id for r in filtered(schedule, "all", "exc footings")] == ["EXC-010"]
        assert filtered(schedule, "behind") == []  # on time: nothing behind
        with pytest.raises(KeyError):
            filtered(schedule, "everything")
        con = schedule.by_id["CON-010"]
        assert driver_text(schedule, con) == "driven by EXC-010 Excavate pad footings (FS)"

    def test_history_newest_first_with_corrections(self, site: Path) -> None:
        wrong = log(site, "remaining", MON, {"activity": "EXC-010", "days": 5}, today=MON)
        fix = log(
            site,
            "correction",
            None,
            {"supersedes": wrong.id, "reason": "typo", "days": 2},
            today=TUE,
        )
        snap = SiteSession(site, TUE).load()
        rows = history_rows(snap.state.journal.entries, snap.state.replay.superseded)
        # The correction describes Monday (the day of the entry it corrects) and was written
        # last, so it comes first; the entry it replaced stays in the list.
        assert [r.entry.id for r in rows] == [fix.id, wrong.id, "tab-test01.1"]
        by_id = {r.entry.id: r for r in rows}
        assert by_id[wrong.id].status == f"replaced by {fix.id}" and by_id[wrong.id].superseded
        assert by_id[fix.id].status == f"corrects {wrong.id}"
        assert summarize(fix) == f"Correction of {wrong.id}: typo"

    @pytest.mark.parametrize("kind", sorted(KINDS))
    def test_every_kind_has_a_one_line_summary(self, kind: str) -> None:
        fields = {}
        for spec in KINDS[kind]:
            if spec.required or spec.type == "bool":
                fields[spec.name] = {
                    "text": "x",
                    "activity": "EXC-010",
                    "entry": "tab-test01.1",
                    "int": 3,
                    "float": 2.0,
                    "bool": True,
                    "date": MON,
                    "choice": (spec.choices or ("x",))[0],
                    "ids": ["EXC-010"],
                    "names": ["weekdays"],
                }[spec.type]
        if kind == "lost-time":
            fields.pop("hours", None)
        e = Entry(
            id="tab-test01.9",
            seq=9,
            kind=kind,
            day=MON,
            written=None,  # type: ignore[arg-type]
            author="T",
            device="tab-test01",
            fields=fields,
        )
        line = summarize(e)
        assert line and "\n" not in line


# -- printing ------------------------------------------------------------------------------------


def _runner(answers: dict[str, tuple[int, str]]):
    """A fake ``subprocess.run``: the first word of the command picks the answer."""
    calls = []

    def run(cmd, **kwargs):  # noqa: ANN001, ANN003, ANN202
        calls.append(cmd)
        code, out = answers[cmd[0]]
        return subprocess.CompletedProcess(
            cmd, code, stdout=out, stderr="printer on fire" if code else ""
        )

    run.calls = calls  # type: ignore[attr-defined]
    return run


class TestPrinting:
    @pytest.mark.parametrize(
        ("tools", "env", "lpstat", "expected"),
        [
            ({"lp", "lpstat"}, {}, "system default destination: yard-laser", ("lp",)),
            ({"lp", "lpstat"}, {}, "no system default destination", None),
            ({"lp"}, {"LPDEST": "office"}, "", ("lp", "-d", "office")),
            ({"lpr"}, {"PRINTER": "hut"}, "", ("lpr", "-P", "hut")),
            ({"lpr", "lpstat"}, {}, "system default destination: hut", ("lpr",)),
            ({"lpr"}, {}, "", None),  # BSD lpr with no printer named: nothing to go on
            (set(), {"PRINTER": "hut"}, "", None),  # no print command at all
        ],
    )
    def test_find_printer(
        self, tools: set[str], env: dict[str, str], lpstat: str, expected: tuple[str, ...] | None
    ) -> None:
        run = _runner({"lpstat": (0, lpstat)})
        found = find_printer(env, lambda name: f"/usr/bin/{name}" if name in tools else None, run)
        assert (found.command if found else None) == expected

    def test_a_failing_printer_is_reported_never_raised(self, tmp_path: Path) -> None:
        sheet = tmp_path / "sheet.txt"
        sheet.write_text("x")
        problem = send_to_printer(
            sheet, Printer(("lp",), "default printer x"), _runner({"lp": (1, "")})
        )
        assert problem == "lp failed: printer on fire"

    def test_the_sheet_is_written_before_printing(self, site: Path) -> None:
        look = SiteSession(site, TUE).load().lookahead
        run = _runner({"lp": (0, "request id is x-1")})
        words = deliver_sheet(look, site, printer=Printer(("lp",), "default printer x"), run=run)
        sheet = site / "prints" / "lookahead-2026-03-04.txt"
        assert run.calls == [["lp", str(sheet)]]  # type: ignore[attr-defined]
        assert words == (
            "Printed on the default printer x; sheet saved as prints/lookahead-2026-03-04.txt"
        )
        assert "plan, not a permit" in sheet.read_text(encoding="utf-8")


def test_forms_cover_every_field_kind() -> None:
    assert {CHOICE, DAY, NUMBER, WHOLE, YES_NO} <= {
        f.kind for kind in KINDS for f in entry_form(kind).fields
    }
