"""The printable daily report: golden file, 80 columns, and what a daily record must hold.

Regenerate the golden file after an intended change with::

    FIELDLOG_UPDATE_GOLDEN=1 .venv/bin/pytest tests/test_journal_report.py

and read the diff before committing it.
"""

from __future__ import annotations

import os
from datetime import date
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.reports.daily_report import WIDTH, render_daily_report
from fieldlog.workspace import load_state
from tests.helpers.journal_helpers import OTHER, FixedClock, make_site, rec

GOLDEN = Path(__file__).parent / "golden" / "daily_report.txt"
DAY = date(2026, 9, 10)


def d(n: int) -> date:
    return date(2026, 9, n)


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    """A pump-house job logged for four days, everything a report can show on the 10th."""
    folder = make_site(tmp_path_factory.mktemp("report") / "site")
    clock = FixedClock()
    r = lambda kind, day, **f: rec(folder, kind, day, clock=clock, **f)  # noqa: E731
    r("started", d(7), activity="EXC-010")
    r("weather", d(7), conditions="dry, bright", high=19, low=9)
    pump = r(
        "need",
        d(8),
        activity="CON-010",
        what="concrete pump booking",
        category="equipment",
        expected=d(11),
    )
    r("remaining", d(8), activity="EXC-010", days=2)
    r("finished", d(9), activity="EXC-010")
    # The 10th: rain, a short stoppage, two crews, an out-of-sequence start, and the rest.
    r(
        "weather",
        DAY,
        conditions="heavy rain until 11:00",
        high=14,
        low=8,
        precip_mm=17.5,
        wind="gusty south-west",
        stopped=True,
        hours_lost=3,
    )
    r(
        "lost-time",
        DAY,
        cause="weather",
        hours=3,
        activities=["BLD-010"],
        note="pumped out the base before blinding",
    )
    crew = r(
        "crew", DAY, trade="groundworks", company="Tarn Civils (invented)", headcount=6, hours=39
    )
    r("crew", DAY, trade="steel fixers", company="Bexley Rebar (invented)", headcount=3)
    r("started", DAY, activity="BLD-010")
    r("remaining", DAY, activity="BLD-010", days=2)
    r("percent", DAY, activity="BLD-010", percent=40)
    r("started", DAY, activity="CON-010")
    r(
        "delivery",
        DAY,
        what="rebar for the base",
        quantity="3.2 t",
        supplier="Hollin Steel (invented)",
        activity="BLD-010",
        note="ticket HS-4471",
    )
    r(
        "inspection",
        DAY,
        what="formation and blinding",
        result="passed",
        inspector="resident engineer",
        reference="IR-012",
    )
    r("visitor", DAY, name="M. Okoro", company="client's agent (invented)", purpose="progress walk")
    r(
        "instruction",
        DAY,
        text="add a second sump pit at the north-east corner",
        given_by="resident engineer",
        form="verbal",
        activities=["BLD-010"],
    )
    r(
        "incident",
        DAY,
        text="excavator bucket struck the fence; no one near",
        injury=False,
        reported_to="site manager",
    )
    r("safety", DAY, text="edge protection gap at the ramp", action="barrier closed")
    r(
        "note",
        DAY,
        text="Pump booking confirmed for tomorrow morning; standby pump on site. "
        "A long note wraps onto more lines so the report must keep it within eighty columns.",
    )
    r("need", DAY, activity="WAL-010", what="wall kicker drawings rev C", category="drawings")
    r("cleared", DAY, item=pump.id, note="booked for 06:30")
    r(
        "correction",
        None,
        supersedes=crew.id,
        reason="two labourers left at noon",
        headcount=5,
        hours=35,
    )
    rec(folder, "note", DAY, device=OTHER, clock=clock, text="Tablet: photos of the sump taken.")
    r("note", d(11), text="the 11th: must not appear in the report of the 10th")
    return folder


def test_golden_daily_report(site):
    text = render_daily_report(load_state(site, DAY), DAY)
    if os.environ.get("FIELDLOG_UPDATE_GOLDEN"):
        GOLDEN.write_text(text, encoding="utf-8", newline="\n")
    assert text == GOLDEN.read_text(encoding="utf-8")


def test_report_fits_80_columns_and_is_deterministic(site):
    text = render_daily_report(load_state(site, DAY), DAY)
    assert all(len(line) <= WIDTH for line in text.splitlines())
    assert text == render_daily_report(load_state(site, DAY), DAY)
    assert "the 11th" not in text
    assert "A schedule is a plan, not a permit" in text


def test_report_command_prints_the_same(site, capsys):
    assert main(["report", str(site), "--day", DAY.isoformat()]) == 0
    out, _ = capsys.readouterr()
    assert out == render_daily_report(load_state(site, DAY), DAY)


def test_report_holds_what_public_records_guides_require(site):
    """Items a daily record must contain, from two public state-DOT manuals:

    * TxDOT, Construction Contract Administration Manual, Section 4 "Project Records": daily
      work report entries include, as a minimum, date; temperature; weather conditions;
      contractor/subcontractor work hours; controlling item of work based on schedule.
    * TxDOT, ROW Utility Manual, ch. 10 section 2 "Project Documentation": document inclement
      weather and down time; verbal authorization for minor changes; notable incidents.
    """
    text = render_daily_report(load_state(site, DAY), DAY)
    required = {
        "date": "Thursday 10 September 2026",
        "temperature": "high 14 C, low 8 C",
        "weather conditions": "heavy rain until 11:00",
        "contractor/subcontractor work hours": "Tarn Civils (invented)",
        "controlling item of work based on schedule": "Controlling work (driving path):",
        "inclement weather": "Work stopped by weather, 3 hours lost",
        "down time": "3 hours lost; cause: weather",
        "verbal authorization": "VERBAL from resident engineer",
        "notable incidents": "excavator bucket struck the fence",
    }
    missing = {item: words for item, words in required.items() if words not in text}
    assert not missing
    crews = text.split("CREWS ON SITE")[1].split("\n\n")[0]
    assert "Total" in crews and "35+" in crews  # 35 person-hours known, one crew's missing
