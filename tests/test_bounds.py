"""Every bound of fieldlog.bounds, at the limit and one past it, through the command line.

At the limit the command succeeds (exit 0); one past it the command refuses with exit 2 and
one line on stderr that names the file, the line or activity, and the fix. The limits
themselves are fieldlog's own (documented in fieldlog/bounds.py); the "at the limit and one
past" pattern is boundary-value analysis (common practice in software testing).
"""

from __future__ import annotations

from datetime import date, timedelta
from pathlib import Path

import pytest

from fieldlog import bounds
from fieldlog.cli import main
from fieldlog.commands.arguments import shift_day
from fieldlog.errors import OutOfBounds
from fieldlog.guarded_read import check_nesting
from fieldlog.journal.device import DEVICE_FILE
from tests.helpers.journal_helpers import AUTHOR, make_site

# Every test reads its files with rtoml and with it hidden (tests/conftest.py).
pytestmark = pytest.mark.usefixtures("toml_reader")

TODAY = "2026-09-25"


def _edit(folder: Path, name: str, old: str, new: str) -> None:
    path = folder / name
    text = path.read_text()
    assert old in text, old
    path.write_text(text.replace(old, new, 1))


def _run(capsys: pytest.CaptureFixture, *argv: str) -> tuple[int, str, str]:
    try:
        code = main(list(argv))
    except SystemExit as exc:  # argparse refuses a bad option value this way
        code = int(exc.code or 0)
    out, err = capsys.readouterr()
    return code, out, err


def _refused(capsys: pytest.CaptureFixture, *argv: str) -> str:
    code, _, err = _run(capsys, *argv)
    assert code == 2, err
    assert len(err.strip().splitlines()) == 1, err
    assert "Traceback" not in err and err.startswith("fieldlog: "), err
    return err


SITE_CASES = [
    # (file, old text, text at the limit, text one past, words in the refusal)
    (
        "site.toml",
        "start = 2026-09-07\nfinish_by = 2026-10-16",
        "start = 1900-01-01",
        "start = 1899-12-31",
        "outside 1900-01-01 to 2199-12-31",
    ),
    (
        "site.toml",
        "finish_by = 2026-10-16",
        "finish_by = 2076-09-07",
        "finish_by = 2076-09-08",
        "more than 50 years from the site start",
    ),
    (
        "site.toml",
        "available = 6",
        "available = 100000",
        "available = 100001",
        "not 0 to 100,000 people",
    ),
    (
        "schedule.toml",
        "revision = 3",
        "revision = 2147483647",
        "revision = 2147483648",
        "revision 2147483648 is not 0 to 2,147,483,647",
    ),
    (
        "schedule.toml",
        "duration = 4",
        "duration = 3650",
        "duration = 3651",
        "duration 3651 is not from 0 to 3650 working days",
    ),
    (
        "schedule.toml",
        'name = "Excavate base"',
        'name = "' + "x" * 4000 + '"',
        'name = "' + "x" * 4001 + '"',
        "4,001 characters, more than 4,000",
    ),
]


@pytest.mark.parametrize(
    "name, old, at_limit, past, words",
    SITE_CASES,
    ids=["start", "finish_by", "headcount", "revision", "duration", "name"],
)
def test_site_bounds(tmp_path, capsys, name, old, at_limit, past, words):
    folder = make_site(tmp_path / "site")
    _edit(folder, name, old, at_limit)
    code, _, err = _run(capsys, "schedule", str(folder), "--format", "json")
    assert code == 0, err
    _edit(folder, name, at_limit, past)
    err = _refused(capsys, "schedule", str(folder))
    assert words in err and name in err and "line " in err


@pytest.mark.parametrize("lag, ok", [(3650, True), (3651, False), (-3650, True), (-3651, False)])
def test_lag_bound(tmp_path, capsys, lag, ok):
    folder = make_site(tmp_path / "site")
    _edit(folder, "schedule.toml", 'after = ["CUR-010"]', "")
    with open(folder / "schedule.toml", "a") as f:
        f.write(f'\n[[link]]\nfrom = "CUR-010"\nto = "WAL-010"\nlag = {lag}\n')
    code, _, err = _run(capsys, "schedule", str(folder), "--format", "json")
    if ok:
        assert code == 0, err
    else:
        assert code == 2 and "WAL-010" in err and "lag" in err and "Fix:" in err


RECORD_CASES = [
    # (arguments, at the limit, one past, words in the refusal)
    (["remaining", "EXC-010"], "3650", "3651", "days 3651 is above 3650"),
    (
        ["crew", "--trade", "groundworks", "--headcount"],
        "100000",
        "100001",
        "headcount 100001 is above 100000",
    ),
    (["note"], "x" * 4000, "x" * 4001, "4,001 characters, more than 4,000"),
]


@pytest.mark.parametrize(
    "args, at_limit, past, words", RECORD_CASES, ids=["remaining", "headcount", "text"]
)
def test_record_bounds(tmp_path, capsys, args, at_limit, past, words):
    folder = make_site(tmp_path / "site")
    common = ["--on", "2026-09-08", "--today", TODAY, "--author", AUTHOR]
    if args[0] == "remaining":
        assert _run(capsys, "record", str(folder), "started", "EXC-010", *common)[0] == 0
    code, _, err = _run(capsys, "record", str(folder), *args, at_limit, *common)
    assert code == 0, err
    err = _refused(capsys, "record", str(folder), *args, past, *common)
    assert words in err


@pytest.mark.parametrize(
    "day, ok",
    [("1900-01-01", True), ("1899-12-31", False), ("2199-12-31", True), ("2200-01-01", False)],
)
def test_command_line_dates(tmp_path, capsys, day, ok):
    folder = make_site(tmp_path / "site")
    code, _, err = _run(capsys, "schedule", str(folder), "--as-of", day, "--format", "json")
    if ok:
        assert code in (0, 2), err  # in range: parsed (the site may still refuse the day)
        assert "outside 1900-01-01" not in err
    else:
        assert code == 2 and "outside 1900-01-01 to 2199-12-31" in err
        assert len(err.strip().splitlines()) == 1


def test_entry_day_decades_from_the_start_is_refused(tmp_path, capsys):
    folder = make_site(tmp_path / "site")
    err = _refused(
        capsys,
        "record",
        str(folder),
        "note",
        "hello",
        "--on",
        "1976-09-06",
        "--today",
        TODAY,
        "--author",
        AUTHOR,
    )
    # The day parser's bound for the day an entry describes (a year before the site start,
    # see fieldlog.day_words) is tighter than the 50 years any site date may lie from it.
    assert "Mon 06 Sep 1976 is before Sat 06 Sep 2025, a year before the site start" in err


def test_today_later_than_the_machine_date_is_refused(tmp_path, capsys):
    folder = make_site(tmp_path / "site")
    tomorrow = (date.today() + timedelta(days=1)).isoformat()
    err = _refused(
        capsys, "record", str(folder), "note", "hello", "--today", tomorrow, "--author", AUTHOR
    )
    assert "later than this computer's date" in err
    assert not (folder / "log").exists()


def test_shift_day_takes_the_machine_date_passed_in():
    machine = date(2026, 9, 25)
    assert shift_day(None, machine) == machine
    assert shift_day(date(2026, 9, 25), machine) == date(2026, 9, 25)
    with pytest.raises(OutOfBounds, match="later than this computer's date"):
        shift_day(date(2026, 9, 26), machine)


def test_app_factory_refuses_a_day_after_the_machine_date(tmp_path):
    from fieldlog.app.app import make_app

    folder = make_site(tmp_path / "site")
    with pytest.raises(OutOfBounds):
        make_app(folder, date(2026, 9, 26), machine_today=date(2026, 9, 25))


def test_finish_with_no_start_is_out_of_sequence(tmp_path, capsys):
    folder = make_site(tmp_path / "site")
    common = ["--today", TODAY, "--author", AUTHOR]
    assert (
        _run(capsys, "record", str(folder), "finished", "EXC-010", "--on", "2026-09-10", *common)[0]
        == 0
    )
    code, out, err = _run(capsys, "schedule", str(folder), "--format", "json")
    assert code == 0, err
    assert "EXC-010 finished, no start recorded" in out
    code, out, err = _run(capsys, "report", str(folder), "--day", "2026-09-10")
    assert code == 0, err
    assert "EXC-010 finished, no start recorded" in out.replace("\n    ", " ")


def test_corrupt_device_settings_are_one_line(tmp_path, capsys, monkeypatch):
    home = tmp_path / "home"
    home.mkdir()
    (home / DEVICE_FILE).write_bytes(b"device = " + b"[" * 10_000)
    monkeypatch.setenv("FIELDLOG_HOME", str(home))
    folder = make_site(tmp_path / "site")
    err = _refused(
        capsys, "record", str(folder), "note", "hi", "--today", TODAY, "--author", AUTHOR
    )
    assert DEVICE_FILE in err and "nested more than 32" in err


@pytest.mark.parametrize("depth, ok", [(bounds.MAX_NESTING, True), (bounds.MAX_NESTING + 1, False)])
def test_nesting_bound(depth, ok):
    arrays = "x = " + "[" * depth + "]" * depth
    key = ".".join(["k"] * depth) + " = 1"
    for text in (arrays, key):
        if ok:
            check_nesting(text)
        else:
            with pytest.raises(Exception, match="more than 32"):
                check_nesting(text)


def test_brackets_in_strings_and_comments_are_not_nesting():
    check_nesting('a = "' + "[" * 100 + '"\n# ' + "{" * 100 + "\nb = '''" + "[" * 100 + "'''\n")


@pytest.mark.parametrize("kind", sorted(bounds.FILE_CAPS))
def test_size_caps_at_the_limit_and_one_past(kind):
    cap = bounds.FILE_CAPS[kind]
    bounds.check_size(cap, kind, "f")
    with pytest.raises(OutOfBounds):
        bounds.check_size(cap + 1, kind, "f")


def test_a_200000_activity_schedule_is_within_its_cap():
    """About 150 bytes an activity (id, name, duration, a link or two) in this format."""
    per_activity = len(
        '[[activity]]\nid = "A000000"\nname = "Work package 199999"\n'
        'duration = 10\ncalendar = "allweek"\nafter = ["A000001", "A000002", '
        '"A000003"]\n\n'
    )
    assert 200_000 * per_activity < bounds.FILE_CAPS["schedule.toml"]


@pytest.mark.parametrize(
    "kind, at_limit, past",
    [
        ("day", "2199-12-31", "2200-01-01"),
        ("day", "1900-01-01", "1899-12-31"),
        ("text", "x" * 4000, "x" * 4001),
    ],
)
def test_app_form_fields_use_the_same_bounds(kind, at_limit, past):
    """The app's forms refuse under the field what the command line refuses."""
    from fieldlog.app.forms import DAY, TEXT, DayContext, Field, read_field

    # A day field that allows later days (an expected date); entry days stop at today.
    field = Field("f", "Value", DAY if kind == "day" else TEXT, future=True)
    days = DayContext(date(2026, 9, 28))
    assert read_field(field, at_limit, days) is not None
    with pytest.raises(ValueError, match="outside 1900-01-01|more than 4,000"):
        read_field(field, past, days)
