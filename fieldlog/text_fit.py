"""Fitting text into fixed columns: display width, abbreviation, word wrap, plain ASCII.

The printed sheet and the daily report are monospaced, so every line is measured in *cells*
(columns), not characters: a wide East Asian character takes two cells, a combining accent
none, and an emoji sequence held together by zero width joiners (a family, a flag) is one
picture two cells wide however many characters it has. Cells are counted and text is cut by
Rich's grapheme and cell tables (``rich.cells``), the ones the app's screen uses, so a name
lines up the same on paper and on screen and a cut never splits an emoji sequence.
``--ascii`` sheets go to old printers and code pages, so user text (site and activity names,
readiness items) is transliterated to plain ASCII *before* it is measured and cut.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterator

from rich.cells import cell_len, split_graphemes

_ASCII_SUBSTITUTES = {
    "\u2018": "'", "\u2019": "'", "\u201c": '"', "\u201d": '"', "\u2013": "-", "\u2014": "-",
    "\u2026": "...", "\u00a0": " ", "\u00df": "ss", "\u00e6": "ae", "\u00c6": "AE",
    "\u00f8": "o", "\u00d8": "O", "\u0142": "l", "\u0141": "L", "\u00b0": "deg",
}


def to_ascii(text: str) -> str:
    """Plain ASCII: accents dropped (``Façade`` -> ``Facade``), anything else becomes ``?``."""
    if text.isascii():
        return text
    out = []
    for ch in text:
        if ch.isascii():
            out.append(ch)
        elif ch in _ASCII_SUBSTITUTES:
            out.append(_ASCII_SUBSTITUTES[ch])
        else:
            base = "".join(c for c in unicodedata.normalize("NFKD", ch)
                           if c.isascii() and not unicodedata.combining(c))
            out.append(base or "?")
    return "".join(out)


def graphemes(text: str) -> Iterator[tuple[str, int]]:
    """Each user-perceived character of ``text`` with the cells it takes."""
    if text.isascii():
        for ch in text:
            yield ch, 1 if ch >= " " else 0
        return
    spans, _ = split_graphemes(text)
    for start, end, cells in spans:
        yield text[start:end], cells


def width(text: str) -> int:
    """Cells ``text`` takes on a monospaced page."""
    if text.isascii():
        return len(text)
    return cell_len(text)


def head(text: str, columns: int) -> str:
    """The longest start of ``text`` that fits in ``columns`` cells (whole graphemes only)."""
    out, used = [], 0
    for piece, cells in graphemes(text):
        if used + cells > columns:
            break
        out.append(piece)
        used += cells
    return "".join(out)


def tail(text: str, columns: int) -> str:
    """The longest end of ``text`` that fits in ``columns`` cells (whole graphemes only)."""
    pieces = list(graphemes(text))
    out: list[str] = []
    used = 0
    for piece, cells in reversed(pieces):
        if used + cells > columns:
            break
        out.append(piece)
        used += cells
    return "".join(reversed(out))


def fit(text: str, columns: int, mark: str = "~") -> str:
    """``text`` cut to ``columns`` (ending in ``mark`` when cut) and padded with spaces."""
    if width(text) <= columns:
        return text + " " * (columns - width(text))
    cut = head(text, columns - width(mark)).rstrip() + mark
    return cut + " " * (columns - width(cut))


def abbreviate(text: str, columns: int, mark: str = "~") -> str:
    """``text`` shortened to ``columns``, keeping a short last part after a comma.

    Activity names often end in the place ("Excavate pad footings, grid A-C"); cutting the end
    off would make two rows read the same, so that part is kept when it takes at most half
    the room: ``Excavate pad~grid A-C``. Otherwise the end is cut (see :func:`fit`). Padded to
    ``columns`` like :func:`fit`.
    """
    if width(text) > columns and "," in text:
        before, place = text.rsplit(",", 1)
        place = place.strip()
        room = columns - width(place) - width(mark)
        if place and width(place) <= columns // 2 and room >= 3:
            short = fit(before, room, mark="").rstrip() + mark + place
            return short + " " * (columns - width(short))
    return fit(text, columns, mark)


def right(text: str, columns: int) -> str:
    """``text`` right-aligned in ``columns`` (cut from the left if too long)."""
    w = width(text)
    if w > columns:
        text = tail(text, columns)
        w = width(text)
    return " " * (columns - w) + text


def _head(word: str, columns: int) -> str:
    """The longest start of ``word`` that fits ``columns`` (at least one grapheme)."""
    return head(word, columns) or next(iter(graphemes(word)))[0]


def _words(text: str) -> Iterator[tuple[str, str]]:
    """``(space before, word)`` pairs of ``text``; tabs and line breaks count as spaces.

    Runs of spaces inside a line are kept, as Python's ``textwrap`` keeps them: a recorded
    note or a padded label ("Started    BLD-010") prints as it was written.
    """
    parts = re.split(r"(\s+)", text.strip())
    yield "", parts[0]
    for k in range(1, len(parts) - 1, 2):
        yield " " * len(parts[k]), parts[k + 1]


def wrap(text: str, columns: int, indent: str = "", first: str = "") -> list[str]:
    """Word-wrap ``text`` to ``columns``; ``first`` starts line one, ``indent`` the others.

    Words longer than a line are cut into pieces, so no line is wider than ``columns``
    (as long as ``columns`` leaves room for one character after the indent). Spaces where a
    line breaks are dropped; spaces inside a line are kept.
    """
    lines: list[str] = []
    prefix, line = first, ""
    for space, word in _words(text):
        if not word:
            continue
        candidate = f"{line}{space}{word}" if line else word
        if width(prefix) + width(candidate) <= columns:
            line = candidate
            continue
        if line:
            lines.append((prefix + line).rstrip())
            prefix, line = indent, ""
        while width(prefix) + width(word) > columns:
            piece = _head(word, columns - width(prefix))
            lines.append(prefix + piece)
            prefix, word = indent, word[len(piece):]
        line = word
    lines.append((prefix + line).rstrip())
    return lines
