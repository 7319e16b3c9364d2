"""What the log proves: the forecast finish as of every logged day, why it moved, and how
reliable the weekly plan was.

:func:`build_history` is the entry point (pure; no Textual, no files, no clock). Readers get
frozen values (:mod:`fieldlog.history.values`); :mod:`fieldlog.reports.history` prints them as
text, JSON or CSV. The split of each movement by cause is a contemporaneous, observational
windows analysis (AACE RP 29R-03, MIP 3.3 with a MIP 3.4-style split); its rules are in
:mod:`fieldlog.history.movement` and DEVELOPERS.md.
"""

from __future__ import annotations

from fieldlog.history.build import DayRun, build_history, history_days
from fieldlog.history.causes import BUCKETS, CAUSES, GAINED, NOT_EXPLAINED
from fieldlog.history.values import (
    Assignment,
    DayRecord,
    Evidence,
    History,
    Step,
    WeekReliability,
    Window,
)
from fieldlog.history.windows import GROUPINGS

__all__ = [
    "BUCKETS",
    "CAUSES",
    "GAINED",
    "GROUPINGS",
    "NOT_EXPLAINED",
    "Assignment",
    "DayRecord",
    "DayRun",
    "Evidence",
    "History",
    "Step",
    "WeekReliability",
    "Window",
    "build_history",
    "history_days",
]
