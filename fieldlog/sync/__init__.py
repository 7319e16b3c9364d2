"""Sync a site folder with the office over a plain folder: logs go in, revisions come out.

Entry points: :func:`sync_site` (used by ``fieldlog sync``) and :func:`list_conflicts` (used by
``verify``, ``sites`` and the app). See :mod:`fieldlog.sync.run` for the steps.
"""

from __future__ import annotations

from fieldlog.sync.conflicts import ConflictCopy, list_conflicts
from fieldlog.sync.run import SyncOptions, sync_site
from fieldlog.sync.summary import SyncSummary

__all__ = ["ConflictCopy", "SyncOptions", "SyncSummary", "list_conflicts", "sync_site"]
