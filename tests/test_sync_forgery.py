"""Forged entries planted in the office folder never reach the site's log: sync refuses them.

Each forgery of tests/test_journal_forgery.py (the ones a hash chain alone let through) is
planted in the office's copy after a clean sync. The next sync must leave the site's ``log/``
byte for byte as it was for that file, keep a refused file in ``quarantine/`` (or, for a file
that no longer begins like ours, in ``conflicts/``), report it, exit 1, and the forged text
must not appear in the site's daily report. The same holds the other way round: a forgery
planted in the site is never sent to the office.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldlog.cli import main
from tests.helpers.sync_helpers import sync, tree
from tests.test_journal_forgery import FORGED_TEXT, FORGERIES


def log_of(folder: Path) -> dict[str, bytes | str]:
    return {k: v for k, v in tree(folder).items() if k.startswith("log/")}


@pytest.mark.parametrize("forge", list(FORGERIES.values()), ids=list(FORGERIES))
@pytest.mark.parametrize("planted_in", ["office", "site"])
def test_planted_forgery_is_refused_and_never_lands_in_log(
    synced_sample, forge, planted_in, capsys
):
    site, office = synced_sample
    planted, other = (office, site) if planted_in == "office" else (site, office)
    name, entry_id = forge(planted)
    before = log_of(other)
    summary = sync(site, office)
    assert summary.exit_code == 1
    assert log_of(other) == before  # nothing of it in the other log/
    where = "target" if planted_in == "office" else "site"
    refused = [r for r in summary.refused if r.path == f"log/{name}"]
    conflict = [c for c in summary.conflicts if c.name == name]
    assert refused or conflict, summary
    if refused:
        assert refused[0].side == where
        assert "holds forged entries" in refused[0].reason and entry_id in refused[0].reason
        assert any((other / "quarantine").glob(f"{name[:-5]}.*.toml"))
    main(["report", str(other), "--day", "2026-09-25"])
    assert FORGED_TEXT not in capsys.readouterr().out


def test_forged_file_reported_through_the_command_line(synced_sample, capsys):
    site, office = synced_sample
    name, entry_id = FORGERIES["a file from an invented device"](office)
    code = main(["sync", str(site), str(office)])
    out, err = capsys.readouterr()
    assert code == 1 and "Traceback" not in err
    assert f"target log/{name}: holds forged entries: entry {entry_id}" in out
    assert f"kept in site quarantine/{name[:-5]}." in out
    assert not (site / "log" / name).exists()
