"""The full way of ``fieldlog verify``: read, check and replay the log, audit the receipts.

What it prints is described in :mod:`fieldlog.commands.verify`; the report is returned
line by line too, so that :mod:`fieldlog.commands.verify_cache` can keep it.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace
from datetime import date
from pathlib import Path

from fieldlog.commands.verify_cache import Report
from fieldlog.errors import SiteError
from fieldlog.home import fieldlog_home
from fieldlog.journal import Journal, read_journal, replay
from fieldlog.journal.own_memory import missing_or_changed, recall
from fieldlog.journal.verify import integrity_findings
from fieldlog.reports.words import count
from fieldlog.site.files import load_site
from fieldlog.sync.audit import (
    Audit,
    audit,
    known_device,
    known_devices,
    office_receipts,
    own_receipts,
    unknown_devices,
)
from fieldlog.sync.conflicts import list_conflicts
from fieldlog.sync.holdings import holdings_of
from fieldlog.sync.receipt_files import read_folder
from fieldlog.sync.receipts import RECEIPTS_DIR


def make_report(site_arg: str, office: str | None) -> Report:
    """Print the findings and contradictions on stdout as they are found (so what was found
    is shown even when a later step fails) and return them, line by line; exit code 1
    when there are any.

    Raises:
        FieldlogError: the site or its log cannot be read (never kept).
    """
    out: list[str] = []

    def say(line: object) -> None:
        out.append(str(line))
        print(out[-1])

    journal = read_journal(site_arg)
    findings = integrity_findings(journal)
    for f in findings:
        say(f)
    site = load_site(site_arg)
    rp = replay(site, journal, date.max)
    contradictions = [p for p in rp.problems if not p.integrity]
    if contradictions:
        say("Contradictions in the log (record a correction to settle each):")
        for p in contradictions:
            say(f"  {p.message}")
    conflicts = list_conflicts(site_arg)
    if conflicts:
        say("Sync conflicts (two versions of one journal file are kept side by side):")
        for c in conflicts:
            say(f"  {c.describe()}")
    receipts = receipts_check(Path(site_arg), journal, office)
    receipt_lines = receipts.lines()
    if receipt_lines:
        say("Against the office receipts (what both sides held at a sync):")
        for line in receipt_lines:
            say(f"  {line}")
    own = own_memory_check(Path(site_arg), journal, say)
    for record in journal.devices.values():
        say(
            f"device {record.device}: {record.author}, key registered {record.registered}, "
            f"signs from entry {record.signed_from}"
        )
    n_entries = len(journal.entries)
    if findings or own or contradictions or conflicts or receipt_lines:
        forged = (
            f", {count(journal.forged, 'forged entry', 'forged entries')} not used"
            if journal.forged
            else ""
        )
        say(
            f"{len(findings) + own} integrity finding(s), {len(contradictions)} contradiction(s), "
            f"{len(conflicts)} sync conflict(s), {len(receipt_lines)} receipt finding(s) in "
            f"{len(journal.files)} file(s), {n_entries} entries used{forged}"
        )
        return Report(tuple(out), 1)
    if journal.unsigned:
        say(
            f"{journal.unsigned} of {n_entries} entries are unsigned: written before this "
            "site's devices signed their entries, so only the hash chain vouches for them"
        )
        say(
            f"unsigned, chain intact: {len(journal.files)} file(s), {n_entries} entries, "
            f"{journal.signed} signed, {journal.unsigned} unsigned, chains unbroken, "
            "no contradictions"
        )
        _unvouched(receipts, n_entries, say)
        return Report(tuple(out), 0)
    say(
        f"log intact: {len(journal.files)} file(s), {n_entries} entries, every one signed "
        "by its device's registered key, chains unbroken, no contradictions"
    )
    _unvouched(receipts, n_entries, say)
    return Report(tuple(out), 0)


def _unvouched(receipts: Audit, n_entries: int, say: Callable[[str], None]) -> None:
    """Say so when no receipt vouches for the log's end. Found: a deleted newest day file
    (or entries cut from the end of one) left a log that read "intact" with no word more; a
    hash chain cannot show it, only a receipt of what the office held can."""
    if receipts.receipts == 0 and n_entries:
        say(
            "not yet vouched for: this site has no office receipt, so entries removed from "
            "the end of a device's log (a deleted newest day file) cannot be seen until "
            "the first 'fieldlog sync'"
        )


def own_memory_check(site: Path, journal: Journal, say: Callable[[str], None]) -> int:
    """The log against this device's memory of its last entry here (:mod:`fieldlog.journal.
    own_memory`): says the finding, or why the memory is set aside; 1 for a finding."""
    memory, aside = recall(fieldlog_home(), site)
    if aside is not None:
        say(aside)
    found = missing_or_changed(memory, {e.id: e for e in journal.entries}) if memory else None
    if found is not None:
        say(found)
    return int(found is not None)


def receipts_check(site: Path, journal: Journal, office: str | None) -> Audit:
    """The log against this device's receipts, and against the office's when asked.

    Raises:
        SiteError: ``office`` is not a folder.
    """
    home = fieldlog_home()
    this = known_device(home)
    mine = own_receipts(site, home)
    groups = [mine]
    known = known_devices(mine.of())
    if office is not None:
        folder = Path(office)
        if not folder.is_dir():
            raise SiteError(
                "the office folder does not exist",
                file=folder,
                fix="give the folder 'fieldlog sync' writes to for this site",
            )
        devices = {d for d, _ in mine.files} | ({this} if this else set())
        groups.append(office_receipts(folder, devices, mine))
        there = read_folder(folder / RECEIPTS_DIR, RECEIPTS_DIR)
        known = known_devices(f for d, f in there.files if f.label == f"{RECEIPTS_DIR}/{d}.toml")
    result = audit(holdings_of(journal), groups)
    return replace(result, unknown=tuple(unknown_devices(site, known, this)))
