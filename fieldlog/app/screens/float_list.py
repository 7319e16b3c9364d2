"""Float: every activity with its dates and floats, filters, and what drives the selected one.

Rows are in the printed float list's order (least float first). ``v`` steps through the
filters (behind, critical, near critical, the next two weeks) and ``a`` shows all again; ``/``
searches ids and names. The line under the list names the driving predecessor of the selected
activity; ``g`` jumps to it. The record keys work here as on Today, on any activity listed.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from datetime import date
from typing import ClassVar

from rich.text import Text
from textual import on
from textual.binding import BindingType
from textual.widget import Widget
from textual.widgets import Input, Static

from fieldlog.app.float_filter import FILTERS, driver_text, filtered
from fieldlog.app.screens.base import bindings
from fieldlog.app.screens.record_keys import RecordView
from fieldlog.app.screens.today import flag
from fieldlog.app.session import Snapshot
from fieldlog.app.widgets.exact_input import ExactInput
from fieldlog.app.widgets.row_list import Column, RowList, fit_columns
from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult

COLUMNS = (
    Column("flag", "", 2),
    Column("id", "ID", 8),
    Column("name", "Activity", 20),
    Column("state", "State", 7),
    Column("start", "Start", 6),
    Column("finish", "Finish", 6),
    Column("tf", "TF", 4, True),
    Column("ff", "FF", 3, True),
    Column("lfinish", "Late fin", 6),
    Column("left", "Left", 4, True),
)
"""The float list's columns. TF total float, FF free float, Left: working days."""

NARROWEST = {"ff": 96, "lfinish": 110}
"""Columns shown only from this screen width on."""

WIDE = 110
"""From this screen width dates carry their year."""

STATE_WORDS = {Status.FINISHED: "done", Status.IN_PROGRESS: "running", Status.NOT_STARTED: ""}


def _n(v: int | None) -> str:
    return "" if v is None else str(v)


def cells(r: ActivityResult, columns: Sequence[Column], wide: bool) -> tuple[str, ...]:
    """One row of the float list, for the columns shown."""
    start = r.actual_start if r.status is not Status.NOT_STARTED else r.early_start
    fmt = "%d %b %y" if wide else "%d %b"

    def d(day: date | None) -> str:
        return day.strftime(fmt) if day else ""

    values = {
        "flag": flag(r),
        "id": r.id,
        "name": r.name,
        "state": "overdue" if r.overdue else STATE_WORDS[r.status],
        "start": d(start),
        "finish": d(r.actual_finish or r.early_finish),
        "tf": _n(r.total_float),
        "ff": _n(r.free_float),
        "lfinish": d(r.late_finish),
        "left": str(r.remaining) if r.is_open else "",
    }
    return tuple(values[c.key] for c in columns)


def columns_for(width: int, id_width: int) -> list[Column]:
    """The columns that fit a screen ``width`` wide, the name filling the rest."""
    wide = width >= WIDE
    out = []
    for c in COLUMNS:
        if width < NARROWEST.get(c.key, 0):
            continue
        if c.key == "id":
            c = Column(c.key, c.heading, id_width)
        elif c.key in ("start", "finish", "lfinish") and wide:
            c = Column(c.key, c.heading, 9)
        out.append(c)
    return fit_columns(out, width - 2, "name")


class FloatScreen(RecordView):
    """The float list."""

    VIEW = "float"
    AUTO_FOCUS = "#float-table"
    BINDINGS: ClassVar[list[BindingType]] = bindings("float")

    def __init__(self) -> None:
        super().__init__()
        self.kind = "all"
        self.query_text = ""
        self.shown: list[ActivityResult] = []

    def compose_body(self) -> Iterable[Widget]:
        """Filter line, search box (hidden until ``/``), list, driver line."""
        yield Static(id="float-head", classes="view-head")
        search = ExactInput(
            placeholder="id or name, Enter to keep, Esc to clear",
            id="float-search",
            compact=True,
            select_on_focus=False,
        )
        search.display = False
        yield search
        yield RowList(id="float-table")
        yield Static(id="float-driver", classes="detail-line")

    def on_mount(self) -> None:
        """Steady cursor in the search box."""
        self.query_one("#float-search", Input).cursor_blink = False
        super().on_mount()

    def paint(self, snap: Snapshot) -> None:
        """Fill the list from the schedule with the current filter and search."""
        schedule = snap.state.schedule
        table = self.query_one("#float-table", RowList)
        self.shown = filtered(schedule, self.kind, self.query_text)
        width = self.size.width
        id_width = max([len(a.id) for a in schedule.activities] + [4])
        columns = columns_for(width, id_width)
        wide = width >= WIDE
        table.set_rows(
            columns, [(r.id, cells(r, columns, wide)) for r in self.shown], keep=table.current
        )
        search = f" · search '{self.query_text}'" if self.query_text else ""
        total = len(schedule.activities)
        self.query_one("#float-head", Static).update(
            Text(
                f"{FILTERS[self.kind].capitalize()} (v: next){search}: {len(self.shown)} of {total}"
                " · !! late  * critical  > driving path"
            )
        )
        self.show_driver()

    def selected_id(self) -> str | None:
        """Id under the cursor, or None."""
        return self.query_one("#float-table", RowList).current

    @on(RowList.Highlighted, "#float-table")
    def _moved(self, event: RowList.Highlighted) -> None:
        event.stop()
        self.show_driver()

    def show_driver(self) -> None:
        """The line naming what drives the selected activity."""
        schedule = self.host.snapshot.state.schedule
        aid = self.selected_id()
        line = self.query_one("#float-driver", Static)
        if aid is None:
            line.update(Text("No activity matches; a shows all"))
            return
        r = schedule.by_id[aid]
        extra = ""
        if r.is_open and r.late_start is not None:
            extra = f" · late start {r.late_start:%a %d %b}"
        line.update(Text(f"{r.id} {r.name}: {driver_text(schedule, r)}{extra}"))

    # -- keys -----------------------------------------------------------------------------------

    def action_filter(self, kind: str) -> None:
        """Show only the activities of filter ``kind``."""
        self.kind = kind
        self.paint(self.host.snapshot)

    def action_next_filter(self) -> None:
        """The next filter in :data:`FILTERS` order, back to all after the last."""
        names = list(FILTERS)
        self.action_filter(names[(names.index(self.kind) + 1) % len(names)])

    @on(RowList.Picked, "#float-table")
    def _picked(self, event: RowList.Picked) -> None:
        """Enter or a tap on an activity: its record keys as a menu."""
        event.stop()
        self.action_menu(event.key)

    def action_search(self) -> None:
        """Open the search box and give it the keys at once.

        Keys reach the list through its own queue, so a quick typist's first letters after
        ``/`` used to be queued for the list before the box had the focus (and ran the list's
        filter keys). ``/`` is therefore a priority key, run by the app in typing order, and
        the focus moves before the app hands on the next key. In the box itself ``/`` types
        (:meth:`check_action`).
        """
        search = self.query_one("#float-search", Input)
        search.display = True
        self.set_focus(search)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """While the search box has the cursor, ``/`` is a character to type, not a key."""
        if action == "search" and self.focused is self.query_one("#float-search", Input):
            return False
        return super().check_action(action, parameters)

    @on(Input.Changed, "#float-search")
    def _typed(self, event: Input.Changed) -> None:
        event.stop()
        self.query_text = event.value.strip()
        self.paint(self.host.snapshot)

    @on(Input.Submitted, "#float-search")
    def _keep(self, event: Input.Submitted) -> None:
        event.stop()
        self.query_one("#float-table", RowList).focus()

    def action_clear_search(self) -> None:
        """Clear the search and hide its box."""
        search = self.query_one("#float-search", Input)
        with self.prevent(Input.Changed):
            search.value = ""
        search.display = False
        self.query_text = ""
        self.query_one("#float-table", RowList).focus()
        self.paint(self.host.snapshot)

    def action_goto_driver(self) -> None:
        """Move to the driving predecessor of the selected activity (showing all if needed)."""
        aid = self.selected_id()
        if aid is None:
            return
        r = self.host.snapshot.state.schedule.by_id[aid]
        if r.driving is None:
            schedule = self.host.snapshot.state.schedule
            self.say(f"{r.id} has no driving predecessor: {driver_text(schedule, r)}")
            return
        target = r.driving.pred
        if target not in {a.id for a in self.shown}:
            self.kind, self.query_text = "all", ""
            with self.prevent(Input.Changed):
                self.query_one("#float-search", Input).value = ""
            self.paint(self.host.snapshot)
        table = self.query_one("#float-table", RowList)
        table.move_to(target)
        table.focus()
