"""``fieldlog sites FOLDER``: the office roll-up of every site folder under a folder.

Forecast finish and float are checked against numpy's business-day functions (an outside
reference for Monday-Friday working-day arithmetic): a chain of three 5-day activities from a
Monday start finishes on working day 15, and the float is the number of working days after that
up to and including finish_by.
"""

from __future__ import annotations

import json
from datetime import date

import numpy as np

from fieldlog.cli import main
from tests.helpers.sync_helpers import append_entry, make_site

START, FINISH_BY = date(2026, 3, 2), date(2026, 6, 30)


def _expected_finish_and_float(data_date: date = START) -> tuple[str, int]:
    finish = np.busday_offset(np.datetime64(data_date), 15 - 1, roll="forward")
    flt = np.busday_count(
        finish + np.timedelta64(1, "D"), np.datetime64(FINISH_BY) + np.timedelta64(1, "D")
    )
    return str(finish), int(flt)


def test_rollup_lists_every_site_and_broken_ones_with_their_error(tmp_path, capsys):
    office = tmp_path / "office"
    make_site(office / "north-yard")
    depot = make_site(office / "region-2" / "river-depot", revision=4)
    append_entry(depot, date(2026, 3, 4), "tab-depot", "site cleared, nothing started")
    broken = make_site(office / "east-shed", revision=3)
    (broken / "schedule.toml").write_text(
        (broken / "schedule.toml").read_text()
        + '\n[[activity]]\nid = "A10"\nname = "x"\nduration = 1\n'
    )
    conflicted = make_site(office / "south-lot")
    (conflicted / "conflicts").mkdir()
    (conflicted / "conflicts" / "2026-03-02_tab-north.0a1b2c3d.toml").write_text("[[entry]]\n")
    (office / "not-a-site").mkdir()
    (office / ".hidden").mkdir()

    code = main(["sites", str(office), "--format", "json"])
    rows = {r["site"]: r for r in json.loads(capsys.readouterr().out)}
    assert code == 1  # a broken site and an open conflict
    assert list(rows) == ["east-shed", "north-yard", "region-2/river-depot", "south-lot"]
    finish, flt = _expected_finish_and_float()
    north = rows["north-yard"]
    assert (north["revision"], north["forecast_finish"], north["float"]) == (1, finish, flt)
    assert north["finish_by"] == str(FINISH_BY) and north["conflicts"] == 0
    assert north["error"] is None
    depot_row = rows["region-2/river-depot"]
    assert (depot_row["revision"], depot_row["last_log_day"]) == (4, "2026-03-04")
    # Nothing started by the end of Wed 4 March: the chain starts on the data date, Thu 5 March
    # (nothing unfinished is forecast before the data date: common practice).
    assert depot_row["forecast_finish"] == _expected_finish_and_float(date(2026, 3, 5))[0]
    assert rows["south-lot"]["conflicts"] == 1
    east = rows["east-shed"]
    assert east["revision"] == 3 and "duplicate activity id 'A10'" in east["error"]


def test_rollup_text_table(tmp_path, capsys):
    office = tmp_path / "office"
    make_site(office / "north-yard")
    assert main(["sites", str(office)]) == 0
    header, row = capsys.readouterr().out.splitlines()
    assert header.split() == [
        "site",
        "rev",
        "last",
        "log",
        "forecast",
        "finish",
        "finish",
        "by",
        "float",
        "conflicts",
    ]
    finish, flt = _expected_finish_and_float()
    assert row.split() == ["north-yard", "1", "-", finish, str(FINISH_BY), f"+{flt}", "0"]


def test_folder_that_is_itself_a_site_and_empty_or_missing_folders(tmp_path, capsys):
    site = make_site(tmp_path / "only")
    assert main(["sites", str(site)]) == 0
    assert capsys.readouterr().out.splitlines()[1].startswith(".  ")
    (tmp_path / "empty").mkdir()
    assert main(["sites", str(tmp_path / "empty")]) == 1
    assert "no site folders" in capsys.readouterr().err
    assert main(["sites", str(tmp_path / "missing")]) == 2
