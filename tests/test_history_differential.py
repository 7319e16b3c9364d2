"""The history's schedule at day D is ``fieldlog schedule --as-of D``, for every logged day.

Differential check against the project's own independent path (a full replay from scratch and
``compute_schedule`` with calendars sized around each status date), on the sample site and on
a log with corrections that move and withdraw entries of earlier days.
"""

from __future__ import annotations

from datetime import timedelta

import pytest

from fieldlog.cli import main
from fieldlog.history import DayRun, history_days
from fieldlog.history.days import logged_days, replay_days
from fieldlog.journal import read_journal, replay
from fieldlog.reports.schedule_sheet import render_schedule
from fieldlog.site.files import load_site
from tests.conftest import SAMPLE_SITE
from tests.helpers.engine_helpers import make_site
from tests.helpers.history_helpers import Log


def test_every_logged_day_matches_schedule_as_of(capsys: pytest.CaptureFixture[str]) -> None:
    site, journal = load_site(SAMPLE_SITE), read_journal(SAMPLE_SITE)
    runs = [r for r in history_days(site, journal.entries) if isinstance(r, DayRun)]
    assert [r.record.day for r in runs] == list(logged_days(journal.entries))
    assert len(runs) == 15
    for run in runs:
        code = main(
            [
                "schedule",
                str(SAMPLE_SITE),
                "--as-of",
                run.record.day.isoformat(),
                "--format",
                "json",
            ]
        )
        out, _ = capsys.readouterr()
        assert code == 0
        assert render_schedule(run.result, "json") == out, run.record.day


def test_incremental_replay_matches_full_replay_with_corrections() -> None:
    """Corrections dated later than what they correct cut the days into segments."""
    site = make_site([("A", 4), ("B", 3)], [("A", "B")])
    d = site.start
    log = Log()
    a = log.add("started", d, activity="A")
    log.add("remaining", d + timedelta(days=1), activity="A", days=5)
    lost = log.add("lost-time", d + timedelta(days=2), cause="weather", whole_day=True)
    log.add(
        "need",
        d + timedelta(days=2),
        activity="B",
        what="rebar",
        category="material",
        expected=d + timedelta(days=9),
    )
    log.add(
        "correction",
        d + timedelta(days=3),
        supersedes=a.id,
        reason="started a day late",
        corrects="started",
    )
    log.add(
        "correction",
        d + timedelta(days=4),
        supersedes=lost.id,
        reason="not lost",
        corrects="lost-time",
        withdraw=True,
    )
    log.add("finished", d + timedelta(days=6), activity="A")
    entries = log.sorted()
    days = logged_days(entries)
    for state in replay_days(site, entries, days):
        full = replay(site, entries, state.day)
        assert dict(state.progress) == dict(full.progress), state.day
        assert dict(state.lost_days) == dict(full.lost_days), state.day
        assert state.readiness == full.readiness, state.day
        assert state.entries == tuple(e for e in full.effective if e.day == state.day)
