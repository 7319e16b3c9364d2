"""The receipt step at the end of a sync: append to the office's chain, refresh the copies.

Rules, each because a receipt must be believable months later:

* a receipt is appended only when what both folders hold differs from the latest receipt, so
  a sync that found nothing to do writes nothing (the second sync leaves both folders as
  they were), and the first is written once both hold an entry in common;
* a chain that does not verify is never appended to: that is reported, and a person restores
  the file from the device's copy;
* an office chain that is an exact beginning of this device's copy lost receipts at the end:
  it is restored from the copy and reported, never quietly;
* the copies (site folder and data folder) are refreshed to the office's bytes after every
  receipt, and whenever they are behind.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

from fieldlog.errors import SyncError
from fieldlog.sync.receipt_files import (
    copy_name,
    device_copies,
    home_folder,
    office_path,
    read_file,
    read_folder,
    write_receipts,
)
from fieldlog.sync.receipts import (
    HEADER,
    RECEIPTS_DIR,
    Holding,
    ReceiptsFile,
    new_receipt,
    parse_receipts,
    receipt_text,
)
from fieldlog.sync.transfer import LinkedFolder


@dataclass(frozen=True)
class ReceiptOutcome:
    """What the receipt step did and found."""

    written: str | None = None
    """e.g. ``receipt 5 in receipts/tab-north-3fa9c1.toml``; None when nothing changed."""
    problems: tuple[str, ...] = ()
    """Chains that do not verify, receipts restored, links refused: a person should look."""


def give_receipt(
    site_folder: Path,
    office: Path,
    home: Path,
    device: str,
    written: datetime | None,
    holds: tuple[Holding, ...],
    keep_copies: bool = True,
) -> ReceiptOutcome:
    """Record in the office (and on this device) what both folders hold after a sync.

    ``keep_copies=False`` leaves this device's copies alone: the git transport refreshes them
    (:func:`copy_office_chain`) only once the office side is pushed, so a copy is never ahead
    of what the office really holds.

    Raises:
        SyncError: a receipts file could not be written (the sync itself is complete).
    """
    path = office_path(office, device)
    label = f"{RECEIPTS_DIR}/{path.name}"
    problems: list[str] = []
    theirs = read_file(path, label) if os.path.lexists(path) else None
    if isinstance(theirs, str):
        return ReceiptOutcome(problems=(f"office {theirs}; no receipt written",))
    if theirs is not None and theirs.problems:
        return ReceiptOutcome(
            problems=tuple(f"office {p}" for p in theirs.problems)
            + (
                f"office {label}: no receipt written; restore the file from this device's copy in "
                f"{RECEIPTS_DIR}/ of the site folder, then run sync again",
            )
        )
    on_disk = theirs.data if theirs is not None else None
    mine = [c for c in device_copies(site_folder, home, device) if not c.problems]
    if theirs is not None and theirs.receipts:
        ours = [c for c in mine if c.chain == theirs.chain]
        best = max(ours, key=lambda c: len(c.receipts), default=None)
        if best is not None and not _begins(theirs, best) and not _begins(best, theirs):
            return ReceiptOutcome(
                problems=(
                    f"office {label}: differs from this device's copy {best.label} (neither begins "
                    "the other); no receipt written; decide which is right, then run sync again",
                )
            )
        if best is not None and len(best.receipts) > len(theirs.receipts):
            problems.append(
                f"office {label}: had lost receipts {len(theirs.receipts) + 1} to "
                f"{len(best.receipts)} since this device's last sync; restored from its copy"
            )
            theirs = best
    data = theirs.data if theirs is not None and theirs.receipts else HEADER.encode("utf-8")
    latest = theirs.latest if theirs is not None else None
    outcome_written = None
    try:
        known = known_to(office, device)
        if (holds or latest is not None) and (
            latest is None or not latest.same_facts(holds, known)
        ):
            receipt = new_receipt(latest, device, written, holds, known)
            data += receipt_text(receipt).encode("utf-8")
            _check_round_trip(label, data, receipt.hash)
            outcome_written = f"receipt {receipt.number} in {label}"
        if outcome_written is None and on_disk is None and not problems:
            return ReceiptOutcome()  # nothing held in common yet: nothing to vouch for
        if data != on_disk:
            write_receipts(path.parent, path.name, data)
    except LinkedFolder as exc:
        problems.append(f"{exc}; the receipt is not kept there")
        return ReceiptOutcome(outcome_written, tuple(problems))
    if keep_copies:
        before = theirs.data if theirs is not None and theirs.receipts else None
        problems += _keep_copies(site_folder, home, device, label, data, before)
    return ReceiptOutcome(outcome_written, tuple(problems))


def copy_office_chain(site_folder: Path, office: Path, home: Path, device: str) -> list[str]:
    """Refresh this device's copies from the office's chain (none there: nothing to do).

    Returns:
        Problems (a copy folder that is a link or a file).
    """
    path = office_path(office, device)
    if not path.is_file() or path.is_symlink():
        return []
    return _keep_copies(
        site_folder, home, device, f"{RECEIPTS_DIR}/{path.name}", path.read_bytes(), None
    )


def _keep_copies(
    site_folder: Path, home: Path, device: str, label: str, data: bytes, before: bytes | None
) -> list[str]:
    """Write ``data`` as this device's copies; a copy that was not ``before`` is reported."""
    problems = []
    chain = parse_receipts(label, data).chain
    for folder in (site_folder / RECEIPTS_DIR, home_folder(home, site_folder)):
        target = folder / copy_name(device, chain)
        held = target.read_bytes() if target.is_file() else None
        if held == data:
            continue
        if before is not None and held != before:
            problems.append(
                f"this device's copy {target} was "
                f"{'missing' if held is None else 'not the office chain'}; "
                "refreshed from the office"
            )
        try:
            write_receipts(folder, target.name, data)
        except LinkedFolder as exc:
            problems.append(f"{exc}; the receipt is not kept there")
    return problems


def _begins(shorter: ReceiptsFile, longer: ReceiptsFile) -> bool:
    """True when ``longer``'s receipts start with exactly ``shorter``'s."""
    return longer.hashes()[: len(shorter.receipts)] == shorter.hashes()


def _check_round_trip(label: str, data: bytes, expected_hash: str) -> None:
    """The file about to be written must read back as a sound chain ending in the new receipt.

    Raises:
        SyncError: the text fieldlog made does not read back (a bug; nothing is written).
    """
    back = parse_receipts(label, data)
    if back.problems or back.latest is None or back.latest.hash != expected_hash:
        raise SyncError(
            "the receipt did not read back as written",
            file=label,
            fix="report this as a fieldlog bug; nothing was written",
        )


def known_to(office: Path, device: str) -> tuple[str, ...]:
    """Devices that synced with ``office`` themselves (a chain they wrote), with ``device``."""
    found = {device}
    for d, f in read_folder(office / RECEIPTS_DIR, RECEIPTS_DIR).files:
        if f.label == f"{RECEIPTS_DIR}/{d}.toml" and f.receipts and f.receipts[0].synced_by == d:
            found.add(d)
    return tuple(sorted(found))
