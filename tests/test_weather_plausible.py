"""A new weather entry's temperatures must be plausible air temperatures in their unit.

Outside facts: the highest air temperature on record is about 56.7 C (134 F) (from memory);
outdoor site work stops long before -60 C (common practice); 60 C = 140 F and -60 C = -76 F
by the conversion F = C * 9/5 + 32. The check is made when an entry is recorded; the reader keeps
accepting the stored range (-80..140), so an entry an older fieldlog wrote stays readable.
"""

from __future__ import annotations

import pytest

from fieldlog.errors import EntryRefused
from fieldlog.journal import read_journal, verify
from fieldlog.journal import rules as journal_rules
from tests.helpers.journal_helpers import TODAY, log_bytes, make_site, rec, run_cli


@pytest.fixture
def folder(tmp_path, monkeypatch):
    monkeypatch.setenv("FIELDLOG_HOME", str(tmp_path / "home"))
    return make_site(tmp_path / "site")


def test_the_two_ranges_are_the_same_temperatures():
    (c_lo, c_hi), (f_lo, f_hi) = journal_rules.PLAUSIBLE_AIR["C"], journal_rules.PLAUSIBLE_AIR["F"]
    assert (c_lo * 9 / 5 + 32, c_hi * 9 / 5 + 32) == (f_lo, f_hi)  # F = C * 9/5 + 32


ACCEPTED = [
    {"high": 60},
    {"low": -60},
    {"high": 56.7, "low": 20},
    {"high": 140, "unit": "F"},
    {"low": -76, "unit": "F"},
    {"high": 80, "unit": "F"},  # a hot day in Fahrenheit
]


@pytest.mark.parametrize("temps", ACCEPTED)
def test_at_the_bounds_it_is_recorded(folder, temps):
    e = rec(folder, "weather", TODAY, conditions="dry", **temps)
    for k, v in temps.items():
        assert e.fields[k] == v


REFUSED = [
    ({"high": 80}, "high 80 C", "(in C: -60 to 60)"),
    ({"high": 60.5}, "high 60.5 C", "(in C: -60 to 60)"),
    ({"low": -60.5}, "low -60.5 C", "(in C: -60 to 60)"),
    ({"low": -77, "unit": "F"}, "low -77 F", "(in F: -76 to 140)"),
    ({"high": 80, "unit": "C"}, "high 80 C", "give the unit F (--unit F)"),
]


@pytest.mark.parametrize(("temps", "names", "says"), REFUSED)
def test_past_the_bounds_one_line_names_field_value_unit_and_fix(folder, temps, names, says):
    before = log_bytes(folder)
    with pytest.raises(EntryRefused) as caught:
        rec(folder, "weather", TODAY, conditions="dry", **temps)
    message = caught.value.message
    assert names in message and says in message and "Fix: check the" in message
    assert "\n" not in message
    assert log_bytes(folder) == before  # nothing written


def test_a_correction_to_an_implausible_temperature_is_refused(folder):
    e = rec(folder, "weather", TODAY, conditions="dry", high=20)
    before = log_bytes(folder)
    with pytest.raises(EntryRefused, match="high 85 C is not a plausible"):
        rec(folder, "correction", None, supersedes=e.id, reason="typo", high=85)
    assert log_bytes(folder) == before
    fixed = rec(folder, "correction", None, supersedes=e.id, reason="was F", unit="F")
    assert fixed.fields["unit"] == "F"


def test_a_stored_entry_within_the_old_range_stays_readable(folder, monkeypatch):
    """An older fieldlog recorded 80 C: the reader and verify still take it as it is."""
    monkeypatch.setitem(journal_rules.PLAUSIBLE_AIR, "C", (-80.0, 140.0))
    rec(folder, "weather", TODAY, conditions="dry", high=80)
    monkeypatch.undo()
    journal = read_journal(folder)
    assert [e.fields["high"] for e in journal.entries] == [80]
    assert verify(folder) == []


def test_cli_weather_80_celsius_is_exit_2_with_one_line(folder, tmp_path):
    out = run_cli(
        "record",
        str(folder),
        "weather",
        "--conditions",
        "dry",
        "--high",
        "80",
        "--author",
        "P. Tester",
        "--today",
        TODAY.isoformat(),
        home=tmp_path / "home",
    )
    assert out.returncode == 2, out.stderr
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and "high 80 C is not a plausible air temperature" in lines[0]
    assert "Traceback" not in out.stderr and out.stdout == ""
    assert not (folder / "log").exists() or log_bytes(folder) == {}
