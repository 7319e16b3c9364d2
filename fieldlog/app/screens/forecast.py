"""History: how the forecast finish moved, day by day, and why, as the log shows it.

The same printout as ``fieldlog history``, laid out for the screen width: a bar per window
(``=`` a working day of the forecast, ``|`` the required finish, ``!`` where the finish is
past it, so it reads without colour), the movement split by the cause the log records, and
plan reliability per week. ``d``, ``w`` and ``m`` show windows of a day, a week or a month.
The history is computed in a worker thread from the snapshot's log (a two-year log takes a
second or two); the view only reads it.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import ClassVar

from rich.text import Text
from textual import work
from textual.binding import BindingType
from textual.containers import VerticalScroll
from textual.widget import Widget
from textual.widgets import Static

from fieldlog.app.screens.base import ViewScreen, bindings
from fieldlog.app.session import Snapshot
from fieldlog.history import build_history
from fieldlog.reports.history_text import render_text
from fieldlog.reports.words import working_days

MIN_WIDTH = 60
"""The printout's narrowest layout; a narrower terminal scrolls sideways."""


class ForecastScreen(ViewScreen):
    """The forecast history of the site up to the app's day."""

    VIEW = "forecast"
    AUTO_FOCUS = "#forecast-panel"
    BINDINGS: ClassVar[list[BindingType]] = bindings("forecast")

    def __init__(self) -> None:
        super().__init__()
        self.by = "day"
        self.shown_text = ""
        """The printout on screen (tests read it)."""

    def compose_body(self) -> Iterable[Widget]:
        """A one-line head and the printout in a scrolling panel."""
        yield Static(id="forecast-head", classes="view-head")
        with VerticalScroll(id="forecast-panel"):
            yield Static(id="forecast-body")

    def paint(self, snap: Snapshot) -> None:
        """Start computing the history for ``snap``; the worker paints it."""
        self.query_one("#forecast-head", Static).update(
            Text(f"History by {self.by} · computing...")
        )
        self._compute(snap, self.by, max(MIN_WIDTH, self.size.width - 2))

    @work(thread=True, exclusive=True, group="forecast")
    def _compute(self, snap: Snapshot, by: str, width: int) -> None:
        state = snap.state
        history = build_history(state.site, state.journal, last=state.as_of, by=by)
        text = render_text(history, width)
        self.app.call_from_thread(self._show, snap.version, by, history.total_movement, text)

    def _show(self, version: int, by: str, moved: int, text: str) -> None:
        if version != self.host.snapshot.version or by != self.by:
            return  # an older computation: a newer one is on its way
        self.shown_text = text
        moved_words = (
            "did not move"
            if not moved
            else f"moved {'+' if moved > 0 else '-'}{working_days(abs(moved))}"
        )
        self.query_one("#forecast-head", Static).update(
            Text(f"History by {by} · finish {moved_words} · d day  w week  m month")
        )
        self.query_one("#forecast-body", Static).update(Text(text))

    def action_group(self, by: str) -> None:
        """Show windows of a day, a week or a month."""
        self.by = by
        self.paint(self.host.snapshot)
