"""The office database: every site's schedule and log in one SQLite file for ordinary SQL tools.

Entry point :func:`export_sites` (used by ``fieldlog export``); the tables are in
:mod:`~fieldlog.office.schema` and documented in DEVELOPERS.md ("The office database"). Only
the standard library's sqlite3 is used, so any SQLite tool can read the file.
"""

from __future__ import annotations

from fieldlog.office.export import ExportSummary, Outcome, SiteExport, expand_sites, export_sites

__all__ = ["ExportSummary", "Outcome", "SiteExport", "expand_sites", "export_sites"]
