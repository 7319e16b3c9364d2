"""Plain mode: ASCII marks for terminals without colour or without block characters.

A VT100, ``TERM=dumb``, a serial console or a font without block elements shows the app's
marks (blocks, shades, box lines, the cursor triangle, the middle-dot separators) as boxes or
garbage. In plain mode every line the app draws passes through :class:`AsciiMarks`, which
swaps those marks for ASCII ones of the same width, and the app's colours are turned off, so
anything that matters has to be said by a word or a mark (it already is: ``!!`` late, ``??``
not ready, ``#`` MUST, ``->`` the selected row).

Letters are never touched: an activity named in Chinese or with an accent shows as typed.
"""

from __future__ import annotations

import unicodedata

from rich.segment import Segment
from textual.color import Color
from textual.filter import LineFilter

_NAMED = {
    "\u2588": "#",
    "\u2593": "#",
    "\u2592": ":",
    "\u2591": ":",
    "\u25b6": ">",
    "\u25b8": ">",
    "\u25c0": "<",
    "\u25b2": "^",
    "\u25bc": "v",
    "\u25cf": "*",
    "\u25a0": "#",
    "\u2022": "*",
    "\u00b7": "-",
    "\u2026": "~",
    "\u2013": "-",
    "\u2014": "-",
    "\u2018": "'",
    "\u2019": "'",
    "\u201c": '"',
    "\u201d": '"',
    "\u2190": "<",
    "\u2192": ">",
    "\u2191": "^",
    "\u2193": "v",
    "\u23ce": "<",
    "\u258f": "|",
    "\u2595": "|",
    "\u2594": "-",
    "\u2581": " ",
    "\u2582": " ",
    "\u2583": " ",
    "\u2584": " ",
    "\u2585": " ",
    "\u2586": " ",
    "\u2587": " ",
    "\u2580": "-",
    "\u2590": "|",
    "\u258c": "|",
    "\u00a0": " ",
    "\u2714": "x",
    "\u2713": "x",
    "\u2717": "x",
}
"""Marks with an obvious ASCII stand-in, all one cell wide on both sides."""


def _box_mark(ch: str) -> str:
    """A box-drawing character as ``-``, ``|`` or ``+`` (by its Unicode name)."""
    name = unicodedata.name(ch, "")
    if "HORIZONTAL" in name and "VERTICAL" not in name:
        return "-"
    if "VERTICAL" in name and "HORIZONTAL" not in name:
        return "|"
    return "+"


def _table() -> dict[int, str]:
    table = {ord(k): v for k, v in _NAMED.items()}
    for code in range(0x2500, 0x2580):  # box drawing
        table.setdefault(code, _box_mark(chr(code)))
    for code in range(0x2580, 0x25A0):  # block elements not named above: a solid mark
        table.setdefault(code, "#")
    return table


ASCII_MARKS = _table()
"""Code point -> ASCII replacement, for :meth:`str.translate`."""


def ascii_marks(text: str) -> str:
    """``text`` with its marks made ASCII (letters, digits and ASCII are kept)."""
    return text if text.isascii() else text.translate(ASCII_MARKS)


class AsciiMarks(LineFilter):
    """A Textual line filter that makes every mark on screen ASCII (see the module)."""

    def apply(self, segments: list[Segment], background: Color) -> list[Segment]:
        """Swap the marks in each segment; styles and control codes pass through."""
        return [Segment(ascii_marks(text), style, control) for text, style, control in segments]
