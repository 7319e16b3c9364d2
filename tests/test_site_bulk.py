"""The bulk checks (fieldlog/site/bulk.py) build exactly what the precise checks build, and
leave every broken file to the precise checks, so each error keeps its exact words.

The reference here is the precise, one-activity-at-a-time path of fieldlog/site/schema.py run
with the bulk path switched off: for every file, valid or broken, both runs must give the same
site or the same error text (file, line, activity id, fix).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

from fieldlog.engine.topology import link_ends
from fieldlog.errors import FieldlogError
from fieldlog.site import bulk, schema
from fieldlog.site.toml_file import SCHEDULE_FILE, SITE_FILE, parse_toml

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE / "benchmarks"))
from synthetic import schedule_toml, site_toml, synthetic_site  # noqa: E402

SITE = """\
[site]
name = "Invented depot extension"
start = 2026-03-02
calendar = "weekdays"

[calendars.weekdays]
workdays = ["mon", "tue", "wed", "thu", "fri"]

[calendars.allweek]
workdays = ["mon", "tue", "wed", "thu", "fri", "sat", "sun"]

[crews.groundworks]
available = 6
"""

SCHEDULE = """\
revision = 3

[[activity]]
id = "A1"
name = "  Strip topsoil "
duration = 3
crew = { groundworks = 4 }

[[activity]]
id = "A2"
name = "Dig footings"
duration = 5
calendar = "allweek"
after = ["A1"]
start_not_before = 2026-03-09

[[activity]]
id = "A3"
name = "Pour footings"
duration = 2
after = ["A2", "A1"]
finish_not_after = 2026-04-30

[[activity]]
id = "M1"
name = "Footings done"
duration = 0
after = ["A3"]

[[link]]
from = "A1"
to = "M1"
type = "SS"
lag = 2

[[link]]
from = "A2"
to = "M1"
type = "FF"
lag = -1
"""

BROKEN = {
    "duplicate id": ('id = "A2"', 'id = "A1"'),
    "bad id": ('id = "A2"', 'id = "-A2"'),
    "id not text": ('id = "A2"', "id = 2"),
    "unknown key": ("duration = 5", "durtion = 5"),
    "blank name": ('name = "Dig footings"', 'name = "  "'),
    "name not text": ('name = "Dig footings"', "name = 7"),
    "long name": ('name = "Dig footings"', 'name = "' + "x" * 4001 + '"'),
    "id differing only in case": ('id = "A2"', 'id = "a1"'),
    "escape in a name": ('name = "Dig footings"', 'name = "Dig \\u001b[2J footings"'),
    "direction override in a name": ('name = "Dig footings"', 'name = "Dig \u202e footings"'),
    "C1 control in a name": ('name = "Dig footings"', 'name = "Dig \\u009b footings"'),
    "no-break space in a name (valid)": ('name = "Dig footings"', 'name = "Dig\u00a0footings"'),
    "true duration": ("duration = 5", "duration = true"),
    "negative duration": ("duration = 5", "duration = -5"),
    "huge duration": ("duration = 5", "duration = 99999"),
    "text duration": ("duration = 5", 'duration = "5"'),
    "unknown calendar": ('calendar = "allweek"', 'calendar = "nights"'),
    "calendar a list": ('calendar = "allweek"', 'calendar = ["allweek"]'),
    "unknown crew": ("crew = { groundworks = 4 }", "crew = { roofers = 4 }"),
    "crew not a table": ("crew = { groundworks = 4 }", "crew = 4"),
    "crew true": ("crew = { groundworks = 4 }", "crew = { groundworks = true }"),
    "crew negative": ("crew = { groundworks = 4 }", "crew = { groundworks = -1 }"),
    "crew huge": ("crew = { groundworks = 4 }", "crew = { groundworks = 200000 }"),
    "date as text": ("start_not_before = 2026-03-09", 'start_not_before = "2026-03-09"'),
    "date as bad text": ("start_not_before = 2026-03-09", 'start_not_before = "soon"'),
    "date-time": ("start_not_before = 2026-03-09", "start_not_before = 2026-03-09T07:00:00"),
    "date far away": ("finish_not_after = 2026-04-30", "finish_not_after = 2126-04-30"),
    "date a number": ("finish_not_after = 2026-04-30", "finish_not_after = 5"),
    "after not a list": ('after = ["A1"]', 'after = "A1"'),
    "after a number": ('after = ["A1"]', "after = [1]"),
    "after unknown": ('after = ["A1"]', 'after = ["A9"]'),
    "after itself": ('after = ["A1"]', 'after = ["A2"]'),
    "link unknown key": ('type = "SS"', 'kind = "SS"'),
    "link unknown from": ('from = "A1"', 'from = "A9"'),
    "link from missing": ('from = "A1"\n', ""),
    "link to itself": ('to = "M1"\ntype = "SS"', 'to = "A1"\ntype = "SS"'),
    "link lower-case type": ('type = "SS"', 'type = "ss"'),
    "link unknown type": ('type = "SS"', 'type = "XX"'),
    "link type a list": ('type = "SS"', 'type = ["SS"]'),
    "link lag true": ("lag = 2", "lag = true"),
    "link lag huge": ("lag = 2", "lag = 4000"),
    "link lead huge": ("lag = -1", "lag = -4000"),
}


def _files(tmp_path: Path, site_text: str, schedule_text: str):
    return (
        parse_toml(tmp_path / SITE_FILE, site_text.encode()),
        parse_toml(tmp_path / SCHEDULE_FILE, schedule_text.encode()),
    )


def _outcome(files, monkeypatch: pytest.MonkeyPatch, *, use_bulk: bool) -> object:
    """The Site built, or the error's text and type (``use_bulk`` False: precise path only)."""
    with monkeypatch.context() as m:
        if not use_bulk:
            m.setattr(schema, "bulk_schedule", lambda *args: None)
        try:
            return schema.build_site(*files)
        except FieldlogError as exc:
            return (type(exc).__name__, exc.message)
        except TypeError as exc:  # an unhashable value (a list as a calendar name)
            return ("TypeError", str(exc))


def _bulk_answer(files) -> object:
    site_file, schedule_file = files
    site = schema.build_site(*_files(Path("."), SITE, SCHEDULE))
    return bulk.bulk_schedule(
        schedule_file.data, dict(site.calendars), dict(site.crews), site.calendar, site.start
    )


def test_the_valid_example_is_built_in_bulk_and_equals_the_precise_build(tmp_path, monkeypatch):
    files = _files(tmp_path, SITE, SCHEDULE)
    assert _bulk_answer(files) is not None  # the fast path is the one taken
    built = _outcome(files, monkeypatch, use_bulk=True)
    assert built == _outcome(files, monkeypatch, use_bulk=False)
    assert built.activities[0].name == "Strip topsoil"
    assert [(lk.pred, lk.succ, lk.type.value, lk.lag) for lk in built.links] == [
        ("A1", "A2", "FS", 0),
        ("A2", "A3", "FS", 0),
        ("A1", "A3", "FS", 0),
        ("A3", "M1", "FS", 0),
        ("A1", "M1", "SS", 2),
        ("A2", "M1", "FF", -1),
    ]


@pytest.mark.parametrize("case", sorted(BROKEN))
def test_a_doubtful_file_goes_to_the_precise_checks_with_the_same_outcome(
    case, tmp_path, monkeypatch
):
    old, new = BROKEN[case]
    assert old in SCHEDULE
    files = _files(tmp_path, SITE, SCHEDULE.replace(old, new, 1))
    assert _bulk_answer(files) is None
    assert _outcome(files, monkeypatch, use_bulk=True) == _outcome(
        files, monkeypatch, use_bulk=False
    )


@pytest.mark.parametrize("n", [1, 50, 2000])
def test_synthetic_schedules_build_the_same_both_ways(n, tmp_path, monkeypatch):
    site = synthetic_site(n, seed=n)
    files = _files(tmp_path, site_toml(site), schedule_toml(site))
    assert _bulk_answer(files) is not None
    built = _outcome(files, monkeypatch, use_bulk=True)
    assert built == _outcome(files, monkeypatch, use_bulk=False)
    assert set(built.links) == set(site.links) and built.activities == site.activities


def test_an_empty_schedule_builds_the_same_both_ways(tmp_path, monkeypatch):
    files = _files(tmp_path, SITE, "revision = 1\n")
    assert _outcome(files, monkeypatch, use_bulk=True) == _outcome(
        files, monkeypatch, use_bulk=False
    )


def test_a_loop_is_named_the_same_both_ways(tmp_path, monkeypatch):
    files = _files(tmp_path, SITE, SCHEDULE.replace('after = ["A1"]', 'after = ["A1", "M1"]', 1))
    outcome = _outcome(files, monkeypatch, use_bulk=True)
    assert outcome == _outcome(files, monkeypatch, use_bulk=False)
    assert outcome[0] == "DependencyLoopError"


def test_the_ends_found_in_bulk_are_the_links_own_and_share_the_id_strings(tmp_path):
    """The bulk checks give each link's ends as positions (the loop test and the engine's
    network use them); they must be the positions a lookup of every end finds, and the
    links must hold the activities' very id strings."""
    files = _files(tmp_path, SITE, SCHEDULE)
    built = _bulk_answer(files)
    assert built is not None
    ids = [a.id for a in built.activities]
    assert built.pred == [ids.index(lk.pred) for lk in built.links]
    assert built.succ == [ids.index(lk.succ) for lk in built.links]
    assert all(lk.pred is ids[k] for lk, k in zip(built.links, built.pred, strict=True))
    assert all(lk.succ is ids[k] for lk, k in zip(built.links, built.succ, strict=True))
    site, ends = schema.build_site_and_ends(*files)
    slow = link_ends({a.id: k for k, a in enumerate(site.activities)}, site.links)
    assert ends.pred.tolist() == slow.pred.tolist() == built.pred
    assert ends.succ.tolist() == slow.succ.tolist() == built.succ
    assert ends.level is not None and ends.level.tolist() == slow.level.tolist()
