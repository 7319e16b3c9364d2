"""The small site the app's tests drive, and a check of its schedule worked out by hand.

Built in the test (not the sample site) so the app's tests do not move when the sample's log
grows. Six activities on a Monday-to-Friday calendar, site start Monday 2 March 2026, required
finish Thursday 12 March 2026::

    START (milestone) -> EXC-010 (3 d) -> CON-010 (2 d) -> FRM-010 (4 d) -> END (milestone)
                                       \\-> DRN-010 (3 d) --------------------/

Other helpers here: a fixed device id and author (so entry ids are the same on every machine,
for the snapshots), and ``log`` to write entries the way the app does, with a fixed clock.
"""

from __future__ import annotations

import os
from datetime import UTC, date, datetime
from pathlib import Path
from typing import Any

from fieldlog.journal import Entry, record_entry
from fieldlog.site.files import load_site
from fieldlog.workspace import load_state
from tests.helpers import site_builder
from tests.helpers.site_builder import Act, schedule_toml, site_toml

DEVICE = "tab-test01"
AUTHOR = "T. Foreman"
START = date(2026, 3, 2)

SITE_TOML = site_toml(
    "Test yard (invented)",
    START,
    finish_by=date(2026, 3, 12),
    crews={"groundworks": 6, "concrete": 5},
)

SCHEDULE_TOML = schedule_toml(
    1,
    [
        Act("START", "Site possession", 0),
        Act("EXC-010", "Excavate pad footings", 3, after=("START",), crew={"groundworks": 4}),
        Act("CON-010", "Pour pad footings", 2, after=("EXC-010",), crew={"concrete": 5}),
        Act("FRM-010", "Erect timber frame", 4, after=("CON-010",)),
        Act("DRN-010", "Lay site drains", 3, after=("EXC-010",), crew={"groundworks": 3}),
        Act("END", "Handover", 0, after=("FRM-010", "DRN-010")),
    ],
)


def write_site(folder: Path) -> Path:
    """Write the test site into ``folder`` (created) and return it."""
    return site_builder.write_site(folder, SITE_TOML, SCHEDULE_TOML)


def fix_device() -> None:
    """Give this test's fieldlog home a fixed device id and author."""
    home = Path(os.environ["FIELDLOG_HOME"])
    home.mkdir(parents=True, exist_ok=True)
    (home / "device.toml").write_text(
        f'device = "{DEVICE}"\nauthor = "{AUTHOR}"\n', encoding="utf-8"
    )


def log(folder: Path, kind: str, day: date | None, fields: dict[str, Any], *, today: date) -> Entry:
    """Record an entry as the app does, written at 17:00 UTC on ``today``."""
    written = datetime(today.year, today.month, today.day, 17, 0, tzinfo=UTC)
    return record_entry(
        folder,
        load_site(folder),
        kind,
        day,
        fields,
        today=today,
        device=DEVICE,
        author=AUTHOR,
        clock=lambda: written,
    )


class TestTheTestSite:
    """The forward and backward pass worked by hand (Hendrickson, *Project Management for
    Construction*, Table 10-7, with inclusive working-day dates as in DEVELOPERS.md, Rules of
    the trade)."""

    def test_dates_and_floats_by_hand(self, tmp_path: Path) -> None:
        state = load_state(write_site(tmp_path / "site"), date(2026, 3, 1))
        r = state.schedule.by_id
        # By hand: EXC Mon 2 - Wed 4; CON Thu 5 - Fri 6; FRM Mon 9 - Thu 12 (the finish);
        # DRN Thu 5 - Mon 9 with late finish Thu 12, so 3 working days of float (Tue-Thu).
        assert (r["EXC-010"].early_start, r["EXC-010"].early_finish) == (
            date(2026, 3, 2),
            date(2026, 3, 4),
        )
        assert (r["CON-010"].early_start, r["CON-010"].early_finish) == (
            date(2026, 3, 5),
            date(2026, 3, 6),
        )
        assert (r["FRM-010"].early_start, r["FRM-010"].early_finish) == (
            date(2026, 3, 9),
            date(2026, 3, 12),
        )
        assert (r["DRN-010"].early_start, r["DRN-010"].early_finish) == (
            date(2026, 3, 5),
            date(2026, 3, 9),
        )
        assert r["DRN-010"].total_float == 3
        assert [r[a].total_float for a in ("EXC-010", "CON-010", "FRM-010")] == [0, 0, 0]
        assert state.schedule.finish == date(2026, 3, 12)


def screen_text(app: Any) -> str:
    """The screen as plain text (Textual's compositor, as ``export_screenshot`` uses it).

    Uses the private ``screen._compositor`` (verified on Textual 8.2.8, libraries.md 1.1); the
    tests also assert on widget state, so a Textual upgrade that breaks this breaks loudly.
    """
    import io

    from rich.console import Console

    w, h = app.size
    console = Console(
        width=w,
        height=h,
        file=io.StringIO(),
        record=True,
        force_terminal=True,
        color_system=None,
        legacy_windows=False,
    )
    console.print(app.screen._compositor.render_update(full=True))
    return console.export_text(styles=False)


async def settle(app: Any, pilot: Any) -> None:
    """Wait for every worker (recompute, print, verify) and the repaint after it."""
    await app.workers.wait_for_complete()
    await pilot.pause()
    await app.workers.wait_for_complete()
    await pilot.pause()


async def save_form(app: Any, pilot: Any, **fields: str) -> None:
    """Type ``fields`` (by field name) into the open form, save it with ctrl+s and settle.

    A text area takes ``text``, the other inputs ``value``: set directly, as a paste would.
    """
    for name, value in fields.items():
        widget = app.screen.query_one(f"#field-{name}")
        setattr(widget, "text" if hasattr(widget, "document") else "value", value)
    await pilot.press("ctrl+s")
    await settle(app, pilot)


def row_texts(table: Any, key: str) -> list[str]:
    """The plain text of one list row (a RowList or a DataTable), by row key."""
    if hasattr(table, "cells"):
        return table.cells(key)
    return [str(c) for c in table.get_row(key)]
