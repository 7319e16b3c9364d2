"""The History view, driven through Textual's Pilot on a copy of the sample site.

What it shows is the `fieldlog history` printout (checked against hand-worked and
differential tests in tests/test_history_*.py); here: the view key, the groupings, and that
the finish line and the causes are on screen and fit the terminal.
"""

from __future__ import annotations

from pathlib import Path

from fieldlog.app.app import make_app
from fieldlog.app.screens.forecast import ForecastScreen
from fieldlog.commands.demo import demo_day
from tests.test_app_site import screen_text


async def _shown(app, pilot) -> str:
    await app.workers.wait_for_complete()
    await pilot.pause()
    screen = app.screen
    assert isinstance(screen, ForecastScreen)
    return screen.shown_text


async def test_history_view_draws_the_finish_line_and_causes(sample_site: Path):
    size = (80, 24)
    day, _ = demo_day(sample_site)
    app = make_app(sample_site, day)
    async with app.run_test(size=size) as pilot:
        await pilot.press("6")
        text = await _shown(app, pilot)
        assert "Finish line" in text and "=====!=" in text
        assert "weather" in text and "not explained by the log" in text
        assert "Plan reliability" in text
        assert max(len(line) for line in text.splitlines()) <= size[0] - 2
        on_screen = screen_text(app)
        assert "[6 History]" in on_screen and "finish moved +1 working day" in on_screen
        await pilot.press("w")
        assert "wk 2026-09-14" in await _shown(app, pilot)
        await pilot.press("m")
        assert "\n2026-09 " in await _shown(app, pilot)
        await pilot.press("d")
        assert "2026-09-17  2027-05-18" in await _shown(app, pilot)
