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
from tests.test_app_site import screen_text, settle
from tests.test_app_today import TUE, entries_of, started_site


async def test_a_celsius_reading_of_80_is_refused_in_the_form_and_nothing_is_written(tmp_path):
    """Found: the weather form recorded 80 C (the stored bound is -80..140 in either unit).
    Outside fact (from memory): the highest air temperature on record is about 56.7 C."""
    folder = started_site(tmp_path)
    before = log_bytes(folder)
    app = make_app(folder, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("w", *"dry")
        app.screen.query_one("#field-high", Input).value = "80"
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        assert isinstance(app.screen, FormScreen)
        text = screen_text(app)
        assert "Not recorded" in text and "high 80 C is not a plausible" in text
        assert log_bytes(folder) == before
        app.screen.query_one("#field-unit").value = "F"
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        assert not isinstance(app.screen, FormScreen)
    (w,) = entries_of(folder, "weather")
    assert (w.fields["high"], w.fields["unit"]) == (80, "F")
