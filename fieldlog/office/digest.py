"""A fingerprint of the site files an export reads, to skip sites that did not change.

Content, not modification times: a copy from a USB stick or a FAT drive (2-second times) must
not look changed, and a file edited within the same second must not look unchanged. Reading
the bytes of a small site costs far less than parsing and scheduling it.
"""

from __future__ import annotations

import hashlib
from pathlib import Path

from fieldlog.errors import OutOfBounds, SiteError
from fieldlog.guarded_read import read_capped
from fieldlog.site.files import SCHEDULE_FILE, SITE_FILE
from fieldlog.sync.scan import LOG_DIR

MAX_SITE_BYTES = 512 * 1024 * 1024
"""A site folder whose export files add up to more than this is refused (a wrong folder)."""


def site_files(folder: Path) -> list[Path]:
    """The files an export reads: site.toml, schedule.toml and every journal file."""
    files = [folder / SITE_FILE, folder / SCHEDULE_FILE]
    log = folder / LOG_DIR
    if log.is_dir() and not log.is_symlink():
        files += sorted(
            p for p in log.iterdir() if p.suffix == ".toml" and not p.is_symlink() and p.is_file()
        )
    return files


def files_sha256(folder: Path) -> str:
    """sha256 over each file's relative name and bytes, in name order; missing files count.

    Raises:
        SiteError: the files add up to more than :data:`MAX_SITE_BYTES`.
    """
    h = hashlib.sha256()
    total = 0
    for path in site_files(folder):
        name = path.relative_to(folder).as_posix().encode("utf-8")
        kind = path.name if path.parent == folder else "journal"
        try:
            data = read_capped(path, kind, follow_links=path.parent != folder)
        except FileNotFoundError:
            data = b""
            name += b" (missing)"
        except OutOfBounds as exc:  # a FIFO, a link in log/ or an oversized file
            raise SiteError(exc.problem, file=path, fix=exc.fix) from None
        except OSError as exc:
            raise SiteError(f"cannot read: {exc.strerror}", file=path) from exc
        total += len(data)
        if total > MAX_SITE_BYTES:
            raise SiteError(
                "the site's files are larger than 512 MB",
                file=folder,
                fix="check this is a site folder",
            )
        h.update(len(name).to_bytes(4, "big") + name + len(data).to_bytes(8, "big") + data)
    return h.hexdigest()
