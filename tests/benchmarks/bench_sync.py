"""Benchmark: sync 1,000 journal files to an empty office folder, then a no-op second sync.

Run as a script: ``.venv/bin/python tests/benchmarks/bench_sync.py [N]``. Prints wall times and
ratios against a reference measured in the same run on the same folders: a plain
``shutil.copyfile`` of every file (no hashing, validation, fsync or rename), i.e. the cost of
moving the bytes at all. Data is invented.
"""

from __future__ import annotations

import shutil
import sys
import tempfile
import time
from collections.abc import Callable
from datetime import date, timedelta
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from fieldlog.journal.record import _append, _Signer  # noqa: E402
from fieldlog.sync import SyncOptions, sync_site  # noqa: E402
from tests.helpers.sync_helpers import WRITTEN, fixed_key, make_site  # noqa: E402

DAYS_PER_DEVICE = 10


def build(site: Path, files: int, entries_per_file: int) -> int:
    """``files`` real journal day files (10 days each from files/10 devices); total bytes.

    Written with the journal's own low-level append (``record._append``, which skips the
    schedule checks of ``record_entry``: those re-read the whole log per entry, which is right
    for a foreman and far too slow to build 12,000 entries here).
    """
    log = site / "log"
    written: dict[str, int] = {}  # the device's entries so far: its next number follows them
    for n in range(files):
        device = f"dev-{n // DAYS_PER_DEVICE:04d}"
        day = date(2026, 3, 2) + timedelta(days=n % DAYS_PER_DEVICE)
        for k in range(entries_per_file):
            written[device] = written.get(device, 0) + 1
            _append(
                log,
                lambda seq=written[device]: seq,
                device,
                "note",
                day,
                {"text": f"entry {k}: " + "x" * 120},
                "Bench Foreman",
                lambda: WRITTEN,
                _Signer(fixed_key(device), site, day),
            )
    return sum(p.stat().st_size for p in log.iterdir() if not p.name.startswith("."))


def timed(fn: Callable[[], object]) -> float:
    t0 = time.perf_counter()
    fn()
    return time.perf_counter() - t0


def main() -> None:
    files = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    with tempfile.TemporaryDirectory() as tmp:
        base = Path(tmp)
        site = make_site(base / "site")
        size = build(site, files, entries_per_file=12)
        ref_dir = base / "ref"
        ref_dir.mkdir()

        def reference() -> None:
            for p in (site / "log").iterdir():
                shutil.copyfile(p, ref_dir / p.name)

        ref = timed(reference)
        office = base / "office"
        office.mkdir()
        opts = SyncOptions(now=time.time())
        results = []
        first = timed(lambda: results.append(sync_site(site, office, opts)))
        again = timed(lambda: results.append(sync_site(site, office, opts)))
        assert len(results[0].sent) == files and not results[0].has_problems, "first sync"
        assert not results[1].changed_anything, "second sync"
        print(f"{files} journal files, {size / 1048576:.1f} MB (journal's own check)")
        print(f"reference plain copy     {ref:7.3f} s")
        print(f"first sync (all sent)    {first:7.3f} s   x{first / ref:5.1f} of reference")
        print(f"second sync (no-op)      {again:7.3f} s   x{again / ref:5.1f} of reference")


QUICK_ARGS = ("100",)  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    main()
