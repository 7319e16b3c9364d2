"""Write the lookahead sheet or a daily report to a file, and print it when there is a printer.

The file always comes first: a sheet on disk can be printed from anywhere, a print job that
failed leaves nothing. Printing never fails hard: when no printer is set up, or the print
command fails, the app says so and the file is still there.

Printer detection (CUPS and BSD-style commands, the ones a Linux or macOS laptop has):

* ``lp`` is used when ``lpstat -d`` names a default destination, or ``LPDEST``/``PRINTER``
  names one;
* otherwise ``lpr`` is used when ``PRINTER`` names a printer or ``lpstat -d`` names a default;
* otherwise there is no printer, and the sheet is only written.
"""

from __future__ import annotations

import os
import shutil
import subprocess
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from datetime import date
from pathlib import Path

from fieldlog.durable import make_folder, refuse_links
from fieldlog.errors import FieldlogError
from fieldlog.lookahead import Lookahead
from fieldlog.reports.lookahead_text import render_text

PRINTS_FOLDER = "prints"
"""Sheets go to ``<site>/prints/``, next to the log, where the foreman finds them."""

SHEET_WIDTH = 80
"""Characters per line: fits A4 and US Letter portrait at 10 characters per inch."""

_TIMEOUT = 20


@dataclass(frozen=True)
class Printer:
    """How to print a text file: the command, without the file name."""

    command: tuple[str, ...]
    name: str
    """Words for the status line: "default printer office-laser"."""


def sheet_path(folder: Path, look: Lookahead) -> Path:
    """Where the sheet for ``look`` is written: one file per first day shown."""
    return folder / PRINTS_FOLDER / f"lookahead-{look.days[0].isoformat()}.txt"


def report_path(folder: Path, day: date) -> Path:
    """Where the daily report of ``day`` is written: one file per day."""
    return folder / PRINTS_FOLDER / f"daily-report-{day.isoformat()}.txt"


def write_print(path: Path, text: str, what: str) -> Path:
    """Write ``text`` to ``path`` in the prints folder; a link there is refused, not followed.

    Raises:
        FieldlogError: the file cannot be written (read-only stick, disk full, a link).
    """
    try:
        make_folder(path.parent)
        refuse_links(path)
        path.write_text(text, encoding="utf-8", newline="\n")
    except OSError as exc:
        raise FieldlogError(
            f"cannot write the {what}: {exc.strerror}",
            file=path,
            fix="check the site folder is writable and the disk has room, and "
            "that prints/ is a real folder, not a link",
        ) from exc
    return path


def write_sheet(look: Lookahead, folder: Path) -> Path:
    """Write the printable sheet under ``folder/prints/`` and return its path.

    Raises:
        FieldlogError: the file cannot be written (read-only stick, disk full).
    """
    return write_print(sheet_path(folder, look), render_text(look, SHEET_WIDTH), "lookahead sheet")


Runner = Callable[..., subprocess.CompletedProcess]


def find_printer(
    env: Mapping[str, str] | None = None,
    which: Callable[[str], str | None] = shutil.which,
    run: Runner = subprocess.run,
) -> Printer | None:
    """The printer to use, or None when none is set up (see the module docstring)."""
    env = os.environ if env is None else env
    default = _lpstat_default(which, run)
    named = env.get("LPDEST") or env.get("PRINTER")
    if which("lp"):
        if named:
            return Printer(("lp", "-d", named), f"printer {named}")
        if default:
            return Printer(("lp",), f"default printer {default}")
    if which("lpr"):
        if env.get("PRINTER"):
            return Printer(("lpr", "-P", env["PRINTER"]), f"printer {env['PRINTER']}")
        if default:
            return Printer(("lpr",), f"default printer {default}")
    return None


def _lpstat_default(which: Callable[[str], str | None], run: Runner) -> str | None:
    """The default destination ``lpstat -d`` names, or None."""
    if not which("lpstat"):
        return None
    try:
        out = run(["lpstat", "-d"], capture_output=True, text=True, timeout=_TIMEOUT)
    except (OSError, subprocess.TimeoutExpired):
        return None  # no answer from the print system: treated as "no printer", said so
    text = (out.stdout or "").strip()
    if out.returncode != 0 or ":" not in text or "no system default" in text.lower():
        return None
    return text.rsplit(":", 1)[1].strip() or None


def send_to_printer(path: Path, printer: Printer, run: Runner = subprocess.run) -> str | None:
    """Print ``path``; returns None on success, else why it did not print (never raises)."""
    try:
        out = run([*printer.command, str(path)], capture_output=True, text=True, timeout=_TIMEOUT)
    except (OSError, subprocess.TimeoutExpired) as exc:
        return f"{printer.command[0]} did not run: {exc}"
    if out.returncode != 0:
        detail = (out.stderr or out.stdout or "").strip().splitlines()
        return f"{printer.command[0]} failed: {detail[0] if detail else f'exit {out.returncode}'}"
    return None


def deliver_sheet(
    look: Lookahead,
    folder: Path,
    *,
    printer: Printer | None = None,
    detect: bool = True,
    run: Runner = subprocess.run,
) -> str:
    """Write the sheet, print it when a printer is set up; returns what happened, in words.

    Raises:
        FieldlogError: the sheet could not be written (printing problems are only reported).
    """
    return deliver(
        write_sheet(look, folder), folder, "sheet", printer=printer, detect=detect, run=run
    )


def deliver(
    path: Path,
    folder: Path,
    noun: str,
    *,
    printer: Printer | None = None,
    detect: bool = True,
    run: Runner = subprocess.run,
) -> str:
    """Print a file already written under ``folder`` when a printer is set up; in words
    naming the file as ``noun`` ("sheet", "report")."""
    where = path.relative_to(folder) if path.is_relative_to(folder) else path
    if printer is None and detect:
        printer = find_printer(run=run)
    if printer is None:
        return f"No printer set up: {noun} saved as {where} (print it from any machine)"
    problem = send_to_printer(path, printer, run)
    if problem:
        return f"Not printed ({problem}): {noun} saved as {where}"
    return f"Printed on the {printer.name}; {noun} saved as {where}"
