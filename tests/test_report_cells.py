"""Printed outputs are laid out in display cells: wide characters and emoji keep every column.

The outside reference is Rich's ``rich.cells`` (``cell_len`` and ``split_graphemes``), the cell
tables Textual draws the app's screen with; a terminal or printer that follows Unicode's East
Asian Width (UAX #11) and emoji presentation (UTS #51) rules shows the same widths. The core
does not import Rich (tests/test_lookahead_command.py), so ``fieldlog.reports.text_fit`` has its own
small grapheme rules; here they are compared with Rich's, and every printed line is measured
with Rich, never with the code under test.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

import pytest
from rich.cells import cell_len, split_graphemes

from fieldlog.lookahead import build_lookahead
from fieldlog.reports.daily_report import render_daily_report
from fieldlog.reports.lookahead_text import render_text
from fieldlog.reports.schedule_sheet import render_schedule
from fieldlog.reports.text_fit import fit, graphemes, right, width, wrap
from fieldlog.workspace import load_state
from tests.test_app_site import fix_device, log, write_site

FAMILY = "\U0001f468\u200d\U0001f469\u200d\U0001f467"  # one picture, 2 cells (UTS #51)
WORKER = "\U0001f477\u200d\u2640\ufe0f"
FLAG = "\U0001f1f3\U0001f1f4"  # a regional-indicator pair: one flag, 2 cells
NAMES = [
    "基礎掘削 北側",  # CJK: 2 cells each (UAX #11 "W")
    f"Crane lift {WORKER} zone B",
    f"Site office {FAMILY} welfare",
    f"Façade e\u0301 {FLAG} panels",  # a combining accent takes no cell
    "ascii only, grid A-C",
]
MON, TUE = date(2026, 3, 2), date(2026, 3, 3)


MORE = [
    "\u2600\ufe0f sunny",
    "\u2600 plain sun",
    "\U0001f44d\U0001f3fd thumbs",
    "\u00b7\u2026",
    "\ud55c\uad6d\uc5b4",
    "\uff76\uff80\uff76\uff85",
    "\U0001f3f4\U000e0067\U000e0062\U000e0073\U000e0063\U000e0074\U000e007f flag",
]


@pytest.mark.parametrize("text", NAMES + MORE)
def test_cells_and_graphemes_agree_with_rich(text: str) -> None:
    assert width(text) == cell_len(text)
    spans, _ = split_graphemes(text)
    ours = [g for g, _ in graphemes(text)]
    if any(0x1F1E6 <= ord(ch) <= 0x1F1FF for ch in text):
        # Rich splits a flag's two regional indicators into two graphemes (cells still 2);
        # the sheet keeps them together, so a cut never leaves half a flag.
        assert "".join(ours) == text and FLAG in ours
    else:
        assert ours == [text[a:b] for a, b, _ in spans]


def test_a_control_character_takes_no_cell() -> None:
    assert width("tab\there") == cell_len("tab\there") == 7


def boundaries(text: str) -> set[int]:
    """String offsets where Rich's graphemes start or end."""
    spans, _ = split_graphemes(text)
    return {0, len(text)} | {s for s, _, _ in spans}


@pytest.mark.parametrize("text", NAMES)
def test_fit_fills_exactly_the_cells_and_never_splits_a_picture(text: str) -> None:
    for columns in range(1, cell_len(text) + 3):
        out = fit(text, columns, mark="")
        assert cell_len(out) == columns, (columns, out)
        kept = out.rstrip(" ")
        assert text.startswith(kept) and len(kept) in boundaries(text), (columns, out)
        assert cell_len(right(text, columns)) == columns


@pytest.mark.parametrize("text", NAMES)
def test_wrap_never_passes_the_width(text: str) -> None:
    for columns in range(4, 30):
        for line in wrap(" ".join([text] * 3), columns, indent="  "):
            assert cell_len(line) <= columns, (columns, line)


@pytest.fixture
def wide_site(tmp_path: Path) -> Path:
    """The test site with wide names, and a day logged with wide text everywhere."""
    fix_device()
    folder = write_site(tmp_path / "site")
    schedule = folder / "schedule.toml"
    text = schedule.read_text(encoding="utf-8")
    text = text.replace('name = "Excavate pad footings"', f'name = "{NAMES[0]} 基礎掘削工事"')
    text = text.replace('name = "Lay site drains"', f'name = "{NAMES[2]}"')
    schedule.write_text(text, encoding="utf-8")
    log(folder, "started", MON, {"activity": "EXC-010"}, today=MON)
    for trade, company in (
        ("型枠工", "東京建設 有限会社 北関東 第二工事部"),
        (f"steel {WORKER}", f"{FAMILY} Invented Rebar Ltd"),
        ("concrete", "Plain Company Ltd"),
    ):
        log(
            folder,
            "crew",
            TUE,
            {"trade": trade, "company": company, "headcount": 4, "hours": 32},
            today=TUE,
        )
    log(folder, "note", TUE, {"text": "全員安全確認済み " * 12 + FAMILY * 30}, today=TUE)
    return folder


def test_daily_report_lines_fit_80_cells_and_columns_line_up(wide_site: Path) -> None:
    state = load_state(wide_site, TUE)
    report = render_daily_report(state, TUE)
    lines = report.splitlines()
    assert max(cell_len(line) for line in lines) <= 80
    crew = [line for line in lines if line.rstrip().endswith(" 32")]
    assert len(crew) == 3
    # The headcount column ends at the same cell on every crew line.
    ends = {cell_len(line[: line.rindex(" 4 ") + 2]) for line in crew}
    assert len(ends) == 1, crew
    assert len({cell_len(line) for line in crew}) == 1, crew


def test_lookahead_sheet_lines_fit_and_grid_lines_up(wide_site: Path) -> None:
    state = load_state(wide_site, TUE)
    look = build_lookahead(state.schedule, state.replay.readiness)
    sheet = render_text(look, 80)
    lines = sheet.splitlines()
    assert max(cell_len(line) for line in lines) <= 80
    grid = [line for line in lines if line[2:9] in ("EXC-010", "DRN-010", "CON-010")]
    assert len(grid) == 3, sheet
    assert len({cell_len(line.rstrip()) for line in grid}) == 1, grid


def test_float_list_columns_line_up_with_wide_names(wide_site: Path) -> None:
    state = load_state(wide_site, TUE)
    text = render_schedule(state.schedule, "text")
    lines = text.splitlines()
    head = next(k for k, line in enumerate(lines) if line.lstrip().startswith("ID"))
    rows = lines[head : head + 2 + len(state.schedule.activities)]
    # Fixed columns and a right-aligned last one: every row ends on the same cell.
    assert len({cell_len(line) for line in rows}) == 1, rows
