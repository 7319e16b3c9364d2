"""Log problems on stderr: the first ten in full, then one line counting the rest."""

from __future__ import annotations

from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.commands.log_warnings import SHOWN, warn_log_problems


@pytest.mark.parametrize("n", [0, 1, SHOWN, SHOWN + 1, 500])
def test_ten_in_full_then_a_count(capsys, n):
    warn_log_problems((f"problem {k}" for k in range(n)), "yard")
    lines = capsys.readouterr().err.splitlines()
    assert lines[: min(n, SHOWN)] == [f"fieldlog: log: problem {k}" for k in range(min(n, SHOWN))]
    if n <= SHOWN:
        assert len(lines) == n
    else:
        more = n - SHOWN
        word = "problem" if more == 1 else "problems"
        assert lines[SHOWN:] == [
            f"fieldlog: log: and {more} more log {word}: 'fieldlog verify yard' lists every one"
        ]


def test_a_log_of_many_bad_entries_does_not_bury_the_schedule(sample_site: Path, capsys):
    day_file = sample_site / "log" / "2026-09-25_site-laptop-1.toml"
    bad = "".join(
        f'\n[[entry]]\nid = "site-laptop-1.{k}"\nseq = {k}\nkind = "note"\n'
        for k in range(200, 260)
    )
    day_file.write_text(day_file.read_text(encoding="utf-8") + bad, encoding="utf-8")
    assert main(["schedule", str(sample_site)]) == 1  # a log with problems: exit 1
    captured = capsys.readouterr()
    assert "KEY-900" in captured.out
    lines = captured.err.splitlines()
    log_lines = [line for line in lines if line.startswith("fieldlog: log: ")]
    assert len(log_lines) == SHOWN + 1
    assert log_lines[-1].endswith(f"'fieldlog verify {sample_site}' lists every one")
