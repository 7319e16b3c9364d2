"""Days as typed (``today``, ``fri``, ``-2``, ISO): one parser for the app and the command line.

The weekday rule is checked by enumeration over four years of "today"s against the standard
library's own calendar (``calendar.day_abbr``, ISO weekday numbering), not against itself.
"""

from __future__ import annotations

import calendar
from datetime import date, timedelta

import pytest

from fieldlog.cli import main
from fieldlog.day_words import DayProblem, earliest_day, long_day, parse_day
from tests.test_app_site import fix_device, write_site

MON = date(2026, 9, 28)
FRI = date(2026, 9, 25)


@pytest.mark.parametrize(
    ("text", "day"),
    [
        ("today", MON),
        ("TODAY ", MON),
        ("yesterday", MON - timedelta(days=1)),
        ("-2", MON - timedelta(days=2)),
        ("-0", MON),
        ("fri", FRI),
        ("Friday", FRI),
        ("mon", MON),  # today is Monday: "mon" is today
        ("sun", date(2026, 9, 27)),
        ("2026-09-01", date(2026, 9, 1)),
    ],
)
def test_words(text: str, day: date) -> None:
    assert parse_day(text, MON) == day


def test_on_a_friday_fri_is_today_and_thu_yesterday() -> None:
    assert parse_day("fri", FRI) == FRI
    assert parse_day("thu", FRI) == FRI - timedelta(days=1)


def test_every_weekday_name_for_four_years_of_todays() -> None:
    """Enumeration: the latest day up to today whose weekday name the calendar module gives."""
    for n in range(4 * 366):
        today = date(2025, 1, 1) + timedelta(days=n)
        for k, abbr in enumerate(calendar.day_abbr):  # Mon..Sun, locale "C"
            day = parse_day(abbr, today)
            assert day.weekday() == k and 0 <= (today - day).days <= 6
            assert calendar.day_abbr[day.weekday()] == abbr


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("", "no day given"),
        ("fr", "not a day"),
        ("someday", "not a day"),
        ("2026-02-30", "not a day"),
        ("26-09-01", "not a day"),
        ("-99999999", "not a day"),
        ("+1", "has not happened yet"),
        ("2026-09-29", r"after today \(Mon 28 Sep 2026\)"),
        ("2024-01-01", "a year before the site start"),
    ],
)
def test_refusals_are_one_line(text: str, words: str) -> None:
    with pytest.raises(DayProblem, match=words) as info:
        parse_day(text, MON, earliest=earliest_day(date(2026, 9, 7)), latest=MON)
    assert "\n" not in str(info.value)


def test_plus_n_only_where_a_later_day_is_allowed() -> None:
    assert parse_day("+3", MON) == MON + timedelta(days=3)


def test_long_day_carries_the_year() -> None:
    assert long_day(FRI) == "Fri 25 Sep 2026"


def test_cli_on_takes_the_same_words_and_echoes_the_full_date(tmp_path, capsys) -> None:
    fix_device()
    site = str(write_site(tmp_path / "site"))
    code = main(["record", site, "note", "quiet", "--on", "fri", "--today", "2026-03-09"])
    out, err = capsys.readouterr()
    assert code == 0 and out.strip().endswith(".1")
    assert err == "fieldlog: recorded note for Fri 06 Mar 2026\n"
    code = main(["record", site, "note", "later", "--on", "+1", "--today", "2026-03-09"])
    out, err = capsys.readouterr()
    assert code == 2 and out == "" and err.count("\n") == 1 and "not happened yet" in err
