"""Two weeks, ``f``: the fewest-people plan as it would be, driven through Textual's Pilot.

The sample site's groundworks crew is over its headcount in the fortnight the demo opens on;
the overlay must show the answer with its proof, the starts to move, the caution, and the
plan's days, and close again with Esc. It only reads: nothing is written to the log.
"""

from __future__ import annotations

from pathlib import Path

from fieldlog.app.app import make_app
from fieldlog.app.screens.fewest import FewestScreen
from fieldlog.commands.demo import demo_day
from tests.test_app_site import screen_text, settle


async def test_f_shows_the_plan_with_its_bound_and_the_caution(sample_site: Path):
    day, _ = demo_day(sample_site)
    logs = sorted(p.read_bytes() for p in (sample_site / "log").glob("*.toml"))
    app = make_app(sample_site, day)
    async with app.run_test(size=(100, 40)) as pilot:
        await pilot.press("2")
        await settle(app, pilot)
        look = app.screen.look
        assert look is not None and look.fewest is not None
        await pilot.press("f")
        await pilot.pause()
        assert isinstance(app.screen, FewestScreen)
        text = screen_text(app)
        answer = look.fewest.crews[0]
        proof = "optimal" if answer.optimal else f"no plan needs fewer than {answer.bound.people}"
        assert f"{answer.crew}: {answer.peak} people" in text and proof in text
        assert "not a safe staffing level" in text
        for move in look.fewest.moves:
            assert move.activity in text
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, FewestScreen)
    assert sorted(p.read_bytes() for p in (sample_site / "log").glob("*.toml")) == logs
