"""rtoml and tomllib read the same files to the same values; what tomllib refuses stays refused.

The reference is tomllib (the standard library's TOML 1.0 reader): for every TOML file in the
repository and the sample site, and for generated site, schedule and journal-like files, the
fast reader (fieldlog/fast_toml.py, rtoml) must give the same values of the same types in the
same order, or hand the text back to tomllib. A text tomllib refuses (including what only a
newer TOML draft allows, which rtoml reads) must be refused with tomllib's own message.
"""

from __future__ import annotations

import math
import tomllib
from datetime import UTC, date, datetime, time, timedelta, timezone
from pathlib import Path
from typing import Any

import pytest
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fieldlog import fast_toml
from fieldlog.errors import UnreadableToml
from fieldlog.guarded_read import check_nesting, loads

ROOT = Path(__file__).resolve().parent.parent
rtoml = pytest.importorskip("rtoml")


@pytest.fixture(autouse=True)
def _every_size(monkeypatch: pytest.MonkeyPatch) -> None:
    """The fast path for every text here, not only large ones."""
    monkeypatch.setattr(fast_toml, "FAST_MIN_CHARS", 0)


def same(a: Any, b: Any) -> bool:
    """Equal values of identical types, keys in the same order (NaN equals NaN)."""
    if type(a) is not type(b):
        return False
    if isinstance(a, dict):
        return list(a) == list(b) and all(same(a[k], b[k]) for k in a)
    if isinstance(a, list):
        return len(a) == len(b) and all(same(x, y) for x, y in zip(a, b, strict=True))
    if isinstance(a, float) and math.isnan(a):
        return math.isnan(b)
    if isinstance(a, datetime | time):
        return a == b and type(a.tzinfo) is type(b.tzinfo) and repr(a) == repr(b)
    return bool(a == b)


def fast(text: str) -> dict[str, Any] | None:
    return fast_toml.fast_loads(text, check_nesting(text))


def agree(text: str) -> None:
    """The checked reader gives tomllib's values, or tomllib's error for a refused text."""
    try:
        expected = tomllib.loads(text)
    except (tomllib.TOMLDecodeError, ValueError) as exc:
        with pytest.raises(UnreadableToml) as refused:
            loads(text, "schedule.toml", "schedule.toml")
        if isinstance(exc, tomllib.TOMLDecodeError):
            assert str(exc).startswith(refused.value.problem), (str(exc), refused.value)
        return
    got = fast(text)
    if got is not None:
        assert same(got, expected), text
    assert same(loads(text, "schedule.toml", "schedule.toml"), expected)


REPO_FILES = sorted(
    p.relative_to(ROOT)
    for p in ROOT.rglob("*.toml")
    if not any(part.startswith(".") for part in p.relative_to(ROOT).parts)
)


def test_the_repository_has_toml_files_to_compare():
    assert len(REPO_FILES) >= 10
    assert any(p.parts[0] == "sample_sites" for p in REPO_FILES)


@pytest.mark.parametrize("name", REPO_FILES, ids=str)
def test_every_toml_file_in_the_repository(name: Path):
    text = (ROOT / name).read_bytes().decode("utf-8-sig")
    agree(text)
    assert fast(text) is not None or fast_toml.newer_than_toml_1_0(text, check_nesting(text))


# What a newer TOML draft allows and rtoml reads, but TOML 1.0 (tomllib) refuses (the TOML
# 1.0.0 specification, toml.io; the cases were found by comparing the two readers).
NEWER_THAN_1_0 = [
    "a = 07:32",
    "a = 1979-05-27 07:32",
    "a = 1979-05-27T07:32Z",
    'a = "\\e"',
    'a = "\\x41"',
    'a = """\\e"""',
    "a = {x = 1,}",
    "a = {\nx = 1\n}",
    "a = {x = 1,\ny = 2}",
    "a = {b = {x = 1},\ny = 2}",
    "a = [{x = 1,\n}]",
]


@pytest.mark.parametrize("text", NEWER_THAN_1_0)
def test_what_only_a_newer_toml_allows_stays_refused(text: str):
    with pytest.raises(tomllib.TOMLDecodeError):
        tomllib.loads(text)
    assert fast_toml.newer_than_toml_1_0(text, check_nesting(text))
    agree(text)


# Edge cases of the TOML 1.0.0 specification (toml.io, the examples of each section).
SPEC_CASES = [
    "a = 1979-05-27T07:32:00Z",
    "a = 1979-05-27T00:32:00.999999-07:00",
    "a = 1979-05-27T07:32:00+00:00",
    "a = 1979-05-27 07:32:00",
    "a = 1979-05-27",
    "a = 07:32:00.999999",
    "a = 07:32:00.1234567",
    "a = [1979-05-27, 07:32:00, 1979-05-27T07:32:00-08:00]",
    "a = inf\nb = -inf\nc = nan\nd = -0.0\ne = 6.626e-34\nf = 1e400",
    "a = 0xDEAD_BEEF\nb = 0o755\nc = 0b1101\nd = 1_000\ne = +99\nf = 99999999999999999999",
    "a = \"\\u00e9\\U0001F600\\t\"\nb = 'C:\\x\\e'\nc = \"\"\"\nx\\\n   y\"\"\"\nd = '''\nz'''",
    "[[a]]\nx = 1\n[[a.b]]\ny = 2\n[[a]]\nx = 3",
    "[a.b.c]\nx = 1\n[a]\ny = 2",
    "a.b = 1\na.c = {d = 2}",
    "a = 1\na = 2",
    "[a]\nx = 1\n[a]\ny = 2",
    "a = {x = 1}\na.y = 2",
    "a = []\n[[a]]",
    "a = 01",
    "a = 1__0",
    "a = 2023-02-29",
    "a = 1979-05-27T07:32:60",
    'a = "\x00"',
    "a = 1\rb = 2",
    "ä = 1",
    "a = 1" + "0" * 5000,
    "a = [1, 'x', [2.5, {y = true}]]",
    "'a b' = 1\n\"\" = 2",
    "b = 1\na = 2\n[z]\n[c]",
]


@pytest.mark.parametrize("text", SPEC_CASES)
def test_toml_specification_cases(text: str):
    agree(text)


def test_offset_date_times_carry_the_standard_timezone():
    big = (
        "".join(f"x{k} = 1\n" for k in range(20))
        + "a = 1979-05-27T00:32:00-07:00\nb = [1979-05-27T07:32:00Z]\n"
    )
    got = fast(big)
    assert got is not None
    assert type(got["a"].tzinfo) is timezone and got["a"].utcoffset() == timedelta(hours=-7)
    assert got["b"][0].tzinfo is UTC


def test_deep_nesting_never_reaches_the_compiled_reader(monkeypatch: pytest.MonkeyPatch):
    class Refuses:
        @staticmethod
        def loads(text: str) -> dict:
            raise AssertionError("the nesting pre-scan must refuse first")

    monkeypatch.setattr(fast_toml, "_parser", Refuses)
    for text in ("a = " + "[" * 100_000, "a = " + "{b = " * 40 + "1" + "}" * 40):
        with pytest.raises(UnreadableToml, match="nested"):
            loads(text, "schedule.toml", "schedule.toml")


# --- generated files ----------------------------------------------------------------------

ids = st.from_regex(r"[A-Z]{1,3}-[0-9]{1,4}", fullmatch=True)
text_values = st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=30)
days = st.dates(date(1900, 1, 1), date(2199, 12, 31))
stamps = st.datetimes(datetime(1900, 1, 1), datetime(2199, 12, 31)).map(
    lambda d: d.replace(tzinfo=timezone(timedelta(minutes=15 * (d.minute % 8 - 4))))
)
activity = st.fixed_dictionaries(
    {"id": ids, "name": text_values, "duration": st.integers(0, 3650)},
    optional={
        "calendar": st.sampled_from(["weekdays", "allweek"]),
        "after": st.lists(ids, max_size=3),
        "start_not_before": days,
        "crew": st.dictionaries(st.sampled_from(["carpenters", "fixers"]), st.integers(0, 99)),
    },
)
link = st.fixed_dictionaries(
    {"from": ids, "to": ids, "type": st.sampled_from(["FS", "SS", "FF", "SF"])},
    optional={"lag": st.integers(-3650, 3650)},
)
schedule = st.fixed_dictionaries(
    {
        "revision": st.integers(0, 2**31 - 1),
        "activity": st.lists(activity, max_size=12),
        "link": st.lists(link, max_size=6),
    }
)
entry = st.fixed_dictionaries(
    {
        "seq": st.integers(1, 2**31 - 1),
        "day": days,
        "written": stamps,
        "note": text_values,
        "days": st.one_of(st.integers(-(2**63), 2**63 - 1), st.floats(allow_nan=False)),
    }
)
journal = st.fixed_dictionaries({"entry": st.lists(entry, max_size=6)})


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.one_of(schedule, journal), st.booleans())
def test_generated_files_read_alike(doc: dict, multiline: bool):
    text = tomli_w.dumps(doc, multiline_strings=multiline)
    agree(text)
    got = fast(text)
    assert got is not None or fast_toml.newer_than_toml_1_0(text, check_nesting(text))


@settings(max_examples=300, deadline=None)
@given(schedule, st.data())
def test_damaged_files_are_refused_as_tomllib_refuses_them(doc: dict, data: st.DataObject):
    """A generated file with a few characters inserted, replaced or removed: both readers
    agree, and whatever tomllib refuses is refused with tomllib's message."""
    text = tomli_w.dumps(doc)
    for _ in range(data.draw(st.integers(1, 3))):
        at = data.draw(st.integers(0, len(text)))
        piece = data.draw(st.sampled_from(list("[]{}=,.\"'#\n\\:-+ xe0Z") + ["", "\r"]))
        cut = data.draw(st.integers(0, 2))
        text = text[:at] + piece + text[at + cut :]
    agree(text)


# --- a large text read in pieces (fast_toml._in_pieces) -------------------------------------
# The reference is still tomllib reading the whole text at once: joining the pieces' values
# must give exactly its values, and a text it refuses must stay refused with its message.


def _big_schedule() -> str:
    from tests.helpers.site_builder import Act, Lnk, schedule_toml

    acts = [
        Act(f"P{k:03d}", f"Panel {k} #{k % 3}", k % 7, after=(f"P{k - 1:03d}",) if k else ())
        for k in range(60)
    ]
    links = [Lnk(f"P{k:03d}", f"P{k + 2:03d}", "SS", lag=1) for k in range(0, 58, 5)]
    return schedule_toml(3, acts, links)


@pytest.fixture
def small_pieces(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(fast_toml, "PIECE_CHARS", 150)


def test_a_schedule_read_in_pieces_equals_one_read_whole(small_pieces):
    text = _big_schedule()
    assert len(fast_toml._pieces(text)) > 10
    assert "".join(fast_toml._pieces(text)) == text
    got = fast(text)
    assert got is not None and same(got, tomllib.loads(text))


def _with_activities(head: str, tail: str = "") -> str:
    body = "".join(f'\n[[activity]]\nid = "A{k}"\nduration = {k}\n' for k in range(30))
    links = "".join(f'\n[[link]]\npred = "A{k}"\nsucc = "A{k + 1}"\n' for k in range(30))
    return head + body + links + tail


# Texts whose pieces each read alone but whose joining could differ from the whole text
# (the TOML 1.0.0 specification, toml.io: a table is defined once, an array of tables is
# extended by its headers only, a sub-table belongs to the last table of its array).
ACROSS_PIECES = [
    _with_activities("[settings]\nx = 1\n", "\n[settings]\ny = 2\n"),  # defined twice
    _with_activities("[settings]\nx = 1\n", "\n[settings.more]\ny = 2\n"),  # valid
    _with_activities("", "\n[activity.crew]\nsteel = 2\n"),  # the last activity's: valid
    _with_activities("activity = [{id = 'Z'}]\n"),  # a static array extended: refused
    _with_activities("[activity]\nid = 'Z'\n"),  # a table made an array: refused
    _with_activities('note = """\n[[activity]]\nid = "fake"\n"""\n'),  # a header in a string
    _with_activities("", '\n[[link]]\npred = "A1"\npred = "A2"\n'),  # a key twice: refused
]


@pytest.mark.parametrize("text", ACROSS_PIECES)
def test_joining_pieces_reads_what_tomllib_reads(small_pieces, text: str):
    agree(text)
