"""The end-of-shift update of the tour, key by key, on a copy of the sample site.

A foreman's whole update: start one activity, finish one, days left on one, the weather with
a lost afternoon, yesterday lost to rain, a delivery, a note, a readiness item cleared, print
the lookahead and sync with the office. Keys are counted as pressed, except the characters of
free text (what is typed into a field: words, numbers, a day, a folder); the budget is 40.
The log must then hold exactly the entries meant, with their values and days.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path
from typing import Any

from textual.widgets import Input, TextArea

from fieldlog.app.app import make_app
from fieldlog.app.widgets.row_list import RowList
from fieldlog.journal import read_journal
from tests.test_app_site import settle

TUE = date(2026, 9, 29)  # the sample's log ends on Friday 25; Monday 28 was rained off
MON = date(2026, 9, 28)
KEY_BUDGET = 40


class CountingKeys:
    """Presses keys through the Pilot and counts them; free text is typed but not counted."""

    def __init__(self, pilot: Any) -> None:
        self.pilot = pilot
        self.keys: list[str] = []
        self.text = 0

    async def press(self, *keys: str) -> None:
        self.keys.extend(keys)
        await self.pilot.press(*keys)

    async def type(self, text: str) -> None:
        """Free text goes into the focused field at its cursor, as typing puts it there (one
        key event per character would cost the test seconds, and they are not counted)."""
        self.text += len(text)
        field = self.pilot.app.focused
        if isinstance(field, TextArea):
            field.insert(text)
        else:
            assert isinstance(field, Input), field
            field.insert_text_at_cursor(text)
        await self.pilot.pause()


async def test_the_end_of_shift_update_takes_at_most_40_keys(
    sample_site: Path, tmp_path: Path
) -> None:
    office = tmp_path / "office"
    office.mkdir()
    before = {e.id for e in read_journal(sample_site).entries}
    app = make_app(sample_site, TUE)
    async with app.run_test(size=(80, 24)) as pilot:
        k = CountingKeys(pilot)
        table = app.screen.query_one("#shift-table", RowList)
        assert table.keys == ["FND-020", "FND-010", "FND-040", "EW-030"]

        await k.press("down", "down")
        assert table.current == "FND-040"
        await k.press("s")  # start one
        await settle(app, pilot)
        await k.press("up")
        assert table.current == "FND-010"  # the cursor followed FND-040
        await k.press("f")  # finish one
        await settle(app, pilot)
        await k.press("home")
        assert table.current == "FND-020"
        await k.press("r")  # days left on one
        await k.type("2")
        await k.press("enter")
        await settle(app, pilot)

        await k.press("w")  # weather, afternoon lost
        await k.type("heavy rain from 13:00")
        await k.press("tab", "space", "tab")
        await k.type("4")
        await k.press("ctrl+s")
        await settle(app, pilot)
        await k.press("l", "tab", "space", "tab")  # yesterday lost to rain
        await k.type("yesterday")
        await k.press("ctrl+s")
        await settle(app, pilot)
        await k.press("d", "enter")  # a delivery
        await k.type("ready-mix C32/40")
        await k.press("ctrl+s")
        await settle(app, pilot)
        await k.press("n")  # a note
        await k.type("pads A-C blinded")
        await k.press("ctrl+s")
        await settle(app, pilot)
        await k.press("y", "enter")  # the open readiness item
        await k.type("erector checked the bolts")
        await k.press("ctrl+s")
        await settle(app, pilot)

        await k.press("2", "p")  # print the lookahead
        await settle(app, pilot)
        await k.press("5")  # sync: type the office folder
        await k.type(str(office))
        await k.press("enter")
        await settle(app, pilot)

    print(f"keys {len(k.keys)}, free-text characters {k.text}: {' '.join(k.keys)}")
    assert len(k.keys) <= KEY_BUDGET, k.keys

    new = sorted(
        (e for e in read_journal(sample_site).entries if e.id not in before), key=lambda e: e.seq
    )  # in the order recorded
    got = [(e.kind, e.day, dict(e.fields)) for e in new]
    assert got == [
        ("started", TUE, {"activity": "FND-040"}),
        ("finished", TUE, {"activity": "FND-010"}),
        ("remaining", TUE, {"activity": "FND-020", "days": 2}),
        (
            "weather",
            TUE,
            {
                "conditions": "heavy rain from 13:00",
                "unit": "C",
                "stopped": True,
                "hours_lost": 4.0,
            },
        ),
        ("lost-time", MON, {"cause": "weather", "whole_day": True}),
        ("delivery", TUE, {"what": "ready-mix C32/40", "activity": "FND-020"}),
        ("note", TUE, {"text": "pads A-C blinded", "activity": "FND-020"}),
        ("cleared", TUE, {"item": got[-1][2]["item"], "note": "erector checked the bolts"}),
    ]
    need = next(e for e in read_journal(sample_site).entries if e.id == got[-1][2]["item"])
    assert need.fields["activity"] == "STL-010"
    assert list((office / "log").glob(f"{TUE}_*.toml"))  # the day's log reached the office
    assert list(sample_site.glob("**/lookahead*.txt"))  # the printable sheet was written
