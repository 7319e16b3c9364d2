"""One sync between a site folder and a target folder (the office share, a stick, a cloud folder).

Steps, each safe to interrupt and repeat:

1. check the two folders (the site must load; the target must exist);
2. remove temporary files a sync that died long ago left behind;
3. seed a target that has no site files yet, and carry the device key files (``devices/``,
   :mod:`fieldlog.sync.devices`: copied when missing, never replaced);
4. list both ``log/`` folders by content hash and plan what each side lacks;
5. copy, each file through a checked temporary name, validating it as a journal first;
6. keep both versions of every conflicting file;
7. bring a newer office schedule revision into the site;
8. give the office a receipt of what both sides now hold (:mod:`fieldlog.sync.receipt_sync`).

Before copying, each side is checked against the receipts that vouch for it
(:mod:`fieldlog.sync.losses`): a copy that brings back entries a side had lost is still made,
and reported as a restore; entries neither side holds any more are reported as lost.

Nothing is ever deleted or overwritten except a journal file by a longer copy that begins with
exactly its bytes, and the site's schedule by a validated newer revision (the old one is kept).
A second run right after the first finds nothing to do and writes nothing.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass
from datetime import UTC, datetime
from functools import partial
from pathlib import Path

from fieldlog.errors import JournalError, SyncError
from fieldlog.home import fieldlog_home
from fieldlog.journal.device import device_id
from fieldlog.journal.names import parse_file_name
from fieldlog.site.files import SCHEDULE_FILE, SITE_FILE, load_site
from fieldlog.sync.checks import JournalCheck, default_check
from fieldlog.sync.conflicts import conflicts_folder, keep_aside
from fieldlog.sync.devices import sync_devices
from fieldlog.sync.forgery import QUARANTINE_DIR, ForgedEntries, SignatureCheck, signature_check
from fieldlog.sync.holdings import Held, common_holdings
from fieldlog.sync.losses import SideLosses, listing_holdings, vouchers
from fieldlog.sync.plan import Conflict, Copy, Direction, LogPlan, plan_logs
from fieldlog.sync.receipt_sync import ReceiptOutcome, give_receipt
from fieldlog.sync.revision import HISTORY_DIR, bring_in_schedule, seed_target
from fieldlog.sync.scan import (
    CONFLICTS_DIR,
    LOG_DIR,
    MAX_FILE_BYTES,
    LogFile,
    Refusal,
    scan_log,
)
from fieldlog.sync.summary import ConflictReport, SyncSummary
from fieldlog.sync.transfer import (
    STALE_AFTER_S,
    LinkedFolder,
    SourceChanged,
    clean_stale_temps,
    copy_verified,
    fsync_folder,
    sha256_file,
)

Progress = Callable[[int, int, int], None]
"""``progress(files_done, files_total, bytes_done)``, called after each copied file."""


@dataclass(frozen=True)
class SyncOptions:
    """How a sync runs; the defaults are what ``fieldlog sync`` uses."""

    check: JournalCheck | None = None
    """Journal validation for every file that lands; None = the journal's own check."""
    max_bytes: int = MAX_FILE_BYTES
    progress: Progress | None = None
    now: float | None = None
    """Wall-clock time (seconds since the epoch) for judging stale temporary files; None skips
    that clean-up. Passed in, so the core never reads the clock."""
    stale_after_s: float = STALE_AFTER_S
    home: Path | None = None
    """This device's data folder (device id, receipt copies); None = :func:`fieldlog_home`."""
    receipts: bool = True
    receipt_copies: bool = True
    """Refresh this device's copies of the receipt chain in the sync itself. The git
    transport sets False and refreshes them once its push has gone through."""
    """Give the target a receipt. False when the "site" side is not a device's copy (the git
    transport's office way round, where the branch's files play the site)."""


@dataclass(frozen=True)
class _Side:
    """What a copy into one side needs to know to tell a restore from new entries."""

    losses: SideLosses
    source: Held
    source_side: str
    signatures: SignatureCheck
    """The receiving side's key check (forged entries never land in its ``log/``)."""


def sync_site(
    site_folder: Path | str, target: Path | str, options: SyncOptions | None = None
) -> SyncSummary:
    """Make the site and the target whole: journal files both ways, schedule revision in.

    Raises:
        SiteError: the site folder does not load (bad input, nothing was touched).
        SyncError: the target is not usable, or a copy could not be written (interrupted:
            both folders are still valid; run sync again).
    """
    opts = options or SyncOptions()
    check = opts.check or default_check()
    site_folder, target = Path(site_folder), Path(target)
    site = load_site(site_folder)
    _check_target(site_folder, target)
    home = opts.home or fieldlog_home()
    device = device_id(home)
    cleaned = _clean(site_folder, target, opts)
    seeded = seed_target(site_folder, target)
    devices = sync_devices(site_folder, target)

    ours, theirs = (
        scan_log(site_folder, "site", max_bytes=opts.max_bytes),
        scan_log(target, "target", max_bytes=opts.max_bytes),
    )
    held_site, held_office = listing_holdings(ours), listing_holdings(theirs)
    vouch = vouchers(site_folder, target, home, device)
    sides = {
        Direction.RECEIVE: _Side(
            SideLosses.of("site", held_site, vouch.site),
            held_office,
            "target",
            signature_check(site_folder),
        ),
        Direction.SEND: _Side(
            SideLosses.of("target", held_office, vouch.office),
            held_site,
            "site",
            signature_check(target),
        ),
    }
    plan = plan_logs(ours.files, theirs.files, _is_prefix)
    refused = [*ours.refused, *theirs.refused]
    done, skipped, copied_bytes, restored = _copy_all(
        plan, site_folder, target, check, opts, refused, sides
    )
    conflicts = [
        _keep_both(c, site_folder, target, check, refused, skipped) for c in plan.conflicts
    ]
    for folder in {site_folder / LOG_DIR, target / LOG_DIR}:
        if folder.is_dir():
            fsync_folder(folder)

    revision = bring_in_schedule(site_folder, target, site, max_bytes=opts.max_bytes)
    after_site = listing_holdings(scan_log(site_folder, "site", max_bytes=opts.max_bytes))
    after_office = listing_holdings(scan_log(target, "target", max_bytes=opts.max_bytes))
    lost = [
        *SideLosses.of("site", after_site, vouch.site).lines(),
        *SideLosses.of("target", after_office, vouch.office).lines(),
    ]
    written = (
        datetime.fromtimestamp(opts.now, UTC).replace(microsecond=0)
        if opts.now is not None
        else None
    )
    receipt = (
        give_receipt(
            site_folder,
            target,
            home,
            device,
            written,
            common_holdings(after_site, after_office),
            opts.receipt_copies,
        )
        if opts.receipts
        else ReceiptOutcome()
    )
    return SyncSummary(
        sent=tuple(c for c in done if c.direction is Direction.SEND),
        received=tuple(c for c in done if c.direction is Direction.RECEIVE),
        unchanged=plan.unchanged,
        seeded=seeded,
        revision=revision,
        conflicts=tuple(conflicts),
        refused=tuple(refused),
        skipped=tuple(skipped),
        cleaned=cleaned,
        bytes_copied=copied_bytes,
        devices=devices,
        restored=tuple(restored),
        lost=tuple(lost),
        receipt=receipt.written,
        receipt_problems=tuple(dict.fromkeys((*vouch.problems, *receipt.problems))),
    )


def _check_target(site_folder: Path, target: Path) -> None:
    """Refuse a target that does not exist, is the site itself, or holds many sites."""
    if not target.is_dir():
        raise SyncError(
            "the target folder does not exist",
            file=target,
            fix="create it first (an empty folder is fine: sync fills it from the "
            "site) or check the drive letter / mount point",
        )
    if os.path.samefile(site_folder, target):
        raise SyncError(
            "the target is the site folder itself",
            file=target,
            fix="give the office's folder for this site",
        )
    has_site_files = any((target / n).exists() for n in (SITE_FILE, SCHEDULE_FILE))
    if not has_site_files and any(
        (p / SITE_FILE).is_file() for p in target.iterdir() if p.is_dir() and not p.is_symlink()
    ):
        raise SyncError(
            "the target holds site folders, not one site's files",
            file=target,
            fix=f"give this site's own folder inside it, e.g. {target / site_folder.name}",
        )


def _clean(site_folder: Path, target: Path, opts: SyncOptions) -> int:
    """Remove stale temporary files in every folder sync writes to."""
    if opts.now is None:
        return 0
    removed = 0
    for side in (site_folder, target):
        for folder in (side, side / LOG_DIR, conflicts_folder(side), side / HISTORY_DIR):
            if not folder.is_symlink():
                removed += clean_stale_temps(folder, opts.now, opts.stale_after_s)
    return removed


def _is_prefix(shorter: LogFile, longer: LogFile) -> bool:
    """True when ``longer`` begins with exactly the bytes of ``shorter``."""
    return sha256_file(longer.path, limit=shorter.size) == shorter.sha256


def _copy_all(
    plan: LogPlan,
    site_folder: Path,
    target: Path,
    check: JournalCheck,
    opts: SyncOptions,
    refused: list[Refusal],
    sides: dict[Direction, _Side],
) -> tuple[list[Copy], list[str], int, list[str]]:
    """Carry out every planned copy; returns (done, skipped names, bytes copied, restores)."""
    done: list[Copy] = []
    skipped: list[str] = []
    restored: list[str] = []
    copied = 0
    total = len(plan.copies)
    unusable = {r.side for r in refused if r.path == LOG_DIR}  # a link or a file: reported
    for n, copy in enumerate(plan.copies, 1):
        to_site = copy.direction is Direction.RECEIVE
        if ("site" if to_site else "target") in unusable:
            continue
        dest_side = site_folder if to_site else target
        side = sides[copy.direction]
        try:
            copied += copy_verified(
                copy.source.path,
                dest_side / LOG_DIR / copy.name,
                copy.source.sha256,
                replaces_sha256=copy.replaces.sha256 if copy.replaces else None,
                validate=partial(_journal_and_keys, check, side.signatures, copy.name),
                make_folder=True,
            )
        except ForgedEntries as exc:
            refused.append(
                _quarantine(
                    copy, dest_side, "site" if to_site else "target", partial(check, copy.name), exc
                )
            )
        except JournalError as exc:
            refused.append(
                Refusal(
                    "target" if to_site else "site",
                    f"{LOG_DIR}/{copy.name}",
                    _not_journal(copy.name, exc),
                )
            )
        except SourceChanged:
            skipped.append(f"{LOG_DIR}/{copy.name}")
        except LinkedFolder:
            _refuse_link(refused, "site" if to_site else "target", LOG_DIR)
        else:
            done.append(copy)
            note = _restore_note(copy, side)
            if note is not None:
                restored.append(note)
        if opts.progress is not None:
            opts.progress(n, total, copied)
    return done, skipped, copied, restored


def _journal_and_keys(
    check: JournalCheck, signatures: SignatureCheck, name: str, data: bytes
) -> None:
    """A sound journal file whose every entry is signed as the receiving side's keys say."""
    check(name, data)
    signatures(name, data)


def _quarantine(
    copy: Copy, dest_side: Path, dest_name: str, check: Callable[[bytes], None], exc: ForgedEntries
) -> Refusal:
    """Keep a file with forged entries in the receiving side's quarantine; the refusal line."""
    from_side = "target" if dest_name == "site" else "site"
    try:
        rel, _ = keep_aside(copy.source, dest_side, check, kept_in=QUARANTINE_DIR)
    except (SourceChanged, LinkedFolder) as why:
        where = f"not kept ({why})"
    else:
        where = f"kept in {dest_name} {rel}, not in {LOG_DIR}/"
    return Refusal(
        from_side, f"{LOG_DIR}/{copy.name}", f"holds forged entries: {exc.problem}; {where}"
    )


def _restore_note(copy: Copy, side: _Side) -> str | None:
    """Why this copy brought back removed entries, or None for new entries."""
    try:
        _, device = parse_file_name(copy.name)
    except JournalError:
        return None  # not a journal file name: the check refused it before it landed
    return side.losses.restore_note(copy.name, device, side.source, side.source_side)


def _keep_both(
    conflict: Conflict,
    site_folder: Path,
    target: Path,
    check: JournalCheck,
    refused: list[Refusal],
    skipped: list[str],
) -> ConflictReport:
    """Save each side's version beside the other's; report where they went."""
    kept: list[str] = []
    pairs = (
        (conflict.target, site_folder, "site", "target"),
        (conflict.site, target, "target", "site"),
    )
    for version, dest, dest_side, from_side in pairs:
        if version is None:
            continue
        try:
            rel, _ = keep_aside(version, dest, partial(check, version.name))
        except JournalError as exc:
            refused.append(
                Refusal(from_side, f"{LOG_DIR}/{version.name}", _not_journal(version.name, exc))
            )
        except SourceChanged:
            skipped.append(f"{LOG_DIR}/{version.name}")
        except LinkedFolder:
            _refuse_link(refused, dest_side, CONFLICTS_DIR)
        else:
            kept.append(f"{dest_side} {rel} (the {from_side}'s version)")
    return ConflictReport(conflict.name, conflict.reason, tuple(kept))


def _not_journal(name: str, exc: JournalError) -> str:
    """The refusal reason for a file the journal check rejected (without repeating its path)."""
    problem = exc.problem.removeprefix(f"{LOG_DIR}/{name}: ").removeprefix(f"{LOG_DIR}/{name}, ")
    return f"is not a valid journal file: {problem}"


def _refuse_link(refused: list[Refusal], side: str, folder: str) -> None:
    """Report once that ``folder`` on ``side`` is a link and nothing was written through it."""
    refusal = Refusal(side, folder, "the folder is a link; links are not followed")
    if refusal not in refused:
        refused.append(refusal)
