"""Site folder validation: every mistake a user can make is a SiteError that names the file,
the line and the activity, and the command line turns it into one line on stderr, exit 2.

The folders here are invented and tiny; each test breaks one thing in a valid pair of files.
"""

from __future__ import annotations

import subprocess
import sys
from datetime import date
from pathlib import Path

import pytest

from fieldlog.errors import DependencyLoopError, SiteError
from fieldlog.site.files import load_site
from fieldlog.site.model import LinkType
from tests.helpers.site_builder import (
    WEEKDAYS_AND_ALL_WEEK,
    Act,
    Lnk,
    changed,
    line_of,
    schedule_toml,
    site_toml,
    write_site,
)

# Every test reads its files with rtoml and with it hidden (tests/conftest.py).
pytestmark = pytest.mark.usefixtures("toml_reader")

SITE = site_toml(
    "Harbour depot",
    date(2026, 3, 2),
    calendars=WEEKDAYS_AND_ALL_WEEK,
    crews={"groundworks": 4},
)

SCHEDULE = schedule_toml(
    3,
    [
        Act("EXC", "Excavate", 3, crew={"groundworks": 3}),
        Act("POUR", "Pour footings", 1, after=("EXC",)),
        Act("CURE", "Cure", 7, calendar="allweek"),
    ],
    [Lnk("POUR", "CURE", "FS", lag=0)],
)


def write(folder: Path, site: str = SITE, schedule: str = SCHEDULE) -> Path:
    return write_site(folder, site, schedule)


def error_for(tmp_path: Path, site: str = SITE, schedule: str = SCHEDULE) -> SiteError:
    with pytest.raises(SiteError) as info:
        load_site(write(tmp_path / "site", site, schedule))
    return info.value


def test_a_valid_folder_loads(tmp_path):
    site = load_site(write(tmp_path / "ok"))
    assert [a.id for a in site.activities] == ["EXC", "POUR", "CURE"]
    assert site.revision == 3 and site.start == date(2026, 3, 2)
    assert [(lk.pred, lk.succ, lk.type) for lk in site.links] == [
        ("EXC", "POUR", LinkType.FS),
        ("POUR", "CURE", LinkType.FS),
    ]
    assert site.activity("CURE").calendar == "allweek"


def test_loading_the_same_files_again_gives_the_same_site(tmp_path):
    folder = write(tmp_path / "site")
    first = load_site(folder)
    assert load_site(folder) is first  # same bytes: remembered (the engine's caches too)
    (folder / "schedule.toml").write_text(SCHEDULE.replace("duration = 7", "duration = 8"))
    changed = load_site(folder)
    assert changed is not first and changed.activity("CURE").duration == 8


def test_bom_and_crlf_as_saved_by_notepad_load(tmp_path):
    folder = tmp_path / "notepad"
    folder.mkdir()
    for name, text in (("site.toml", SITE), ("schedule.toml", SCHEDULE)):
        (folder / name).write_bytes(b"\xef\xbb\xbf" + text.replace("\n", "\r\n").encode())
    assert load_site(folder) == load_site(write(tmp_path / "plain"))


def test_toml_syntax_error_names_file_and_line(tmp_path):
    bad = SCHEDULE.replace('name = "Pour footings"', 'name = "Pour footings')
    err = error_for(tmp_path, schedule=bad)
    assert err.file.name == "schedule.toml"
    assert err.line == line_of(bad, 'name = "Pour footings')
    assert "TOML syntax error" in str(err) and f"line {err.line}" in str(err)


@pytest.mark.parametrize("missing", ["site.toml", "schedule.toml"])
def test_missing_file(tmp_path, missing):
    folder = write(tmp_path / "site")
    (folder / missing).unlink()
    with pytest.raises(SiteError, match=f"{missing} is missing"):
        load_site(folder)


def test_not_a_folder(tmp_path):
    with pytest.raises(SiteError, match="not a site folder"):
        load_site(tmp_path / "nowhere")


def _assert_located(err: SiteError, text: str, fragment: str, activity: str, nth: int = 0):
    message = str(err)
    assert err.file.name == "schedule.toml" and "schedule.toml" in message
    assert err.line == line_of(text, fragment, nth) and f"line {err.line}" in message
    assert err.activity == activity and f"'{activity}'" in message
    assert "Fix:" in message or "fix" in message.lower()


def test_duplicate_id(tmp_path):
    bad = SCHEDULE.replace('id = "CURE"', 'id = "EXC"')
    err = error_for(tmp_path, schedule=bad)
    assert "duplicate activity id" in str(err)
    _assert_located(err, bad, 'id = "EXC"', "EXC", nth=1)


def test_unknown_id_in_after(tmp_path):
    bad = SCHEDULE.replace('after = ["EXC"]', 'after = ["EXCAVATE"]')
    err = error_for(tmp_path, schedule=bad)
    assert "unknown activity 'EXCAVATE'" in str(err)
    _assert_located(err, bad, 'id = "POUR"', "POUR")


def test_unknown_id_in_a_link(tmp_path):
    bad = SCHEDULE.replace('to = "CURE"', 'to = "CURING"')
    err = error_for(tmp_path, schedule=bad)
    _assert_located(err, bad, "[[link]]", "CURING")


@pytest.mark.parametrize(
    "old, new, words",
    [
        ('calendar = "allweek"', 'calendar = "sevenday"', "unknown calendar 'sevenday'"),
        ("crew = { groundworks = 3 }", "crew = { steelfixers = 3 }", "unknown crew 'steelfixers'"),
        ("duration = 3", "duration = -3", "negative duration"),
        ("duration = 3", 'duration = "three"', "whole number"),
    ],
)
def test_bad_activity_fields(tmp_path, old, new, words):
    bad = SCHEDULE.replace(old, new)
    err = error_for(tmp_path, schedule=bad)
    assert words in str(err)
    activity = "CURE" if "calendar" in old else "EXC"
    _assert_located(err, bad, f'id = "{activity}"', activity)


def test_bad_link_type(tmp_path):
    bad = SCHEDULE.replace('type = "FS"', 'type = "XS"')
    err = error_for(tmp_path, schedule=bad)
    assert "unknown type 'XS'" in str(err) and "FS, SS, FF or SF" in str(err)
    _assert_located(err, bad, "[[link]]", "CURE")


def test_absurd_lag_is_refused(tmp_path):
    """A lag of decades is a typo; refusing it keeps the calendars a sane size."""
    bad = SCHEDULE.replace("lag = 0", "lag = 99999")
    err = error_for(tmp_path, schedule=bad)
    assert "lag 99999 is not from -3650 to 3650" in str(err)
    _assert_located(err, bad, "[[link]]", "CURE")


def test_dependency_loop_names_every_activity_in_order(tmp_path):
    bad = SCHEDULE.replace('name = "Excavate"', 'name = "Excavate"\nafter = ["CURE"]')
    with pytest.raises(DependencyLoopError) as info:
        load_site(write(tmp_path / "site", schedule=bad))
    err = info.value
    assert err.cycle == ["EXC", "POUR", "CURE", "EXC"]
    assert "EXC -> POUR -> CURE -> EXC" in str(err)
    assert err.file.name == "schedule.toml"


def test_a_date_that_is_not_a_date(tmp_path):
    bad = SCHEDULE.replace('name = "Cure"', 'name = "Cure"\nstart_not_before = "next week"')
    err = error_for(tmp_path, schedule=bad)
    assert "'next week' is not a date" in str(err) and "YYYY-MM-DD" in str(err)
    assert err.activity == "CURE" and err.line == line_of(bad, "start_not_before")


def test_a_bad_site_date(tmp_path):
    bad = SITE.replace("start = 2026-03-02", 'start = "2026-02-30"')
    with pytest.raises(SiteError) as info:
        load_site(write(tmp_path / "site", site=bad))
    assert info.value.file.name == "site.toml"
    assert info.value.line == line_of(bad, "start =")


@pytest.mark.parametrize(
    "old, new, key",
    [
        ("duration = 1", "durtion = 1", "durtion"),
        ("lag = 0", "lags = 0", "lags"),
    ],
)
def test_unknown_keys_are_refused(tmp_path, old, new, key):
    bad = SCHEDULE.replace(old, new)
    err = error_for(tmp_path, schedule=bad)
    assert f"unknown key '{key}'" in str(err)
    assert err.line == line_of(bad, f"{key} =")
    if key == "durtion":
        assert err.activity == "POUR" and "'POUR'" in str(err)


def test_unknown_key_in_site_toml(tmp_path):
    bad = SITE.replace("available = 4", "availabel = 4")
    with pytest.raises(SiteError, match="unknown key 'availabel'") as info:
        load_site(write(tmp_path / "site", site=bad))
    assert info.value.line == line_of(bad, "availabel")


# --- the command line: one line on stderr, exit 2, never a traceback --------------------------


def run_cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "fieldlog", *args], capture_output=True, text=True, timeout=60
    )


@pytest.mark.parametrize("breakage", ["missing", "syntax", "loop", "unknown-key"])
def test_cli_refuses_a_bad_folder_with_one_line(tmp_path, breakage):
    folder = tmp_path / "site"
    if breakage == "syntax":
        write(folder, schedule=SCHEDULE.replace("revision = 3", "revision = = 3"))
    elif breakage == "loop":
        write(
            folder,
            schedule=SCHEDULE.replace('name = "Excavate"', 'name = "Excavate"\nafter = ["CURE"]'),
        )
    elif breakage == "unknown-key":
        write(folder, schedule=SCHEDULE.replace("duration = 1", "durtion = 1"))
    proc = run_cli("schedule", str(folder))
    assert proc.returncode == 2
    assert proc.stdout == ""
    assert "Traceback" not in proc.stderr
    assert len(proc.stderr.strip().splitlines()) == 1
    assert proc.stderr.startswith("fieldlog: ")


def test_cli_schedules_a_good_folder(tmp_path):
    proc = run_cli("schedule", str(write(tmp_path / "site")), "--format", "json")
    assert proc.returncode == 0, proc.stderr
    assert '"id": "CURE"' in proc.stdout and "Traceback" not in proc.stderr


# Every bad input the foundation issue lists, through the real command line (in-process, so
# the whole table costs milliseconds): exit code 2, one line on stderr naming the file, the
# activity where there is one, and what is wrong; nothing on stdout; no traceback.


def _schedule_case(case: str, old: str, new: str, words: str) -> tuple:
    """A row of BAD_INPUTS: the valid site with one change made to its schedule.toml."""
    return (case, SITE, changed(SCHEDULE, old, new), "schedule.toml", words)


def _site_case(case: str, old: str, new: str, words: str) -> tuple:
    """A row of BAD_INPUTS: the valid site with one change made to its site.toml."""
    return (case, changed(SITE, old, new), SCHEDULE, "site.toml", words)


BAD_INPUTS = [
    # (case, site text or None to omit, schedule text or None to omit, file, words)
    _schedule_case("toml syntax", "revision = 3", "revision = = 3", "TOML syntax error"),
    ("missing site.toml", None, SCHEDULE, "site.toml", "site.toml is missing"),
    ("missing schedule.toml", SITE, None, "schedule.toml", "schedule.toml is missing"),
    _schedule_case("duplicate id", 'id = "POUR"', 'id = "EXC"', "duplicate activity id 'EXC'"),
    _schedule_case(
        "unknown id in after", 'after = ["EXC"]', 'after = ["EXX"]', "unknown activity 'EXX'"
    ),
    _schedule_case("unknown id in link", 'to = "CURE"', 'to = "CURING"', "'CURING'"),
    _schedule_case(
        "unknown calendar",
        'calendar = "allweek"',
        'calendar = "7day"',
        "unknown calendar '7day'",
    ),
    _schedule_case(
        "unknown crew", "groundworks = 3", "steelfixers = 3", "unknown crew 'steelfixers'"
    ),
    _schedule_case("negative duration", "duration = 3", "duration = -3", "negative duration"),
    _schedule_case("bad link type", 'type = "FS"', 'type = "XS"', "unknown type 'XS'"),
    _schedule_case(
        "dependency loop",
        'name = "Excavate"',
        'name = "Excavate"\nafter = ["CURE"]',
        "dependency loop: EXC -> POUR -> CURE -> EXC",
    ),
    _site_case(
        "not a date",
        "start = 2026-03-02",
        'start = "next Monday"',
        "'next Monday' is not a date",
    ),
    _site_case("impossible date", "start = 2026-03-02", "start = 2026-02-30", "TOML syntax error"),
]


@pytest.mark.parametrize(
    "case, site, schedule, file, words", BAD_INPUTS, ids=[row[0] for row in BAD_INPUTS]
)
def test_every_bad_input_exits_2_with_one_clear_line(
    tmp_path, capsys, case, site, schedule, file, words
):
    from fieldlog.cli import main

    folder = tmp_path / "site"
    folder.mkdir()
    if site is not None:
        (folder / "site.toml").write_text(site, encoding="utf-8")
    if schedule is not None:
        (folder / "schedule.toml").write_text(schedule, encoding="utf-8")
    code = main(["schedule", str(folder)])
    out, err = capsys.readouterr()
    assert code == 2, case
    assert out == ""
    assert len(err.strip().splitlines()) == 1 and err.startswith("fieldlog: ")
    assert "Traceback" not in err
    assert file in err and words in err
    assert "Fix: " in err  # every message says what to do
