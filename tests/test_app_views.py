"""Float, two weeks, help, palette, tabs and sync, driven through Textual's Pilot.

Uses the small site of ``test_app_site`` (dates worked by hand there) and, once, a copy of the
sample site at both supported screen sizes.
"""

from __future__ import annotations

import os
import stat
from datetime import date
from pathlib import Path

import pytest
from textual.widgets import DataTable, Input

from fieldlog.app.app import make_app
from fieldlog.app.keymap import VIEWS
from fieldlog.app.screens.help import HelpScreen
from fieldlog.app.widgets.bars import ViewTab
from fieldlog.app.widgets.row_list import RowList
from fieldlog.commands.demo import demo_day
from fieldlog.journal import read_journal
from tests.test_app_site import fix_device, log, row_texts, screen_text, settle, write_site

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


@pytest.fixture
def site(tmp_path: Path) -> Path:
    """The test site, EXC-010 started on Monday (the app opens on Tuesday)."""
    fix_device()
    folder = write_site(tmp_path / "site")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    return folder


async def test_float_filters_search_and_driver(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("3")
        await pilot.pause()
        table = app.screen.query_one("#float-table", RowList)
        assert table.row_count == 6

        await pilot.press("v", "v")  # all -> behind -> critical
        # Critical: every open activity but the drains (3 days float).
        assert {"EXC-010", "CON-010", "FRM-010", "END"} <= set(table.keys)
        assert "DRN-010" not in table.keys
        await pilot.press("v")  # near critical: 1-5 days of float
        assert table.keys == ["DRN-010"]
        assert row_texts(table, "DRN-010")[6].strip() == "3"

        await pilot.press("g")  # the drains wait on the excavation
        assert app.screen.selected_id() == "EXC-010"
        assert "EXC-010 Excavate pad footings: driven by" in screen_text(app)

        await pilot.press("slash", *"pour")
        assert table.keys == ["CON-010"]
        await pilot.press("escape")
        assert table.row_count == 6
        assert not app.screen.query_one("#float-search", Input).display


async def test_lookahead_explains_the_selected_cell(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("2")
        await pilot.pause()
        table = app.screen.query_one("#look-table", DataTable)
        table.move_cursor(row=table.get_row_index("CON-010"), column=3)  # Wednesday
        await pilot.pause()
        why = str(app.screen.query_one("#look-why").render())
        assert why.startswith("CON-010 Wed 04 Mar: cannot run")
        assert "EXC-010" in why  # waiting on the excavation
        table.move_cursor(row=table.get_row_index("DRN-010"), column=4)  # Thursday
        await pilot.pause()
        assert "may run" in str(app.screen.query_one("#look-why").render())
        await pilot.press("full_stop")  # a week on
        assert "Wed 11 Mar to" in screen_text(app)
        assert "plan, not a permit" not in screen_text(app)  # that is on the sheet and help


def fake_print_tools(folder: Path, default: str | None) -> Path:
    """``lp`` that records its arguments, and ``lpstat -d`` naming ``default`` (or none)."""
    folder.mkdir()
    calls = folder / "calls.txt"
    answer = (
        f"system default destination: {default}" if default else "no system default destination"
    )
    tools = {
        "lp": f'#!/bin/sh\necho "$@" >> "{calls}"\necho "request id is {default}-1"\n',
        "lpstat": f'#!/bin/sh\necho "{answer}"\n',
    }
    for name, body in tools.items():
        path = folder / name
        path.write_text(body)
        path.chmod(path.stat().st_mode | stat.S_IXUSR)
    return calls


@pytest.mark.parametrize("default", ["site-office-laser", None])
async def test_print_writes_the_sheet_and_uses_the_printer_if_any(
    site: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch, default: str | None
):
    calls = fake_print_tools(tmp_path / "bin", default)
    monkeypatch.setenv("PATH", str(tmp_path / "bin"))
    monkeypatch.delenv("PRINTER", raising=False)
    monkeypatch.delenv("LPDEST", raising=False)
    app = make_app(site, TUE)
    async with app.run_test(size=(120, 30)) as pilot:
        await pilot.press("2", "p")
        await settle(app, pilot)
        sheet = site / "prints" / "lookahead-2026-03-04.txt"
        text = sheet.read_text(encoding="utf-8")
        assert "EXC-010" in text and "plan, not a permit" in text
        status = screen_text(app)
        if default:
            assert calls.read_text().split() == [str(sheet)]
            assert f"Printed on the default printer {default}" in status
        else:
            assert not calls.exists()
            assert "No printer set up" in status


async def test_help_lists_every_key_and_closes(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("question_mark")
        assert isinstance(app.screen, HelpScreen)
        assert "End of shift, in three steps" in screen_text(app)
        await pilot.press("escape")
        assert not isinstance(app.screen, HelpScreen)


async def test_palette_runs_an_action_in_its_view(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("4")
        await pilot.press("ctrl+p", *"record: finished")
        await pilot.pause(0.3)
        await pilot.press("enter")
        await settle(app, pilot)
        assert app.current_mode == "today"  # the journal has no record keys: Today does
        finished = [e for e in read_journal(site).entries if e.kind == "finished"]
        assert [e.fields["activity"] for e in finished] == ["EXC-010"]


async def test_tabs_switch_views_with_a_click(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        for view in ("float", "sync", "today"):
            tab = next(t for t in app.screen.query(ViewTab) if t.view == view)
            await pilot.click(tab)
            await pilot.pause()
            assert app.current_mode == view
            number = list(VIEWS).index(view) + 1
            assert f"[{number} {VIEWS[view]}]" in screen_text(app)


async def test_sync_with_an_office_folder(site: Path, tmp_path: Path):
    office = tmp_path / "office"
    office.mkdir()
    app = make_app(site, TUE)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.press("5")
        await pilot.pause()
        assert "Never synced from this device" in screen_text(app)
        app.screen.query_one("#sync-target", Input).value = str(office)
        await pilot.press("enter")  # the folder box has the cursor: Enter syncs
        await settle(app, pilot)
        text = screen_text(app)
        assert "Last sync" in text and "sent 1, received 0" in text
        assert "1 journal file (1 new, 0 grown) to the target" in text
        assert "No open conflicts" in text
        assert sorted(p.name for p in (office / "log").glob("*.toml")) == sorted(
            p.name for p in (site / "log").glob("*.toml")
        )


@pytest.mark.parametrize("size", [(80, 24), (132, 40)])
async def test_sample_site_every_view(sample_site: Path, size: tuple[int, int]):
    day, _ = demo_day(sample_site)
    app = make_app(sample_site, day)
    async with app.run_test(size=size) as pilot:
        for key in ("1", "2", "3", "4"):
            await pilot.press(key)
            await pilot.pause()
            text = screen_text(app)
            assert len(text.splitlines()) == size[1]
            assert "Kestrel Yard" in text
        assert os.environ.get("NO_COLOR") is None


async def test_lists_follow_a_terminal_resize(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        table = app.screen.query_one("#shift-table", RowList)
        narrow = next(c.width for c in table.columns if c.key == "name")
        await pilot.resize_terminal(132, 40)
        await pilot.pause()
        wide = next(c.width for c in table.columns if c.key == "name")
        assert wide - narrow == 132 - 80
