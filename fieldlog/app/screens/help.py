"""The help overlay: every key of the app, by area, read from the keymap table itself.

The overlay is the manual. Someone who has never seen the app should be able to record a day,
read tomorrow's MUST list and print the lookahead from this page alone, so it opens with three
steps that say how and the caution that goes with any schedule, then lists every key.
"""

from __future__ import annotations

from typing import ClassVar

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from fieldlog.app.keymap import AREAS, KEYS, VIEWS
from fieldlog.app.widgets.row_list import CURSOR_MARK, PLAIN_CURSOR_MARK

CAUTION = (
    "A schedule is a plan, not a permit. Excavation, lifting, concrete, work at height and "
    "access follow the contract, the local codes and the licensed professionals, whatever the "
    "dates say."
)

QUICK_START = (
    (
        "1",
        "Today: pick an activity with Up/Down (/ finds any other), then s started, f "
        "finished, r days left, n note; w weather, c crews, l lost time. The same keys work "
        "on Two weeks and Float. Each key writes the log at once.",
    ),
    (
        "2",
        "Tomorrow's MUST list: the Tmrw column on 1 Today, or the first day column of "
        "2 Two weeks (the legend under the grid names each mark). p there prints the "
        "sheet.",
    ),
    ("3", "Nothing to save: Ctrl+Q leaves, and every entry is already in the log."),
)
"""The three steps of a shift, shown first."""


def marks(cursor: str) -> str:
    """The marks of the lists, with the selected row's mark as this screen draws it."""
    return (
        "Marks in the lists: !! late (negative float)  * critical  > driving path  "
        f"{cursor.strip()} selected row. Tmrw: what tomorrow asks (MUST / may / cannot / "
        "off)."
    )


def quick_start() -> Table:
    """The three steps, numbered, wrapping under their own text."""
    table = Table(
        box=None,
        show_header=False,
        pad_edge=False,
        expand=True,
        title="End of shift, in three steps",
        title_justify="left",
        title_style="bold",
    )
    table.add_column("step", no_wrap=True, width=3)
    table.add_column("what", ratio=1)
    for number, words in QUICK_START:
        table.add_row(Text(number, style="bold"), Text(words))
    return table


def key_table() -> Group:
    """All keys, grouped by area: each area's heading on its own line, then its keys.

    The heading is a title over its area's table, not a cell of the key column (14 wide),
    so a heading longer than that ("Two weeks (lookahead)") is never cut at 80 columns.
    """
    parts: list[Table | Text] = []
    for area, heading in AREAS.items():
        keys = [k for k in KEYS if k.area == area]
        if not keys:
            continue
        table = Table(
            box=None,
            show_header=False,
            pad_edge=False,
            expand=True,
            title=heading,
            title_justify="left",
            title_style="bold underline",
        )
        table.add_column("key", no_wrap=True, width=14)
        table.add_column("what it does", ratio=1)
        for k in keys:
            table.add_row(Text(k.shown_key, style="bold"), Text(k.help))
        parts += [table, Text("")]
    return Group(*parts)


class HelpScreen(ModalScreen[None]):
    """Every key, the three steps of a shift, and the caution. Esc, ? or q closes it."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,question_mark,f1,q", "close", "Close", id="help.close"),
    ]

    def compose(self) -> ComposeResult:
        """Quick start, keys, caution."""
        with Vertical(id="help-box") as box:
            box.border_title = "Keys"
            box.border_subtitle = "Esc closes"
            with VerticalScroll(id="help-scroll"):
                yield Static(quick_start(), id="help-quick")
                yield Static(Text(CAUTION), id="help-caution")
                views = "  ".join(f"{n} {name}" for n, name in enumerate(VIEWS.values(), 1))
                cursor = PLAIN_CURSOR_MARK if self.app.has_class("-plain") else CURSOR_MARK
                yield Static(
                    Text(f"Views: {views}  (click a tab too)\n{marks(cursor)}"), id="help-views"
                )
                yield Static(key_table(), id="help-keys")

    def action_close(self) -> None:
        """Close the overlay."""
        self.dismiss(None)
