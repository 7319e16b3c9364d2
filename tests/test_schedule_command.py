"""`fieldlog schedule`: the float list, the JSON contract and the CSV for the office.

Golden files: tests/golden/schedule_small.*; update with FIELDLOG_UPDATE_GOLDEN=1.
The small site's dates were checked by hand against a wall calendar (Mar-Apr 2026, with
2026-04-03 a holiday on the weekday calendar).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from fieldlog.cli import main
from tests.helpers.golden_files import assert_golden

SMALL = Path(__file__).parent / "data" / "small-site"

CONTRACT_KEYS = {
    "id",
    "name",
    "status",
    "early_start",
    "early_finish",
    "late_start",
    "late_finish",
    "total_float",
    "free_float",
    "critical",
    "actual_start",
    "actual_finish",
    "remaining",
}


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("fmt, suffix", [("text", "txt"), ("json", "json"), ("csv", "csv")])
def test_golden_output(capsys: pytest.CaptureFixture[str], fmt: str, suffix: str) -> None:
    code, out, err = run(capsys, "schedule", str(SMALL), "--format", fmt)
    assert code == 0 and err == ""
    assert_golden(f"schedule_small.{suffix}", out)


def test_json_contract(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "schedule", str(SMALL), "--format", "json")
    doc = json.loads(out)
    assert code == 0
    assert {"as_of", "data_date", "finish", "finish_float", "activities"} <= doc.keys()
    assert doc["as_of"] == "2026-03-01" and doc["data_date"] == "2026-03-02"
    assert doc["finish"] == "2026-03-24" and doc["finish_float"] == 12
    for row in doc["activities"]:
        assert row.keys() >= CONTRACT_KEYS
    by_id = {row["id"]: row for row in doc["activities"]}
    # Hand-checked: the 7-day cure starts the Saturday after Friday's pour, and the frame
    # waits for the next weekday after the cure ends (FS lag 0 = next working day, common
    # practice).
    assert by_id["CU-1"]["early_start"] == "2026-03-07"
    assert by_id["FR-1"]["early_start"] == "2026-03-16"
    # Total float on the 7-day calendar counts calendar days: 18, against 12 on weekdays.
    assert by_id["CU-1"]["total_float"] == 18 and by_id["FR-1"]["total_float"] == 12


def test_as_of_before_start_is_plain_plan(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(capsys, "schedule", str(SMALL), "--as-of", "2026-02-20", "--format", "json")
    assert code == 0
    assert json.loads(out)["activities"][0]["early_start"] == "2026-03-02"


def test_bad_date_is_exit_2(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["schedule", str(SMALL), "--as-of", "2026-13-01"])
    assert exc.value.code == 2
    assert "not a date" in capsys.readouterr().err


def test_missing_folder_is_exit_2(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    code, out, err = run(capsys, "schedule", str(tmp_path / "nowhere"))
    assert code == 2 and out == ""
    assert "not a site folder" in err and "Traceback" not in err


@pytest.mark.parametrize("names", [[], ["a"], ["a", 'q"uote', "é\n"]])
def test_fast_json_matches_json_dumps(names: list[str]) -> None:
    """The fast JSON writer gives exactly the bytes of json.dumps(indent=2) (the reference)."""
    from fieldlog.reports.schedule_sheet import json_text

    doc = {
        "as_of": "2026-03-01",
        "n": None,
        "nested": {"x": [1, 2]},
        "activities": [{"id": n, "ok": True, "f": -1, "none": None, "x": 1.5} for n in names],
    }
    assert json_text(doc) == json.dumps(doc, indent=2) + "\n"
