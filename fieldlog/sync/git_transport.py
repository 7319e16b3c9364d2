"""Git as a second sync transport: a thin wrapper around the folder sync.

One sync with a git remote, each step safe to interrupt:

1. fetch the site's branch (:func:`~fieldlog.sync.git_remote.branch_for`) into a fresh private
   scratch repository under fieldlog's data folder, never inside the site folder;
2. write the fetched files into a scratch folder beside it (:func:`~fieldlog.sync.git_tree.
   write_tree`, which refuses links, climbing paths and oversize files);
3. run the ordinary folder sync between the site and that folder: the same rules apply
   (journal files only appended, conflicts kept side by side, invalid files refused, a newer
   office revision brought in), and whatever the folder sync learns, git gets for free;
4. commit the folder on top of the fetched tree (:func:`~fieldlog.sync.git_tree.overlay_tree`:
   nothing is ever removed from the branch) and push it, expecting the branch where it was;
5. if another device pushed first (or is pushing at this moment: the branch is locked), the
   push is refused: start again from 1 after a short pause, at most
   :data:`MAX_ATTEMPTS` times. The site folder already holds everything it received, so
   nothing is lost by starting over.

The office runs the same command on its copy of the site with ``office=True``: the folder
sync then runs the other way round (the branch's files are the "site", the office's folder is
the "target"), so the office's newer schedule revision goes into the branch, and the devices
bring it in on their next sync exactly as from an office folder.

An interrupted push leaves the remote branch where it was (git moves a branch only after the
objects arrived); the next sync repeats the work. dulwich is pure Python and imported only
here, when a git target is used.
"""

from __future__ import annotations

import shutil
import tempfile
import time
from collections.abc import Callable
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from fieldlog.errors import SyncError
from fieldlog.home import fieldlog_home
from fieldlog.journal.device import device_id
from fieldlog.site.files import SCHEDULE_FILE, SITE_FILE, load_site
from fieldlog.sync.git_remote import GitRemote, branch_for
from fieldlog.sync.git_tree import overlay_tree, write_tree
from fieldlog.sync.receipt_sync import copy_office_chain
from fieldlog.sync.run import SyncOptions, sync_site
from fieldlog.sync.summary import SyncSummary

MAX_ATTEMPTS = 5
"""Pushes tried before giving up when other devices keep pushing first."""
RETRY_PAUSE_S = 0.1
"""Pause before fetching again, longer after each lost race."""
SCRATCH_DIR = "git-scratch"
STALE_SCRATCH_S = 24 * 3600.0
"""A scratch folder older than this was left by a sync that died; it is removed."""


class _Moved(Exception):
    """The remote branch is not where this sync fetched it: another device pushed first."""


@dataclass(frozen=True)
class GitSyncResult:
    """What a git sync did: the folder sync's summary and the git side."""

    summary: SyncSummary
    branch: str
    attempts: int
    pushed: str | None
    """The commit pushed, or None when the branch already held everything."""


def _dulwich() -> Any:
    try:
        from dulwich import client, repo
    except ImportError as exc:
        raise SyncError(
            "syncing with git needs the dulwich package", fix="pip install 'fieldlog[git]'"
        ) from exc
    return client, repo


def sync_git(
    site_folder: Path | str,
    remote: GitRemote,
    options: SyncOptions,
    *,
    office: bool = False,
    before_push: Callable[[int], None] | None = None,
) -> GitSyncResult:
    """Sync a site folder with its branch in a git repository (see the module docstring).

    Args:
        site_folder: the site (a device's, or with ``office=True`` the office's copy).
        remote: the checked target.
        options: as for the folder sync; ``now`` is required (it dates the commit).
        office: run the folder sync the office's way round.
        before_push: called with the attempt number just before each push (tests use it to
            make another device push first).

    Raises:
        SiteError: the site does not load.
        SyncError: the repository cannot be reached or read, a push was interrupted (run the
            same command again), or other devices pushed first :data:`MAX_ATTEMPTS` times.
    """
    if options.now is None:
        raise SyncError("a git sync needs the time to date its commit")
    client_mod, repo_mod = _dulwich()
    site_folder = Path(site_folder)
    site = load_site(site_folder)
    branch = branch_for(site.name)
    identity = f"fieldlog sync {device_id()} <{device_id()}@fieldlog.invalid>".encode()
    try:
        client, path = client_mod.get_transport_and_path(remote.url)
    except ValueError as exc:
        raise SyncError(f"cannot use {remote.shown}: {exc}") from exc
    scratch_root = _scratch_root(options.now)
    for attempt in range(1, MAX_ATTEMPTS + 1):
        scratch = Path(tempfile.mkdtemp(prefix="sync-", dir=scratch_root))
        try:
            repo = repo_mod.Repo.init_bare(str(_mkdir(scratch / "repo.git")))
            try:
                head = _fetch(client, path, repo, branch, remote)
            except _Moved:
                time.sleep(RETRY_PAUSE_S * attempt)  # caught mid-push: read it again
                continue
            files = _mkdir(scratch / "files")
            base_tree = repo[head].tree if head else None
            refused = write_tree(repo, base_tree, files) if base_tree else []
            summary = _folder_sync(site_folder, files, options, office)
            summary = replace(summary, refused=(*summary.refused, *refused))
            tree = overlay_tree(repo, base_tree, files)
            if base_tree == tree:
                return GitSyncResult(
                    _kept(summary, site_folder, files, office, options.home),
                    branch.decode(),
                    attempt,
                    None,
                )
            commit = _commit(repo, tree, head, identity, options.now, site.name)
            if before_push is not None:
                before_push(attempt)
            try:
                _push(client, path, repo, branch, head, commit, remote)
            except _Moved:
                time.sleep(RETRY_PAUSE_S * attempt)  # let the other device finish its push
                continue
            return GitSyncResult(
                _kept(summary, site_folder, files, office, options.home),
                branch.decode(),
                attempt,
                commit.decode(),
            )
        finally:
            shutil.rmtree(scratch, ignore_errors=False)
    raise SyncError(
        f"other devices kept pushing to {remote.shown} first ({MAX_ATTEMPTS} tries)",
        fix="run the same sync again in a minute; nothing was lost",
    )


def _mkdir(path: Path) -> Path:
    path.mkdir()
    return path


def _scratch_root(now: float) -> Path:
    """fieldlog's private scratch folder, cleared of folders that dead syncs left behind."""
    root = fieldlog_home() / SCRATCH_DIR
    try:
        root.mkdir(parents=True, exist_ok=True)
        for old in root.iterdir():
            if (
                old.is_dir()
                and not old.is_symlink()
                and (now - old.stat().st_mtime > STALE_SCRATCH_S)
            ):
                shutil.rmtree(old)
    except OSError as exc:
        raise SyncError(
            f"cannot use fieldlog's scratch folder: {exc.strerror}",
            file=root,
            fix="check fieldlog's data folder is writable",
        ) from exc
    return root


def _folder_sync(site_folder: Path, files: Path, options: SyncOptions, office: bool) -> SyncSummary:
    """The folder sync between the site and the branch's files, the right way round."""
    has_site = (files / SITE_FILE).is_file() and (files / SCHEDULE_FILE).is_file()
    if office and has_site:  # the branch plays the site: no device receipt to give
        return sync_site(files, site_folder, replace(options, receipts=False))
    return sync_site(site_folder, files, replace(options, receipt_copies=False))


def _kept(
    summary: SyncSummary, site_folder: Path, files: Path, office: bool, home: Path | None
) -> SyncSummary:
    """After the branch holds the receipt: refresh this device's copies of its chain (never
    before, so a push that loses the race leaves no copy ahead of the branch)."""
    if office:
        return summary
    home = home or fieldlog_home()
    problems = copy_office_chain(site_folder, files, home, device_id(home))
    return replace(summary, receipt_problems=(*summary.receipt_problems, *problems))


def _fetch(client: Any, path: str, repo: Any, branch: bytes, remote: GitRemote) -> bytes | None:
    """Fetch the site's branch; its commit id, or None when the branch does not exist yet."""
    seen: list[bytes] = []

    def wants(refs: dict[bytes, bytes], depth: int | None = None) -> list[bytes]:
        if branch not in refs:
            return []
        seen.append(bytes(refs[branch]))
        return [refs[branch]]

    try:
        client.fetch(path, repo, determine_wants=wants)
    except KeyError as exc:
        # An object the branch names is not readable: another device is pushing to the same
        # repository this moment. Fetch again, like a branch that moved under a push.
        raise _Moved from exc
    except Exception as exc:  # dulwich raises many kinds; each becomes one SyncError line
        raise SyncError(
            f"cannot fetch from {remote.shown}: {_why(exc)}",
            fix="check the address, the network and that the repository exists (git init --bare)",
        ) from exc
    # The commit asked for, not the branch as the fetch reports it at its end: another device
    # pushing meanwhile can have moved the branch to a commit this fetch never brought over
    # (seen with two syncs to one repository at once: "KeyError" from the new commit). The
    # push then finds the branch moved and the sync starts again.
    head = seen[-1] if seen else None
    if head is not None and head not in repo:
        raise _Moved
    return head


def _commit(
    repo: Any, tree: Any, parent: Any, identity: bytes, now: float, site_name: str
) -> bytes:
    from dulwich.objects import Commit

    commit = Commit()
    commit.tree = tree
    commit.parents = [parent] if parent else []
    commit.author = commit.committer = identity
    commit.author_time = commit.commit_time = int(now)
    commit.author_timezone = commit.commit_timezone = 0
    commit.encoding = b"UTF-8"
    commit.message = f"fieldlog sync: {site_name}\n".encode()
    repo.object_store.add_object(commit)
    return bytes(commit.id)


def _push(
    client: Any,
    path: str,
    repo: Any,
    branch: bytes,
    expected: bytes | None,
    commit: bytes,
    remote: GitRemote,
) -> None:
    """Move the remote branch from ``expected`` to ``commit``, or raise :class:`_Moved`."""
    from dulwich.objects import ZERO_SHA

    def update(refs: dict[bytes, bytes]) -> dict[bytes, bytes]:
        if refs.get(branch, ZERO_SHA) != (expected or ZERO_SHA):
            raise _Moved
        return {branch: commit}

    from dulwich.file import FileLocked

    try:
        result = client.send_pack(path, update, generate_pack_data=repo.generate_pack_data)
    except _Moved:
        raise
    except FileLocked as exc:  # another device is moving the branch this very moment
        raise _Moved from exc
    except Exception as exc:  # dulwich raises many kinds; each becomes one SyncError line
        raise SyncError(
            f"the push to {remote.shown} did not complete: {_why(exc)}",
            fix="run the same sync again; the repository keeps its last "
            "complete state and the site lost nothing",
        ) from exc
    status = (result.ref_status or {}).get(branch)
    if status:
        raise _Moved


def _why(exc: Exception) -> str:
    text = str(exc).strip().splitlines()
    return f"{type(exc).__name__}: {text[0][:200]}" if text else type(exc).__name__
