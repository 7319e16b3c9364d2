"""Durable writes: a full disk or a read-only folder leaves the log exactly as it was, a
locked file is retried, and two fieldlog processes writing at once both land.

We run as root in CI, where chmod cannot make a folder read-only, so the failures are made by
monkeypatching the system calls the writer uses (``os.write``, ``os.fsync``, ``os.replace``,
the temp file's creation ``store.make_temp``); a real read-only folder is tried too when not
running as root.
"""

from __future__ import annotations

import errno
import os
import subprocess
import sys
import time
from datetime import date

import pytest

from fieldlog import durable
from fieldlog.errors import JournalError
from fieldlog.journal import read_journal, store, verify
from tests.helpers.journal_helpers import DEVICE, ROOT, log_bytes, make_site, rec


@pytest.fixture
def site(tmp_path):
    folder = make_site(tmp_path / "site")
    rec(folder, "note", date(2026, 9, 8), text="before")
    return folder


def _fail(code: int):
    def boom(*args, **kwargs):
        raise OSError(code, os.strerror(code))

    return boom


def _no_temps(folder) -> bool:
    return not [p for p in (folder / "log").iterdir() if p.name.endswith(".tmp")]


@pytest.mark.parametrize(
    ("call", "code", "words"),
    [
        ("write", errno.ENOSPC, "the disk is full"),
        ("fsync", errno.ENOSPC, "the disk is full"),
        ("fsync", errno.EIO, "input/output error"),
        ("replace", errno.EROFS, "read-only"),
    ],
)
def test_failed_write_leaves_the_log_as_it_was(site, monkeypatch, call, code, words):
    before = log_bytes(site)
    monkeypatch.setattr(os, call, _fail(code))
    with pytest.raises(JournalError, match=words) as info:
        rec(site, "note", date(2026, 9, 8), text="after")
    monkeypatch.undo()
    assert "the log was left as it was" in info.value.message
    assert str(site / "log") in info.value.message  # names the file
    assert log_bytes(site) == before and _no_temps(site)
    assert verify(site) == []


def test_read_only_folder_by_refused_temp_file(site, monkeypatch):
    before = log_bytes(site)
    monkeypatch.setattr(store, "make_temp", _fail(errno.EROFS))
    with pytest.raises(JournalError, match="read-only disk"):
        rec(site, "note", date(2026, 9, 9), text="after")
    monkeypatch.undo()
    assert log_bytes(site) == before


@pytest.mark.skipif(
    not hasattr(os, "geteuid") or os.geteuid() == 0, reason="root ignores folder permissions"
)
def test_read_only_folder_for_real(site):
    log = site / "log"
    before = log_bytes(site)
    log.chmod(0o555)
    try:
        with pytest.raises(JournalError, match="cannot"):
            rec(site, "note", date(2026, 9, 8), text="after")
    finally:
        log.chmod(0o755)
    assert log_bytes(site) == before


def test_a_locked_target_is_retried(site, monkeypatch):
    """Windows refuses a rename while a scanner holds the file; the writer retries."""
    real = os.replace
    calls = []

    def flaky(src, dst):
        calls.append(dst)
        if len(calls) < 3:
            raise PermissionError(errno.EACCES, "in use by another process")
        return real(src, dst)

    monkeypatch.setattr(durable, "RETRY_REPLACE", True)
    monkeypatch.setattr(os, "replace", flaky)
    rec(site, "note", date(2026, 9, 8), text="after")
    monkeypatch.undo()
    calls = [c for c in calls if c.parent.name != "last-entry"]  # the device's memory, after
    assert len(calls) == 3 and len(read_journal(site).entries) == 2 and _no_temps(site)


def test_a_second_writer_waits_for_the_lock(site):
    log = site / "log"
    with (
        store.device_lock(log, DEVICE),
        pytest.raises(JournalError, match="still writing"),
        store.device_lock(log, DEVICE, timeout=0.05),
    ):
        pass  # pragma: no cover - the inner lock is never granted
    with store.device_lock(log, "other-device-9", timeout=0.05):
        pass  # another device's lock is independent


WRITER = """
import sys
from datetime import date, datetime, UTC
from pathlib import Path
from fieldlog.journal import record_entry
from fieldlog.site.files import load_site
folder, tag, n, device = Path(sys.argv[1]), sys.argv[2], int(sys.argv[3]), sys.argv[4]
site = load_site(folder)
clock = lambda: datetime(2026, 9, 8, 17, 0, tzinfo=UTC)
for i in range(n):
    record_entry(folder, site, "note", date(2026, 9, 8 + i % 2), {"text": f"{tag}-{i}"},
                 today=date(2026, 9, 25), author=tag, device=device, clock=clock)
"""


@pytest.mark.parametrize(
    "devices", [(DEVICE, DEVICE), (DEVICE, "test-tablet-2")], ids=["same device", "two devices"]
)
def test_two_processes_writing_at_once_both_land(site, devices):
    n = 15
    env = dict(os.environ)  # this test's FIELDLOG_HOME: the key that wrote "before" signs on
    procs = [
        subprocess.Popen(
            [sys.executable, "-c", WRITER, str(site), tag, str(n), dev],
            cwd=ROOT,
            env=env,
            stderr=subprocess.PIPE,
        )
        for tag, dev in zip(("a", "b"), devices, strict=True)
    ]
    for p in procs:
        assert p.wait(timeout=120) == 0, p.stderr.read().decode()
    texts = sorted(e.fields["text"] for e in read_journal(site).entries)
    assert texts == sorted(["before"] + [f"{t}-{i}" for t in "ab" for i in range(n)])
    assert verify(site) == []


def test_append_latency_is_small(site):
    """Not a benchmark, a guard: an append to a day file with 100 entries takes well under a
    second (it re-reads and re-checks the whole log under the lock)."""
    for i in range(100):
        rec(site, "note", date(2026, 9, 8), text=f"n{i}")
    t0 = time.perf_counter()
    rec(site, "note", date(2026, 9, 8), text="timed")
    assert time.perf_counter() - t0 < 1.0
