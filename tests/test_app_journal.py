"""The journal view: newest first, corrections as the only way to change the past, log check.

Driven with keys through Textual's Pilot on the small test site of ``test_app_site``.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

from textual.widgets import Checkbox, Input

from fieldlog.app.app import make_app
from fieldlog.app.screens.form import FormScreen
from fieldlog.app.widgets.row_list import RowList
from fieldlog.journal import read_journal
from tests.test_app_site import fix_device, log, row_texts, screen_text, settle, write_site

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


def site_with_a_wrong_entry(tmp_path: Path) -> tuple[Path, str]:
    """EXC-010 started Monday, then 5 days left recorded by mistake (it was 2)."""
    fix_device()
    folder = write_site(tmp_path / "site")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    wrong = log(folder, "remaining", MON, {"activity": "EXC-010", "days": 5}, today=MON)
    log(folder, "note", MON, {"text": "crane booked for Thursday"}, today=MON)
    return folder, wrong.id


async def test_newest_first_and_correct_a_value(tmp_path: Path):
    folder, wrong = site_with_a_wrong_entry(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(100, 30)) as pilot:
        # With 5 days left as of Monday, 4 are left after Tuesday.
        assert app.snapshot.state.schedule.by_id["EXC-010"].remaining == 4
        await pilot.press("4")
        await pilot.pause()
        table = app.screen.query_one("#journal-table", RowList)
        ids = table.keys
        assert ids == ["tab-test01.3", "tab-test01.2", "tab-test01.1"]  # newest first
        assert "Log check: OK, 3 entries in 1 file" in screen_text(app)

        table.move_to(wrong)
        await pilot.press("c")
        form = app.screen
        assert isinstance(form, FormScreen)
        days = form.query_one("#field-days", Input)
        # A number opens empty with the old value shown: typing replaces it.
        assert days.value == "" and days.placeholder.startswith("5 now")
        await pilot.press(*"wrong count")
        form.query_one("#field-days", Input).value = "2"
        await pilot.press("ctrl+s")
        await settle(app, pilot)

        corrections = [e for e in read_journal(folder).entries if e.kind == "correction"]
        assert len(corrections) == 1
        c = corrections[0]
        assert (c.fields["supersedes"], c.fields["reason"], c.fields["days"]) == (
            wrong,
            "wrong count",
            2,
        )
        # The old entry stays, marked; the schedule uses the corrected value: 2 as of Monday,
        # so 1 left after Tuesday.
        assert row_texts(table, wrong)[3] == f"replaced by {c.id}"
        assert row_texts(table, c.id)[3] == f"corrects {wrong}"
        assert app.snapshot.state.schedule.by_id["EXC-010"].remaining == 1


async def test_withdraw_an_entry_recorded_in_error(tmp_path: Path):
    folder, _ = site_with_a_wrong_entry(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.press("4")
        await pilot.pause()
        table = app.screen.query_one("#journal-table", RowList)
        table.cursor = 0  # the note, newest
        await pilot.press("c")
        form = app.screen
        assert isinstance(form, FormScreen)
        await pilot.press(*"wrong site", "tab", "space")
        assert form.query_one("#field-withdraw", Checkbox).value is True
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        assert row_texts(table, "tab-test01.3")[3] == "withdrawn by tab-test01.4"
        assert len(read_journal(folder).entries) == 4  # nothing erased

        # Correcting the withdrawn entry again is refused with the reason on screen.
        table.move_to("tab-test01.3")
        await pilot.press("c")
        await pilot.pause()
        assert not isinstance(app.screen, FormScreen)
        assert "nothing left to correct" in screen_text(app)


async def test_log_check_names_an_altered_entry(tmp_path: Path):
    folder, _ = site_with_a_wrong_entry(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(120, 30)) as pilot:
        await pilot.press("4", "v")
        await settle(app, pilot)
        assert "Log check: OK" in screen_text(app)
        day_file = next((folder / "log").glob("*.toml"))
        day_file.write_bytes(day_file.read_bytes().replace(b"days = 5", b"days = 3"))
        await pilot.press("v")
        await settle(app, pilot)
        text = screen_text(app)
        assert "!! Log check: " in text and "PROBLEM" in text and "tab-test01.2" in text


async def test_log_check_names_a_key_file_edited_after_it_was_sealed(tmp_path: Path):
    folder, _ = site_with_a_wrong_entry(tmp_path)
    (key_file,) = (folder / "devices").glob("*.toml")
    text = key_file.read_text(encoding="utf-8")
    assert "seal = " in text
    author = next(line for line in text.splitlines() if line.startswith("author = "))
    key_file.write_text(text.replace(author, 'author = "Someone Else"'), encoding="utf-8")
    app = make_app(folder, TUE)
    async with app.run_test(size=(160, 30)) as pilot:
        await pilot.press("4")
        await settle(app, pilot)
        shown = screen_text(app)
        assert "!! Log check: 1 PROBLEM: devices/" in shown and "bad key file" in shown
