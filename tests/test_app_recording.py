"""The recording path driven with keys: the app records exactly what the foreman meant.

Each test is a finding from trying the app at the end of a shift (80x24): it failed before the
fix and passes after. The site is the small test site of ``test_app_site`` (dates worked by
hand there); the journal on disk is the thing checked, since it is the legal record.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

from textual.widgets import DataTable, Input, TextArea

from fieldlog.app.app import make_app
from fieldlog.app.screens.find import FindScreen
from fieldlog.app.screens.form import FormScreen
from fieldlog.app.screens.pick import PickScreen
from fieldlog.app.widgets.row_list import RowList
from fieldlog.reports.daily_report import render_daily_report
from fieldlog.workspace import load_state
from tests.test_app_site import log, screen_text, settle
from tests.test_app_today import entries_of, started_site

MON, TUE, WED = date(2026, 3, 2), date(2026, 3, 3), date(2026, 3, 4)
# started_site: EXC-010 started Monday (3 days, so 1 left after Tuesday).


async def settled_after_menu(app, pilot, done) -> None:  # noqa: ANN001 - app and Pilot
    """A menu runs its action a moment after it closes (``call_later``), so the recompute may
    start after a first settle: wait until ``done()`` holds (at most about 3 s)."""
    for _ in range(30):
        await settle(app, pilot)
        if done():
            return
        await pilot.pause(0.1)
    assert done(), (app.status, screen_text(app))


# -- number fields -------------------------------------------------------------------------------


async def test_typing_a_number_replaces_the_old_value_and_bad_numbers_are_refused(tmp_path):
    """Found: ``r 3`` recorded 13 (the field held the old value), 2.5 became 25, 1e9 became
    19. Now the old value is only a placeholder and anything else than a plain number is
    refused under the field, exactly as typed."""
    folder = started_site(tmp_path)
    log(folder, "percent", MON, {"activity": "EXC-010", "percent": 25.0}, today=MON)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("r")
        days = app.screen.query_one("#field-days", Input)
        assert days.value == "" and days.placeholder.startswith("1 now")
        await pilot.press("2", "full_stop", "5", "enter")
        assert isinstance(app.screen, FormScreen) and days.value == "2.5"  # never altered
        assert "Days left: '2.5' is not a whole number" in screen_text(app)
        days.value = ""
        await pilot.press("3", "enter")
        await settle(app, pilot)
        assert [e.fields["days"] for e in entries_of(folder, "remaining")] == [3]

        await pilot.press("percent_sign")
        pct = app.screen.query_one("#field-percent", Input)
        assert pct.value == "" and pct.placeholder.startswith("25 now")
        await pilot.press("1", "e", "9", "enter")
        assert pct.value == "1e9" and "not a number like 2.5" in screen_text(app)
        pct.value = ""
        await pilot.press("5", "0", "enter")
        await settle(app, pilot)
        assert [e.fields["percent"] for e in entries_of(folder, "percent")] == [25.0, 50.0]


async def test_enter_on_an_empty_number_keeps_its_value(tmp_path):
    """The placeholder is the value kept: "still 1 day left" is one key, not three."""
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("r", "enter")
        await settle(app, pilot)
        assert [e.fields["days"] for e in entries_of(folder, "remaining")] == [1]


# -- the cursor follows the activity -------------------------------------------------------------


def site_on_wednesday(tmp_path: Path) -> Path:
    """EXC-010 done Monday-Tuesday: the pour (0 float) and the drains (3 float) are ready."""
    folder = started_site(tmp_path)
    log(folder, "finished", TUE, {"activity": "EXC-010"}, today=TUE)
    return folder


async def test_the_cursor_follows_the_activity_through_every_resort(tmp_path):
    """Found: after a key on the second row the list re-sorted and the cursor stayed on the
    row number, so the next ``f`` finished another activity."""
    folder = site_on_wednesday(tmp_path)
    app = make_app(folder, WED)
    async with app.run_test(size=(80, 24)) as pilot:
        table = app.screen.query_one("#shift-table", RowList)
        assert table.keys[:2] == ["CON-010", "DRN-010"]
        await pilot.press("down", "s")  # the drains start: running work moves to the top
        await settle(app, pilot)
        assert table.keys.index("DRN-010") == 0 and table.current == "DRN-010"
        await pilot.press("f")
        await settle(app, pilot)
        assert [e.fields["activity"] for e in entries_of(folder, "finished")] == [
            "EXC-010",
            "DRN-010",
        ]


async def test_the_cursor_follows_the_activity_in_float_two_weeks_and_journal(tmp_path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("4")  # Journal: new entries go on top; the cursor keeps its entry
        await pilot.pause()
        journal = app.screen.query_one("#journal-table", RowList)
        kept = journal.current

        await pilot.press("3")  # Float: the drains (3 days float) sit below the zero-float work
        await pilot.pause()
        flt = app.screen.query_one("#float-table", RowList)
        flt.move_to("DRN-010")
        before = flt.cursor
        await pilot.press("s")  # out of sequence, allowed
        await settle(app, pilot)
        await pilot.press("r", "9", "enter")  # 9 days left: late, so it sorts to the top
        await settle(app, pilot)
        assert flt.current == "DRN-010" and flt.cursor != before

        await pilot.press("2")  # Two weeks: finishing the excavation removes the row above
        await pilot.pause()
        grid = app.screen.query_one("#look-table", DataTable)
        grid.move_cursor(row=grid.get_row_index("FRM-010"), column=3)
        before = grid.cursor_row
        await pilot.press("slash", *"EXC", "enter", "f")
        await settled_after_menu(app, pilot, lambda: grid.cursor_row != before)
        assert app.screen.selected_id() == "FRM-010"

        await pilot.press("4")
        await pilot.pause()
        assert journal.current == kept and journal.keys.index(kept) == 3


# -- any activity, from any view -----------------------------------------------------------------


async def test_start_work_that_is_not_ready_through_find_and_it_says_so(tmp_path):
    """Found: only running or ready work was on Today, so out-of-sequence work could not be
    started. ``/`` finds any activity; the start is recorded and called out of sequence."""
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("slash")
        assert isinstance(app.screen, FindScreen)
        await pilot.press(*"frame", "enter")
        assert isinstance(app.screen, PickScreen)  # the record keys for FRM-010
        await pilot.press("s")
        words = "FRM-010 started OUT OF SEQUENCE: CON-010 not finished"
        await settled_after_menu(app, pilot, lambda: words in screen_text(app))
        assert [e.fields["activity"] for e in entries_of(folder, "started")] == [
            "EXC-010",
            "FRM-010",
        ]


async def test_record_keys_work_in_float_and_two_weeks(tmp_path):
    """Found: ``y`` did nothing in Float. The same keys record on every list."""
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("3")
        await pilot.pause()
        app.screen.query_one("#float-table", RowList).move_to("FRM-010")
        await pilot.press("y", "enter")  # nothing open: a new item for FRM-010
        app.screen.query_one("#field-what", Input).value = "frame drawings rev C"
        app.screen.query_one("#field-category").value = "drawings"
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        assert [e.fields["activity"] for e in entries_of(folder, "need")] == ["FRM-010"]

        await pilot.press("2")
        await pilot.pause()
        grid = app.screen.query_one("#look-table", DataTable)
        grid.move_cursor(row=grid.get_row_index("EXC-010"), column=3)
        await pilot.press("f")
        await settle(app, pilot)
        assert [e.fields["activity"] for e in entries_of(folder, "finished")] == ["EXC-010"]


async def test_a_readiness_item_of_work_not_on_today_is_listed_and_cleared(tmp_path):
    """Found: an item could be cleared only from its own activity's row on Today."""
    folder = started_site(tmp_path)
    need = log(
        folder,
        "need",
        MON,
        {"activity": "FRM-010", "what": "frame drawings", "category": "drawings"},
        today=MON,
    )
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("y")
        assert "Clear: FRM-010 needs frame drawings" in screen_text(app)
        await pilot.press("enter", "ctrl+s")
        await settle(app, pilot)
        assert [e.fields["item"] for e in entries_of(folder, "cleared")] == [need.id]


# -- drafts --------------------------------------------------------------------------------------


async def test_esc_keeps_a_draft_and_ctrl_d_discards_it(tmp_path):
    """Found: Esc threw a half-filled form away."""
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("w", *"showers")
        await pilot.press("escape")
        assert not isinstance(app.screen, FormScreen)
        assert "draft kept" in screen_text(app)
        await pilot.press("w")
        assert app.screen.query_one("#field-conditions", Input).value == "showers"
        assert "Draft restored" in screen_text(app)
        await pilot.press("ctrl+d")
        await pilot.press("w")
        assert app.screen.query_one("#field-conditions", Input).value == ""
        await pilot.press("escape")  # nothing typed: nothing kept, nothing written
        assert entries_of(folder, "weather") == [] and app.drafts == {}


# -- days as typed -------------------------------------------------------------------------------


async def test_a_day_typed_in_words_is_echoed_with_its_year(tmp_path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("l", "tab", "space", "tab", *"+1")
        assert "has not happened yet" in screen_text(app)
        app.screen.query_one("#field-on", Input).value = ""
        await pilot.press(*"yesterday")
        assert "= Mon 02 Mar 2026" in screen_text(app)
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        (lost,) = entries_of(folder, "lost-time")
        assert lost.day == MON and lost.fields["whole_day"] is True
        assert "for Mon 02 Mar 2026" in screen_text(app)


# -- crews, plant, visitors, notes ---------------------------------------------------------------


async def test_crews_same_as_the_last_day_with_one_key_then_edit(tmp_path):
    folder = started_site(tmp_path)
    for trade, n, hours in (("groundworks", 4, 32.0), ("concrete", 3, 24.0)):
        log(
            folder,
            "crew",
            MON,
            {"trade": trade, "headcount": n, "hours": hours, "company": "Tarn Civils (invented)"},
            today=MON,
        )
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("c")
        assert "Same as Mon 02 Mar" in screen_text(app)
        await pilot.press("tab", "5", "enter")  # concrete had 5 today; groundworks as before
        await settle(app, pilot)
    today = [e.fields for e in entries_of(folder, "crew") if e.day == TUE]
    assert [(f["trade"], f["headcount"], f.get("hours")) for f in today] == [
        ("groundworks", 4, 32.0),
        ("concrete", 5, None),
    ]  # changed: the hours were others'


async def test_plant_breakdown_visitor_times_lost_cause_and_a_note_of_lines(tmp_path):
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("e", *"13 t excavator")
        form = app.screen
        form.query_one("#field-hours_worked", Input).value = "5"
        form.query_one("#field-broken_down").value = True
        form.query_one("#field-hours_down", Input).value = "3"
        await pilot.press("ctrl+s")
        await settle(app, pilot)

        await pilot.press("l")
        app.screen.query_one("#field-cause").value = "plant-breakdown"
        app.screen.query_one("#field-hours", Input).value = "3"
        await pilot.press("ctrl+s")
        await settle(app, pilot)

        await pilot.press("d")  # what came or was said: pick "Visitor"
        options = [oid for oid, _ in app.screen.options]
        await pilot.press(*["down"] * options.index("visitor"), "enter", *"A. Inspector")
        app.screen.query_one("#field-time_in", Input).value = "09:15"
        app.screen.query_one("#field-time_out", Input).value = "11:40"
        await pilot.press("ctrl+s")
        await settle(app, pilot)

        await pilot.press("n")
        assert isinstance(app.screen.query_one("#field-text"), TextArea)
        await pilot.press(*"pump on hire", "enter", *"back Thursday", "ctrl+s")
        await settle(app, pilot)

    (plant,) = entries_of(folder, "plant")
    assert plant.fields == {
        "what": "13 t excavator",
        "hours_worked": 5.0,
        "broken_down": True,
        "hours_down": 3.0,
        "activity": "EXC-010",
    }
    assert entries_of(folder, "lost-time")[0].fields["cause"] == "plant-breakdown"
    (note,) = entries_of(folder, "note")
    assert note.fields["text"] == "pump on hire\nback Thursday"
    report = render_daily_report(load_state(folder, TUE), TUE)
    words = " ".join(report.split())  # the report wraps at 80 columns
    assert "PLANT AND EQUIPMENT" in report and "BROKE DOWN, 3 h out of use" in words
    assert "A. Inspector; in 09:15; out 11:40" in words
    assert "pump on hire\n      back Thursday" in report  # the note's lines are kept
