"""Report: the printable daily report of one day, on screen, and written to prints/.

The text is exactly what ``fieldlog report SITE --day DAY`` prints (the same function, the
same state), so what the foreman reads here is what the office gets on paper. The view opens
on the shift being recorded; ``,`` and ``.`` move a day back or on (never past the shift, never
before the site's start); ``p`` writes ``prints/daily-report-DAY.txt`` and prints it when a
printer is set up. A ``prints`` folder that is a link is refused, never written through.
"""

from __future__ import annotations

from collections.abc import Iterable
from datetime import date, timedelta
from typing import ClassVar

from rich.text import Text
from textual import work
from textual.binding import BindingType
from textual.containers import VerticalScroll
from textual.widget import Widget
from textual.widgets import Static

from fieldlog.app.messages import ShowStatus
from fieldlog.app.printing import deliver, report_path, write_print
from fieldlog.app.screens.base import ViewScreen, bindings
from fieldlog.app.session import Snapshot
from fieldlog.errors import FieldlogError
from fieldlog.reports.daily_report import render_daily_report
from fieldlog.workspace import state_for


class ReportScreen(ViewScreen):
    """The daily report of one day."""

    VIEW = "report"
    AUTO_FOCUS = "#report-scroll"
    BINDINGS: ClassVar[list[BindingType]] = bindings("report")

    def __init__(self) -> None:
        super().__init__()
        self.day: date | None = None
        """The day shown; None: the shift being recorded."""
        self.text = ""

    def compose_body(self) -> Iterable[Widget]:
        """Heading, then the report in a scrolling panel."""
        yield Static(id="report-head", classes="view-head")
        with VerticalScroll(id="report-scroll"):
            yield Static(id="report-text")

    def shown_day(self, snap: Snapshot) -> date:
        """The day on screen."""
        return self.day or snap.today

    def paint(self, snap: Snapshot) -> None:
        """The report of the day shown, as of the end of that day."""
        day = self.shown_day(snap)
        state = snap.state
        if day != snap.today:
            state = state_for(state.folder, state.site, state.journal, day)
        self.text = render_daily_report(state, day)
        self.query_one("#report-text", Static).update(Text(self.text))
        self.query_one("#report-head", Static).update(
            Text(f"Daily report {day:%a %d %b %Y} · , day back  . day on · p print")
        )

    def action_shift_day(self, days: int) -> None:
        """Another day: never after the shift being recorded, never before the site start."""
        self.show_day(self.shown_day(self.host.snapshot) + timedelta(days=days))

    def show_day(self, day: date) -> None:
        """Show the report of ``day`` (from the Journal's ``d`` too), within the same bounds."""
        snap = self.host.snapshot
        if day > snap.today:
            self.say(f"{snap.today:%a %d %b} is the shift being recorded: no later report")
            return
        if day < snap.site.start:
            self.say(f"The site starts on {snap.site.start:%a %d %b %Y}: no earlier report")
            return
        self.day = None if day == snap.today else day
        self.paint(snap)
        self.query_one("#report-scroll", VerticalScroll).scroll_home(animate=False)

    def action_print_report(self) -> None:
        """Write the report shown to prints/, then print it if a printer is set up."""
        day = self.shown_day(self.host.snapshot)
        self.say("Writing the daily report")
        self._deliver(day, self.text)

    @work(thread=True, exclusive=True, group="print")
    def _deliver(self, day: date, text: str) -> None:
        folder = self.host.site_folder
        try:
            path = write_print(report_path(folder, day), text, "daily report")
            words = deliver(path, folder, "report")
        except FieldlogError as exc:
            self.post_message(ShowStatus(exc.message, problem=True))
            return
        self.post_message(ShowStatus(words))
