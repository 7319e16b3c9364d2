"""``fieldlog check`` end to end: the sample's report (golden), JSON, exit codes, baseline.

The checks themselves are tested against their published marks in tests/test_checks_dcma.py;
here the command and the baseline choice are.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest
from conftest import SAMPLE_SITE

from fieldlog.checks.baseline import earliest_history_file, load_baseline
from fieldlog.cli import main
from fieldlog.site.files import load_site
from tests.helpers.golden_files import assert_golden


def test_sample_report_is_golden_and_exits_1(capsys: pytest.CaptureFixture[str]) -> None:
    """The sample job is one day late and leans on SS/FF links: checks fail, exit 1."""
    assert main(["check", str(SAMPLE_SITE)]) == 1
    out, err = capsys.readouterr()
    assert_golden("check_sample.txt", out)
    assert "outside the mark: 2 Leads" in err
    assert "not a permit" in out


def test_json_lists_every_check(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(SAMPLE_SITE), "--format", "json"]) == 1
    data = json.loads(capsys.readouterr().out)
    assert [c["number"] for c in data["checks"]] == list(range(1, 15))
    by_number = {c["number"]: c for c in data["checks"]}
    assert by_number[7]["outcome"] == "fail" and by_number[7]["count"] == 38
    assert by_number[12]["mark_recalled"] is True
    assert set(data["failed"]) == {c["number"] for c in data["checks"] if c["outcome"] == "fail"}


def test_before_any_work_most_checks_are_within_the_mark(
    capsys: pytest.CaptureFixture[str],
) -> None:
    """As of the day before the start nothing is due: missed tasks and BEI are n/a."""
    assert main(["check", str(SAMPLE_SITE), "--as-of", "2026-09-06", "--format", "json"]) == 1
    by_number = {c["number"]: c for c in json.loads(capsys.readouterr().out)["checks"]}
    assert by_number[11]["outcome"] == by_number[14]["outcome"] == "n/a"
    assert by_number[9]["outcome"] == "pass"


@pytest.mark.parametrize(
    "argv",
    [
        ["check", "no-such-folder"],
        ["check", str(SAMPLE_SITE), "--as-of", "2026-13-01"],
        ["check", str(SAMPLE_SITE), "--format", "xml"],
    ],
)
def test_bad_input_is_exit_2_with_one_line(
    argv: list[str], capsys: pytest.CaptureFixture[str]
) -> None:
    with pytest.raises(SystemExit) as exc:
        code = main(argv)
        raise SystemExit(code)
    assert exc.value.code == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and err.startswith("fieldlog")


def test_baseline_is_the_earliest_kept_revision(tmp_path: Path) -> None:
    """A site that took revisions 2 and 3 is judged against revision 1's durations."""
    site_dir = tmp_path / "job"
    shutil.copytree(SAMPLE_SITE, site_dir)
    history = site_dir / "schedule_history"
    history.mkdir()
    text = (SAMPLE_SITE / "schedule.toml").read_text(encoding="utf-8")
    longer = text.replace(
        'id = "SITE-010"\nname = "Site entrance, haul road, wash"\nduration = 3',
        'id = "SITE-010"\nname = "Site entrance, haul road, wash"\nduration = 50',
    )
    assert longer != text
    (history / "schedule.r1.toml").write_text(longer, encoding="utf-8")
    (history / "schedule.r2.0123abcd.toml").write_text(text.replace("revision = 1", "revision = 2"))
    (history / "notes.toml").write_text("not a kept revision")
    assert earliest_history_file(site_dir) == history / "schedule.r1.toml"
    base = load_baseline(site_dir, load_site(site_dir))
    assert "schedule.r1.toml (revision 1" in base.source
    assert base.activities["SITE-010"].duration == 50


def test_without_history_the_baseline_is_the_plan_as_of_the_start() -> None:
    base = load_baseline(SAMPLE_SITE, load_site(SAMPLE_SITE))
    assert "as of the site start 2026-09-07" in base.source
    assert base.activities["KEY-000"].start.isoformat() == "2026-09-07"
