"""``fieldlog verify SITE``: is the field log exactly as fieldlog wrote it, and consistent?

Prints every integrity finding (a forged entry: unsigned, signed with a key the site does not
register for its device, or changed after it was signed; an edited, removed, reordered or
misfiled entry; a file that is not a journal or key file) with its file and entry id, then
every contradiction the log holds (finish before start, two devices disagreeing on a start,
progress on an activity the schedule no longer has ...), which are fixed by recording a
correction, and every sync conflict copy.

Then the log is checked against the office receipts that vouch for it (this device's copies;
with ``--office FOLDER`` the office's own chain): an entry removed from the end of the log
after a sync, which the hash chain alone cannot show, is named with its device, entry and file,
and a device key in ``devices/`` of a device the office never heard from itself is named too.
Then the registered devices with their authors. Exit code 1 when anything is found, 0 when
the log is clean; a log written before its devices signed is clean but says how many entries
are unsigned ("unsigned, chain intact").
"""

from __future__ import annotations

import argparse
from dataclasses import replace
from datetime import date
from pathlib import Path

from fieldlog.errors import SiteError
from fieldlog.home import fieldlog_home
from fieldlog.journal import Journal, read_journal, replay
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


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog verify``."""
    p = sub.add_parser(
        "verify",
        help="check the field log is intact (exit 1 if not)",
        description=__doc__.splitlines()[0].split(": ", 1)[1],
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--office",
        metavar="FOLDER",
        help="also check the log against the receipts in the office's folder for "
        "this site (catches entries removed after a sync even when this device's "
        "own copies of the receipts are gone)",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print findings and contradictions on stdout; 1 when there are any."""
    journal = read_journal(args.site)
    findings = journal.findings
    for f in findings:
        print(f)
    site = load_site(args.site)
    rp = replay(site, journal, date.max)
    contradictions = [p for p in rp.problems if not p.integrity]
    if contradictions:
        print("Contradictions in the log (record a correction to settle each):")
        for p in contradictions:
            print(f"  {p.message}")
    conflicts = list_conflicts(args.site)
    if conflicts:
        print("Sync conflicts (two versions of one journal file are kept side by side):")
        for c in conflicts:
            print(f"  {c.describe()}")
    receipt_lines = receipts_check(Path(args.site), journal, args.office).lines()
    if receipt_lines:
        print("Against the office receipts (what both sides held at a sync):")
        for line in receipt_lines:
            print(f"  {line}")
    for record in journal.devices.values():
        print(
            f"device {record.device}: {record.author}, key registered {record.registered}, "
            f"signs from entry {record.signed_from}"
        )
    n_entries = len(journal.entries)
    if findings or contradictions or conflicts or receipt_lines:
        forged = (
            f", {count(journal.forged, 'forged entry', 'forged entries')} not used"
            if journal.forged
            else ""
        )
        print(
            f"{len(findings)} integrity finding(s), {len(contradictions)} contradiction(s), "
            f"{len(conflicts)} sync conflict(s), {len(receipt_lines)} receipt finding(s) in "
            f"{len(journal.files)} file(s), {n_entries} entries used{forged}"
        )
        return 1
    if journal.unsigned:
        print(
            f"{journal.unsigned} of {n_entries} entries are unsigned: written before this "
            "site's devices signed their entries, so only the hash chain vouches for them"
        )
        print(
            f"unsigned, chain intact: {len(journal.files)} file(s), {n_entries} entries, "
            f"{journal.signed} signed, {journal.unsigned} unsigned, chains unbroken, "
            "no contradictions"
        )
        return 0
    print(
        f"log intact: {len(journal.files)} file(s), {n_entries} entries, every one signed "
        "by its device's registered key, chains unbroken, no contradictions"
    )
    return 0


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
