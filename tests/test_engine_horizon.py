"""The engine's calendar range stops at the site's window; long but possible jobs still compute.

Outside checks: numpy's ``busday_offset`` (a reference library) gives the finish of a chain of
long activities on a Monday-to-Friday calendar; hypothesis checks the widening rule itself.
"""

from __future__ import annotations

import json
from datetime import date, timedelta

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from fieldlog.bounds import LATEST_DATE, site_window
from fieldlog.cli import main
from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.horizon import ScheduleTooLong, widened
from tests.helpers.engine_helpers import WEEKDAYS, before_start, make_site
from tests.helpers.site_builder import chain, schedule_toml, site_toml, write_site


def test_a_forty_year_chain_still_computes_like_numpy_busday_offset():
    """Three activities of 3,650 working days: 10,950 working days, about 42 years."""
    site = make_site(
        [("A", 3650), ("B", 3650), ("C", 3650)],
        [("A", "B"), ("B", "C")],
        calendar="weekdays",
        calendars=(WEEKDAYS,),
    )
    result = compute_schedule(site, before_start(site))
    # Inclusive working days: the last of 10,950 working days counted from the start.
    expected = np.busday_offset(np.datetime64(site.start), 3 * 3650 - 1, roll="forward")
    assert result.finish == expected.astype(date)


def test_past_the_window_is_one_site_error_naming_the_file():
    site = make_site(
        [(f"A{k}", 3650) for k in range(20)],
        [(f"A{k}", f"A{k + 1}") for k in range(19)],
        calendar="weekdays",
        calendars=(WEEKDAYS,),
    )
    with pytest.raises(ScheduleTooLong) as caught:
        compute_schedule(site, before_start(site))
    assert caught.value.exit_code == 2
    assert caught.value.message.startswith("schedule.toml: the work runs outside")


days = st.dates(date(1950, 1, 1), date(2180, 12, 31))


@given(start=days, a=st.integers(-30_000, 30_000), width=st.integers(1, 40_000))
def test_widening_never_narrows_stays_in_the_window_and_ends(start, a, width):
    floor, ceiling = site_window(start)
    lo = start + timedelta(days=a)
    lo = min(max(lo, date(1900, 1, 1)), LATEST_DATE - timedelta(days=1))
    hi = min(lo + timedelta(days=width), LATEST_DATE)
    for _ in range(64):  # doubling: the window is reached long before this
        try:
            new_lo, new_hi = widened(start, lo, hi)
        except ScheduleTooLong:
            assert lo <= floor and hi >= ceiling  # refused only once the whole window is in
            return
        assert new_lo <= lo and new_hi >= hi and (new_lo, new_hi) != (lo, hi)
        assert new_lo >= min(lo, floor) and new_hi <= max(hi, ceiling)
        lo, hi = new_lo, new_hi
    raise AssertionError("widening did not end")


def _too_long_site(folder):
    """Twenty activities of 3,650 working days in a chain: about 280 years of work."""
    return write_site(
        folder,
        site_toml("Long chain yard (invented)", date(2026, 3, 2)),
        schedule_toml(1, chain([f"A{k}" for k in range(20)], duration=3650)),
    )


@pytest.mark.parametrize(
    "words",
    [["schedule"], ["lookahead"], ["report", "--day", "2026-03-02"], ["history"], ["check"]],
)
def test_every_command_names_the_schedule_as_the_user_finds_it(tmp_path, capsys, words):
    """Found: the error named a bare "schedule.toml", not which site's."""
    folder = _too_long_site(tmp_path / "yards" / "long-chain")
    assert main([words[0], str(folder), *words[1:]]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1, err
    assert err[0].startswith(f"fieldlog: {folder / 'schedule.toml'}: the work runs outside"), err


def test_sites_names_the_site_folder_too(tmp_path, capsys):
    folder = _too_long_site(tmp_path / "office" / "long-chain")
    assert main(["sites", str(folder.parent), "--format", "json"]) == 1
    (row,) = json.loads(capsys.readouterr().out)
    assert row["error"].startswith(f"{folder / 'schedule.toml'}: the work runs outside")
