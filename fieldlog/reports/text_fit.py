"""Fitting text into fixed columns: display width, abbreviation, word wrap, plain ASCII.

The printed sheet and the daily report are monospaced, so every line is measured in *cells*
(columns), not characters: a wide East Asian character takes two cells (Unicode's East Asian
Width, UAX #11), a combining accent none, and an emoji sequence held together by zero width
joiners (a family, a profession), a flag (two regional indicators, or a black flag with tag
characters) or an emoji made wide by variation selector 16 is one picture two cells wide
however many characters it has (UTS #51). Text is cut between such pictures, never inside one.
tests/test_report_cells.py checks these widths against Rich's ``rich.cells``, the tables the
app's screen is drawn with; the core itself imports neither Rich nor Textual.
``--ascii`` sheets go to old printers and code pages, so user text (site and activity names,
readiness items) is transliterated to plain ASCII *before* it is measured and cut.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterator, Sequence

ZWJ = "\u200d"
VS16 = "\ufe0f"
"""Variation selector 16: show the character before it as an emoji (two cells)."""


def _extends(ch: str) -> bool:
    """True for a character that belongs to the picture before it: accents, variation
    selectors, skin-tone modifiers, tag characters, the joiner itself."""
    code = ord(ch)
    return (
        unicodedata.combining(ch) != 0
        or unicodedata.category(ch) in ("Mn", "Me", "Mc")
        or 0x1F3FB <= code <= 0x1F3FF
        or 0xE0020 <= code <= 0xE007F
        or ch == ZWJ
    )


def _regional(ch: str) -> bool:
    return 0x1F1E6 <= ord(ch) <= 0x1F1FF


def _cells(cluster: str) -> int:
    """Cells one user-perceived character takes."""
    base = cluster[0]
    if len(cluster) > 1 and (ZWJ in cluster or VS16 in cluster or _regional(base)):
        return 2
    if unicodedata.category(base) in ("Cc", "Cf", "Mn", "Me", "Zl", "Zp"):
        return 0
    return 2 if unicodedata.east_asian_width(base) in ("W", "F") else 1


_ASCII_SUBSTITUTES = {
    "\u2018": "'",
    "\u2019": "'",
    "\u201c": '"',
    "\u201d": '"',
    "\u2013": "-",
    "\u2014": "-",
    "\u2026": "...",
    "\u00a0": " ",
    "\u00df": "ss",
    "\u00e6": "ae",
    "\u00c6": "AE",
    "\u00f8": "o",
    "\u00d8": "O",
    "\u0142": "l",
    "\u0141": "L",
    "\u00b0": "deg",
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
            base = "".join(
                c
                for c in unicodedata.normalize("NFKD", ch)
                if c.isascii() and not unicodedata.combining(c)
            )
            out.append(base or "?")
    return "".join(out)


def graphemes(text: str) -> Iterator[tuple[str, int]]:
    """Each user-perceived character of ``text`` (a grapheme) with the cells it takes."""
    if text.isascii():
        for ch in text:
            yield ch, 1 if ch >= " " else 0
        return
    k, n = 0, len(text)
    while k < n:
        end = k + 1
        if _regional(text[k]) and end < n and _regional(text[end]):
            end += 1  # a flag: two regional indicators
        while end < n and _extends(text[end]):
            end += 2 if text[end] == ZWJ and end + 1 < n else 1  # a joiner takes the next one
        yield text[k:end], _cells(text[k:end])
        k = end


def plain(texts: Sequence[str]) -> bool:
    """Every text is printable ASCII: one cell per character (checked in C over all of them
    at once: a character that is not shows in the joined text)."""
    joined = "".join(texts)
    return joined.isascii() and joined.isprintable()


def width(text: str) -> int:
    """Cells ``text`` takes on a monospaced page (control characters take none)."""
    if text.isascii() and text.isprintable():
        return len(text)
    return sum(cells for _, cells in graphemes(text))


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
            prefix, word = indent, word[len(piece) :]
        line = word
    lines.append((prefix + line).rstrip())
    return lines
