"""`fieldlog history`: printed output (golden files, 80 and 132 columns), JSON, CSV, bad input.

Golden files: tests/golden/history_*; update with FIELDLOG_UPDATE_GOLDEN=1 and read the diff.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.history import BUCKETS
from tests.conftest import SAMPLE_SITE
from tests.helpers.golden_files import assert_golden


def run(capsys: pytest.CaptureFixture[str], *args: str) -> tuple[int, str, str]:
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize(
    "args, name",
    [
        (("--by", "day"), "history_day_80.txt"),
        (("--by", "week", "--width", "132"), "history_week_132.txt"),
        (("--by", "week", "--format", "json"), "history_week.json"),
        (("--by", "day", "--format", "csv"), "history_day.csv"),
    ],
)
def test_golden_output(
    capsys: pytest.CaptureFixture[str], args: tuple[str, ...], name: str
) -> None:
    code, out, err = run(capsys, "history", str(SAMPLE_SITE), *args)
    assert code == 0 and err == ""
    assert_golden(name, out)


@pytest.mark.parametrize("width", [80, 132])
def test_text_fits_the_paper(capsys: pytest.CaptureFixture[str], width: int) -> None:
    code, out, _ = run(capsys, "history", str(SAMPLE_SITE), "--width", str(width))
    assert code == 0
    assert max(len(line) for line in out.splitlines()) <= width
    assert "plan, not a permit" in out


def test_json_and_csv_add_up(capsys: pytest.CaptureFixture[str]) -> None:
    _, out, _ = run(capsys, "history", str(SAMPLE_SITE), "--format", "json")
    doc = json.loads(out)
    assert doc["total_movement"] == sum(w["movement"] for w in doc["windows"])
    assert sum(doc["split"].values()) == doc["total_movement"]
    for w in doc["windows"]:
        assert sum(w["split"].values()) == w["movement"]
    _, out, _ = run(capsys, "history", str(SAMPLE_SITE), "--format", "csv")
    rows = list(csv.DictReader(io.StringIO(out)))
    assert len(rows) == len(doc["windows"])
    for row in rows:
        assert sum(int(row[b]) for b in BUCKETS) == int(row["movement"])


def test_from_to_cut_the_range(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = run(
        capsys,
        "history",
        str(SAMPLE_SITE),
        "--from",
        "2026-09-14",
        "--to",
        "2026-09-18",
        "--format",
        "json",
    )
    doc = json.loads(out)
    assert code == 0
    assert [w["status"] for w in doc["windows"]] == [
        "2026-09-14",
        "2026-09-15",
        "2026-09-16",
        "2026-09-17",
        "2026-09-18",
    ]
    assert doc["baseline"]["status"] == "2026-09-11"


@pytest.mark.parametrize(
    "args, words",
    [
        (("--from", "2026-09-20", "--to", "2026-09-10"), "is after --to"),
        (("--width", "20"), "outside 60-400"),
        (("--width", "wide"), "not a whole number"),
        (("--by", "year"), "invalid choice"),
        (("--from", "2026-13-01"), "not a date"),
    ],
)
def test_bad_input_is_one_line_and_exit_2(
    capsys: pytest.CaptureFixture[str], args: tuple[str, ...], words: str
) -> None:
    with pytest.raises(SystemExit) as raised:
        code = main(["history", str(SAMPLE_SITE), *args])
        raise SystemExit(code)
    out, err = capsys.readouterr()
    assert raised.value.code == 2 and out == ""
    assert words in err and len(err.strip().splitlines()) == 1


def test_missing_folder_is_exit_2(capsys: pytest.CaptureFixture[str], tmp_path: Path) -> None:
    code, out, err = run(capsys, "history", str(tmp_path / "nowhere"))
    assert code == 2 and out == "" and len(err.strip().splitlines()) == 1
