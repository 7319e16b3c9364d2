"""Read commands on a damaged log print their data and exit 1: "exit 0 ok, 1 problem found,
2 bad input" (the command line's contract, DEVELOPERS.md "Contracts").

Found: ``schedule``, ``lookahead``, ``report`` and ``history`` warned on stderr and exited 0
when entries were altered or a day file was cut short, so a script reading the schedule of a
forged log saw "ok"; ``verify`` on the same log exits 1. ``sites`` now counts the problems of
each site's log and exits 1 too.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from fieldlog.cli import main

DAY_FILE = "2026-09-25_site-laptop-1.toml"

READS = [
    (["schedule"], "KEY-900"),
    (["schedule", "--format", "json"], '"KEY-900"'),
    (["lookahead", "--format", "csv"], "KEY-900"),
    (["report", "--day", "2026-09-25"], "DAILY REPORT"),
    (["history"], "2026-09-25"),
]


def altered(site: Path) -> None:
    """One value of a logged entry changed by hand: its hash no longer matches."""
    path = site / "log" / DAY_FILE
    text = path.read_text(encoding="utf-8")
    assert 'conditions = "dry, sunny"' in text
    path.write_text(text.replace('conditions = "dry, sunny"', 'conditions = "wet"', 1), "utf-8")


def truncated(site: Path) -> None:
    """The day file cut short in the middle of an entry (a copy stopped half way)."""
    path = site / "log" / DAY_FILE
    data = path.read_bytes()
    path.write_bytes(data[: len(data) * 2 // 3])


@pytest.mark.parametrize("damage", [altered, truncated])
@pytest.mark.parametrize(("words", "shows"), READS)
def test_a_damaged_log_still_prints_the_data_and_exits_1(sample_site, capsys, damage, words, shows):
    damage(sample_site)
    code = main([words[0], str(sample_site), *words[1:]])
    out, err = capsys.readouterr()
    assert code == 1, err
    assert shows in out  # the data is still printed
    assert "fieldlog: log: " in err and "Traceback" not in err
    assert main(["verify", str(sample_site)]) == 1  # the same verdict as verify's


@pytest.mark.parametrize(("words", "shows"), READS)
def test_an_intact_log_exits_0(sample_site, capsys, words, shows):
    assert main([words[0], str(sample_site), *words[1:]]) == 0
    out, err = capsys.readouterr()
    assert shows in out and "fieldlog: log: " not in err


def test_sites_counts_each_sites_log_problems_and_exits_1(sample_site, capsys):
    office = sample_site.parent
    assert main(["sites", str(office), "--format", "json"]) == 0
    (row,) = json.loads(capsys.readouterr().out)
    assert row["log_problems"] == 0 and row["error"] is None
    altered(sample_site)
    assert main(["sites", str(office), "--format", "json"]) == 1
    (row,) = json.loads(capsys.readouterr().out)
    assert row["log_problems"] >= 1 and row["error"] is None
    assert main(["sites", str(office)]) == 1
    _, line = capsys.readouterr().out.splitlines()
    assert line.startswith("kestrel-yard ") and "LOG: " in line and "fieldlog verify" in line
