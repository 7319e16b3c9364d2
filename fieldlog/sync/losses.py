"""Before and after a sync: what each side lost since the receipts, and what sync brought back.

A journal file only grows, so a copy that replaces a shorter file is normally new entries
arriving. But when a side holds less than a receipt says it held (or has a hole in a device's
numbering), a copy that fills the gap is a restore of removed entries: sync still makes the
side whole (nothing may stay lost), and reports it as a finding so a person looks at why.
Whatever neither side still holds is reported as lost.

Which receipts vouch for which side (see :mod:`fieldlog.sync.audit`): the site, by this
device's copies and the office's chain for this device; the office, by every chain in its
``receipts/`` and by this device's copies of the office's own chain.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType

from fieldlog.journal.reader import checked
from fieldlog.sync.audit import Receipts, own_receipts
from fieldlog.sync.holdings import Held, Shortfall, shortfalls
from fieldlog.sync.receipt_files import read_folder
from fieldlog.sync.receipts import RECEIPTS_DIR, ReceiptsFile
from fieldlog.sync.scan import LOG_DIR, Listing
from fieldlog.sync.transfer import SourceChanged, read_plain_file


def listing_holdings(listing: Listing) -> Held:
    """What the journal files of a listing hold per device, read without following links.

    Files that vanish or turn into links while read are left out (the copy step skips them).
    """
    out: dict[str, dict[int, tuple[str, str]]] = {}
    for name, f in sorted(listing.files.items()):
        try:
            entries = checked(name, read_plain_file(f.path)).entries
        except SourceChanged:
            continue
        for e in entries:
            out.setdefault(e.device, {}).setdefault(e.seq, (e.hash, e.file))
    return MappingProxyType({d: MappingProxyType(s) for d, s in out.items()})


@dataclass(frozen=True)
class Vouchers:
    """The receipts that vouch for each side of one sync, and their problems."""

    site: tuple[ReceiptsFile, ...]
    office: tuple[ReceiptsFile, ...]
    problems: tuple[str, ...]


def vouchers(site_folder: Path, office: Path, home: Path, device: str) -> Vouchers:
    """Collect the receipts for both sides (see the module docstring for which is which)."""
    mine: Receipts = own_receipts(site_folder, home)
    there = read_folder(office / RECEIPTS_DIR, f"office {RECEIPTS_DIR}")
    office_mine = there.for_device(device)
    chains = {f.chain for f in office_mine if f.receipts}
    problems = [*mine.problems, *there.problems, *(p for _, f in there.files for p in f.problems)]
    return Vouchers(
        site=(*mine.of(), *office_mine),
        office=(*(f for _, f in there.files), *(f for f in mine.of() if f.chain in chains)),
        problems=tuple(problems),
    )


@dataclass(frozen=True)
class SideLosses:
    """One side's shortfalls by device, and its holdings."""

    side: str
    held: Held
    by_device: Mapping[str, Shortfall]

    @classmethod
    def of(cls, side: str, held: Held, files: tuple[ReceiptsFile, ...]) -> SideLosses:
        """Check ``held`` against ``files``."""
        return cls(side, held, MappingProxyType({s.device: s for s in shortfalls(held, files)}))

    def restore_note(self, name: str, device: str, source: Held, source_side: str) -> str | None:
        """Why copying ``name`` of ``device`` from the other side is a restore, or None.

        Args:
            name: the journal file being copied into this side.
            device: the device the file belongs to.
            source: what the other side holds (the entries the file carries are read there).
            source_side: ``"site"`` or ``"target"``.
        """
        brought = [s for s, (_, f) in source.get(device, {}).items() if f == name]
        mine = self.held.get(device, {})
        top = max(mine, default=0)
        where = f"{self.side} {LOG_DIR}/{name}: restored from the {source_side}"
        lost = self.by_device.get(device)
        if lost is not None and lost.brings_back(brought):
            return f"{where}: {lost.what()}"
        holes = sorted(s for s in brought if s < top and s not in mine)
        if holes:
            return (
                f"{where}: entry {device}.{holes[0]} had been removed from the "
                f"{self.side} although {device}.{top} written after it is still there"
            )
        return None

    def lines(self) -> list[str]:
        """Every shortfall still there, as one line with the side."""
        return [f"{self.side} {s.describe()}" for s in self.by_device.values()]
