"""Write sites into the office database, skipping those whose files did not change.

Sites are written in batches of :data:`BATCH` sites, each batch one transaction: a crash or a
full disk mid-export leaves every site either as it was after the previous export or fully
replaced, never half-replaced. (A transaction per site would be simpler, but each commit waits
for the disk; batches make a 100-site export several times faster.)

A site that does not load is recorded with its error (``sites.error``) and keeps the rows of
its last good export; its fingerprint is cleared, so the next export tries it again.

Skipping: ``sites.files_sha256`` (:mod:`fieldlog.office.digest`) holds the fingerprint of the
files last exported. A site with the same fingerprint, no recorded error, and (for an explicit
``as_of``) results already stored for that status date is skipped without being parsed.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from datetime import date
from enum import StrEnum
from pathlib import Path

from fieldlog.errors import FieldlogError
from fieldlog.office.digest import files_sha256
from fieldlog.office.rows import SiteRows, site_rows
from fieldlog.office.schema import SITE_TABLES, open_database
from fieldlog.sync.rollup import find_sites
from fieldlog.workspace import load_state

BATCH = 25
"""Sites per transaction."""
MAX_SITES = 10_000
"""More site folders than this in one export is refused as a wrong folder."""


class Outcome(StrEnum):
    """What happened to one site."""

    EXPORTED = "exported"
    SKIPPED = "unchanged"
    FAILED = "failed"


@dataclass(frozen=True)
class SiteExport:
    """One site's part of an export."""

    folder: Path
    outcome: Outcome
    error: str | None = None


@dataclass(frozen=True)
class ExportSummary:
    """Every site's outcome, in the order exported."""

    sites: tuple[SiteExport, ...]

    def count(self, outcome: Outcome) -> int:
        """How many sites came out so."""
        return sum(1 for s in self.sites if s.outcome is outcome)


def expand_sites(folders: Iterable[Path]) -> list[Path]:
    """Each argument as a site folder, or the site folders under it; duplicates once.

    Raises:
        FieldlogError: a folder does not exist, holds no site, or there are too many sites.
    """
    found: dict[Path, None] = {}
    for folder in folders:
        if not folder.is_dir():
            raise FieldlogError(
                "not a folder", file=folder, fix="give site folders, or a folder that holds them"
            )
        sites = list(find_sites(folder))
        if not sites:
            raise FieldlogError(
                "holds no site folder (site.toml or schedule.toml)",
                file=folder,
                fix="give site folders, or a folder that holds them",
            )
        for site in sites:
            found[site.resolve()] = None
        if len(found) > MAX_SITES:
            raise FieldlogError(
                f"more than {MAX_SITES:,} site folders",
                file=folder,
                fix="export fewer folders at a time",
            )
    return list(found)


def export_sites(
    folders: Sequence[Path], db_path: Path, as_of: date | None = None
) -> ExportSummary:
    """Export every site in ``folders`` (already expanded) into the database at ``db_path``.

    Raises:
        FieldlogError: the database cannot be opened or written.
    """
    db = open_database(db_path)
    done: list[SiteExport] = []
    try:
        for start in range(0, len(folders), BATCH):
            db.execute("BEGIN IMMEDIATE")
            done.extend(_export_one(db, f, as_of) for f in folders[start : start + BATCH])
            db.execute("COMMIT")
    except sqlite3.Error as exc:
        raise FieldlogError(
            f"cannot write the office database: {exc}",
            file=db_path,
            fix="check the disk has room and no other program holds the file "
            "open; the sites not yet committed are as before",
        ) from exc
    finally:
        if db.in_transaction:
            db.execute("ROLLBACK")
        db.close()
    return ExportSummary(tuple(done))


def _export_one(db: sqlite3.Connection, folder: Path, as_of: date | None) -> SiteExport:
    key = str(folder)
    row = db.execute(
        "SELECT site_id, files_sha256, error FROM sites WHERE folder = ?", (key,)
    ).fetchone()
    try:
        digest = files_sha256(folder)
        if (
            row is not None
            and row[1] == digest
            and row[2] is None
            and (as_of is None or _has_run(db, row[0], as_of))
        ):
            return SiteExport(folder, Outcome.SKIPPED)
        state = load_state(folder, as_of)
    except FieldlogError as exc:
        _record_failure(db, key, exc.message)
        return SiteExport(folder, Outcome.FAILED, exc.message)
    rows = site_rows(state)
    site = state.site
    values = (
        site.name,
        site.start.isoformat(),
        _iso(site.finish_by),
        site.calendar,
        site.revision,
        _iso(state.journal.last_day),
        digest,
        state.as_of.isoformat(),
    )
    db.execute("SAVEPOINT site")  # a site is replaced whole or not at all
    _replace_rows(db, _upsert_site(db, key, values), rows)
    db.execute("RELEASE site")
    return SiteExport(folder, Outcome.EXPORTED)


def _iso(value: date | None) -> str | None:
    return None if value is None else value.isoformat()


def _has_run(db: sqlite3.Connection, site_id: int, as_of: date) -> bool:
    return (
        db.execute(
            "SELECT 1 FROM schedule_runs WHERE site_id = ? AND as_of = ?",
            (site_id, as_of.isoformat()),
        ).fetchone()
        is not None
    )


def _upsert_site(db: sqlite3.Connection, key: str, values: tuple) -> int:
    db.execute(
        "INSERT INTO sites (folder, name, start, finish_by, calendar, revision, last_log_day, "
        "files_sha256, exported_as_of, error) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, NULL) "
        "ON CONFLICT (folder) DO UPDATE SET name = excluded.name, start = excluded.start, "
        "finish_by = excluded.finish_by, calendar = excluded.calendar, "
        "revision = excluded.revision, last_log_day = excluded.last_log_day, "
        "files_sha256 = excluded.files_sha256, exported_as_of = excluded.exported_as_of, "
        "error = NULL",
        (key, *values),
    )
    return int(db.execute("SELECT site_id FROM sites WHERE folder = ?", (key,)).fetchone()[0])


def _replace_rows(db: sqlite3.Connection, site_id: int, rows: SiteRows) -> None:
    for table in SITE_TABLES:
        db.execute(f"DELETE FROM {table} WHERE site_id = ?", (site_id,))
        data = rows.tables[table]
        if data:
            marks = ", ".join("?" * (len(data[0]) + 1))
            db.executemany(f"INSERT INTO {table} VALUES ({marks})", [(site_id, *r) for r in data])
    as_of = rows.run[0]
    for table in ("schedule_results", "schedule_runs"):
        db.execute(f"DELETE FROM {table} WHERE site_id = ? AND as_of = ?", (site_id, as_of))
    db.execute("INSERT INTO schedule_runs VALUES (?, ?, ?, ?, ?, ?, ?)", (site_id, *rows.run))
    if rows.results:
        db.executemany(
            "INSERT INTO schedule_results VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
            [(site_id, *r) for r in rows.results],
        )


def _record_failure(db: sqlite3.Connection, key: str, message: str) -> None:
    """Note the error on the site's row (made if new); its other rows stay as last exported."""
    db.execute(
        "INSERT INTO sites (folder, error) VALUES (?, ?) ON CONFLICT (folder) "
        "DO UPDATE SET error = excluded.error, files_sha256 = NULL",
        (key, message),
    )
