"""The views say what is true and keep what was typed: one Pilot test per finding.

Each test drives the real app on the small site of ``test_app_site`` at 80x24, the size of a
tablet's terminal, the way a tired foreman would: quick bursts of keys, pasted text, no mouse.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

import pytest
from textual import events
from textual.widgets import DataTable, Input

from fieldlog.app.app import make_app
from fieldlog.app.keymap import AREAS
from fieldlog.app.screens.help import key_table
from fieldlog.app.widgets.row_list import RowList
from fieldlog.cli import main
from fieldlog.journal import read_journal
from tests.test_app_site import log, screen_text, settle
from tests.test_app_today import started_site

MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


@pytest.fixture
def site(tmp_path: Path) -> Path:
    """The test site, EXC-010 started on Monday (the app opens on Tuesday)."""
    return started_site(tmp_path)


def burst(app, *keys: tuple[str, str]) -> None:  # noqa: ANN001 - the app under test
    """Keys arriving together, as a terminal hands over a fast typist's keys: all are queued
    before the first is handled (``Pilot.press`` waits for the app between keys)."""
    for name, character in keys:
        app.post_message(events.Key(name, character))


async def test_day_panel_counts_progress_recorded_today(site: Path):
    log(site, "finished", TUE, {"activity": "EXC-010"}, today=TUE)
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)):
        day = str(app.screen.query_one("#day-record").render())
    assert "nothing yet" not in day
    assert "1 progress entry" in day


async def test_no_key_typed_after_slash_is_lost(site: Path):
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("3")
        await settle(app, pilot)
        # "con" holds two of the list's filter keys (c critical, n near critical).
        burst(app, ("slash", "/"), ("c", "c"), ("o", "o"), ("n", "n"), ("slash", "/"))
        await pilot.pause()
        await pilot.pause()
        search = app.screen.query_one("#float-search", Input)
        assert search.value == "con/"
        assert app.screen.kind == "all"  # no filter key ran


FAMILY = "\U0001f468\u200d\U0001f469\u200d\U0001f467"  # man ZWJ woman ZWJ girl
FLAG = "\U0001f3f4\U000e0067\U000e0062\U000e0073\U000e0063\U000e0074\U000e007f"  # tag flag
WORKER = "\U0001f477\u200d\u2640\ufe0f"  # construction worker ZWJ female sign VS16


async def test_text_typed_and_pasted_is_recorded_exactly(site: Path):
    """A one-line box (the weather's conditions) and a note's box of several lines."""
    app = make_app(site, TUE)
    typed = "lift ok " + WORKER + " " + FAMILY + " "
    async with app.run_test(size=(80, 24)) as pilot:
        for key, name, paste in (
            ("w", "conditions", FLAG + "\nline 2"),
            ("n", "text", FLAG + "\nline 2"),
        ):
            await pilot.press(key)
            await pilot.pause()
            field = app.screen.query_one(f"#field-{name}")
            field.focus()
            await pilot.pause()
            burst(app, *((ch, ch) for ch in typed))
            await pilot.pause()
            field.post_message(events.Paste(paste))
            await pilot.pause()
            await pilot.press("ctrl+s")
            await settle(app, pilot)
    journal = read_journal(site).entries
    assert [e.fields["conditions"] for e in journal if e.kind == "weather"] == [
        typed + FLAG + " / line 2"
    ]  # one line: the paste's line break shows as " / "
    assert [e.fields["text"] for e in journal if e.kind == "note"] == [
        typed + FLAG + "\nline 2"
    ]  # a note has lines: the paste keeps them


async def test_sync_view_words_match_its_keys(site: Path, tmp_path: Path):
    office = tmp_path / "office stick"
    office.mkdir()
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("5")
        await pilot.pause()
        assert "Type the office folder, then press Enter to sync" in screen_text(app)
        box = app.screen.query_one("#sync-target", Input)
        box.insert_text_at_cursor(f"{tmp_path}/")  # the long part at once, the rest typed:
        await pilot.press(*"office stick")  # an s in a path types, it does not sync
        assert box.value == str(office)
        assert not (office / "log").exists()
        await pilot.press("enter")
        await settle(app, pilot)
        assert "Last sync" in screen_text(app)
        assert (office / "log").is_dir()

        await pilot.press("1", "5")  # the panel has the keys after a sync: view keys work
        await pilot.pause()
        hint = str(app.screen.query_one("#sync-hint").render())
        assert hint.startswith(f"Press s or Enter to sync with {office}")
        await pilot.press("s")
        await settle(app, pilot)
        assert app.screen.query_one("#sync-target", Input).value == str(office)
        assert "Sync done" in screen_text(app)


async def test_two_weeks_shows_the_printed_sheets_rows(sample_site: Path):
    from fieldlog.commands.demo import demo_day

    day, _ = demo_day(sample_site)
    app = make_app(sample_site, day)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("2")
        await settle(app, pilot)
        look = app.snapshot.lookahead
        assert look is not None
        table = app.screen.query_one("#look-table", DataTable)
        crews = sum(1 for load in look.crews if any(load.most))
        shown = [r.id for r in app.screen.shown]
        assert shown == [r.id for r in look.rows_with_work]
        assert table.row_count == len(shown) + crews
        assert len(look.rows) > len(shown)
        await pilot.press("a")
        assert len(app.screen.shown) == len(look.rows)


async def test_plain_mode_draws_ascii_only(site: Path):
    app = make_app(site, TUE, plain=True)
    async with app.run_test(size=(80, 24)) as pilot:
        for view in ("1", "2", "3", "4", "5", "question_mark"):
            await pilot.press(view)
            await settle(app, pilot)
            text = screen_text(app)
            assert text.isascii(), {ch for ch in text if not ch.isascii()}
        await pilot.press("escape", "escape", "2")  # close help, leave the folder box
        await pilot.pause()
        assert "## MUST  :: may  .. cannot" in screen_text(app)


async def test_daily_report_view_is_the_commands_report_and_prints_it(
    site: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture
) -> None:
    no_tools = tmp_path / "no-tools"
    no_tools.mkdir()
    monkeypatch.setenv("PATH", str(no_tools))  # no print command: the file only
    log(site, "weather", TUE, {"conditions": "dry", "unit": "C"}, today=TUE)
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()

    command = {}  # what `fieldlog report SITE --day DAY` prints (before the app takes stdout)
    for day in (MON, TUE):
        assert main(["report", str(site), "--day", day.isoformat()]) == 0
        command[day] = capsys.readouterr().out

    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("7")
        await settle(app, pilot)
        assert app.screen.text == command[TUE]
        assert "DAILY REPORT" in screen_text(app)
        await pilot.press("comma")  # Monday
        assert app.screen.text == command[MON]
        await pilot.press("full_stop", "full_stop")  # back to Tuesday; never past the shift
        assert app.screen.shown_day(app.snapshot) == TUE
        await pilot.press("p")
        await settle(app, pilot)
        printed = site / "prints" / "daily-report-2026-03-03.txt"
        assert printed.read_text(encoding="utf-8") == app.screen.text
        assert "report saved as prints/daily-report-2026-03-03.txt" in app.status[0]

        printed.unlink()
        (site / "prints").rmdir()
        (site / "prints").symlink_to(elsewhere, target_is_directory=True)
        await pilot.press("p")
        await settle(app, pilot)
        assert app.status[1] and "link" in app.status[0]

        await pilot.press("4")  # the Journal: the report of the selected entry's day
        await pilot.pause()
        monday = next(e.id for e in read_journal(site).entries if e.day == MON)
        app.screen.query_one("#journal-table", RowList).move_to(monday)
        await pilot.press("d")
        await settle(app, pilot)
        assert app.current_mode == "report" and app.screen.text == command[MON]
    assert list(elsewhere.iterdir()) == []  # nothing written through the link


def test_help_headings_are_whole_at_80_columns() -> None:
    import io

    from rich.console import Console

    console = Console(width=76, file=io.StringIO(), record=True)  # the help box inside 80
    console.print(key_table())
    text = console.export_text()
    for heading in AREAS.values():
        assert heading in [line.rstrip() for line in text.splitlines()], heading


async def test_two_weeks_shows_work_after_its_finish_as_done(site: Path):
    from fieldlog.app.screens.lookahead import GLYPHS
    from fieldlog.lookahead import Cell

    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("2")
        await settle(app, pilot)
        look = app.snapshot.lookahead
        assert look is not None
        exc = next(r for r in look.rows if r.id == "EXC-010")  # finishes Wed 4th, no float
        after = [c for d, c in zip(look.days, exc.cells, strict=True) if d > exc.late_finish]
        assert after and Cell.CANNOT not in after and Cell.DONE in after
        table = app.screen.query_one("#look-table", DataTable)
        cells = [str(c).strip() for c in table.get_row("EXC-010")[3 : 3 + len(look.days)]]
        assert GLYPHS[Cell.CANNOT] not in cells[1:]  # Thursday on: done, not cannot
        table.move_cursor(row=table.get_row_index("EXC-010"), column=4)  # Thursday
        await pilot.pause()
        assert "EXC-010 Thu 05 Mar: done" in str(app.screen.query_one("#look-why").render())


async def test_keys_typed_with_a_view_key_go_to_the_new_view(site: Path):
    """ "3/fnd" in one burst, the Float view not loaded yet: the search gets "fnd", and the
    "f" never reaches Today (where it would record a finish)."""
    app = make_app(site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        burst(app, ("3", "3"), ("slash", "/"), *((ch, ch) for ch in "exn"))
        await settle(app, pilot)
        assert app.current_mode == "float"
        assert app.screen.query_one("#float-search", Input).value == "exn"
        assert app.screen.kind == "all"
        await pilot.press("escape")
        burst(app, ("1", "1"), ("f", "f"))  # back to Today, then a finish: it lands on Today
        await settle(app, pilot)
        assert app.current_mode == "today"
    kinds = [e.kind for e in read_journal(site).entries]
    assert kinds == ["started", "finished"]  # only the finish typed on Today
