"""The end-of-shift view, driven with keys through Textual's Pilot on the small test site.

Each test builds the site of ``test_app_site`` in a temporary folder, logs what happened before
"today" the way the app does, then presses keys and checks three things: the journal on disk,
the schedule the app computed, and what is on the screen.

Expected dates are worked by hand from the test site's network (see ``test_app_site``): with
EXC-010 started on Monday 2 March, it finishes Wednesday 4 and the job Thursday 12 March.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

from textual.widgets import DataTable, Input

from fieldlog.app.app import make_app
from fieldlog.app.screens.form import FormScreen
from fieldlog.app.screens.lookahead import GLYPHS
from fieldlog.app.widgets.row_list import RowList
from fieldlog.journal import read_journal
from fieldlog.lookahead import Cell
from tests.test_app_site import fix_device, log, row_texts, screen_text, settle, write_site

MON, TUE, WED = date(2026, 3, 2), date(2026, 3, 3), date(2026, 3, 4)


def started_site(tmp_path: Path) -> Path:
    """The test site with EXC-010 started on Monday; the app opens on Tuesday."""
    fix_device()
    folder = write_site(tmp_path / "site")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    return folder


def entries_of(folder: Path, kind: str) -> list:
    return [e for e in read_journal(folder).entries if e.kind == kind]


async def test_finish_writes_the_journal_and_repaints_float_and_lookahead(tmp_path: Path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        table = app.screen.query_one("#shift-table", RowList)
        assert row_texts(table, "EXC-010")[3:6] == ["running", "MUST", "0"]
        # Before: pouring cannot start on Wednesday, it waits for the excavation.
        con = next(r for r in app.snapshot.lookahead.rows if r.id == "CON-010")
        assert con.cells[0] is Cell.CANNOT
        assert app.snapshot.state.schedule.finish == date(2026, 3, 12)

        table.move_to("EXC-010")
        await pilot.press("f")
        await settle(app, pilot)

        finished = entries_of(folder, "finished")
        assert [(e.fields["activity"], e.day) for e in finished] == [("EXC-010", TUE)]
        # Its float is gone (finished work has none); the pour is ready tomorrow and, the
        # excavation having gained a day, has one day of float against the required finish.
        assert row_texts(table, "EXC-010")[3:6] == ["finished", "", ""]
        assert row_texts(table, "CON-010")[3:6] == ["ready", "may", "+1"]
        # Finished a day early: the job finishes Wednesday 11 instead of Thursday 12.
        assert app.snapshot.state.schedule.finish == date(2026, 3, 11)
        assert "1 working day earlier" in screen_text(app)

        await pilot.press("2")
        await pilot.pause()
        grid = app.screen.query_one("#look-table", DataTable)
        keys = [k.value for k in grid.rows]
        assert "EXC-010" not in keys
        # Wednesday changed from "cannot" (waiting) to "may" (one day of float).
        assert str(grid.get_row("CON-010")[3]).strip() == GLYPHS[Cell.MAY]


async def test_a_lost_day_moves_the_forecast_finish(tmp_path: Path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        assert app.snapshot.state.schedule.finish == date(2026, 3, 12)
        await pilot.press("l")
        assert isinstance(app.screen, FormScreen)
        # Cause is already "weather"; Tab to "whole day lost", tick it, record.
        await pilot.press("tab", "space", "ctrl+s")
        await settle(app, pilot)

        lost = entries_of(folder, "lost-time")
        assert len(lost) == 1 and lost[0].fields["whole_day"] is True
        # Tuesday is no longer a working day: the excavation needs Wednesday and Thursday,
        # and everything after it moves one working day.
        assert app.snapshot.state.schedule.finish == date(2026, 3, 13)
        text = screen_text(app)
        assert "1 working day later" in text
        assert "LATE 1 day" in text
        assert "Lost time: whole day lost, cause weather" in text


async def test_days_left_refused_by_the_form_then_recorded(tmp_path: Path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("r")
        form = app.screen
        assert isinstance(form, FormScreen)
        days = form.query_one("#field-days", Input)
        days.value = "0"
        await pilot.press("enter")
        assert isinstance(app.screen, FormScreen)  # still open, nothing written
        assert "Days left: 0 is below 1" in screen_text(app)
        assert entries_of(folder, "remaining") == []

        days.value = "5"
        await pilot.press("enter")
        await settle(app, pilot)
        assert not isinstance(app.screen, FormScreen)
        remaining = entries_of(folder, "remaining")
        assert [(e.fields["activity"], e.fields["days"]) for e in remaining] == [("EXC-010", 5)]
        table = app.screen.query_one("#shift-table", RowList)
        assert row_texts(table, "EXC-010")[6] == "5 d"


async def test_the_journal_refuses_and_nothing_is_written(tmp_path: Path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        table = app.screen.query_one("#shift-table", RowList)
        table.move_to("EXC-010")
        before = len(read_journal(folder).entries)
        await pilot.press("s")  # it started on Monday already
        await settle(app, pilot)
        assert len(read_journal(folder).entries) == before
        assert "Not recorded: EXC-010 already started" in screen_text(app)


async def test_quit_and_reopen_shows_the_same_state(tmp_path: Path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("f")
        await settle(app, pilot)
        await pilot.press("w")
        app.screen.query_one("#field-conditions", Input).value = "dry, light wind"
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        first = _state_of(app)
        await pilot.press("ctrl+q")
    assert first["finish"] == date(2026, 3, 11)
    assert any("Weather: dry, light wind" in line for line in first["day"].splitlines())

    again = make_app(folder, TUE)
    async with again.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert _state_of(again) == first


def _state_of(app) -> dict:
    table = app.screen.query_one("#shift-table", RowList)
    rows = [row_texts(table, k) for k in table.keys]
    day = str(app.screen.query_one("#day-record").render())
    return {
        "finish": app.snapshot.state.schedule.finish,
        "rows": rows,
        "day": day,
        "entries": [e.id for e in app.snapshot.state.journal.entries],
    }


async def test_touch_only_tap_a_row_then_its_action(tmp_path: Path):
    """Gloves on a tablet: a tap on the row opens its actions, a tap on one records it."""
    from textual.widgets import OptionList

    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        table = app.screen.query_one("#shift-table", RowList)
        row = table.index_of("EXC-010")
        await pilot.click(table, offset=(10, 1 + row))  # line 0 is the header
        await pilot.pause()
        options = app.screen.query_one(OptionList)
        finished = [o.id for o in options.options].index("finished")
        await pilot.click(options, offset=(5, 1 + finished))  # below the list's top border
        await settle(app, pilot)
        assert [(e.fields["activity"], e.day) for e in entries_of(folder, "finished")] == [
            ("EXC-010", TUE)
        ]


async def test_open_and_clear_a_readiness_item(tmp_path: Path):
    from textual.widgets import Select

    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(100, 30)) as pilot:
        app.screen.query_one("#shift-table", RowList).move_to("EXC-010")
        await pilot.press("y", "enter")  # nothing open yet: the only choice is a new item
        form = app.screen
        assert isinstance(form, FormScreen)
        form.query_one("#field-what", Input).value = "dewatering pump"
        form.query_one("#field-category", Select).value = "equipment"
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        (need,) = entries_of(folder, "need")
        assert need.fields == {
            "activity": "EXC-010",
            "what": "dewatering pump",
            "category": "equipment",
        }
        assert "!! EXC-010 needs dewatering pump (equipment), no expected date" in screen_text(app)

        await pilot.press("y", "enter")  # open items come first: clear it
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        assert [e.fields["item"] for e in entries_of(folder, "cleared")] == [need.id]
        day = str(app.screen.query_one("#day-record").render())
        assert "Open readiness items" not in day  # nothing left to chase
        assert f"Need {need.id} cleared" in day
