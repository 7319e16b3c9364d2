"""Which git repository and branch a site syncs with: ``git+<url>`` targets, checked.

``fieldlog sync SITE git+file:///srv/jobs.git`` (also ``git+ssh://`` and ``git+https://``)
picks the git transport; anything else is a folder. One repository holds every job, one branch
per site, named from the site's name in site.toml (``fieldlog/<name-slug>``), so every device
and the office land on the same branch without agreeing on folder names.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from urllib.parse import urlsplit

from fieldlog.errors import SyncError

PREFIX = "git+"
SCHEMES = ("file", "ssh", "https")
MAX_URL = 2000
BRANCH_PREFIX = "fieldlog/"


@dataclass(frozen=True)
class GitRemote:
    """A checked git target."""

    url: str
    """What dulwich is given: the target without ``git+``."""
    scheme: str

    @property
    def shown(self) -> str:
        """The target as the user typed it, without any password."""
        parts = urlsplit(self.url)
        if parts.password is None:
            return PREFIX + self.url
        host = parts.hostname or ""
        user = f"{parts.username}:***@" if parts.username else ""
        port = f":{parts.port}" if parts.port else ""
        return PREFIX + parts._replace(netloc=f"{user}{host}{port}").geturl()


def is_git_target(target: str) -> bool:
    """True for ``git+...`` targets (the folder sync handles everything else)."""
    return target.startswith(PREFIX)


def parse_remote(target: str) -> GitRemote:
    """Check a ``git+<url>`` target.

    Raises:
        SyncError: not one of the supported schemes, too long, or no repository path.
    """
    if len(target) > MAX_URL:
        raise SyncError(
            f"the git target is longer than {MAX_URL} characters", fix="check what was pasted"
        )
    url = target.removeprefix(PREFIX)
    parts = urlsplit(url)
    if parts.scheme not in SCHEMES:
        raise SyncError(
            f"'{target[:80]}' is not a git target fieldlog can use",
            fix="use git+file:///path/jobs.git, git+ssh://host/path/jobs.git or "
            "git+https://host/path/jobs.git",
        )
    if not parts.path.strip("/") or any(ord(c) < 32 for c in url):
        raise SyncError(
            f"'{target[:80]}' names no repository",
            fix="add the repository's path, e.g. git+file:///srv/jobs.git",
        )
    if parts.scheme == "file" and parts.netloc not in ("", "localhost"):
        raise SyncError(
            f"'{target[:80]}' names a host in a file URL",
            fix="write git+file:///path (three slashes) for a local repository",
        )
    return GitRemote(url=url, scheme=parts.scheme)


def branch_for(site_name: str) -> bytes:
    """The site's branch ref: ``refs/heads/fieldlog/<slug of the site name>``."""
    slug = re.sub(r"[^a-z0-9]+", "-", site_name.lower()).strip("-")[:60].strip("-")
    if not slug:
        raise SyncError(
            f"the site name {site_name!r} gives no branch name",
            fix="give the site a name with letters or digits in site.toml",
        )
    return f"refs/heads/{BRANCH_PREFIX}{slug}".encode("ascii")
