"""The sync plan and the file-name rules, checked against independent oracles.

* The plan's "grown file" rule is checked against Python's own ``bytes.startswith`` on
  hypothesis-generated histories of append-only files: whatever two sides hold, applying the
  plan never loses a byte, makes every non-conflicting pair equal, and a second plan is empty.
* File-name rules follow the Windows/FAT naming rules listed in the project's library notes,
  section 4.3 (verified there on Python 3.11 and 3.13 against ``ntpath.isreserved``, and on
  FAT32/exFAT images for the forbidden characters).
"""

from __future__ import annotations

import hashlib
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.sync.names import case_clashes, fold, is_ignored, portable_name_problem
from fieldlog.sync.plan import Direction, plan_logs
from fieldlog.sync.scan import LogFile


def _files(side: str, contents: dict[str, bytes]) -> dict[str, LogFile]:
    return {
        n: LogFile(n, Path(side, n), len(b), hashlib.sha256(b).hexdigest())
        for n, b in contents.items()
    }


def _plan(site: dict[str, bytes], target: dict[str, bytes]):
    sides = {"site": site, "target": target}

    def is_prefix(shorter: LogFile, longer: LogFile) -> bool:
        short_bytes = sides[shorter.path.parent.name][shorter.name]
        long_bytes = sides[longer.path.parent.name][longer.name]
        return long_bytes[: shorter.size] == short_bytes

    return plan_logs(_files("site", site), _files("target", target), is_prefix)


def _apply(site: dict[str, bytes], target: dict[str, bytes]):
    plan = _plan(site, target)
    site, target = dict(site), dict(target)
    for c in plan.copies:
        if c.direction is Direction.SEND:
            target[c.name] = site[c.name]
        else:
            site[c.name] = target[c.name]
    return plan, site, target


# Journal-like histories: a common start, then each side may append more.
_chunk = st.binary(min_size=0, max_size=6)
_history = st.tuples(_chunk, _chunk, _chunk, st.sampled_from(["both", "site", "target"]))
_names = st.sampled_from([f"2026-03-0{d}_tab-{x}.toml" for d in range(1, 4) for x in "ab"])


@settings(max_examples=300, deadline=None)
@given(st.dictionaries(_names, _history, max_size=6))
def test_plan_never_loses_bytes_and_converges(histories):
    site, target = {}, {}
    for name, (base, more_here, more_there, where) in histories.items():
        if where in ("both", "site"):
            site[name] = base + more_here
        if where in ("both", "target"):
            target[name] = base + more_there
    plan, new_site, new_target = _apply(site, target)
    conflicted = {c.name for c in plan.conflicts}
    for name in {*site, *target}:
        a, b = site.get(name), target.get(name)
        # Oracle: bytes.startswith, independent of the plan's hashing.
        compatible = a is None or b is None or a.startswith(b) or b.startswith(a)
        assert (name in conflicted) == (not compatible)
        if compatible:
            longest = max((x for x in (a, b) if x is not None), key=len)
            assert new_site[name] == new_target[name] == longest
        else:
            assert (new_site[name], new_target[name]) == (a, b)  # nothing overwritten
        for before, after in ((a, new_site.get(name)), (b, new_target.get(name))):
            assert before is None or after.startswith(before)  # never a byte lost
    second = _plan(new_site, new_target)
    assert not second.copies and {c.name for c in second.conflicts} == conflicted


def test_plan_directions_and_grown_flags():
    site = {"2026-03-02_tab-a.toml": b"AB", "2026-03-03_tab-a.toml": b"X"}
    target = {"2026-03-02_tab-a.toml": b"A", "2026-03-02_tab-b.toml": b"Q"}
    plan = _plan(site, target)
    got = sorted((c.name, c.direction.value, c.grown) for c in plan.copies)
    assert got == [
        ("2026-03-02_tab-a.toml", "send", True),
        ("2026-03-02_tab-b.toml", "receive", False),
        ("2026-03-03_tab-a.toml", "send", False),
    ]


# --- names ------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("name", "fragment"),
    [
        ("2026-03-02_tab-01.toml", None),
        ("a:b.toml", "':'"),  # drive / alternate stream separator on Windows
        ("a<b.toml", "'<'"),
        ("a>b.toml", "'>'"),
        ('a"b.toml', "'\"'"),
        ("a|b.toml", "'|'"),
        ("a?b.toml", "'?'"),
        ("a*b.toml", "'*'"),
        ("a\\b.toml", "'\\\\'"),
        ("a/b.toml", "'/'"),
        ("a\x01b.toml", "'\\x01'"),  # control characters
        ("notes.", "ends with"),
        ("notes ", "ends with"),
        ("CON", "reserves"),
        ("con.toml", "reserves"),
        ("Aux.txt", "reserves"),
        ("nul .toml", "reserves"),
        ("LPT1.toml", "reserves"),
        ("COM9.log", "reserves"),
        ("COM¹.toml", "reserves"),
        ("CONIN$", "reserves"),
        ("COM10.toml", None),
        ("console.toml", None),
        ("..", "dot name"),
        (".", "dot name"),
        ("", "empty"),
        ("..evil.toml", "leave the folder"),
        ("e\u0301t\u00e9.toml", "NFC"),  # decomposed e + combining acute
        ("x" * 251 + ".toml", "longer than 255"),
        ("x" * 250 + ".toml", None),
    ],
)
def test_portable_name_rules(name, fragment):
    problem = portable_name_problem(name)
    if fragment is None:
        assert problem is None
    else:
        assert problem is not None and fragment in problem


def test_case_clashes_and_fold():
    names = [
        "2026-03-02_tab-a.toml",
        "2026-03-02_TAB-A.toml",
        "2026-03-02_tab-b.toml",
        "\u00e9.toml",
        "e\u0301.toml",
    ]
    clashes = case_clashes(names)
    assert sorted(clashes.values()) == [
        ("2026-03-02_TAB-A.toml", "2026-03-02_tab-a.toml"),
        ("e\u0301.toml", "\u00e9.toml"),
    ]
    assert fold("2026-03-02_TAB-A.toml") == fold("2026-03-02_tab-a.toml")


@pytest.mark.parametrize(
    ("name", "ignored"),
    [
        (".~2026-03-02_tab-a.toml.x1y2.tmp", True),  # the journal's temporary file
        (".fieldlog-sync-0a1b2c.tmp", True),  # ours
        (".tab-a.lock", True),
        (".DS_Store", True),
        ("Thumbs.db", True),
        ("desktop.ini", True),
        ("..\\evil.toml", False),
        ("2026-03-02_tab-a.toml", False),
    ],
)
def test_ignored_names(name, ignored):
    assert is_ignored(name) is ignored
