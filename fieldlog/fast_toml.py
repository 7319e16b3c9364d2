"""A faster reader for large, valid TOML files: rtoml (compiled), with tomllib as the judge.

tomllib takes over half a second for a 10,000-activity schedule and about 12 s for 200,000;
rtoml reads the same text six times faster. It is optional: when it is not installed, or the
file is small (journal day files, settings, site.toml), tomllib reads everything as before.

tomllib stays the judge of what is valid TOML. rtoml follows a newer TOML draft and accepts a
few things tomllib refuses (a time without seconds, ``\\e`` and ``\\x`` escapes, newlines and
trailing commas inside inline tables), so a text that uses any of them is never given to
rtoml (:func:`newer_than_toml_1_0`, a cheap scan over the text with strings and comments
blanked). Whatever rtoml refuses is parsed again by tomllib, so a bad file gets exactly the
error and line it got before. Nesting is checked before either parser sees the text
(:func:`fieldlog.guarded_read.check_nesting`). tests/test_fast_toml.py compares both parsers
on every TOML file in the repository and on generated files.
"""

from __future__ import annotations

import re
from datetime import UTC, datetime, timezone
from types import ModuleType
from typing import Any

FAST_MIN_CHARS = 64 * 1024
"""Texts shorter than this go to tomllib: rtoml's import costs more than it saves on them."""

PIECE_CHARS = 1 << 20
"""A large text is read by rtoml in pieces of about this many characters (:func:`_in_pieces`)."""
_CUT_KEYS = ("activity", "link")
_CUTS = tuple(f"\n[[{key}]]\n" for key in _CUT_KEYS)
"""Header lines a text may be cut before: the arrays of tables a schedule is made of."""

_TIME_WITHOUT_SECONDS = re.compile(r"(?<![\d:+-])\d\d:\d\d(?!:)")
"""``07:32`` not followed by ``:SS`` and not an offset such as ``-07:00`` (strings and
comments already blanked)."""
_NEW_ESCAPE = re.compile(r"\\[ex]")
"""``\\e`` or ``\\x41`` (may also match an escaped backslash before e/x: tomllib then reads it)."""
_INNERMOST_INLINE_TABLE = re.compile(r"\{[^{}\n]*\}")
"""An inline table on one line with no table inside it."""
_TRAILING_COMMA_IN_TABLE = re.compile(r",\s*\}")
_OFFSET = re.compile(r"[zZ+-](?:(?<=\d[zZ])|(?<=\d[+-])\d\d:\d\d)")
"""The end of an offset date-time (``...00Z``, ``...00-07:00``) in blanked text: a digit, then
Z or a signed ``HH:MM``. It starts at the Z or the sign (the digit is a look-behind), so the
regex engine skips to those few characters instead of trying every digit of a big file."""

_NOT_LOADED: Any = object()
_parser: ModuleType | None = _NOT_LOADED


def rtoml_module() -> ModuleType | None:
    """rtoml when installed (imported at the first large file), else None."""
    global _parser
    if _parser is _NOT_LOADED:
        try:
            import rtoml
        except ImportError:
            _parser = None
        else:
            _parser = rtoml
    return _parser


def fast_loads(text: str, code: str) -> dict[str, Any] | None:
    """rtoml's reading of ``text``, or None when tomllib must read it.

    ``code`` is ``text`` with strings and comments blanked (see guarded_read). None when
    rtoml is not installed, the text is short, uses TOML newer than 1.0, or rtoml refuses
    it: the caller then parses with tomllib, which words the error.
    """
    if len(text) < FAST_MIN_CHARS:
        return None
    parser = rtoml_module()
    if parser is None or newer_than_toml_1_0(text, code):
        return None
    try:
        data = _in_pieces(parser, text, code)
    except ValueError:  # rtoml's TomlParsingError; tomllib re-reads and names the line
        return None
    if _OFFSET.search(code):
        _standard_offsets(data)
    return data


def _in_pieces(parser: ModuleType, text: str, code: str) -> dict[str, Any]:
    """rtoml's reading of ``text``, a large one read piece by piece.

    rtoml first builds its own tree of the whole document, then the Python values: on a
    30 MB schedule that took 5.6 s and 1 GB, read in pieces of about :data:`PIECE_CHARS`
    1.0 s and 390 MB (tests/benchmarks/bench_process.py --200k). A piece ends just before
    an ``[[activity]]`` or ``[[link]]`` header line; the pieces' values are joined as
    TOML joins the tables of one file: the arrays of those two names are extended, in file
    order, and any other top-level key must come from one piece only.

    The whole text is read at once instead when joining could differ from reading it
    whole: a header line inside a multi-line string (counted in ``code``, where strings and
    comments are blanked), the first piece already naming ``activity`` or ``link``, a later
    piece giving one of them as a table (``[activity.crew]`` right after a ``[[link]]``
    belongs to an earlier piece's activity) or repeating another key (a table defined twice
    or extended in two pieces). Whatever rtoml refuses goes to tomllib, as before.
    """
    if len(text) <= PIECE_CHARS or any(text.count(h) != code.count(h) for h in _CUTS):
        return dict(parser.loads(text))
    pieces = iter(_pieces(text))
    data: dict[str, Any] = parser.loads(next(pieces))
    if any(key in data for key in _CUT_KEYS):
        return dict(parser.loads(text))
    for piece in pieces:
        for key, value in parser.loads(piece).items():
            if key in _CUT_KEYS and isinstance(value, list):
                joined = data.setdefault(key, [])
                if not isinstance(joined, list):
                    return dict(parser.loads(text))
                joined.extend(value)
            elif key in data:
                return dict(parser.loads(text))
            else:
                data[key] = value
    return data


def _pieces(text: str) -> list[str]:
    """``text`` cut before its first ``[[activity]]`` or ``[[link]]`` header line (the first
    piece holds the top-level keys only), then into pieces of at least :data:`PIECE_CHARS`,
    each starting with such a header line."""
    pieces, start, end, least = [], 0, len(text), 0
    while start < end:
        found = [at for at in (text.find(h, start + least) for h in _CUTS) if at >= 0]
        cut = min(found) + 1 if found else end  # just after the newline before the header
        pieces.append(text[start:cut])
        start, least = cut, PIECE_CHARS
    return pieces


def newer_than_toml_1_0(text: str, code: str) -> bool:
    """Whether ``text`` may use something TOML 1.0 (tomllib) refuses but rtoml reads.

    Errs towards True (a false alarm only means tomllib reads the file).
    """
    # A time has a colon: most schedules have none, and the search is slow on a big text.
    if (":" in code and _TIME_WITHOUT_SECONDS.search(code)) or _NEW_ESCAPE.search(text):
        return True
    if "{" in code:
        if _TRAILING_COMMA_IN_TABLE.search(code):
            return True
        rest, previous = code, ""
        while rest != previous:  # peel one-line inline tables from the inside out
            previous, rest = rest, _INNERMOST_INLINE_TABLE.sub("", rest)
        if "{" in rest or "}" in rest:
            return True  # a table across lines (or unbalanced: tomllib says where)
    return False


def _standard_offsets(node: Any) -> None:
    """Give offset date-times the standard library's ``timezone``, as tomllib does.

    rtoml uses its own tzinfo class; the values compare equal, but a pickled cache entry or a
    printed repr would differ. Recursion is bounded: nesting was checked first.
    """
    items = node.items() if isinstance(node, dict) else enumerate(node)
    for key, value in items:
        if isinstance(value, datetime) and value.tzinfo is not None:
            node[key] = value.replace(tzinfo=_standard(value))
        elif isinstance(value, dict | list):
            _standard_offsets(value)


def _standard(value: datetime) -> timezone:
    offset = value.utcoffset()
    return UTC if not offset else timezone(offset)
