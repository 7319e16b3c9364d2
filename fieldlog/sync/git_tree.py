"""Between a git tree and a plain folder, without trusting the tree.

:func:`write_tree` puts a fetched commit's files into the scratch folder the folder sync then
works on. Only regular files with plain relative paths are written; links, submodules, paths
that climb out (``..``), ``.git`` anywhere, and files over the size limit are refused and left
out of the folder (the folder sync refuses anything else it dislikes, such as a journal file
that is not valid).

:func:`overlay_tree` builds the tree to commit: the fetched tree, with every file of the folder
added or replaced on top. Nothing the fetched tree had is ever dropped, refused entries
included, so a sync can add to the branch but never remove from it.
"""

from __future__ import annotations

import os
import stat
from collections.abc import Iterator
from pathlib import Path
from typing import Any

from fieldlog.errors import SyncError
from fieldlog.sync.scan import MAX_FILE_BYTES, Refusal

MAX_FILES = 100_000
"""A site branch with more files than this is refused (not a site)."""
REGULAR = (0o100644, 0o100755)
_NOT_ALLOWED = {"", ".", ".."}


def _path_problem(path: bytes) -> str | None:
    """Why a tree path is not safe to write, or None."""
    try:
        text = path.decode("utf-8")
    except UnicodeDecodeError:
        return "the name is not UTF-8"
    parts = text.split("/")
    if any(p in _NOT_ALLOWED or p.lower() == ".git" for p in parts):
        return "the path climbs out, is empty or names .git"
    if any(ord(c) < 32 or c in '\\:*?"<>|' for c in text):
        return "the name has characters some systems cannot store"
    return None


def write_tree(repo: Any, tree_id: bytes, folder: Path) -> list[Refusal]:
    """Write the files of ``tree_id`` into the empty ``folder``; returns what was refused.

    Raises:
        SyncError: the tree has more than :data:`MAX_FILES` entries.
    """
    refused: list[Refusal] = []
    count = 0
    for entry in repo.object_store.iter_tree_contents(tree_id):
        count += 1
        if count > MAX_FILES:
            raise SyncError(
                f"the site's branch holds more than {MAX_FILES:,} files",
                fix="check the repository: a site has far fewer",
            )
        name = entry.path.decode("utf-8", "replace")
        problem = _path_problem(entry.path)
        if problem is None and entry.mode not in REGULAR:
            problem = "not a plain file (a link or a submodule)"
        blob = None
        if problem is None:
            blob = repo.object_store[entry.sha]
            if blob.raw_length() > MAX_FILE_BYTES:
                problem = f"larger than {MAX_FILE_BYTES // 1048576} MB"
        if problem is not None or blob is None:
            refused.append(Refusal("target", name, f"left in the repository: {problem}"))
            continue
        dest = folder.joinpath(*name.split("/"))
        dest.parent.mkdir(parents=True, exist_ok=True)
        fd = os.open(dest, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o644)
        with os.fdopen(fd, "wb") as out:
            out.write(blob.as_raw_string())
    return refused


def folder_files(folder: Path) -> Iterator[tuple[bytes, Path]]:
    """(tree path, file) for every regular file under ``folder``; links are not followed."""
    for root, dirs, files in os.walk(folder, followlinks=False):
        dirs.sort()
        for name in sorted(files):
            path = Path(root) / name
            if stat.S_ISREG(path.lstat().st_mode):
                yield path.relative_to(folder).as_posix().encode("utf-8"), path


def overlay_tree(repo: Any, base_tree: bytes | None, folder: Path) -> bytes:
    """The id of a tree: ``base_tree``'s entries, then every file of ``folder`` on top."""
    from dulwich.index import commit_tree
    from dulwich.objects import Blob

    entries: dict[bytes, tuple[Any, int]] = {}  # Any: dulwich's ObjectID
    if base_tree is not None:
        for e in repo.object_store.iter_tree_contents(base_tree):
            entries[e.path] = (e.sha, e.mode)
    for tree_path, path in folder_files(folder):
        blob = Blob.from_string(path.read_bytes())
        repo.object_store.add_object(blob)
        mode = entries[tree_path][1] if tree_path in entries else 0o100644
        entries[tree_path] = (blob.id, mode)
    return bytes(
        commit_tree(
            repo.object_store, [(p, sha, mode) for p, (sha, mode) in sorted(entries.items())]
        )
    )
