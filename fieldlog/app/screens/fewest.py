"""Fewest people, as it would be: the plan's crews, the starts to move, and its days.

Opened with ``h`` from Two weeks. The words are the printed sheet's own
(:mod:`fieldlog.lookahead.fewest_text`): per crew the fewest people with its proof beside it,
"with N people: move X to ...", what the lower bound rests on, and the caution that a smaller
crew is a suggestion, not a safe staffing level. Under them a small grid shows the plan as it
would be: each moved activity on its new days, and each crew's people per day with the moves
made (``!`` over what the crew has). The screen only reads the lookahead; nothing is written.
"""

from __future__ import annotations

from typing import ClassVar

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from fieldlog.lookahead import Cell, Lookahead, fewest_text
from fieldlog.reports.lookahead_text import UNICODE

WORKS = UNICODE.must * 2
NOTHING = "No crew is over or near its headcount in these two weeks: nothing to plan."


def plan_grid(look: Lookahead) -> Table:
    """Moved activities on their new days, then each crew's people per day under the plan."""
    table = Table(box=None, pad_edge=False, show_edge=False, padding=(0, 0))
    table.add_column("ID", no_wrap=True)
    table.add_column("", no_wrap=True, width=1)
    for d in look.days:
        table.add_column(Text(f" {d:%a}"[:3] + f"\n {d.day:02d}"), no_wrap=True, width=3)
    fewest = look.fewest
    if fewest is None:
        return table
    rows = {r.id: r for r in look.rows}
    for m in fewest.moves:
        row = rows.get(m.activity)
        cells = []
        for k, d in enumerate(look.days):
            off = row is not None and row.cells[k] is Cell.OFF
            cells.append(Text(" " + WORKS if m.start <= d <= m.finish and not off else ""))
        table.add_row(Text(m.activity), "", *cells)
    for a in fewest.crews:
        table.add_row(
            Text(f"{a.crew} (has {a.available})", style="bold"),
            "",
            *(_count(v, a.available) for v in a.load),
        )
    return table


def _count(people: int, available: int) -> Text:
    """People on a day, ``-`` for nobody, a trailing ``!`` when over what the crew has."""
    over = people > available
    return Text(
        f"{people if people else '-':>2}{'!' if over else ' '}",
        style="bold reverse" if over else "",
    )


class FewestScreen(ModalScreen[None]):
    """The fewest-people plan of a lookahead. Esc, f or q closes it."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,f,q", "close", "Close", id="fewest.close"),
    ]

    def __init__(self, look: Lookahead) -> None:
        super().__init__()
        self.look = look

    def compose(self) -> ComposeResult:
        """Words first, then the plan's days."""
        fewest = self.look.fewest
        with Vertical(id="fewest-box") as box:
            box.border_title = "Fewest people"
            box.border_subtitle = "Esc closes"
            with VerticalScroll(id="fewest-scroll"):
                if fewest is None:
                    yield Static(Text(NOTHING), id="fewest-words")
                    return
                words = [fewest_text.title(fewest), *fewest_text.lines(fewest, self.look.days)]
                yield Static(Text("\n".join(words)), id="fewest-words")
                yield Static(
                    Text(f"{WORKS} works that day with the moves made"), id="fewest-legend"
                )
                yield Static(plan_grid(self.look), id="fewest-grid")

    def action_close(self) -> None:
        """Close the overlay."""
        self.dismiss(None)
