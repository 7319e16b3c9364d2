"""The hash chain that makes a journal file tamper-evident.

Each entry stores ``prev``, the hash of the entry before it in the same file (``""`` for the
first), and ``hash``, the SHA-256 of its own canonical content *including* ``prev``. Changing
any value of an entry breaks its own hash; removing or moving an entry breaks the ``prev`` of
the one that follows; rewriting an entry together with its hash still breaks the next entry's
``prev``. The hash is over the values, not the bytes, so a file re-saved with other line ends
or spacing still verifies, while any changed value does not.

Canonical content is JSON with sorted keys, no spaces and UTF-8 text; dates and times are
tagged (``{"date": "2026-09-18"}``) so a date can never hash the same as the text
``"2026-09-18"``.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Mapping
from datetime import date, datetime, time
from typing import Any


def _tag(value: Any) -> Any:
    if isinstance(value, datetime):
        return {"datetime": value.isoformat()}
    if isinstance(value, date):
        return {"date": value.isoformat()}
    if isinstance(value, time):
        return {"time": value.isoformat()}
    raise TypeError(f"cannot hash a {type(value).__name__}")


def canonical(content: Mapping[str, Any]) -> bytes:
    """The bytes that are hashed: ``content`` without ``hash`` and ``sig``, as canonical JSON.

    The signature is made over the hash (:mod:`fieldlog.journal.signing`), so it cannot be part
    of what is hashed; leaving it out also keeps the hashes of unsigned older entries as they
    were.
    """
    body = {k: v for k, v in content.items() if k not in ("hash", "sig")}
    return json.dumps(
        body,
        sort_keys=True,
        separators=(",", ":"),
        ensure_ascii=False,
        allow_nan=False,
        default=_tag,
    ).encode("utf-8")


def entry_hash(content: Mapping[str, Any]) -> str:
    """SHA-256 (hex) of an entry's canonical content; ``content`` must include ``prev``."""
    return hashlib.sha256(canonical(content)).hexdigest()
