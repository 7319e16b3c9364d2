"""Fitting text into fixed columns: display width, abbreviation, word wrap, plain ASCII.

The printed sheet is monospaced, so every line has to be measured in *columns*, not characters:
a wide East Asian character takes two columns and a combining accent none. ``--ascii`` sheets go
to old printers and code pages, so user text (site and activity names, readiness items) is
transliterated to plain ASCII *before* it is measured and cut.
"""

from __future__ import annotations

import unicodedata

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


def char_width(ch: str) -> int:
    """Columns one character takes on a monospaced page."""
    if ch.isascii():
        return 1 if ch >= " " else 0
    if unicodedata.combining(ch):
        return 0
    return 2 if unicodedata.east_asian_width(ch) in ("W", "F") else 1


def width(text: str) -> int:
    """Columns ``text`` takes."""
    if text.isascii():
        return len(text)
    return sum(char_width(ch) for ch in text)


def fit(text: str, columns: int, mark: str = "~") -> str:
    """``text`` cut to ``columns`` (ending in ``mark`` when cut) and padded with spaces."""
    if width(text) <= columns:
        return text + " " * (columns - width(text))
    room = columns - width(mark)
    out, used = [], 0
    for ch in text:
        w = char_width(ch)
        if used + w > room:
            break
        out.append(ch)
        used += w
    cut = "".join(out).rstrip() + mark
    return cut + " " * (columns - width(cut))


def abbreviate(text: str, columns: int, mark: str = "~") -> str:
    """``text`` shortened to ``columns``, keeping a short last part after a comma.

    Activity names often end in the place ("Excavate pad footings, grid A-C"); cutting the end
    off would make two rows read the same, so that part is kept when it takes at most half
    the room: ``Excavate pad~grid A-C``. Otherwise the end is cut (see :func:`fit`). Padded to
    ``columns`` like :func:`fit`.
    """
    if width(text) > columns and "," in text:
        head, tail = text.rsplit(",", 1)
        tail = tail.strip()
        room = columns - width(tail) - width(mark)
        if tail and width(tail) <= columns // 2 and room >= 3:
            short = fit(head, room, mark="").rstrip() + mark + tail
            return short + " " * (columns - width(short))
    return fit(text, columns, mark)


def right(text: str, columns: int) -> str:
    """``text`` right-aligned in ``columns`` (cut from the left if too long)."""
    w = width(text)
    return " " * (columns - w) + text if w <= columns else text[-columns:]


def _head(word: str, columns: int) -> str:
    """The longest start of ``word`` that fits ``columns`` (at least one character)."""
    used = 0
    for k, ch in enumerate(word):
        used += char_width(ch)
        if used > columns:
            return word[:max(k, 1)]
    return word


def wrap(text: str, columns: int, indent: str = "", first: str = "") -> list[str]:
    """Word-wrap ``text`` to ``columns``; ``first`` starts line one, ``indent`` the others.

    Words longer than a line are cut into pieces, so no line is wider than ``columns``
    (as long as ``columns`` leaves room for one character after the indent).
    """
    lines: list[str] = []
    prefix, line = first, ""
    for word in text.split():
        candidate = f"{line} {word}" if line else word
        if width(prefix) + width(candidate) <= columns:
            line = candidate
            continue
        if line:
            lines.append(prefix + line)
            prefix, line = indent, ""
        while width(prefix) + width(word) > columns:
            piece = _head(word, columns - width(prefix))
            lines.append(prefix + piece)
            prefix, word = indent, word[len(piece):]
        line = word
    lines.append((prefix + line).rstrip())
    return lines
