"""The office database's tables, and opening a file safely.

The office queries every site with ordinary SQL tools, so the tables are plain and flat:
dates are ISO text (``YYYY-MM-DD``, sorts and compares as dates), flags are 0/1, lists are
comma-separated text, and an entry's own fields are also kept whole as JSON text (SQLite's
``json_extract`` reads them). Every table but ``meta`` carries ``site_id``.

The same tables are described for users in DEVELOPERS.md ("The office database"); a change
here is a change to that contract: add columns or tables, never repurpose one, and raise
:data:`SCHEMA_VERSION`.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

from fieldlog.errors import FieldlogError

SCHEMA_VERSION = 1
APPLICATION = "fieldlog office database"

TABLES = """
CREATE TABLE IF NOT EXISTS meta (
    key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS sites (
    site_id INTEGER PRIMARY KEY, folder TEXT NOT NULL UNIQUE, name TEXT, start TEXT,
    finish_by TEXT, calendar TEXT, revision INTEGER, last_log_day TEXT, files_sha256 TEXT,
    exported_as_of TEXT, error TEXT);
CREATE TABLE IF NOT EXISTS activities (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), activity_id TEXT NOT NULL,
    name TEXT NOT NULL, duration INTEGER NOT NULL, calendar TEXT NOT NULL,
    start_not_before TEXT, finish_not_after TEXT, crew TEXT NOT NULL,
    PRIMARY KEY (site_id, activity_id));
CREATE TABLE IF NOT EXISTS links (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), pred TEXT NOT NULL,
    succ TEXT NOT NULL, type TEXT NOT NULL, lag INTEGER NOT NULL);
CREATE TABLE IF NOT EXISTS schedule_runs (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), as_of TEXT NOT NULL,
    revision INTEGER NOT NULL, finish TEXT NOT NULL, finish_float INTEGER,
    critical_count INTEGER NOT NULL, late_count INTEGER NOT NULL,
    PRIMARY KEY (site_id, as_of));
CREATE TABLE IF NOT EXISTS schedule_results (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), as_of TEXT NOT NULL,
    activity_id TEXT NOT NULL, status TEXT NOT NULL, early_start TEXT NOT NULL,
    early_finish TEXT NOT NULL, late_start TEXT, late_finish TEXT, total_float INTEGER,
    free_float INTEGER, critical INTEGER NOT NULL, on_driving_path INTEGER NOT NULL,
    remaining INTEGER NOT NULL, actual_start TEXT, actual_finish TEXT,
    PRIMARY KEY (site_id, as_of, activity_id));
CREATE TABLE IF NOT EXISTS entries (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), entry_id TEXT NOT NULL,
    kind TEXT NOT NULL, day TEXT NOT NULL, device TEXT NOT NULL, author TEXT NOT NULL,
    written TEXT NOT NULL, file TEXT NOT NULL, position INTEGER NOT NULL, activities TEXT,
    superseded_by TEXT, fields TEXT NOT NULL,
    PRIMARY KEY (site_id, entry_id));
CREATE INDEX IF NOT EXISTS entries_by_kind ON entries (kind, site_id, day);
CREATE TABLE IF NOT EXISTS lost_time (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), entry_id TEXT NOT NULL,
    day TEXT NOT NULL, cause TEXT NOT NULL, whole_day INTEGER NOT NULL, hours REAL,
    activities TEXT, calendars TEXT, note TEXT);
CREATE TABLE IF NOT EXISTS crews (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), crew TEXT NOT NULL,
    available INTEGER NOT NULL, PRIMARY KEY (site_id, crew));
CREATE TABLE IF NOT EXISTS crew_days (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), entry_id TEXT NOT NULL,
    day TEXT NOT NULL, trade TEXT NOT NULL, company TEXT, headcount INTEGER NOT NULL,
    hours REAL, activities TEXT);
CREATE TABLE IF NOT EXISTS readiness (
    site_id INTEGER NOT NULL REFERENCES sites(site_id), entry_id TEXT NOT NULL,
    activity_id TEXT NOT NULL, what TEXT NOT NULL, category TEXT NOT NULL, expected TEXT,
    opened TEXT NOT NULL, cleared_by TEXT, cleared_day TEXT);
"""

SITE_TABLES = ("activities", "links", "entries", "lost_time", "crews", "crew_days", "readiness")
"""Tables replaced whole when a site's files change (schedule results are kept per date)."""


def open_database(path: Path) -> sqlite3.Connection:
    """Open (or create) an office database; refuse any other SQLite file or a non-database.

    Raises:
        FieldlogError: the file is not a fieldlog office database, is of a newer schema, or
            cannot be opened.
    """
    if path.is_dir():
        raise FieldlogError(
            "is a folder, not a database file", file=path, fix="give a file name such as office.db"
        )
    if not path.parent.is_dir():
        raise FieldlogError(
            "the folder for the database does not exist", file=path, fix="create the folder first"
        )
    existed = path.exists() and path.stat().st_size > 0
    try:
        db = sqlite3.connect(path, isolation_level=None)
        db.execute("PRAGMA foreign_keys = ON")
        if existed:
            _check_existing(db, path)
        db.executescript(TABLES)
        db.execute("INSERT OR IGNORE INTO meta VALUES ('application', ?)", (APPLICATION,))
        db.execute(
            "INSERT OR IGNORE INTO meta VALUES ('schema_version', ?)", (str(SCHEMA_VERSION),)
        )
    except sqlite3.DatabaseError as exc:
        raise FieldlogError(
            f"cannot use the database: {exc}",
            file=path,
            fix="give a new file name, or an office database fieldlog wrote",
        ) from exc
    return db


def _check_existing(db: sqlite3.Connection, path: Path) -> None:
    """An existing file must be ours and not from a newer fieldlog."""
    names = {r[0] for r in db.execute("SELECT name FROM sqlite_master WHERE type = 'table'")}
    if "meta" not in names:
        db.close()
        raise FieldlogError(
            "is an SQLite file that fieldlog did not write",
            file=path,
            fix="give a new file name; fieldlog never writes into other databases",
        )
    meta = dict(db.execute("SELECT key, value FROM meta"))
    if meta.get("application") != APPLICATION:
        db.close()
        raise FieldlogError(
            "is not a fieldlog office database", file=path, fix="give a new file name"
        )
    version = meta.get("schema_version", "")
    if not version.isdigit() or int(version) > SCHEMA_VERSION:
        db.close()
        raise FieldlogError(
            f"was written by a newer fieldlog (schema {version[:10]})",
            file=path,
            fix="update fieldlog, or export to a new file",
        )
