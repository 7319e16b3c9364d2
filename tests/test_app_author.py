"""First run on a device: the app asks whose name stands on the entries, once.

Driven through Textual's Pilot with a fresh fieldlog home (no name kept yet).
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

import pytest

from fieldlog.app.app import make_app
from fieldlog.app.screens.form import FormScreen
from fieldlog.journal import read_journal
from fieldlog.journal.keys import saved_author
from tests.test_app_site import settle, write_site

MON = date(2026, 3, 2)


@pytest.fixture
def fresh_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    home = tmp_path / "new-device"
    monkeypatch.setenv("FIELDLOG_HOME", str(home))
    return home


async def test_the_first_run_asks_the_name_and_keeps_it(tmp_path: Path, fresh_home: Path):
    folder = write_site(tmp_path / "site")
    app = make_app(folder, MON)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        form = app.screen
        assert isinstance(form, FormScreen) and form.form.title == "Who records on this device?"
        field = form.query_one("#field-author")
        field.value = "x" * 81  # type: ignore[attr-defined]
        await pilot.press("enter")  # too long: the form stays, saying why
        await pilot.pause()
        assert app.screen is form and saved_author(fresh_home) is None
        field.value = "M. Achterberg"  # type: ignore[attr-defined]
        await pilot.press("enter")
        await pilot.pause()
        assert not isinstance(app.screen, FormScreen)
        assert saved_author(fresh_home) == "M. Achterberg"
        assert app.write("note", {"text": "first entry from this tablet"}) is None
        await settle(app, pilot)
    (entry,) = read_journal(folder).entries
    assert entry.author == "M. Achterberg" and entry.sig
    key_file = next((folder / "devices").iterdir()).read_text()
    assert 'author = "M. Achterberg"' in key_file


async def test_a_device_with_a_name_is_not_asked_again(tmp_path: Path):
    folder = write_site(tmp_path / "site")  # the shared test home already keeps a name
    app = make_app(folder, MON)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        assert not isinstance(app.screen, FormScreen)


async def test_without_a_name_nothing_is_recorded(tmp_path: Path, fresh_home: Path):
    folder = write_site(tmp_path / "site")
    app = make_app(folder, MON)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        await pilot.press("escape")  # the foreman closes the question
        await pilot.pause()
        refused = app.write("note", {"text": "who wrote this?"})
        assert refused is not None and "no author name is set" in refused
    assert not (folder / "log").exists()
