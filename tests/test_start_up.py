"""`fieldlog schedule` imports only what the command needs, so it starts fast.

Each case runs the real command in a fresh interpreter and reads ``sys.modules`` afterwards:
the only way to see what a command imported, directly or through another module. Textual is
for the app, holidays for a calendar that asks for public holidays, cryptography's key and
signature code for a log whose signatures are not yet checked (the journal's cache of
checked files spares it afterwards), icalendar for ``--format ics``, dulwich for git sync.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from datetime import date
from pathlib import Path

import pytest

from tests.helpers.site_builder import Act, chain, schedule_toml, site_toml, write_site

NEVER = ("textual", "holidays", "icalendar", "dulwich")
SIGNATURES = "cryptography.hazmat"

_PROBE = """\
import sys
from fieldlog.cli import main
code = main(["schedule", sys.argv[1]])
sys.stdout.flush()
found = sorted({m for m in sys.modules for p in sys.argv[2:] if m == p or m.startswith(p + ".")})
print("IMPORTED:" + ",".join(found), file=sys.stderr)
sys.exit(code)
"""


def probe_imports(probe_and_args: list[str], home: Path) -> set[str]:
    """The module names a probe (``python -c PROBE ARGS``) reports on its last stderr line."""
    done = subprocess.run(
        [sys.executable, "-c", *probe_and_args],
        capture_output=True,
        text=True,
        env={**os.environ, "FIELDLOG_HOME": str(home)},
        check=True,
    )
    line = done.stderr.strip().splitlines()[-1]
    assert line.startswith("IMPORTED:"), done.stderr
    return set(filter(None, line.removeprefix("IMPORTED:").split(",")))


def imported(folder: Path, home: Path, watch: tuple[str, ...]) -> set[str]:
    """Top packages of ``watch`` that ``fieldlog schedule folder`` imported."""
    names = probe_imports([_PROBE, str(folder), *watch], home)
    return {p for p in watch if any(n == p or n.startswith(p + ".") for n in names)}


def test_schedule_of_the_sample_imports_no_app_holidays_ics_or_git(sample_site, tmp_path):
    home = tmp_path / "home"
    watch = (*NEVER, SIGNATURES)
    first = imported(sample_site, home, watch)
    assert not first & set(NEVER), first
    # The second run finds the log's files checked already: no signature is verified again.
    assert imported(sample_site, home, watch) == set()


def test_an_unsigned_site_never_loads_the_signature_code(sample_site, tmp_path):
    shutil.rmtree(sample_site / "log")
    shutil.rmtree(sample_site / "devices", ignore_errors=True)
    assert imported(sample_site, tmp_path / "home", (*NEVER, SIGNATURES)) == set()


def test_public_holidays_load_the_holidays_package_only_when_asked(sample_site, tmp_path):
    site = sample_site / "site.toml"
    text = site.read_text(encoding="utf-8")
    head = "[calendars.weekdays]\n"
    assert head in text
    site.write_text(text.replace(head, head + 'public_holidays = "GB-ENG"\n', 1), encoding="utf-8")
    assert "holidays" in imported(sample_site, tmp_path / "home", ("holidays",))


_RECORD_PROBE = _PROBE.replace('main(["schedule", sys.argv[1]])', "main(sys.argv[3:])").replace(
    "for p in sys.argv[2:]", "for p in sys.argv[2].split(',')"
)

LATER = ("numpy", "fieldlog.journal.replay", "fieldlog.site.schema", "fieldlog.engine.calendars")
"""Replay, the schedule checks and the engine: what a kept log record (the tail) spares."""


def test_record_with_the_log_unchanged_loads_no_replay_schema_or_numpy(sample_site, tmp_path):
    home = tmp_path / "home"
    args = ["record", str(sample_site), "note", "set-out checked", "--author", "Test Foreman"]

    def run() -> set[str]:
        return probe_imports([_RECORD_PROBE, str(sample_site), ",".join(LATER), *args], home)

    # The first note registers this device's key in devices/, a change the kept record is
    # not carried over (fieldlog/journal/tail.py), so the first two take the full way.
    assert "fieldlog.journal.replay" in run()
    assert "fieldlog.journal.replay" in run()
    assert run() == set()  # notes on an unchanged log: none of them
    assert run() == set()


def test_replay_and_verify_stay_functions_whichever_is_imported_first() -> None:
    # Both names are a function of fieldlog.journal and a submodule of it; the package is
    # imported lazily, so a fresh interpreter is the only place to see the order matter.
    probe = (
        "import types, fieldlog.journal.replay, fieldlog.journal.verify\n"
        "import fieldlog.journal as j\n"
        "from fieldlog.journal import replay, verify\n"
        "from fieldlog.journal.replay import replay as r\n"
        "assert replay is r is j.replay and not isinstance(replay, types.ModuleType)\n"
        "assert verify is j.verify and verify.__module__ == 'fieldlog.journal.verify'\n"
        "assert isinstance(j.record_entry, types.FunctionType)\n"
    )
    subprocess.run([sys.executable, "-c", probe], check=True)
    lazy = "import fieldlog.journal as j, types\nassert j.replay.__name__ == 'replay'\n"
    subprocess.run([sys.executable, "-c", lazy], check=True)


STDLIB_NOT_NEEDED = ("tempfile", "shutil", "random", "bz2", "lzma")
"""Brought by ``tempfile`` (and by argparse's help width): no one-shot command needs them."""


def test_schedule_and_record_import_no_tempfile_or_shutil(sample_site, tmp_path):
    home = tmp_path / "home"
    assert imported(sample_site, home, STDLIB_NOT_NEEDED) == set()
    args = ["record", str(sample_site), "note", "set-out checked", "--author", "Test Foreman"]

    def run() -> set[str]:
        watch = ",".join(STDLIB_NOT_NEEDED)
        return probe_imports([_RECORD_PROBE, str(sample_site), watch, *args], home)

    run()  # the device's first entry makes its key (cryptography's key export imports random)
    assert run() == set()  # the full way (the key file registered meanwhile)
    assert run() == set()  # with the kept record


def test_help_is_laid_out_as_argparse_would_at_any_width(monkeypatch):
    # The parser finds the width itself (cli._columns), not through shutil; the layout must
    # be argparse's own: compared with argparse.HelpFormatter, which asks shutil.
    import argparse

    from fieldlog import cli

    for columns in ("", "40", "100", "junk", "-3"):
        if columns:
            monkeypatch.setenv("COLUMNS", columns)
        else:
            monkeypatch.delenv("COLUMNS", raising=False)
        for words in ([], ["record"], ["schedule"]):
            ours = cli.build_parser(words[0] if words else None, words)
            sub = ours._subparsers._group_actions[0].choices if words else {}  # type: ignore[union-attr]
            for parser in (ours, *sub.values()):
                plain = argparse.HelpFormatter(prog=parser.prog)
                assert parser._get_formatter()._width == plain._width, (columns, parser.prog)
                assert parser.format_help() == _with(parser, argparse.HelpFormatter).format_help()


def _with(parser, formatter_class):
    """``parser`` laid out by another formatter class (same actions, same text)."""
    import copy

    other = copy.copy(parser)
    other.formatter_class = formatter_class
    return other


_LOOKAHEAD_PROBE = _PROBE.replace(
    'main(["schedule", sys.argv[1]])', 'main(["lookahead", sys.argv[1]])'
)
SUGGESTIONS = ("fieldlog.lookahead.fewest_people", "fieldlog.lookahead.levelling")
"""The fewest-people search and the levelling: only for a crew over or near its headcount."""


@pytest.mark.parametrize("needed, asked", [(2, False), (4, True)])
def test_lookahead_loads_the_crew_suggestions_only_for_a_crew_near_its_headcount(
    tmp_path, needed, asked
):
    # Four people on hand: two needed is far under (no question to answer), four is at it.
    acts = [*chain(["A", "B"]), Act("C", "Work C", 3, crew={"fixers": needed})]
    folder = write_site(
        tmp_path / "site",
        site_toml("Probe works", date(2026, 3, 2), crews={"fixers": 4}),
        schedule_toml(1, acts),
    )
    names = probe_imports([_LOOKAHEAD_PROBE, str(folder), *SUGGESTIONS], tmp_path / "home")
    assert bool(names) is asked, names


_BLAS_PROBE = """\
import os
import fieldlog.cli as cli
cli.main = lambda: print(os.environ.get("OPENBLAS_NUM_THREADS")) or 0
cli.entry()
"""


@pytest.mark.parametrize(("given", "seen"), [(None, "1"), ("4", "4")])
def test_the_command_asks_numpy_for_one_blas_thread_unless_the_user_set_it(given, seen):
    """fieldlog does no linear algebra; OpenBLAS's threads only spin at import."""
    env = {k: v for k, v in os.environ.items() if k != "OPENBLAS_NUM_THREADS"}
    if given is not None:
        env["OPENBLAS_NUM_THREADS"] = given
    done = subprocess.run(
        [sys.executable, "-c", _BLAS_PROBE], capture_output=True, text=True, env=env, check=True
    )
    assert done.stdout.strip() == seen


WRITERS = tuple(f"fieldlog.reports.lookahead_{w}" for w in ("data", "text", "ics"))


@pytest.mark.parametrize(
    ("fmt", "writer"),
    [("json", "lookahead_data"), ("csv", "lookahead_data"), ("text", "lookahead_text")],
)
def test_the_lookahead_imports_only_the_writer_of_its_format(sample_site, tmp_path, fmt, writer):
    probe = _PROBE.replace(
        'main(["schedule", sys.argv[1]])', f'main(["lookahead", sys.argv[1], "--format", "{fmt}"])'
    )
    found = probe_imports([probe, str(sample_site), *WRITERS], tmp_path / "home")
    assert found == {f"fieldlog.reports.{writer}"}
