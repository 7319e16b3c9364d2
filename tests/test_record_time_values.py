"""Values refused or normalised when an entry is recorded, never when a stored one is read.

Found by an adversarial pass: ``--precip-mm -0`` stored ``-0.0`` (TOML keeps the sign of a
zero, TOML 1.0 spec "Float": "-0.0 and +0.0 are valid"), and lost time of 0 hours was
accepted. The log's bytes are what is checked: the log is the legal record.
"""

from __future__ import annotations

import pytest

from fieldlog.errors import EntryRefused
from fieldlog.journal import read_journal
from fieldlog.journal import record as record_module
from fieldlog.journal.entries import KINDS, check_fields
from tests.helpers.journal_helpers import AUTHOR, TODAY, log_bytes, make_site, rec, run_cli

FLOAT_FIELDS = sorted(
    (kind, s.name) for kind, specs in KINDS.items() for s in specs if s.type == "float"
)


def test_every_float_field_is_covered_below():
    """The list the tests walk is the kinds' own: a new float field is tested too."""
    assert ("weather", "precip_mm") in FLOAT_FIELDS and len(FLOAT_FIELDS) >= 8


def _base(kind: str) -> dict:
    return {
        "percent": {"activity": "EXC-010"},
        "weather": {"conditions": "dry"},
        "crew": {"trade": "concrete", "headcount": 3},
        "lost-time": {"cause": "weather"},
        "plant": {"what": "13 t excavator"},
    }[kind]


@pytest.mark.parametrize(("kind", "name"), [f for f in FLOAT_FIELDS if f[0] != "lost-time"])
@pytest.mark.parametrize("typed", ["-0", "-0.0", -0.0])
def test_a_negative_zero_is_stored_as_zero(tmp_path, kind, name, typed):
    folder = make_site(tmp_path / "site")
    fields = {**_base(kind), name: typed}
    if name == "hours_down":
        fields["broken_down"] = True
    if kind == "percent":
        rec(folder, "started", TODAY, activity="EXC-010")
    e = rec(folder, kind, TODAY, **fields)
    text = b"".join(log_bytes(folder).values())
    assert f"\n{name} = 0.0\n".encode() in text and b"= -0" not in text
    assert str(read_journal(folder).by_id(e.id).fields[name]) == "0.0"


def test_the_command_line_stores_zero_rain_for_minus_zero(tmp_path):
    folder = make_site(tmp_path / "site")
    home = tmp_path / "home"
    r = run_cli(
        "record", str(folder), "weather", "--conditions", "dry", "--precip-mm", "-0",
        "--high", "-0.0", "--today", TODAY.isoformat(), "--author", AUTHOR, home=home,
    )  # fmt: skip
    assert r.returncode == 0, r.stderr
    text = b"".join(log_bytes(folder).values())
    assert b"\nprecip_mm = 0.0\n" in text and b"\nhigh = 0.0\n" in text and b"= -0" not in text


@pytest.mark.parametrize("hours", ["0", "-0", "0.0", 0, 0.0])
def test_lost_time_of_no_hours_is_refused_with_the_fix(tmp_path, hours):
    folder = make_site(tmp_path / "site")
    with pytest.raises(EntryRefused) as exc:
        rec(folder, "lost-time", TODAY, cause="weather", hours=hours)
    assert "hours 0 is no time lost" in str(exc.value) and "more than 0" in str(exc.value)
    assert log_bytes(folder) == {}


def test_the_command_line_refuses_0_and_25_lost_hours_in_one_line_each(tmp_path):
    folder = make_site(tmp_path / "site")
    home = tmp_path / "home"
    for hours, says in (
        ("0", "hours 0 is no time lost"),
        ("25", "hours 25 is above 24, more than a day"),
    ):
        r = run_cli(
            "record", str(folder), "lost-day", "--cause", "weather", "--hours", hours,
            "--today", TODAY.isoformat(), "--author", AUTHOR, home=home,
        )  # fmt: skip
        assert r.returncode == 2 and says in r.stderr and len(r.stderr.splitlines()) == 1
    assert log_bytes(folder) == {}
    r = run_cli(
        "record", str(folder), "lost-day", "--cause", "weather", "--hours", "24",
        "--today", TODAY.isoformat(), home=home,
    )  # fmt: skip
    assert r.returncode == 0, r.stderr  # the bound itself: a day's 24 hours


def test_a_correction_to_no_lost_hours_is_refused_too(tmp_path):
    folder = make_site(tmp_path / "site")
    e = rec(folder, "lost-time", TODAY, cause="weather", hours=2.0)
    before = log_bytes(folder)
    with pytest.raises(EntryRefused, match="hours 0 is no time lost"):
        rec(folder, "correction", None, supersedes=e.id, reason="typo", hours="0")
    assert log_bytes(folder) == before


def test_a_stored_entry_of_0_lost_hours_stays_readable(tmp_path, monkeypatch):
    """A legal record stays readable: the reader keeps the old bounds (0..24)."""
    folder = make_site(tmp_path / "site")
    # Written as a fieldlog before the record-time rules did: the reader's rules only.
    monkeypatch.setattr(record_module, "recordable", check_fields)
    e = rec(folder, "lost-time", TODAY, cause="weather", hours=0.0)
    monkeypatch.undo()
    journal = read_journal(folder)
    assert journal.by_id(e.id).fields["hours"] == 0.0
    assert not journal.findings
