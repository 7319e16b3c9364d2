"""The three one-line bars every view shares: site bar, view strip and status line.

* :class:`SiteBar` (top): the site, revision, the shift being recorded and the forecast finish
  against the required finish, in words ("2 days to spare", "LATE by 3 days") so it reads the
  same without colour.
* :class:`ViewStrip`: one tab per view with its number key; the current one is bracketed
  (``[1 Today]``), so it is visible in monochrome. Tabs are clickable (mouse, touch).
* :class:`StatusLine` (above the footer): what was just recorded and what it changed.
"""

from __future__ import annotations

from datetime import date

from rich.text import Text
from textual import events
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Static

from fieldlog.app.keymap import VIEWS
from fieldlog.app.messages import ShowHelp
from fieldlog.engine.result import ScheduleResult
from fieldlog.reports.words import days


def finish_words(schedule: ScheduleResult) -> str:
    """The forecast finish against the required finish, in words."""
    text = f"finish {schedule.finish:%d %b %Y}"
    ff = schedule.finish_float
    if ff is None:
        return text
    if ff >= 0:
        return f"{text}: {days(ff)} to spare"
    return f"{text}: LATE {days(-ff)}"


class SiteBar(Horizontal):
    """Site name and revision on the left; shift day and forecast finish on the right."""

    def compose(self) -> ComposeResult:
        yield Static(id="site-name")
        yield Static(id="site-finish")

    def show(self, schedule: ScheduleResult, today: date) -> None:
        """Repaint from a schedule."""
        site = schedule.site
        self.query_one("#site-name", Static).update(Text(f"{site.name} · rev {site.revision}"))
        late = schedule.finish_float is not None and schedule.finish_float < 0
        right = Text(f"shift {today:%a %d %b} · ")
        right.append(finish_words(schedule), style="bold" if late else "")
        self.query_one("#site-finish", Static).update(right)
        self.set_class(late, "-late")


class ViewTab(Static):
    """One clickable tab of the view strip."""

    def __init__(self, view: str, number: int, current: bool) -> None:
        label = f"{number} {VIEWS[view]}"
        super().__init__(Text(f"[{label}]" if current else f" {label} "), classes="view-tab")
        self.view = view
        self.set_class(current, "-current")

    def on_click(self, event: events.Click) -> None:
        """Switch to this tab's view."""
        event.stop()
        self.app.switch_mode(self.view)


class HelpTab(Static):
    """The help tab at the end of the strip."""

    def __init__(self) -> None:
        super().__init__(Text(" ? Help "), classes="view-tab help-tab")

    def on_click(self, event: events.Click) -> None:
        """Open the help overlay."""
        event.stop()
        self.post_message(ShowHelp())


class ViewStrip(Horizontal):
    """The row of view tabs; ``current`` is the view this strip sits on."""

    def __init__(self, current: str) -> None:
        super().__init__(id="view-strip")
        self.current = current

    def compose(self) -> ComposeResult:
        for number, view in enumerate(VIEWS, 1):
            yield ViewTab(view, number, view == self.current)
        yield HelpTab()


class StatusLine(Static):
    """What was just recorded and what it changed (one line, plain words)."""

    def __init__(self) -> None:
        super().__init__("", id="status-line")

    def say(self, text: str, *, problem: bool = False) -> None:
        """Show ``text``; ``problem`` marks it (``!!`` prefix and style) as needing attention."""
        shown = Text("!! " + text if problem else text)
        self.update(shown)
        self.set_class(problem, "-problem")
