"""What a log folder holds, per device, and what it lacks against the receipts it was given.

Every device numbers its entries 1, 2, 3 ... across all its files, so what a folder holds of a
device is a set of numbers with the hash and file of each. A receipt says "both folders held
entry D.N with hash H (in file F)": a log that now lacks D.N, or holds it with another hash,
lost or changed it after that sync. The finding names the device, the entry expected and the
file, because that is what a person restores it from.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from types import MappingProxyType

from fieldlog.journal import Journal
from fieldlog.journal.names import LOG_DIR
from fieldlog.sync.receipts import Holding, Receipt, ReceiptsFile

Held = Mapping[str, Mapping[int, tuple[str, str]]]
"""device -> entry number -> (entry hash, file name)."""


def holdings_of(journal: Journal) -> Held:
    """What ``journal`` holds per device (the first copy of an entry when one is duplicated)."""
    out: dict[str, dict[int, tuple[str, str]]] = {}
    for e in journal.entries:
        out.setdefault(e.device, {}).setdefault(e.seq, (e.hash, e.file))
    return MappingProxyType({d: MappingProxyType(s) for d, s in out.items()})


def common_holdings(a: Held, b: Held) -> tuple[Holding, ...]:
    """Per device, the highest entry both sides hold with the same hash (device order)."""
    out = []
    for device in sorted(set(a) & set(b)):
        mine, theirs = a[device], b[device]
        shared = [s for s in mine if s in theirs and mine[s][0] == theirs[s][0]]
        if shared:
            top = max(shared)
            out.append(Holding(device, top, mine[top][0], mine[top][1]))
    return tuple(out)


@dataclass(frozen=True)
class Expected:
    """An entry a receipt says this folder held, and which receipt says so."""

    holding: Holding
    source: str
    """e.g. ``receipt 4 of receipts/tab-north-3fa9c1.toml``."""


@dataclass(frozen=True)
class Shortfall:
    """A device whose entries this folder no longer holds as a receipt says it did."""

    device: str
    expected: Expected
    """The highest entry of the device a receipt vouches for that is missing or changed."""
    held_up_to: int
    """The highest entry number of the device the folder holds now (0: none)."""
    missing_up_to: int
    """Every number up to this one that the folder does not hold is missing."""
    held: frozenset[int]
    """The device's entry numbers the folder holds."""
    changed: bool
    """True when the expected entry is there but with another hash."""

    def brings_back(self, seqs: Iterable[int]) -> bool:
        """True when a file holding entries ``seqs`` of the device restores a missing one."""
        return any(s <= self.missing_up_to and s not in self.held for s in seqs)

    def what(self) -> str:
        """What happened to the expected entry, and which receipt says so (no location)."""
        h = self.expected.holding
        if self.changed:
            return (
                f"entry {h.entry_id} was changed after a sync: {self.expected.source} "
                "records another hash for it"
            )
        now = (
            f"holds {self.device}'s entries only up to {self.device}.{self.held_up_to}"
            if self.held_up_to
            else f"holds none of {self.device}'s entries"
        )
        return (
            f"entry {h.entry_id} was removed after a sync: {self.expected.source} records "
            f"it, but the log {now}"
        )

    def describe(self) -> str:
        """One line: file, entry, what happened, which receipt says so, the fix."""
        h = self.expected.holding
        return (
            f"{LOG_DIR}/{h.file}: {self.what()}; restore the file from the office or another copy"
        )


def expectations(files: Iterable[ReceiptsFile]) -> dict[str, list[Expected]]:
    """Every entry the receipts in ``files`` vouch for, per device (highest first)."""
    out: dict[str, dict[tuple[int, str], Expected]] = {}
    for f in files:
        for r in f.receipts:
            for h in r.holds:
                out.setdefault(h.device, {}).setdefault(
                    (h.seq, h.entry_hash), Expected(h, _source(r, f))
                )
    return {d: sorted(v.values(), key=lambda e: -e.holding.seq) for d, v in out.items()}


def _source(r: Receipt, f: ReceiptsFile) -> str:
    return f"receipt {r.number} of {f.label}"


def shortfalls(held: Held, files: Iterable[ReceiptsFile]) -> tuple[Shortfall, ...]:
    """Devices whose entries ``held`` lacks or holds changed, against every receipt given.

    One shortfall per device, for the highest entry found wrong; the holes below the highest
    entry held count as missing too (the journal reports those as well), so sync knows
    whether a copy brings any entry back.
    """
    out = []
    for device, wanted in sorted(expectations(files).items()):
        have = held.get(device, {})
        top = max(have, default=0)
        bad = [
            e
            for e in wanted
            if e.holding.seq not in have or have[e.holding.seq][0] != e.holding.entry_hash
        ]
        if not bad:
            continue
        worst = bad[0]
        out.append(
            Shortfall(
                device,
                worst,
                top,
                max(worst.holding.seq, top),
                frozenset(have),
                changed=worst.holding.seq in have,
            )
        )
    return tuple(out)
