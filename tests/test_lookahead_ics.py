"""``fieldlog lookahead --format ics``: the MUST days as all-day events, read back by icalendar.

Outside references: the icalendar library parses every file back (icalendar 7, the reference
reader here); RFC 5545 for the rules checked by hand: DTEND of an all-day event is the day
after (non-inclusive, section 3.6.1), UID and DTSTAMP are required in every VEVENT (the library
does not check them: libraries.md), lines end in CRLF and are at most 75 octets (section 3.1).
The expected MUST days come from :func:`build_lookahead`, the same rule the sheet prints.
"""

from __future__ import annotations

import subprocess
import sys
from datetime import date, timedelta
from pathlib import Path

import icalendar
import pytest
from conftest import SAMPLE_SITE

from fieldlog.cli import main
from fieldlog.lookahead.build import build_lookahead
from fieldlog.lookahead.classify import Cell
from fieldlog.workspace import load_state
from tests.helpers.golden_files import assert_golden

AS_OF = "2026-09-25"


def must_days(as_of: str = AS_OF, crew: str | None = None) -> set[tuple[str, date]]:
    """(activity, day) for every MUST cell of the lookahead, straight from the builder."""
    state = load_state(SAMPLE_SITE, date.fromisoformat(as_of))
    la = build_lookahead(state.schedule, state.replay.readiness)
    return {
        (row.id, day)
        for row in la.rows
        for day, cell in zip(la.days, row.cells, strict=True)
        if cell is Cell.MUST and (crew is None or row.crew.get(crew, 0) > 0)
    }


def run_ics(capsysbinary: pytest.CaptureFixture[bytes], *extra: str, as_of: str = AS_OF) -> bytes:
    assert main(["lookahead", str(SAMPLE_SITE), "--as-of", as_of, "--format", "ics", *extra]) == 0
    return capsysbinary.readouterr().out


def events(data: bytes) -> list[icalendar.Event]:
    cal = icalendar.Calendar.from_ical(data)
    return list(cal.walk("VEVENT"))


def event_days(data: bytes) -> set[tuple[str, date]]:
    """(activity id from the UID, start day) of every event."""
    return {(str(ev["uid"]).split(".")[0], ev.decoded("dtstart")) for ev in events(data)}


def test_events_are_exactly_the_must_days(capsysbinary: pytest.CaptureFixture[bytes]) -> None:
    data = run_ics(capsysbinary)
    expected = must_days()
    assert expected, "the sample must have MUST work in its fortnight"
    assert event_days(data) == expected
    assert len(events(data)) == len(expected)  # one event per activity and day


def test_every_event_is_a_well_formed_all_day_event(
    capsysbinary: pytest.CaptureFixture[bytes],
) -> None:
    data = run_ics(capsysbinary)
    uids = []
    for ev in events(data):
        start, end = ev.decoded("dtstart"), ev.decoded("dtend")
        assert type(start) is date and end == start + timedelta(days=1)  # RFC 5545 3.6.1
        assert ev["dtstart"].params["VALUE"] == "DATE"
        assert "uid" in ev and "dtstamp" in ev  # RFC 5545 3.6.1: both required
        assert ev.decoded("dtstamp").isoformat() == "2026-09-25T00:00:00+00:00"  # no clock
        assert "not a permit" in str(ev["description"])
        uids.append(str(ev["uid"]))
    assert len(uids) == len(set(uids))
    lines = data.split(b"\r\n")
    assert lines[-1] == b"" and all(len(line) <= 75 for line in lines)  # RFC 5545 3.1
    assert b"\n" not in data.replace(b"\r\n", b"")


def test_sample_file_is_golden(capsysbinary: pytest.CaptureFixture[bytes]) -> None:
    assert_golden("lookahead_sample.ics", run_ics(capsysbinary).decode("utf-8"))


def test_a_later_status_keeps_the_uids_of_shared_days(
    capsysbinary: pytest.CaptureFixture[bytes],
) -> None:
    """Re-import updates rather than duplicates: same activity and day, same UID; the later
    status has the higher SEQUENCE (RFC 5545 3.8.7.4)."""
    earlier = {
        (str(e["uid"]).split(".")[0], e.decoded("dtstart")): e
        for e in events(run_ics(capsysbinary, as_of="2026-09-24"))
    }
    later = {
        (str(e["uid"]).split(".")[0], e.decoded("dtstart")): e
        for e in events(run_ics(capsysbinary))
    }
    shared = earlier.keys() & later.keys()
    assert len(shared) >= 5
    for key in shared:
        assert earlier[key]["uid"] == later[key]["uid"]
        assert later[key].decoded("sequence") > earlier[key].decoded("sequence")


def test_one_crew(capsysbinary: pytest.CaptureFixture[bytes]) -> None:
    data = run_ics(capsysbinary, "--crew", "groundworks")
    assert event_days(data) == must_days(crew="groundworks")
    assert "(groundworks)" in str(icalendar.Calendar.from_ical(data)["x-wr-calname"])


def test_per_crew_files(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "phones"
    assert (
        main(
            [
                "lookahead",
                str(SAMPLE_SITE),
                "--as-of",
                AS_OF,
                "--format",
                "ics",
                "--per-crew",
                "--out",
                str(out),
            ]
        )
        == 0
    )
    files = sorted(p.name for p in out.iterdir())
    assert files and all(f.startswith("kestrel-yard-workshop-and-office-") for f in files)
    for path in out.iterdir():
        crew = path.stem.removeprefix("kestrel-yard-workshop-and-office-")
        assert event_days(path.read_bytes()) == must_days(crew=crew)
    assert capsys.readouterr().out == ""  # the files are the data; names go to stderr


@pytest.mark.parametrize(
    ("extra", "says"),
    [
        (["--format", "ics", "--crew", "nobody"], "no crew 'nobody'"),
        (["--crew", "groundworks"], "go with --format ics"),
        (["--format", "ics", "--per-crew"], "needs --out"),
        (["--format", "ics", "--crew", "mep", "--per-crew"], "not allowed with"),
    ],
)
def test_bad_crew_options_are_exit_2(
    extra: list[str], says: str, capsys: pytest.CaptureFixture[str]
) -> None:
    try:
        code = main(["lookahead", str(SAMPLE_SITE), *extra])
    except SystemExit as exc:
        code = int(exc.code or 0)
    err = capsys.readouterr().err
    assert code == 2 and says in err and err.count("\n") == 1


def test_icalendar_is_imported_only_when_writing() -> None:
    code = (
        "import sys, fieldlog.commands.lookahead, fieldlog.reports.lookahead_ics\n"
        "print('icalendar' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
