"""How long one journal append takes as the log grows, against the bare durable write.

Two cases: *warm*, as in the app, where files already checked in this process are not parsed
again; and *cold*, as in a one-shot ``fieldlog record``, where the whole log is parsed and
checked before the entry is accepted.

Run as a script: ``python tests/benchmarks/bench_journal_append.py [ENTRIES]``. It builds a
log of ENTRIES notes (default 3000, about six months of a busy site at ~20 entries a working
day) spread over day files, then times ``record_entry`` (validate against the whole log,
lock, append, fsync, replace) and, as the reference measured in the same run, a bare
``atomic_write`` of a file of the same size (the fsync and rename alone). Prints the ratio.
"""

from __future__ import annotations

import os
import statistics
import sys
import tempfile
import time
from datetime import UTC, date, datetime, timedelta
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from fieldlog.journal import read_journal, record_entry  # noqa: E402
from fieldlog.journal.reader import forget_checks  # noqa: E402
from fieldlog.journal.store import atomic_write  # noqa: E402
from fieldlog.site.files import load_site  # noqa: E402
from tests.helpers.journal_helpers import make_site  # noqa: E402

CLOCK = lambda: datetime(2026, 9, 8, 17, 0, tzinfo=UTC)  # noqa: E731


def main(total: int) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        # Its own data folder: the device key the first append makes never lands in the
        # user's real one.
        os.environ["FIELDLOG_HOME"] = str(Path(tmp) / "home")
        folder = make_site(Path(tmp) / "site")
        site = load_site(folder)
        start = date(2026, 9, 7)
        per_day = 20
        t0 = time.perf_counter()
        for i in range(total):
            day = start + timedelta(days=i // per_day)
            record_entry(
                folder,
                site,
                "note",
                day,
                {"text": f"note {i} " + "x" * 60},
                today=date(2030, 1, 1),
                author="bench",
                device="bench-laptop-1",
                clock=CLOCK,
            )
            if i + 1 in (100, 1000, 3000, 10000):
                print(f"built {i + 1:>6} entries, {time.perf_counter() - t0:7.1f} s so far")
        last = start + timedelta(days=(total - 1) // per_day)
        appends, cold, bare, reads = [], [], [], []
        target = folder / "log" / f"{last}_bench-laptop-1.toml"
        for k in range(7):
            t = time.perf_counter()
            record_entry(
                folder,
                site,
                "note",
                last,
                {"text": f"timed {k}"},
                today=date(2030, 1, 1),
                author="bench",
                device="bench-laptop-1",
                clock=CLOCK,
            )
            appends.append(time.perf_counter() - t)
            forget_checks()
            t = time.perf_counter()
            record_entry(
                folder,
                site,
                "note",
                last,
                {"text": f"cold {k}"},
                today=date(2030, 1, 1),
                author="bench",
                device="bench-laptop-1",
                clock=CLOCK,
            )
            cold.append(time.perf_counter() - t)
            data = target.read_bytes()
            t = time.perf_counter()
            atomic_write(folder / "log" / ".bench-copy", data)
            bare.append(time.perf_counter() - t)
            forget_checks()
            t = time.perf_counter()
            read_journal(folder)
            reads.append(time.perf_counter() - t)
        a, c, b, r = (statistics.median(x) * 1000 for x in (appends, cold, bare, reads))
        print(
            f"log of {total} entries (medians of 7): bare durable write {b:.1f} ms; "
            f"append warm {a:.1f} ms ({a / b:.1f}x bare), cold {c:.1f} ms ({c / b:.1f}x "
            f"bare); read+check whole log cold {r:.1f} ms"
        )


QUICK_ARGS = ("300",)  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 3000)
