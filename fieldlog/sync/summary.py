"""What a sync did, as a value, and its short printed summary (text or JSON).

The summary is the foreman's receipt: how many journal files went each way, whether a new
schedule revision came in (and which field entries it left without an activity), and every
conflict or refused file with what to do about it. Counts come first so a glance is enough.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field

from fieldlog.reports.words import count
from fieldlog.sync.devices import DeviceSync
from fieldlog.sync.plan import Copy
from fieldlog.sync.revision import RevisionChange, RevisionStatus
from fieldlog.sync.scan import Refusal


@dataclass(frozen=True)
class ConflictReport:
    """A conflict as reported: the file, why, and where each version was kept."""

    name: str
    reason: str
    kept: tuple[str, ...] = ()
    """Lines like ``site conflicts/<name>.<hash>.toml (the target's version)``."""


@dataclass(frozen=True)
class SyncSummary:
    """Everything one sync did and found."""

    sent: tuple[Copy, ...]
    received: tuple[Copy, ...]
    unchanged: int
    seeded: tuple[str, ...]
    """Files copied into a target that had no site files yet."""
    revision: RevisionChange
    conflicts: tuple[ConflictReport, ...]
    refused: tuple[Refusal, ...]
    skipped: tuple[str, ...]
    """Files that changed while syncing (someone was writing); the next sync takes them."""
    cleaned: int
    """Leftover temporary files of an interrupted sync that were removed."""
    bytes_copied: int
    restored: tuple[str, ...] = ()
    """Copies that brought back entries a side had lost since a receipt (a finding)."""
    lost: tuple[str, ...] = ()
    """Entries a receipt vouches for that neither side holds any more."""
    receipt: str | None = None
    """The receipt given to the office (``receipt 5 in receipts/<device>.toml``), or None
    when what both sides hold had not changed since the last one."""
    receipt_problems: tuple[str, ...] = ()
    """Receipts files that do not verify, were restored, or are links."""

    devices: DeviceSync = field(default_factory=DeviceSync)
    """Device key files carried (``devices/``) and any that differ between the sides."""

    @property
    def has_problems(self) -> bool:
        """True when a person should look: conflicts, refusals, skipped files, schedules,
        restored or lost entries, receipts that do not verify."""
        return bool(
            self.conflicts
            or self.refused
            or self.skipped
            or self.revision.is_problem
            or self.restored
            or self.lost
            or self.receipt_problems
            or self.devices.has_problems
        )

    @property
    def changed_anything(self) -> bool:
        """True when either folder was written to."""
        return bool(
            self.sent
            or self.received
            or self.seeded
            or self.cleaned
            or self.receipt
            or self.devices.sent
            or self.devices.received
            or self.revision.status is RevisionStatus.BROUGHT_IN
            or any(r.kept for r in self.conflicts)
        )

    @property
    def exit_code(self) -> int:
        """0 when all is well, 1 when conflicts, refusals or schedule problems were found."""
        return 1 if self.has_problems else 0


def _files(copies: tuple[Copy, ...]) -> str:
    grown = sum(1 for c in copies if c.grown)
    files = count(len(copies), "journal file", "journal files")
    return f"{files} ({len(copies) - grown} new, {grown} grown)" if copies else files


def render_text(s: SyncSummary) -> str:
    """The printed summary, a few lines, deterministic (no paths, no times)."""
    pad = " " * 11
    lines = []
    if s.seeded:
        lines.append(f"{'seeded':<11}target was empty: copied {', '.join(s.seeded)} from the site")
    lines.extend(_device_lines(s.devices))
    lines.append(f"{'sent':<11}{_files(s.sent)} to the target")
    lines.append(f"{'received':<11}{_files(s.received)} from the target")
    lines.append(
        f"{'unchanged':<11}{count(s.unchanged, 'journal file', 'journal files')} "
        "already the same on both sides"
    )
    lines.append(f"{'schedule':<11}{_revision_line(s.revision)}")
    if s.revision.removed:
        lines.append(f"{pad}activities no longer in the schedule: {', '.join(s.revision.removed)}")
    if s.revision.orphaned:
        lines.append(
            f"{'orphaned':<11}{len(s.revision.orphaned)} journal entries name "
            "activities the new revision no longer has (kept in the journal):"
        )
        lines.extend(f"{pad}- {m}" for m in s.revision.orphaned)
    lines.append(f"{'conflicts':<11}{len(s.conflicts)}")
    for c in s.conflicts:
        lines.append(f"{pad}- log/{c.name}: {c.reason}")
        lines.extend(f"{pad}  kept: {k}" for k in c.kept)
    lines.append(f"{'refused':<11}{len(s.refused)}")
    lines.extend(f"{pad}- {r.describe()}" for r in s.refused)
    if s.skipped:
        lines.append(f"{'skipped':<11}{len(s.skipped)} changed while syncing; run sync again:")
        lines.extend(f"{pad}- {name}" for name in s.skipped)
    if s.restored:
        lines.append(
            f"{'restored':<11}{count(len(s.restored), 'journal file', 'journal files')} "
            "brought back after "
            "entries had been removed since a sync:"
        )
        lines.extend(f"{pad}- {r}" for r in s.restored)
    if s.lost:
        lines.append(
            f"{'lost':<11}{len(s.lost)} receipted entries are on neither side; "
            "restore them from a backup:"
        )
        lines.extend(f"{pad}- {r}" for r in s.lost)
    lines.append(f"{'receipt':<11}{s.receipt or 'unchanged: the last receipt still holds'}")
    lines.extend(f"{pad}- {p}" for p in s.receipt_problems)
    if s.cleaned:
        lines.append(
            f"{'cleaned':<11}{s.cleaned} leftover temporary files of an interrupted sync removed"
        )
    if s.has_problems:
        lines.append(
            "result     look at the findings above; both folders are valid and "
            "nothing was overwritten"
        )
    elif not s.changed_anything:
        lines.append("result     nothing to do: both sides already match")
    else:
        lines.append("result     both sides are up to date")
    return "\n".join(lines) + "\n"


def _device_lines(d: DeviceSync) -> list[str]:
    """Lines about key files, only when something happened to them."""
    pad = " " * 11
    lines = []
    if d.sent or d.received:
        lines.append(
            f"{'keys':<11}{len(d.sent)} device key file(s) sent, {len(d.received)} received"
        )
    for c in d.conflicts:
        lines.append(f"{'KEY CLASH':<11}{c}")
    lines.extend(f"{pad}- {r.describe()}" for r in d.refused)
    lines.extend(f"{pad}- {name} changed while syncing; run sync again" for name in d.skipped)
    return lines


def _revision_line(r: RevisionChange) -> str:
    if r.status is RevisionStatus.SAME:
        return f"revision {r.site_revision} on both sides"
    if r.status is RevisionStatus.BROUGHT_IN:
        return (
            f"revision {r.site_revision} -> {r.target_revision} brought in from the target "
            f"(revision {r.site_revision} kept as {r.kept_as})"
        )
    return f"PROBLEM: {r.message}"


def render_json(s: SyncSummary) -> str:
    """The summary as JSON for scripts and the app."""

    def copies(cs: tuple[Copy, ...]) -> list[dict]:
        return [
            {"name": c.name, "grown": c.grown, "bytes": c.source.size, "sha256": c.source.sha256}
            for c in cs
        ]

    data = {
        "sent": copies(s.sent),
        "received": copies(s.received),
        "unchanged": s.unchanged,
        "seeded": list(s.seeded),
        "schedule": {
            "status": s.revision.status.value,
            "site_revision": s.revision.site_revision,
            "target_revision": s.revision.target_revision,
            "message": s.revision.message,
            "kept_as": s.revision.kept_as,
            "removed": list(s.revision.removed),
            "orphaned": list(s.revision.orphaned),
        },
        "conflicts": [
            {"name": c.name, "reason": c.reason, "kept": list(c.kept)} for c in s.conflicts
        ],
        "refused": [{"side": r.side, "path": r.path, "reason": r.reason} for r in s.refused],
        "skipped": list(s.skipped),
        "devices": {
            "sent": list(s.devices.sent),
            "received": list(s.devices.received),
            "conflicts": list(s.devices.conflicts),
            "refused": [
                {"side": r.side, "path": r.path, "reason": r.reason} for r in s.devices.refused
            ],
            "skipped": list(s.devices.skipped),
        },
        "restored": list(s.restored),
        "lost": list(s.lost),
        "receipt": {"written": s.receipt, "problems": list(s.receipt_problems)},
        "cleaned": s.cleaned,
        "bytes_copied": s.bytes_copied,
        "problems": s.has_problems,
    }
    return json.dumps(data, indent=2) + "\n"
