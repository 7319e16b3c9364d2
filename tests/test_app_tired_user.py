"""A tired foreman at the end of a shift, driving the real app with keys (Textual Pilot).

Each test is a finding from trying to break the recording forms at 80x24: every wrong value
is refused in the form with a clear message, and what is written is exactly what the screen
showed. The log file's bytes are the thing checked, since the log is the legal record.
"""

from __future__ import annotations

from textual.widgets import Input

from fieldlog.app.app import make_app
from fieldlog.app.screens.form import FormScreen
from tests.helpers.journal_helpers import log_bytes
from tests.test_app_site import log, save_form, screen_text, settle
from tests.test_app_today import MON, TUE, entries_of, started_site


async def test_a_celsius_reading_of_80_is_refused_in_the_form_and_nothing_is_written(tmp_path):
    """Found: the weather form recorded 80 C (the stored bound is -80..140 in either unit).
    Outside fact (from memory): the highest air temperature on record is about 56.7 C."""
    folder = started_site(tmp_path)
    before = log_bytes(folder)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("w", *"dry")
        await save_form(app, pilot, high="80")
        assert isinstance(app.screen, FormScreen)
        text = screen_text(app)
        assert "Not recorded" in text and "high 80 C is not a plausible" in text
        assert log_bytes(folder) == before
        await save_form(app, pilot, unit="F")
        assert not isinstance(app.screen, FormScreen)
    (w,) = entries_of(folder, "weather")
    assert (w.fields["high"], w.fields["unit"]) == (80, "F")


async def test_a_comma_decimal_a_negative_and_a_double_enter_record_once_as_shown(tmp_path):
    """A tired foreman types "2,5", then "-1", then 3 and presses Enter twice: the first two
    are refused under the field, and exactly one entry of 3 days is written."""
    folder = started_site(tmp_path)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("r")
        days = app.screen.query_one("#field-days", Input)
        for typed, says in (("2,5", "'2,5' is not a whole number"), ("-1", "below 1")):
            days.value = typed
            await pilot.press("enter")
            assert isinstance(app.screen, FormScreen) and days.value == typed
            assert says in screen_text(app)
        days.value = "3"
        await pilot.press("enter", "enter")
        await settle(app, pilot)
    assert [e.fields["days"] for e in entries_of(folder, "remaining")] == [3]


async def test_the_same_start_twice_is_refused_and_written_once(tmp_path):
    folder = started_site(tmp_path)  # EXC-010 started on Monday
    before = log_bytes(folder)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("s")
        await settle(app, pilot)
        assert "already started" in screen_text(app)
    assert log_bytes(folder) == before


async def test_lost_time_of_0_hours_is_refused_and_minus_0_rain_is_written_as_0(tmp_path):
    """Found by an adversarial pass: the lost-time form took 0 hours, and the weather form
    wrote "-0" mm of rain as -0.0 (TOML keeps the sign of a zero, TOML 1.0 spec "Float")."""
    folder = started_site(tmp_path)
    before = log_bytes(folder)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("l")
        await save_form(app, pilot, hours="0")
        refused = " ".join(screen_text(app).split()), log_bytes(folder) == before
        await pilot.press("escape")  # give up on it: the form said no
        await settle(app, pilot)
        assert "hours 0 is no time lost" in refused[0] and refused[1]
        await settle(app, pilot)
        await pilot.press("w", *"dry")
        await save_form(app, pilot, precip_mm="-0")
        assert not isinstance(app.screen, FormScreen)
    text = b"".join(log_bytes(folder).values())
    assert b"\nprecip_mm = 0.0\n" in text and b"= -0" not in text


async def test_the_crews_form_on_a_double_enter_records_each_crew_once(tmp_path):
    """As for the other forms: Enter twice on the crews form writes one set of crews."""
    folder = started_site(tmp_path)
    for trade, n in (("groundworks", 4), ("concrete", 3)):
        log(folder, "crew", MON, {"trade": trade, "headcount": n}, today=MON)
    before = log_bytes(folder)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("c", "enter", "enter")  # the crews of Monday, as they were
        await settle(app, pilot)
    today = [e for e in entries_of(folder, "crew") if e.day == TUE]
    assert [(e.fields["trade"], e.fields["headcount"]) for e in today] == [
        ("groundworks", 4),
        ("concrete", 3),
    ]
    after = log_bytes(folder)
    new = [k for k in after if after[k] != before.get(k)]
    assert len(new) == 1 and new[0].startswith("2026-03-03")
    assert after[new[0]].count(b"[[entry]]") == 2 and after[new[0]].count(b'kind = "crew"') == 2
