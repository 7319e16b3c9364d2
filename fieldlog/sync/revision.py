"""Bring the office's newer schedule revision into the site, and seed an empty office folder.

``schedule.toml`` belongs to the office and carries a ``revision`` number: a higher number on
the target wins and comes into the site, nothing ever goes the other way. The incoming file is
written to a temporary name in the site folder and validated there against the site's own
``site.toml`` (calendars and crews) exactly as it will land; a revision that does not load is
refused and the site keeps its schedule. The replaced schedule is kept as
``schedule_history/schedule.r<N>.toml``, because a disputed delay is argued against the
schedule that was in force at the time.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from enum import StrEnum
from pathlib import Path

from fieldlog.durable import make_folder
from fieldlog.errors import FieldlogError, JournalError, SiteError, SyncError
from fieldlog.guarded_read import loads, read_capped
from fieldlog.site.files import SCHEDULE_FILE, SITE_FILE, build_site, read_toml
from fieldlog.site.model import Site
from fieldlog.sync.orphans import orphaned_entries, removed_activities
from fieldlog.sync.transfer import (
    SourceChanged,
    fsync_folder,
    read_plain_file,
    remove_quietly,
    replace,
    sha256_bytes,
    sha256_file,
    write_atomic,
    write_temp,
)

HISTORY_DIR = "schedule_history"


class RevisionStatus(StrEnum):
    """What happened to the schedule during a sync."""

    SAME = "same"
    """Both sides have the same revision and the same schedule."""
    BROUGHT_IN = "brought in"
    """The target's newer revision replaced the site's schedule."""
    TARGET_BEHIND = "target behind"
    """The target holds an older revision; nothing changed (the field never sends schedules)."""
    DIFFERS = "differs"
    """Same revision number, different content: the office must issue a new revision."""
    REFUSED = "refused"
    """The target's schedule cannot be used (not valid, a link, too large)."""


@dataclass(frozen=True)
class RevisionChange:
    """The schedule part of a sync summary."""

    status: RevisionStatus
    site_revision: int
    """The site's revision before the sync."""
    target_revision: int | None
    message: str = ""
    """For DIFFERS, TARGET_BEHIND and REFUSED: what is wrong and what to do."""
    kept_as: str | None = None
    """For BROUGHT_IN: where the replaced schedule was kept, relative to the site folder."""
    removed: tuple[str, ...] = ()
    """Activity ids the new revision no longer has."""
    orphaned: tuple[str, ...] = field(default=())
    """Journal problems the new revision causes (entries for activities it no longer has)."""

    @property
    def is_problem(self) -> bool:
        """True when a person has to look at the schedules."""
        return self.status in (
            RevisionStatus.DIFFERS,
            RevisionStatus.TARGET_BEHIND,
            RevisionStatus.REFUSED,
        )


def seed_target(site_folder: Path, target: Path) -> tuple[str, ...]:
    """Copy site.toml and schedule.toml into a target that lacks them; returns what was copied.

    An empty office folder (or a fresh USB stick folder) thus becomes a valid site folder that
    ``fieldlog schedule`` and ``lookahead`` can read with every device's entries merged.
    Files the target already has are never touched.
    """
    seeded = []
    for name in (SITE_FILE, SCHEDULE_FILE):
        dest = target / name
        if not os.path.lexists(dest):
            write_atomic(dest, (site_folder / name).read_bytes())
            seeded.append(name)
    if seeded:
        fsync_folder(target)
    return tuple(seeded)


def bring_in_schedule(
    site_folder: Path, target: Path, site: Site, *, max_bytes: int
) -> RevisionChange:
    """Compare schedule revisions and bring the target's newer one into the site.

    Args:
        site_folder: the site folder.
        target: the office (target) folder.
        site: the site as loaded before the sync (its revision is the one to beat).
        max_bytes: a larger target schedule is refused unread.

    Raises:
        SyncError: the new schedule could not be written (the site keeps its old one).
    """
    ours = site.revision
    src = target / SCHEDULE_FILE
    if os.path.islink(src) or not src.is_file():
        return _refused(ours, None, f"{SCHEDULE_FILE} on the target is a link or not a file")
    if src.stat().st_size > max_bytes:
        return _refused(ours, None, f"{SCHEDULE_FILE} on the target is over the size limit")
    try:
        theirs_file = read_toml(src)
    except SiteError as exc:
        return _refused(ours, None, exc.message)
    theirs = theirs_file.data.get("revision")
    if not isinstance(theirs, int) or isinstance(theirs, bool):
        return _refused(ours, None, f"{src}: revision is missing or not a whole number")
    if theirs == ours:
        mine = read_toml(site_folder / SCHEDULE_FILE).data
        if mine == theirs_file.data:
            return RevisionChange(RevisionStatus.SAME, ours, theirs)
        return RevisionChange(
            RevisionStatus.DIFFERS,
            ours,
            theirs,
            f"the site's and the target's {SCHEDULE_FILE} differ but both say revision {ours}; "
            "nothing changed. Fix: the office issues the change as a new revision "
            f"(revision = {ours + 1})",
        )
    if theirs < ours:
        return RevisionChange(
            RevisionStatus.TARGET_BEHIND,
            ours,
            theirs,
            f"the target has revision {theirs}, older than the site's {ours}; nothing changed "
            "(the field never sends schedules). Fix: check this is the right office folder",
        )
    return _bring_in(site_folder, src, site, theirs)


def _bring_in(site_folder: Path, src: Path, site: Site, theirs: int) -> RevisionChange:
    """Validate the target's schedule as it will land, keep the old one, then swap."""
    history = site_folder / HISTORY_DIR
    if os.path.islink(history) or (os.path.lexists(history) and not history.is_dir()):
        return _refused(
            site.revision,
            theirs,
            f"{HISTORY_DIR} in the site folder is a link or a file, so the old "
            "schedule cannot be kept there (links are never followed). Fix: "
            f"replace it with a plain folder named {HISTORY_DIR}",
        )
    try:
        data = read_plain_file(src)
    except SourceChanged:
        return _refused(
            site.revision, theirs, "the target's schedule changed while syncing; run sync again"
        )
    tmp = write_temp(site_folder, data, sha256_bytes(data))
    try:
        try:
            new_site = build_site(read_toml(site_folder / SITE_FILE), read_toml(tmp))
        except SiteError as exc:
            located = SiteError(
                exc.problem, file=src, line=exc.line, activity=exc.activity, fix=exc.fix
            )
            remove_quietly(tmp)
            return _refused(
                site.revision,
                theirs,
                f"revision {theirs} does not load with this site's {SITE_FILE}: {located.message}",
            )
        if new_site.revision <= site.revision:  # the office rewrote it while we read it
            remove_quietly(tmp)
            return _refused(
                site.revision,
                new_site.revision,
                "the target's schedule changed while syncing; run sync again",
            )
        kept = _keep_old(site_folder, site.revision)
        replace(tmp, site_folder / SCHEDULE_FILE)
    except BaseException:
        remove_quietly(tmp)
        raise
    fsync_folder(site_folder)
    try:
        orphaned = orphaned_entries(site_folder, site, new_site)
    except JournalError as exc:  # the new schedule is in; say why orphans could not be listed
        orphaned = (f"the journal could not be read to look for orphaned entries: {exc.message}",)
    return RevisionChange(
        RevisionStatus.BROUGHT_IN,
        site.revision,
        new_site.revision,
        kept_as=kept,
        removed=removed_activities(site, new_site),
        orphaned=orphaned,
    )


def _keep_old(site_folder: Path, revision: int) -> str:
    """Copy the current schedule into the history folder; returns its relative path.

    A re-run after an interruption finds the identical copy and does not write it again; a
    different file already under that name (an office that reused a number) gets a hash suffix.
    """
    old = (site_folder / SCHEDULE_FILE).read_bytes()
    digest = sha256_bytes(old)
    history = site_folder / HISTORY_DIR
    try:
        make_folder(history)
    except OSError as exc:
        raise SyncError(
            f"cannot use {HISTORY_DIR}/: {exc.strerror}",
            file=history,
            fix="replace a link there with a real folder; check the site folder is writable",
        ) from exc
    for name in (f"schedule.r{revision}.toml", f"schedule.r{revision}.{digest[:8]}.toml"):
        dest = history / name
        if not os.path.lexists(dest):
            write_atomic(dest, old)
            fsync_folder(history)
            return f"{HISTORY_DIR}/{name}"
        if dest.is_file() and sha256_file(dest) == digest:
            return f"{HISTORY_DIR}/{name}"
    dest = history / f"schedule.r{revision}.{digest}.toml"
    write_atomic(dest, old)
    return f"{HISTORY_DIR}/{dest.name}"


def _refused(ours: int, theirs: int | None, message: str) -> RevisionChange:
    return RevisionChange(RevisionStatus.REFUSED, ours, theirs, message)


def schedule_revision(folder: Path) -> int | None:
    """The ``revision`` in ``folder/schedule.toml`` read without full validation, or None.

    For listings of sites that fail to load: the load error is shown beside it, so a schedule
    that cannot even be parsed simply shows no revision here.
    """
    try:
        raw = read_capped(folder / SCHEDULE_FILE, SCHEDULE_FILE)
        value = loads(raw, SCHEDULE_FILE, SCHEDULE_FILE, bom=True).get("revision")
    except (OSError, FieldlogError):
        return None
    return value if isinstance(value, int) and not isinstance(value, bool) else None
