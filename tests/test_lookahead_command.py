"""``fieldlog lookahead SITE``: formats, options, exit codes, and bytes on stdout and in files.

The site folder is written by the test (invented names); it has no log yet, so the lookahead
is the plan as of the status date given.
"""

from __future__ import annotations

import csv
import io
import json
import subprocess
import sys
from datetime import date
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.lookahead import build_lookahead
from fieldlog.reports.lookahead_text import render_text
from fieldlog.workspace import load_state
from tests.helpers.site_builder import (
    WEEKDAYS_AND_ALL_WEEK,
    Act,
    schedule_toml,
    site_toml,
    write_site,
)

SITE_TOML = site_toml(
    "Heron Wharf pump house (invented)",
    date(2026, 9, 7),
    finish_by=date(2026, 10, 30),
    calendars=WEEKDAYS_AND_ALL_WEEK,
    holidays={"weekdays": [date(2026, 10, 12)]},
    crews={"groundworks": 6, "concrete": 5},
)

SCHEDULE_TOML = schedule_toml(
    2,
    [
        Act("START", "Site possession", 0),
        Act("EXC-010", "Excavate wet well", 4, after=("START",), crew={"groundworks": 4}),
        Act("DRN-010", "Lay site drainage runs", 3, after=("START",), crew={"groundworks": 3}),
        Act(
            "CON-010",
            "Pour wet well base",
            2,
            after=("EXC-010",),
            start_not_before=date(2026, 9, 14),
            crew={"concrete": 5},
        ),
        Act("CUR-010", "Base cure", 7, calendar="allweek", after=("CON-010",)),
        Act("DONE", "Handover", 0, after=("CUR-010", "DRN-010")),
    ],
)


@pytest.fixture
def site(tmp_path: Path) -> Path:
    return write_site(tmp_path / "heron-wharf", SITE_TOML, SCHEDULE_TOML)


def _run(capsysbinary, *args: str) -> tuple[int, bytes, str]:
    code = main(["lookahead", *args])
    out = capsysbinary.readouterr()
    return code, out.out, out.err.decode()


def test_text_on_stdout_is_the_rendered_sheet(site: Path, capsysbinary) -> None:
    code, out, err = _run(capsysbinary, str(site), "--as-of", "2026-09-06")
    assert code == 0 and err == ""
    state = load_state(site, date(2026, 9, 6))
    expected = render_text(build_lookahead(state.schedule, state.replay.readiness))
    assert out == expected.encode("utf-8")


def test_out_file_holds_the_same_bytes(site: Path, tmp_path: Path, capsysbinary) -> None:
    target = tmp_path / "sheet.txt"
    args = (str(site), "--as-of", "2026-09-06", "--width", "132", "--ascii")
    code, out, _ = _run(capsysbinary, *args, "--out", str(target))
    assert code == 0 and out == b""
    _, again, _ = _run(capsysbinary, *args)
    assert target.read_bytes() == again
    again.decode("ascii")
    assert b"\r" not in again


def test_json_lists_every_unfinished_activity(site: Path, capsysbinary) -> None:
    code, out, _ = _run(
        capsysbinary, str(site), "--as-of", "2026-09-06", "--format", "json", "--days", "10"
    )
    assert code == 0
    doc = json.loads(out)
    assert doc["from"] == "2026-09-07" and len(doc["days"]) == 10
    ids = [a["id"] for a in doc["activities"]]
    assert sorted(ids) == ["CON-010", "CUR-010", "DONE", "DRN-010", "EXC-010", "START"]
    for a in doc["activities"]:
        assert set(a) >= {"id", "name", "cells", "reasons", "late", "total_float"}
        assert len(a["cells"]) == 10
        assert set(a["cells"]) <= {"must", "may", "cannot", "off"}
        assert isinstance(a["late"], bool)
        for cell, k in zip(a["cells"], a["cell_reasons"], strict=True):
            if cell in ("may", "cannot"):
                assert a["reasons"][k]
    crews = {c["crew"]: c for c in doc["crews"]}
    assert crews["groundworks"]["available"] == 6 and len(crews["groundworks"]["must"]) == 10
    assert doc["levelling"]["method"] == "Burgess-Killebrew minimum sum of squares"


def test_csv_has_one_row_per_activity_and_day(site: Path, capsysbinary) -> None:
    code, out, _ = _run(capsysbinary, str(site), "--as-of", "2026-09-06", "--format", "csv")
    assert code == 0
    rows = list(csv.DictReader(io.StringIO(out.decode("utf-8"))))
    assert len(rows) == 6 * 14
    first = rows[0]
    assert first["day"] == "2026-09-07" and first["cell"] in ("must", "may", "cannot", "off")


def test_from_moves_the_window(site: Path, capsysbinary) -> None:
    code, out, _ = _run(
        capsysbinary,
        str(site),
        "--as-of",
        "2026-09-06",
        "--from",
        "2026-09-14",
        "--days",
        "7",
        "--format",
        "json",
    )
    doc = json.loads(out)
    assert code == 0 and doc["days"][0] == "2026-09-14" and doc["to"] == "2026-09-20"


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--days", "0"], "--days must be 1 to"),
        (["--days", "62"], "do not fit on a 80-column sheet"),
    ],
)
def test_bad_window_exits_2_with_one_line(site: Path, capsysbinary, args, message) -> None:
    code, out, err = _run(capsysbinary, str(site), *args)
    assert code == 2 and out == b"" and message in err and len(err.splitlines()) == 1


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--width", "100"], "invalid choice"),
        (["--from", "next week"], "is not a date"),
    ],
)
def test_bad_option_exits_2_with_one_line(site: Path, capsysbinary, args, message) -> None:
    with pytest.raises(SystemExit) as caught:
        main(["lookahead", str(site), *args])
    err = capsysbinary.readouterr().err.decode()
    assert caught.value.code == 2 and message in err and len(err.splitlines()) == 1


def test_missing_site_exits_2(tmp_path: Path, capsysbinary) -> None:
    code, out, err = _run(capsysbinary, str(tmp_path / "nowhere"))
    assert code == 2 and out == b"" and "not a site folder" in err


def test_core_lookahead_modules_never_import_textual_or_rich() -> None:
    """The core never imports textual (DEVELOPERS.md, Contracts), checked in a fresh interpreter."""
    code = (
        "import sys, fieldlog.lookahead, fieldlog.reports.lookahead_text, "
        "fieldlog.reports.lookahead_data, fieldlog.commands.lookahead; "
        "print(sorted(m for m in sys.modules if m.split('.')[0] in ('textual', 'rich')))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    ).stdout
    assert out.strip() == "[]"
