"""Two weeks: the must / may / cannot grid, why each cell is so, crew load, and the printout.

One row per activity that can run inside the window (``a`` shows every unfinished one), one
three-character cell per day, crew rows at the bottom. Cells are glyphs *and* colours, so the
grid reads the same on a monochrome screen; the legend sits under the grid and the line below
it explains the selected cell in words ("waiting on ...", "3 days of float").

``,`` and ``.`` move the window a week; ``p`` writes the printable sheet (and prints it when a
printer is set up); ``h`` shows the fewest-people plan as it would be
(:mod:`fieldlog.app.screens.fewest`). The record keys work on the selected row as on Today.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from datetime import timedelta
from typing import ClassVar

from rich.text import Text
from textual import on, work
from textual.binding import BindingType
from textual.widget import Widget
from textual.widgets import DataTable, Static

from fieldlog.app.messages import ShowStatus
from fieldlog.app.printing import deliver_sheet
from fieldlog.app.screens.base import bindings
from fieldlog.app.screens.fewest import FewestScreen
from fieldlog.app.screens.record_keys import RecordView
from fieldlog.app.session import Snapshot
from fieldlog.errors import FieldlogError
from fieldlog.lookahead import ActivityRow, Cell, Lookahead, build_lookahead
from fieldlog.lookahead.build import LOOKAHEAD_DAYS
from fieldlog.lookahead.crew_load import CrewLoad
from fieldlog.reports.lookahead_text import ASCII, UNICODE, Glyphs


def glyphs(sheet: Glyphs) -> Mapping[Cell, str]:
    """Two characters per day cell, the printed sheet's own marks: each class has its own
    shape (solid, shaded, dotted, blank), so no colour is needed."""
    return {
        Cell.MUST: sheet.must * 2,
        Cell.MAY: sheet.may * 2,
        Cell.CANNOT: sheet.cannot * 2,
        Cell.DONE: sheet.done * 2,
        Cell.OFF: "  ",
    }


GLYPHS = glyphs(UNICODE)
PLAIN_GLYPHS = glyphs(ASCII)
"""Plain mode: the ``--ascii`` sheet's marks (``#``, ``:``, ``.``)."""

CELL_WORDS: Mapping[Cell, str] = {
    Cell.MUST: "MUST run",
    Cell.MAY: "may run",
    Cell.CANNOT: "cannot run",
    Cell.DONE: "done",
    Cell.OFF: "not a working day",
}

CELL_STYLES: Mapping[Cell, str] = {
    Cell.MUST: "bold #f0a030",
    Cell.MAY: "#70b0e0",
    Cell.CANNOT: "dim",
    Cell.DONE: "dim",
    Cell.OFF: "",
}
"""Colour helps where there is colour; the glyphs carry the meaning without it."""


def legend(marks: Mapping[Cell, str]) -> str:
    """Fits 80 columns, so the whole legend is on screen at the smallest size."""
    return (
        f"{marks[Cell.MUST]} MUST  {marks[Cell.MAY]} may  {marks[Cell.CANNOT]} cannot  "
        f"{marks[Cell.DONE]} done  blank: day off  !! late  ?? not ready"
    )


CREW_PREFIX = "crew:"


def row_flag(row: ActivityRow) -> str:
    """``!!`` late, ``??`` a readiness item to chase, ``!?`` both, ``*`` critical."""
    if row.late and row.not_ready:
        return "!?"
    if row.late:
        return "!!"
    if row.not_ready:
        return "??"
    return "*" if row.critical else ""


def crew_cell(load: CrewLoad, k: int) -> Text:
    """The MUST headcount of a crew on day ``k``; ``!`` marks more than the crew has."""
    n = load.must[k]
    over = n > load.available
    text = f"{n}!" if over else (str(n) if n else "")
    return Text(f"{text:>3}", style="bold reverse" if over else "")


class LookaheadScreen(RecordView):
    """The two-week grid."""

    AUTO_FOCUS = "#look-table"
    VIEW = "lookahead"
    BINDINGS: ClassVar[list[BindingType]] = bindings("lookahead")

    def __init__(self) -> None:
        super().__init__()
        self.week = 0
        self.show_all = False
        self.look: Lookahead | None = None
        self.shown: list[ActivityRow] = []

    def compose_body(self) -> Iterable[Widget]:
        """Heading, grid, legend, the selected cell in words."""
        yield Static(id="look-head", classes="view-head")
        table: DataTable[Text] = DataTable(
            id="look-table", cursor_type="cell", cell_padding=0, header_height=2, fixed_columns=3
        )
        yield table
        yield Static(Text(legend(self.marks)), id="look-legend")
        yield Static(id="look-why", classes="detail-line")

    @property
    def marks(self) -> Mapping[Cell, str]:
        """The day-cell marks: the sheet's blocks, or its ASCII marks in plain mode."""
        return PLAIN_GLYPHS if self.host.plain else GLYPHS

    def is_stale(self, snap: Snapshot) -> bool:
        """Stale only once the new snapshot's full lookahead is there (step 2)."""
        return snap.lookahead is not None and snap.version != self.painted_version

    def lookahead_for(self, snap: Snapshot) -> Lookahead:
        """The snapshot's lookahead, or one moved by whole weeks."""
        if self.week == 0 and snap.lookahead is not None:
            return snap.lookahead
        start = snap.state.schedule.data_date + timedelta(days=7 * self.week)
        return build_lookahead(
            snap.state.schedule, snap.state.replay.readiness, start=start, days=LOOKAHEAD_DAYS
        )

    def paint(self, snap: Snapshot) -> None:
        """Rebuild the grid."""
        look = self.look = self.lookahead_for(snap)
        table = self.query_one("#look-table", DataTable)
        keep = table.cursor_coordinate
        keep_key = self.selected_row_key()
        table.clear(columns=True)
        id_width = max([len(r.id) for r in look.rows] + [4]) + 1
        days_width = 3 * len(look.days)
        name_width = max(12, self.size.width - 3 - id_width - days_width - 6)
        table.add_column("", key="flag", width=3)
        table.add_column(Text("ID"), key="id", width=id_width)
        table.add_column(Text("Activity"), key="name", width=name_width)
        for d in look.days:
            table.add_column(Text(f" {d:%a}"[:3] + f"\n{d.day:>3}"), key=d.isoformat(), width=3)
        table.add_column(Text("  TF"), key="tf", width=5)
        self.shown = list(look.rows if self.show_all else look.rows_with_work)
        for r in self.shown:
            table.add_row(
                Text(f"{row_flag(r):<3}"),
                Text(r.id),
                Text(r.name[: name_width - 1]),
                *(_cell(c, self.marks) for c in r.cells),
                Text(f"{r.total_float:>4}"),
                key=r.id,
            )
        for load in look.crews:
            if not any(load.most):
                continue
            table.add_row(
                Text(""),
                Text("crew"),
                Text(f"{load.crew} (has {load.available})"),
                *(crew_cell(load, k) for k in range(len(look.days))),
                Text(""),
                key=CREW_PREFIX + load.crew,
            )
        if table.row_count:
            # The cursor follows its activity (by id) when a recompute moves the rows.
            row = min(keep.row, table.row_count - 1)
            if keep_key is not None and keep_key in table.rows:
                row = table.get_row_index(keep_key)
            table.move_cursor(row=row, column=max(keep.column, 3) if keep.column else 3)
        hidden = len(look.rows) - len(self.shown)
        more = f" · {hidden} with nothing to do now hidden (a shows all)" if hidden else ""
        first, last = look.days[0], look.days[-1]
        self.query_one("#look-head", Static).update(
            Text(f"{first:%a %d %b} to {last:%a %d %b} · {len(self.shown)} activities{more}")
        )
        self.explain()

    def selected_row_key(self) -> str | None:
        """Key of the grid row under the cursor (an activity id or a crew row), or None."""
        table = self.query_one("#look-table", DataTable)
        if not table.row_count:
            return None
        return table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value

    def selected_id(self) -> str | None:
        """The activity under the cursor, for the record keys (None on a crew row)."""
        key = self.selected_row_key()
        return None if key is None or key.startswith(CREW_PREFIX) else key

    @on(DataTable.CellHighlighted, "#look-table")
    def _moved(self, event: DataTable.CellHighlighted) -> None:
        event.stop()
        self.explain()

    def explain(self) -> None:
        """Say why the selected cell is what it is."""
        line = self.query_one("#look-why", Static)
        table = self.query_one("#look-table", DataTable)
        look = self.look
        if look is None or table.row_count == 0:
            line.update(Text("Nothing to run in these two weeks"))
            return
        coord = table.cursor_coordinate
        key = table.coordinate_to_cell_key(coord).row_key.value or ""
        k = coord.column - 3
        in_days = 0 <= k < len(look.days)
        if key.startswith(CREW_PREFIX):
            load = next(c for c in look.crews if c.crew == key[len(CREW_PREFIX) :])
            line.update(
                Text(
                    _crew_words(load, look, k)
                    if in_days
                    else f"{load.crew}: has {load.available} people a day"
                )
            )
            return
        row = next(r for r in self.shown if r.id == key)
        flags = []
        if row.late and not in_days:  # a day cell's own reason already says it is late
            flags.append(f"LATE: {-row.total_float} working days behind")
        flags.extend(f"NOT READY: {f}" for f in row.not_ready)
        if in_days:
            cell = row.cells[k]
            why = row.why[k]
            reason = f": {row.reasons[why]}" if why is not None else ""
            text = f"{row.id} {look.days[k]:%a %d %b}: {CELL_WORDS[cell]}{reason}"
        else:
            text = f"{row.id} {row.name}: " + ("; ".join(row.reasons) or "nothing to explain")
        line.update(Text(" · ".join([text, *flags])))

    # -- keys -----------------------------------------------------------------------------------

    def action_shift_week(self, weeks: int) -> None:
        """Move the window by whole weeks (never more than two weeks back)."""
        self.week = max(-2, self.week + weeks)
        self.paint(self.host.snapshot)

    def action_toggle_all(self) -> None:
        """Show every unfinished activity, or only those with something to do."""
        self.show_all = not self.show_all
        self.paint(self.host.snapshot)

    def action_fewest(self) -> None:
        """Open the fewest-people plan of the window shown."""
        if self.look is not None:
            self.app.push_screen(FewestScreen(self.look))

    def action_print_sheet(self) -> None:
        """Write the printable sheet, then print it if a printer is set up."""
        if self.look is None:
            return
        self.say("Writing the lookahead sheet")
        self._deliver(self.look)

    @work(thread=True, exclusive=True, group="print")
    def _deliver(self, look: Lookahead) -> None:
        try:
            words = deliver_sheet(look, self.host.site_folder)
        except FieldlogError as exc:
            self.post_message(ShowStatus(exc.message, problem=True))
            return
        self.post_message(ShowStatus(words))


def _cell(c: Cell, marks: Mapping[Cell, str]) -> Text:
    return Text(" " + marks[c], style=CELL_STYLES[c])


def _crew_words(load: CrewLoad, look: Lookahead, k: int) -> str:
    must, most, has = load.must[k], load.most[k], load.available
    text = (
        f"{load.crew} {look.days[k]:%a %d %b}: {must} people MUST be on site, up to {most} "
        f"if all work with float runs; has {has}"
    )
    if must > has:
        text += f" · OVER by {must - has}"
    return text
