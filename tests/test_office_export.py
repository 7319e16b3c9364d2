"""``fieldlog export``: 100 generated sites into SQLite, queried with plain SQL.

The outside references: the stdlib sqlite3 module runs the queries (any SQL tool would read
the same file), and every expected answer is counted straight from the site files with
tomllib, never through fieldlog's own reader. Timings are printed (``-s`` shows them); the
asserted bounds are loose on purpose, since the machine is shared.
"""

from __future__ import annotations

import shutil
import sqlite3
import time
import tomllib
from collections import Counter
from pathlib import Path

import pytest
from conftest import SAMPLE_SITE

from fieldlog.cli import main
from fieldlog.journal import record_entry
from fieldlog.office import Outcome, expand_sites, export_sites
from fieldlog.site.files import load_site
from fieldlog.sync.rollup import rollup
from tests.helpers.office_sites import TODAY, make_sites

SITES = 100


@pytest.fixture(scope="module")
def office(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path]:
    """(folder of 100 sites, database exported from them); exported once for the module."""
    root = tmp_path_factory.mktemp("office")
    home = tmp_path_factory.mktemp("office-home")
    make_sites(root / "jobs", SITES, home)
    db = root / "office.db"
    with pytest.MonkeyPatch.context() as mp:
        mp.setenv("FIELDLOG_HOME", str(home))
        started = time.perf_counter()
        summary = export_sites(expand_sites([root / "jobs"]), db)
        print(f"\nexport of {SITES} sites: {time.perf_counter() - started:.2f} s")
    assert summary.count(Outcome.EXPORTED) == SITES
    return root / "jobs", db


def log_entries(jobs: Path) -> list[tuple[str, dict]]:
    """(site folder name, entry table) for every entry in every journal file, via tomllib."""
    out = []
    for path in sorted(jobs.glob("*/log/*.toml")):
        for entry in tomllib.loads(path.read_text(encoding="utf-8")).get("entry", []):
            out.append((path.parent.parent.name, entry))
    return out


def query(db: Path, sql: str, *args: object) -> list[tuple]:
    with sqlite3.connect(db) as con:
        return con.execute(sql, args).fetchall()


def test_every_site_and_activity_is_there(office: tuple[Path, Path]) -> None:
    jobs, db = office
    expected = sum(
        len(tomllib.loads(p.read_text())["activity"]) for p in jobs.glob("*/schedule.toml")
    )
    assert query(db, "SELECT COUNT(*) FROM sites WHERE error IS NULL") == [(SITES,)]
    assert query(db, "SELECT COUNT(*) FROM activities") == [(expected,)]
    assert query(db, "SELECT COUNT(DISTINCT site_id) FROM schedule_results") == [(SITES,)]


def test_entries_by_kind(office: tuple[Path, Path]) -> None:
    jobs, db = office
    expected = Counter(e["kind"] for _, e in log_entries(jobs))
    got = dict(query(db, "SELECT kind, COUNT(*) FROM entries GROUP BY kind"))
    assert got == dict(expected)


def test_whole_days_lost_to_weather_per_site(office: tuple[Path, Path]) -> None:
    jobs, db = office
    expected = Counter(
        site
        for site, e in log_entries(jobs)
        if e["kind"] == "lost-time" and e["cause"] == "weather" and e.get("whole_day")
    )
    rows = query(
        db,
        "SELECT s.folder, COUNT(*) FROM lost_time l JOIN sites s USING (site_id) "
        "WHERE l.cause = 'weather' AND l.whole_day = 1 GROUP BY s.folder",
    )
    assert {Path(folder).name: n for folder, n in rows} == dict(expected)


def test_person_hours_by_trade(office: tuple[Path, Path]) -> None:
    jobs, db = office
    expected: Counter[str] = Counter()
    for _, e in log_entries(jobs):
        if e["kind"] == "crew":
            expected[e["trade"]] += e.get("hours", 0)
    got = dict(query(db, "SELECT trade, SUM(hours) FROM crew_days GROUP BY trade"))
    assert got == pytest.approx(dict(expected))


def test_open_readiness_items(office: tuple[Path, Path]) -> None:
    jobs, db = office
    entries = log_entries(jobs)
    cleared = {(site, e["item"]) for site, e in entries if e["kind"] == "cleared"}
    expected = sum(
        1 for site, e in entries if e["kind"] == "need" and (site, e["id"]) not in cleared
    )
    assert query(db, "SELECT COUNT(*) FROM readiness WHERE cleared_by IS NULL") == [(expected,)]


def test_status_date_is_each_sites_last_logged_day(office: tuple[Path, Path]) -> None:
    jobs, db = office
    last = {}
    for site, e in log_entries(jobs):
        last[site] = max(last.get(site, ""), e["day"].isoformat())
    rows = query(db, "SELECT s.folder, r.as_of FROM schedule_runs r JOIN sites s USING (site_id)")
    assert {Path(f).name: d for f, d in rows} == last


def test_unchanged_sites_are_skipped_and_a_changed_one_is_redone(
    office: tuple[Path, Path], tmp_path: Path
) -> None:
    jobs, db = office
    started = time.perf_counter()
    again = export_sites(expand_sites([jobs]), db)
    skipped_s = time.perf_counter() - started
    print(f"\nre-export, nothing changed: {skipped_s:.3f} s")
    assert again.count(Outcome.SKIPPED) == SITES
    assert skipped_s < 5

    site = jobs / "site-007"
    before = query(
        db,
        "SELECT COUNT(*) FROM entries e JOIN sites s USING (site_id) WHERE s.folder = ?",
        str(site.resolve()),
    )[0][0]
    record_entry(
        site,
        load_site(site),
        "note",
        TODAY,
        {"text": "late delivery"},
        today=TODAY,
        author="Test Foreman",
        device="office-test-2",
        home=tmp_path,
    )
    third = export_sites(expand_sites([jobs]), db)
    assert [s.folder.name for s in third.sites if s.outcome is Outcome.EXPORTED] == ["site-007"]
    after = query(
        db,
        "SELECT COUNT(*) FROM entries e JOIN sites s USING (site_id) WHERE s.folder = ?",
        str(site.resolve()),
    )[0][0]
    assert after == before + 1
    # a new status date keeps the earlier one's results beside it
    runs = query(
        db,
        "SELECT COUNT(*) FROM schedule_runs r JOIN sites s USING (site_id) WHERE s.folder = ?",
        str(site.resolve()),
    )
    assert runs == [(2,)]


def test_roll_up_of_100_sites_is_quick(office: tuple[Path, Path]) -> None:
    """`fieldlog sites` reads 100 sites within 5 s (tests/benchmarks/bench_sites.py measures
    it from a cold cache too)."""
    jobs, _ = office
    started = time.perf_counter()
    rows = rollup(jobs)
    took = time.perf_counter() - started
    print(f"\nroll-up of {len(rows)} sites: {took:.2f} s")
    assert len(rows) == SITES and took < 5


def test_corrections_keep_the_original_and_name_the_correction(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    """The sample log has one correction: the entry it supersedes is still in ``entries``."""
    db = tmp_path / "office.db"
    assert main(["export", str(SAMPLE_SITE), "--sqlite", str(db)]) == 0
    corrections = [
        (e["id"], e["supersedes"])
        for _, e in log_entries(SAMPLE_SITE.parent)
        if e["kind"] == "correction"
    ]
    assert corrections
    for correction_id, original in corrections:
        assert query(db, "SELECT superseded_by FROM entries WHERE entry_id = ?", original) == [
            (correction_id,)
        ]
    assert "1 exported" in capsys.readouterr().out


def test_a_broken_site_is_recorded_and_keeps_its_rows(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    site = tmp_path / "jobs" / "yard"
    site.parent.mkdir()
    shutil.copytree(SAMPLE_SITE, site)
    db = tmp_path / "office.db"
    assert main(["export", str(site.parent), "--sqlite", str(db)]) == 0
    (site / "schedule.toml").write_text("revision = [broken\n", encoding="utf-8")
    assert main(["export", str(site.parent), "--sqlite", str(db)]) == 1
    out = capsys.readouterr()
    assert "failed" in out.out and "did not load" in out.err
    assert query(db, "SELECT error IS NOT NULL, files_sha256 FROM sites") == [(1, None)]
    assert query(db, "SELECT COUNT(*) FROM activities") == [(116,)]


@pytest.mark.parametrize("content", [b"not a database at all, just text" * 10, None])
def test_a_database_fieldlog_did_not_write_is_refused(
    tmp_path: Path, content: bytes | None, capsys: pytest.CaptureFixture[str]
) -> None:
    db = tmp_path / "other.db"
    if content is None:
        with sqlite3.connect(db) as con:
            con.execute("CREATE TABLE invoices (n INTEGER)")
    else:
        db.write_bytes(content)
    before = db.read_bytes()
    assert main(["export", str(SAMPLE_SITE), "--sqlite", str(db)]) == 2
    assert capsys.readouterr().err.count("\n") == 1
    assert db.read_bytes() == before


def test_no_such_folder_is_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["export", str(tmp_path / "nope"), "--sqlite", str(tmp_path / "o.db")]) == 2
    assert "not a folder" in capsys.readouterr().err
