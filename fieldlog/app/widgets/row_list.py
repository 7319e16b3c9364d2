"""A fast list of fixed-width rows with a header and a row cursor (Textual's Line API).

Why not a DataTable: a DataTable renders every visible cell on its own, which on a 2-core
tablet costs about 100 ms to repaint a screenful of eight-column rows, and the end-of-shift view
repaints after every key. Here each row is one pre-laid-out line, rendered once and cached, so a
repaint costs a few milliseconds and a 2,000-row float list fills as fast as a 20-row one.

* The header line stays put; rows scroll under it (mouse wheel, keys, scrollbar).
* The cursor row is drawn reversed *and* marked with ``▶`` in the gutter, so it is visible
  without colour (``>`` is taken: it marks the driving path in the lists).
* Up/Down, PgUp/PgDn, Home/End move; Enter or a click picks a row. :class:`RowList.Highlighted`
  is posted whenever the cursor lands on another row.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import ClassVar

from rich.style import Style
from rich.text import Text
from textual import events
from textual.binding import Binding, BindingType
from textual.geometry import Size
from textual.message import Message
from textual.reactive import reactive
from textual.scroll_view import ScrollView
from textual.strip import Strip

GUTTER = 2
"""Characters before the first column: the cursor mark and a space."""

CURSOR_MARK = "\u25b6 "
"""The selected row's mark (a right-pointing triangle), as wide as the gutter."""

PLAIN_CURSOR_MARK = "->"
"""The mark in plain mode (ASCII only, as wide as the gutter)."""


@dataclass(frozen=True)
class Column:
    """One column: key, heading, width in characters, alignment."""

    key: str
    heading: str
    width: int
    right: bool = False


def fit_columns(columns: Sequence[Column], total: int, flex: str) -> list[Column]:
    """The columns with the ``flex`` one widened or narrowed to fill ``total`` characters.

    The flex column never goes below 10 characters; the list scrolls sideways instead.
    """
    fixed = sum(c.width for c in columns if c.key != flex) + len(columns) - 1 + GUTTER
    room = max(10, total - fixed)
    return [Column(c.key, c.heading, room, c.right) if c.key == flex else c for c in columns]


def lay_out(columns: Sequence[Column], cells: Sequence[str | Text]) -> Text:
    """One line: every cell cut or padded to its column, one space between columns."""
    line = Text(no_wrap=True, overflow="crop")
    for k, (col, cell) in enumerate(zip(columns, cells, strict=True)):
        text = cell if isinstance(cell, Text) else Text(cell)
        if text.cell_len > col.width:
            text = text.copy()
            text.truncate(col.width, overflow="ellipsis")
        pad = col.width - text.cell_len
        if col.right:
            line.append(" " * pad)
            line.append_text(text)
        else:
            line.append_text(text)
            line.append(" " * pad)
        if k < len(columns) - 1:
            line.append(" ")
    return line


class RowList(ScrollView, can_focus=True):
    """Rows of cells under a fixed header, with a row cursor."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("up", "move(-1)", "Up", show=False),
        Binding("down", "move(1)", "Down", show=False),
        Binding("pageup", "page(-1)", "Page up", show=False),
        Binding("pagedown", "page(1)", "Page down", show=False),
        Binding("home", "jump(0)", "First", show=False),
        Binding("end", "jump(-1)", "Last", show=False),
        Binding("enter", "pick", "Pick", show=False),
    ]

    COMPONENT_CLASSES: ClassVar[set[str]] = {"row-list--header", "row-list--cursor"}

    DEFAULT_CSS = """
    RowList {
        height: 1fr;
        background: $surface;
    }
    RowList > .row-list--header {
        text-style: bold;
        color: $text-muted;
    }
    RowList > .row-list--cursor {
        text-style: reverse;
    }
    RowList:focus > .row-list--cursor {
        background: $accent 50%;
        text-style: bold;
    }
    """

    cursor: reactive[int] = reactive(0, always_update=True, init=False)

    class Highlighted(Message):
        """The cursor is on another row."""

        def __init__(self, row_list: RowList, key: str | None) -> None:
            super().__init__()
            self.row_list = row_list
            self.key = key

        @property
        def control(self) -> RowList:
            """The list."""
            return self.row_list

    class Picked(Message):
        """Enter or a click on a row."""

        def __init__(self, row_list: RowList, key: str) -> None:
            super().__init__()
            self.row_list = row_list
            self.key = key

        @property
        def control(self) -> RowList:
            """The list."""
            return self.row_list

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:  # noqa: A002
        super().__init__(id=id, classes=classes)
        self.columns: list[Column] = []
        self._keys: list[str] = []
        self._cells: list[Sequence[str | Text]] = []
        self._index: dict[str, int] = {}
        self._lines: dict[int, Text] = {}
        self._header = Text()
        self._width = 0

    # -- filling --------------------------------------------------------------------------------

    def set_rows(
        self,
        columns: Sequence[Column],
        rows: Sequence[tuple[str, Sequence[str | Text]]],
        *,
        keep: str | None = None,
    ) -> None:
        """Replace every row; the cursor goes back to ``keep`` when it is still there.

        Args:
            columns: the columns, already fitted to the width (:func:`fit_columns`).
            rows: ``(key, cells)`` per row, cells in column order.
            keep: the key the cursor should stay on.
        """
        self.columns = list(columns)
        self._keys = [k for k, _ in rows]
        self._cells = [c for _, c in rows]
        self._index = {k: i for i, k in enumerate(self._keys)}
        self._lines.clear()
        self._header = lay_out(self.columns, [c.heading for c in self.columns])
        self._width = GUTTER + self._header.cell_len
        self.virtual_size = Size(self._width, len(self._keys) + 1)
        target = (
            self._index.get(keep, min(self.cursor, len(self._keys) - 1))
            if keep
            else (min(self.cursor, max(0, len(self._keys) - 1)))
        )
        self.cursor = max(0, target)
        self.refresh()

    # -- reading --------------------------------------------------------------------------------

    @property
    def row_count(self) -> int:
        """Number of rows."""
        return len(self._keys)

    @property
    def keys(self) -> list[str]:
        """Row keys, top to bottom."""
        return list(self._keys)

    @property
    def current(self) -> str | None:
        """Key of the row under the cursor, or None when the list is empty."""
        if not self._keys:
            return None
        return self._keys[min(self.cursor, len(self._keys) - 1)]

    def index_of(self, key: str) -> int:
        """Row index of ``key`` (KeyError when it is not listed)."""
        return self._index[key]

    def cells(self, key: str) -> list[str]:
        """The plain text of the cells of row ``key``."""
        return [str(c) for c in self._cells[self._index[key]]]

    def move_to(self, key: str) -> None:
        """Put the cursor on row ``key``."""
        self.cursor = self._index[key]

    # -- cursor ---------------------------------------------------------------------------------

    def validate_cursor(self, value: int) -> int:
        """Keep the cursor on a row."""
        return max(0, min(value, len(self._keys) - 1)) if self._keys else 0

    def watch_cursor(self, old: int, new: int) -> None:
        """Scroll the cursor into view, redraw, and say which row is current."""
        visible = max(1, self.scrollable_content_region.height - 1)
        if new < self.scroll_y:
            self.scroll_to(y=new, animate=False)
        elif new >= self.scroll_y + visible:
            self.scroll_to(y=new - visible + 1, animate=False)
        self.refresh()
        self.post_message(self.Highlighted(self, self.current))

    def action_move(self, step: int) -> None:
        """One row up or down."""
        self.cursor += step

    def action_page(self, pages: int) -> None:
        """A screenful up or down."""
        self.cursor += pages * max(1, self.scrollable_content_region.height - 2)

    def action_jump(self, index: int) -> None:
        """First (0) or last (-1) row."""
        self.cursor = index if index >= 0 else len(self._keys) - 1

    def action_pick(self) -> None:
        """Enter: pick the current row."""
        if self.current is not None:
            self.post_message(self.Picked(self, self.current))

    def on_click(self, event: events.Click) -> None:
        """A click (or a tap) on a row moves the cursor there and picks it."""
        row = event.y - 1 + int(self.scroll_y)
        if event.y >= 1 and 0 <= row < len(self._keys):
            self.cursor = row
            self.post_message(self.Picked(self, self._keys[row]))

    # -- drawing --------------------------------------------------------------------------------

    def render_line(self, y: int) -> Strip:
        """Line ``y`` of the widget: the header, or a row."""
        width = self.scrollable_content_region.width
        x = int(self.scroll_x)
        if y == 0:
            style = self.get_component_rich_style("row-list--header")
            return self._strip(Text(" " * GUTTER) + self._header, style, x, width)
        index = int(self.scroll_y) + y - 1
        if index >= len(self._keys):
            return Strip.blank(width, self.rich_style)
        line = self._lines.get(index)
        if line is None:
            line = lay_out(self.columns, self._cells[index])
            self._lines[index] = line
        if index == self.cursor:
            mark = PLAIN_CURSOR_MARK if self.app.has_class("-plain") else CURSOR_MARK
            return self._strip(
                Text(mark) + line, self.get_component_rich_style("row-list--cursor"), x, width
            )
        return self._strip(Text(" " * GUTTER) + line, Style(), x, width)

    def _strip(self, text: Text, style: Style, x: int, width: int) -> Strip:
        segments = list(text.render(self.app.console))
        strip = Strip(segments).crop(x, x + width).extend_cell_length(width)
        base = self.rich_style + style
        return strip.apply_style(base) if base else strip

    def on_resize(self) -> None:
        """A new width: nothing cached depends on it except the blank fill, so just redraw."""
        self.refresh()
