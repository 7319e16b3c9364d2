"""Today: the end-of-shift view. The day's activities first, one key per fact, then the day.

Top: the activities running or ready today (:mod:`fieldlog.app.shift`), with what tomorrow
asks of each (MUST / may, from the lookahead), float, days left and forecast finish. One key
records a fact about the selected activity; day facts (weather, crews, lost time, visits,
incidents) have their own keys (:mod:`fieldlog.app.screens.record_keys`, the same on every
list); ``/`` finds work that is not on the list. Bottom: what is already recorded for today
and the readiness items still open, so the foreman sees what is missing before leaving.

Every key writes the journal at once: there is nothing to save.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import ClassVar

from rich.text import Text
from textual import on
from textual.binding import BindingType
from textual.containers import VerticalScroll
from textual.widget import Widget
from textual.widgets import Static

from fieldlog.app.history_rows import summarize
from fieldlog.app.screens.base import bindings
from fieldlog.app.screens.record_keys import RecordView
from fieldlog.app.session import Snapshot
from fieldlog.app.shift import ShiftRow
from fieldlog.app.widgets.row_list import Column, RowList, fit_columns
from fieldlog.engine.result import ActivityResult
from fieldlog.journal.entries import PROGRESS_KINDS
from fieldlog.lookahead import Cell
from fieldlog.reports.words import count

COLUMNS = (
    Column("flag", "", 2),
    Column("id", "ID", 8),
    Column("name", "Activity", 20),
    Column("state", "Now", 8),
    Column("tomorrow", "Tmrw", 6),
    Column("float", "TF", 4, True),
    Column("left", "Left", 7),
    Column("finish", "Finish", 6),
)
"""The activity list's columns; the name takes whatever width is left."""

TOMORROW_WORDS: Mapping[Cell, str] = {
    Cell.MUST: "MUST",
    Cell.MAY: "may",
    Cell.CANNOT: "cannot",
    Cell.DONE: "done",
    Cell.OFF: "off",
}


def flag(r: ActivityResult) -> str:
    """The same marks as the printed float list: ``!!`` late, ``*`` critical, ``>`` driving."""
    if r.late:
        return "!!"
    if r.critical and r.is_open:
        return "*"
    return ">" if r.on_driving_path and r.is_open else ""


def left_text(r: ActivityResult) -> str:
    """Days left (and percent built when known): ``"4 d 40%"``."""
    if not r.is_open:
        return "done"
    text = f"{r.remaining} d"
    if r.percent is not None:
        text += f" {r.percent:g}%"
    return text


def float_text(r: ActivityResult) -> str:
    """Total float with its sign, blank for finished work."""
    if r.total_float is None:
        return ""
    return f"{r.total_float:+d}" if r.total_float else "0"


class TodayScreen(RecordView):
    """The end-of-shift view."""

    AUTO_FOCUS = "#shift-table"
    VIEW = "today"
    BINDINGS: ClassVar[list[BindingType]] = bindings("today")

    def __init__(self) -> None:
        super().__init__()
        self.rows: list[ShiftRow] = []

    def compose_body(self) -> Iterable[Widget]:
        """Heading, activity list, day panel."""
        yield Static(id="today-head", classes="view-head")
        yield RowList(id="shift-table")
        with VerticalScroll(id="day-panel"):
            yield Static(id="day-record")

    def paint(self, snap: Snapshot) -> None:
        """Fill the list (keeping the selected activity) and the day panel."""
        table = self.query_one("#shift-table", RowList)
        self.rows = list(snap.shift)
        id_width = max([len(row.id) for row in self.rows] + [4])
        columns = [Column(c.key, c.heading, id_width) if c.key == "id" else c for c in COLUMNS]
        columns = fit_columns(columns, self.size.width - 2, "name")
        lines = []
        must = 0
        for row in self.rows:
            r = row.result
            cell = snap.tomorrow.get(r.id)
            must += cell is Cell.MUST
            finish = r.actual_finish or r.early_finish
            lines.append(
                (
                    r.id,
                    (
                        flag(r),
                        r.id,
                        r.name,
                        row.state,
                        TOMORROW_WORDS[cell] if cell is not None else "",
                        float_text(r),
                        left_text(r),
                        f"{finish:%d %b}" if finish else "",
                    ),
                )
            )
        # The cursor follows its activity through the re-sort: after "started" the row moves
        # up, and the next key still means the activity the foreman was looking at.
        table.set_rows(columns, lines, keep=table.current)
        n = len(self.rows)
        head = (
            f"{snap.today:%a %d %b %Y}: {count(n, 'activity', 'activities')} running or "
            f"ready · {must} MUST run tomorrow"
        )
        if not self.rows:
            head = f"{snap.today:%a %d %b %Y}: nothing running or ready to start"
        self.query_one("#today-head", Static).update(Text(head))
        self.query_one("#day-record", Static).update(day_text(snap))

    # -- selection ------------------------------------------------------------------------------

    def selected_id(self) -> str | None:
        """Id of the activity under the cursor, or None when the list is empty."""
        return self.query_one("#shift-table", RowList).current

    @on(RowList.Picked, "#shift-table")
    def _picked(self, event: RowList.Picked) -> None:
        """Enter, a click or a tap on an activity: offer its actions (no keyboard needed)."""
        event.stop()
        self.action_menu(event.key)


def day_text(snap: Snapshot) -> Text:
    """The day panel: what is recorded for today, then the readiness items to chase."""
    today = snap.today
    recorded = [e for e in snap.state.replay.effective if e.day == today]
    day_entries = [e for e in recorded if e.kind not in PROGRESS_KINDS]
    progress = len(recorded) - len(day_entries)
    text = Text()
    text.append(f"Recorded for {today:%a %d %b}", style="bold")
    kinds = {e.kind for e in day_entries}
    missing = [w for k, w in (("weather", "weather (w)"), ("crew", "crews (c)")) if k not in kinds]
    if missing:
        text.append(f"  · not yet: {', '.join(missing)}")
    text.append("\n")
    if progress:
        # Progress shows in the list above, but "nothing yet" under it would read as if the
        # day's record were empty: say how much of it is there.
        text.append(
            f"  {count(progress, 'progress entry', 'progress entries')} "
            "(started, finished, days left, percent): see the list above\n"
        )
    if not recorded:
        text.append("  nothing yet for the day\n")
    for e in day_entries:
        text.append(f"  {summarize(e)}\n")
    items = snap.state.replay.readiness
    if items:
        text.append("Open readiness items\n", style="bold")
        for item in items:
            when = f"expected {item.expected:%a %d %b}" if item.expected else "no expected date"
            flag_text = item.flag(snap.state.as_of)
            mark = "!! " if flag_text else "   "
            text.append(f"{mark}{item.activity} needs {item.what} ({item.kind}), {when}\n")
    problems = snap.state.replay.problems
    if problems:
        text.append(f"Log problems: {len(problems)} (see 4 Journal)\n", style="bold")
    return text
