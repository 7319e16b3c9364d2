"""Golden files for the printed lookahead, and the rules every printed sheet keeps.

The sheet's bytes are the contract: ``tests/golden/lookahead_{80,132}[_ascii].txt`` hold the
sheet for the invented site below, built in the test so that changes elsewhere (sample sites,
the journal) never move it. To regenerate after an intended change, run

    FIELDLOG_UPDATE_GOLDEN=1 .venv/bin/pytest tests/test_lookahead_golden.py

and read the diff before committing it. The site, its names and its crews are invented.
"""

from __future__ import annotations

import os
from datetime import date
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from test_lookahead_oracle import act, make_site

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.engine.readiness import OpenItem
from fieldlog.lookahead import build_lookahead
from fieldlog.reports.lookahead_text import CAUTION, PAGE_LINES, render_text
from fieldlog.reports.text_fit import abbreviate, fit, width
from fieldlog.site.model import CalendarSpec, Link, LinkType

GOLDEN = Path(__file__).parent / "golden"
STATUS = date(2026, 9, 11)  # end of Friday; the sheet starts Saturday


def golden_site():
    """A small invented job: groundworks, concrete and a frame, with a cure on a 7-day
    calendar, one job in progress, one finished, a required finish, and a crunch on the
    groundworks crew."""
    weekdays = CalendarSpec("weekdays", frozenset({0, 1, 2, 3, 4}), frozenset({date(2026, 9, 21)}))
    allweek = CalendarSpec("allweek", frozenset(range(7)))
    acts = [
        act("MOB", 0, "Site set up, hoarding and welfare units"),
        act("CLR-010", 3, "Strip topsoil and clear", crew={"groundworks": 4}),
        act("EXC-010", 5, "Excavate pad footings, grid A-C", crew={"groundworks": 4}),
        act("EXC-020", 4, "Excavate pad footings, grid D-F", crew={"groundworks": 3}),
        act("DRN-010", 4, "Lay foul drainage runs", crew={"groundworks": 3}),
        act(
            "DRN-020",
            3,
            "Surface water soakaways",
            crew={"groundworks": 2},
            finish_not_after=date(2026, 9, 18),
        ),
        act("RBR-010", 2, "Fix footing rebar, grid A-C", crew={"steelfixers": 3}),
        act(
            "CON-010",
            1,
            "Pour pad footings, grid A-C",
            crew={"concrete": 5},
            start_not_before=date(2026, 9, 17),
        ),
        act("CUR-010", 5, "Footing cure", calendar="allweek"),
        act("CON-020", 1, "Pour pad footings, grid D-F", crew={"concrete": 5}),
        act("DUC-010", 2, "Ducts for the incoming supply", crew={"groundworks": 2}),
        act("SLB-010", 3, "Sub-base and blinding", crew={"groundworks": 4}),
        act(
            "STL-010",
            8,
            "Erect steel frame",
            crew={"erectors": 4},
            finish_not_after=date(2026, 10, 6),
        ),
        act("HND", 0, "Frame handed to the cladding trade"),
    ]
    links = [
        Link("MOB", "CLR-010"),
        Link("CLR-010", "EXC-010"),
        Link("CLR-010", "EXC-020"),
        Link("EXC-010", "RBR-010", LinkType.SS, 2),
        Link("RBR-010", "CON-010"),
        Link("EXC-010", "CON-010"),
        Link("CON-010", "CUR-010"),
        Link("EXC-020", "CON-020"),
        Link("CON-020", "CUR-010", LinkType.FF),
        Link("CUR-010", "STL-010"),
        Link("DRN-010", "DRN-020"),
        Link("DRN-010", "SLB-010", LinkType.FS, 1),
        Link("DUC-010", "SLB-010"),
        Link("STL-010", "HND"),
        Link("SLB-010", "HND"),
        Link("DRN-020", "HND"),
    ]
    site = make_site(
        acts,
        links,
        calendars=[weekdays, allweek],
        start=date(2026, 9, 1),
        crews={"groundworks": 7, "steelfixers": 4, "concrete": 5, "erectors": 6},
        finish_by=date(2026, 10, 16),
        name="Kingfisher Lane depot (invented)",
        revision=4,
    )
    progress = {
        "MOB": Progress(actual_start=date(2026, 9, 1), actual_finish=date(2026, 9, 1)),
        "CLR-010": Progress(actual_start=date(2026, 9, 2), actual_finish=date(2026, 9, 4)),
        "EXC-010": Progress(actual_start=date(2026, 9, 7), remaining=2, remaining_as_of=STATUS),
        "DRN-010": Progress(actual_start=date(2026, 9, 10), remaining=3, remaining_as_of=STATUS),
    }
    readiness = [
        OpenItem(
            "DUC-010",
            "duct route sign-off from the supply company",
            "drawings",
            date(2026, 9, 16),
            date(2026, 9, 8),
        ),
        OpenItem("STL-010", "crane lift plan approved", "permit", None, date(2026, 9, 9)),
    ]
    return site, progress, readiness


def golden_lookahead():
    site, progress, readiness = golden_site()
    holds = {i.activity: u for i in readiness if (u := i.holds_until(STATUS)) is not None}
    result = compute_schedule(site, STATUS, progress, holds=holds)
    return build_lookahead(result, readiness)


@pytest.mark.parametrize(
    ("sheet_width", "ascii_only", "name"),
    [
        (80, False, "lookahead_80.txt"),
        (80, True, "lookahead_80_ascii.txt"),
        (132, False, "lookahead_132.txt"),
        (132, True, "lookahead_132_ascii.txt"),
    ],
)
def test_sheet_matches_golden(sheet_width: int, ascii_only: bool, name: str) -> None:
    got = render_text(golden_lookahead(), sheet_width, ascii_only=ascii_only)
    data = got.encode("ascii" if ascii_only else "utf-8")
    path = GOLDEN / name
    if os.environ.get("FIELDLOG_UPDATE_GOLDEN") == "1":
        path.parent.mkdir(exist_ok=True)
        path.write_bytes(data)
    assert data == path.read_bytes(), f"{name} changed: FIELDLOG_UPDATE_GOLDEN=1 to accept"


@pytest.mark.parametrize("sheet_width", [80, 132])
@pytest.mark.parametrize("ascii_only", [False, True])
@pytest.mark.parametrize("page_lines", [PAGE_LINES, 40])
def test_every_page_keeps_the_sheet_rules(sheet_width, ascii_only, page_lines) -> None:
    """Width, page length, repeated header, legend and caution on every page."""
    la = golden_lookahead()
    sheet = render_text(la, sheet_width, ascii_only=ascii_only, page_lines=page_lines)
    pages = sheet.split("\f")
    assert len(pages) > 1  # the golden site is long enough to need a page break
    caution = " ".join(CAUTION.split()[:6])
    for n, page in enumerate(pages, 1):
        lines = page.split("\n")
        assert lines[-1] == "" and len(lines) - 1 <= page_lines
        assert lines[0].startswith("Kingfisher Lane depot (invented) - lookahead")
        assert lines[-2].endswith(f"page {n} of {len(pages)}")
        assert caution in " ".join(page.split())
        for line in lines:
            assert width(line) <= sheet_width and line == line.rstrip()

    if ascii_only:
        sheet.encode("ascii")
    assert render_text(la, sheet_width, ascii_only=ascii_only, page_lines=page_lines) == sheet


def test_sheet_flags_late_and_not_ready_rows() -> None:
    sheet = render_text(golden_lookahead(), 132)
    rows = {
        line[2:12].strip(): line for line in sheet.splitlines() if line[:2] in ("! ", " ?", "!?")
    }
    assert rows["STL-010"].startswith(" ?")  # no date for the lift plan
    assert rows["DRN-020"].startswith("! ")  # late against its finish-not-after
    assert "crane lift plan approved: no expected date" in sheet


def test_eighty_columns_abbreviate_long_names() -> None:
    """Names are cut to fit, keeping a short place after a comma so rows stay distinct."""
    sheet = render_text(golden_lookahead(), 80)
    assert "  DUC-010  Ducts for the incomi\u2026   16 " in sheet
    assert " ~EXC-010  Excavate pad\u2026grid A-C    2 " in sheet  # ~: already running
    assert "  EXC-020  Excavate pad\u2026grid D-F    3 " in sheet
    assert "Ducts for the incoming supply" in sheet  # in full among the reasons


@settings(max_examples=200, deadline=None, derandomize=True)
@given(st.text(alphabet="ab ,-\u00e9\u6771\u0301", max_size=40), st.integers(4, 40))
def test_fitted_and_abbreviated_text_takes_exactly_its_columns(text: str, columns: int) -> None:
    """Every cell of the grid lines up: names of any script take exactly their columns."""
    for mark in ("~", "\u2026"):
        assert width(fit(text, columns, mark)) == columns
        assert width(abbreviate(text, columns, mark)) == columns


def test_too_many_days_for_the_width_is_refused() -> None:
    site, _, _ = golden_site()
    la = build_lookahead(compute_schedule(site, STATUS), days=60)
    with pytest.raises(ValueError, match="do not fit"):
        render_text(la, 80)
    assert render_text(la, 132)
