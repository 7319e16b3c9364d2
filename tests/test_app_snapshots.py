"""Screenshots of the main views at 80x24 and 132x40, compared with the stored SVG files.

The site, the log (fixed device id, author and write times) and the app's date are all fixed
by the test, cursors do not blink, and ``NO_COLOR`` is cleared by ``conftest.py``, so the same
code draws the same screen on any machine.

When a change to the screens is intended, look at the report of the failing run, then store
the new pictures with::

    .venv/bin/pytest tests/test_app_snapshots.py --snapshot-update

These tests are plain functions, not ``async``: the snapshot plugin runs its own event loop.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

import pytest

from fieldlog.app.app import FieldlogApp, make_app
from tests.test_app_site import fix_device, log, write_site

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


@pytest.fixture
def app(tmp_path: Path) -> FieldlogApp:
    """The test site on Tuesday 3 March: excavation running, a need and a note logged."""
    fix_device()
    folder = write_site(tmp_path / "site")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    log(
        folder,
        "weather",
        MON,
        {"conditions": "showers", "high": 9.0, "low": 3.0, "unit": "C"},
        today=MON,
    )
    log(
        folder,
        "need",
        MON,
        {
            "activity": "FRM-010",
            "what": "timber frame drawings rev B",
            "category": "drawings",
            "expected": date(2026, 3, 6),
        },
        today=MON,
    )
    log(folder, "crew", TUE, {"trade": "groundworks", "headcount": 4}, today=TUE)
    return make_app(folder, TUE)


async def _settle(pilot) -> None:  # noqa: ANN001 - the plugin's Pilot
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


def test_today_80x24(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, terminal_size=(80, 24), run_before=_settle)


def test_today_after_a_finish_132x40(snap_compare, app: FieldlogApp) -> None:
    async def finish(pilot) -> None:  # noqa: ANN001
        await pilot.press("f")
        await _settle(pilot)

    assert snap_compare(app, terminal_size=(132, 40), run_before=finish)


def test_lookahead_80x24(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["2", "right"], terminal_size=(80, 24), run_before=_settle)


def test_lookahead_132x40(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["2"], terminal_size=(132, 40), run_before=_settle)


def test_float_132x40(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["3", "down"], terminal_size=(132, 40), run_before=_settle)


def test_journal_80x24(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["4"], terminal_size=(80, 24), run_before=_settle)


def test_weather_form_80x24(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["w"], terminal_size=(80, 24), run_before=_settle)


def test_help_80x24(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["question_mark"], terminal_size=(80, 24))


def test_report_80x24(snap_compare, app: FieldlogApp) -> None:
    assert snap_compare(app, press=["7"], terminal_size=(80, 24), run_before=_settle)


def test_lookahead_plain_80x24(snap_compare, tmp_path: Path) -> None:
    fix_device()
    folder = write_site(tmp_path / "plain")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    plain = make_app(folder, TUE, plain=True)
    assert snap_compare(plain, press=["2"], terminal_size=(80, 24), run_before=_settle)
