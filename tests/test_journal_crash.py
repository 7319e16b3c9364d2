"""Crash safety: kill the writer with SIGKILL at random moments, then check the log.

After every kill: ``verify`` finds nothing wrong, every entry whose writer reported success is
there, no entry appears that was never attempted, and nothing half-written is visible (a
temporary file may be left behind, which readers ignore and the next write removes).

Two loops: the real command (``python -m fieldlog record``) killed at random points of its
run; and a forked in-process writer that appends as fast as it can and is
killed every few milliseconds, which lands many more kills inside the write itself. Both print
how many kills struck while a temporary file existed (mid-write); run with ``-s`` to see them.
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from datetime import date

import pytest

from fieldlog.journal import read_journal, record_entry, verify
from fieldlog.site.files import load_site
from tests.helpers.journal_helpers import AUTHOR, DEVICE, ROOT, FixedClock, make_site

pytestmark = pytest.mark.skipif(
    not hasattr(signal, "SIGKILL") or not hasattr(os, "fork"), reason="needs POSIX signals and fork"
)


def _temps(folder) -> list[str]:
    """Temporary files in log/; none when no writer got as far as creating log/.

    A kill can land before the writer's first ``mkdir``: a child forked from a large test
    process spends 5-20 ms (more on a busy machine) on copy-on-write faults and loading the
    site before it writes anything, so "log/ does not exist yet" is a normal state here.
    """
    log = folder / "log"
    if not log.exists():
        return []
    return [p.name for p in log.iterdir() if p.name.endswith(".tmp")]


def _check(folder, landed: set[str], attempted: set[str]) -> None:
    assert verify(folder) == []
    texts = {e.fields["text"] for e in read_journal(folder).entries}
    assert landed <= texts, f"lost: {sorted(landed - texts)}"
    assert texts <= attempted, f"never attempted: {sorted(texts - attempted)}"


def test_sigkill_the_record_command_at_random_moments(tmp_path):
    folder = make_site(tmp_path / "site")
    env = {**os.environ, "FIELDLOG_HOME": str(tmp_path / "home")}
    rnd = random.Random(20260918)

    def start(i: int) -> subprocess.Popen:
        day = f"2026-09-{8 + i % 3:02d}"
        return subprocess.Popen(
            [
                sys.executable,
                "-m",
                "fieldlog",
                "record",
                str(folder),
                "note",
                f"n{i}",
                "--on",
                day,
                "--today",
                "2026-09-25",
                "--author",
                AUTHOR,
            ],
            cwd=ROOT,
            env=env,
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
        )

    t0 = time.perf_counter()
    first = start(0)
    assert first.wait(timeout=60) == 0, first.stderr.read()
    full = time.perf_counter() - t0
    landed, attempted, mid_write = {"n0"}, {"n0"}, 0
    for i in range(1, 6):
        attempted.add(f"n{i}")
        p = start(i)
        # Most kills late in the run, where the write happens; some anywhere.
        time.sleep(full * (rnd.uniform(0.6, 1.1) if rnd.random() < 0.8 else rnd.random()))
        p.send_signal(signal.SIGKILL)
        if p.wait(timeout=60) == 0:
            landed.add(f"n{i}")
        mid_write += bool(_temps(folder))
        _check(folder, landed, attempted)
    print(
        f"\ncommand loop: 5 kills, {len(landed) - 1} finished first, "
        f"{mid_write} struck mid-write; one run takes {full * 1000:.0f} ms"
    )


def _writer(folder, out_fd: int, start_at: int) -> None:  # pragma: no cover - child process
    site = load_site(folder)
    clock = FixedClock()
    i = start_at
    while True:
        record_entry(
            folder,
            site,
            "note",
            date(2026, 9, 8 + i % 3),
            {"text": f"f{i}"},
            today=date(2026, 9, 25),
            author=AUTHOR,
            device=DEVICE,
            clock=clock,
        )
        os.write(out_fd, f"f{i}\n".encode())
        i += 1


def test_sigkill_a_fast_writer_many_times(tmp_path):
    folder = make_site(tmp_path / "site")
    rnd = random.Random(7)
    # The first entry makes the device's key and registers it; the kills then strike the
    # entry writes themselves, as on a device in use.
    record_entry(
        folder,
        load_site(folder),
        "note",
        date(2026, 9, 8),
        {"text": "f0"},
        today=date(2026, 9, 25),
        author=AUTHOR,
        device=DEVICE,
        clock=FixedClock(),
    )
    landed: set[str] = {"f0"}
    attempted: set[str] = {"f0"}
    mid_write = rounds = 0
    next_i = 1
    deadline = time.perf_counter() + 2.5
    while time.perf_counter() < deadline:
        r, w = os.pipe()
        pid = os.fork()
        if pid == 0:  # pragma: no cover - child
            os.close(r)
            try:
                _writer(folder, w, next_i)
            finally:
                os._exit(0)
        os.close(w)
        # The first kill lands at once, before the child can have created log/ (the case that
        # made this test flaky on a busy machine); later ones at random points.
        time.sleep(rnd.uniform(0.002, 0.06) if rounds else 0)
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
        with os.fdopen(r, "rb") as pipe:
            reported = pipe.read().decode().split()
        landed.update(reported)
        # The child may have written one more entry than it reported, never more.
        top = next_i + len(reported)
        attempted.update(f"f{k}" for k in range(next_i, top + 1))
        next_i = top + 1
        mid_write += bool(_temps(folder))
        rounds += 1
    _check(folder, landed, attempted)
    print(
        f"\nfork loop: {rounds} kills, {len(landed)} entries reported written, "
        f"{mid_write} kills struck mid-write"
    )
    assert rounds >= 10
