"""Benchmark: what signing costs: one signed append in the app path, and verify of a 2-year log.

Run as a script: ``.venv/bin/python tests/benchmarks/bench_signing.py [DAYS] [PER_DAY]``.

1. **Sign + append, app path.** A log of 1,000 signed entries is built through
   ``record_entry``; then appends are timed warm (as in the app: files already checked in
   this process are not parsed again). Reference, same run: a bare ``atomic_write`` of a
   file of the same size (the fsync and rename alone), and one Ed25519 signature.
2. **Verify of a 2-year log.** DAYS working days (default 500) of PER_DAY entries a day
   (default 40) from 2 devices, written straight to day files with fieldlog's own chain and
   signing functions (building it through ``record_entry`` would take far longer than the
   check). ``verify`` is timed cold (no cached checks, no cached signatures). Reference,
   same run: the same log with every signature stripped and no devices registered, i.e. the
   unsigned hash-chain check alone.

All data is invented.
"""

from __future__ import annotations

import shutil
import statistics
import sys
import tempfile
import time
from dataclasses import replace
from datetime import UTC, date, datetime, timedelta
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests"))

import tomli_w  # noqa: E402
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey  # noqa: E402

from fieldlog.journal import read_journal, record_entry, verify  # noqa: E402
from fieldlog.journal.chain import entry_hash  # noqa: E402
from fieldlog.journal.key_seal import seal  # noqa: E402
from fieldlog.journal.keys import public_hex, save_author  # noqa: E402
from fieldlog.journal.reader import forget_checks  # noqa: E402
from fieldlog.journal.registry import DeviceRecord, register  # noqa: E402
from fieldlog.journal.signing import forget_signatures, sign  # noqa: E402
from fieldlog.journal.store import atomic_write  # noqa: E402
from fieldlog.site.files import load_site  # noqa: E402
from tests.helpers.journal_helpers import make_site  # noqa: E402

CLOCK = lambda: datetime(2026, 9, 8, 17, 0, tzinfo=UTC)  # noqa: E731
DEVICES = ("bench-laptop-1", "bench-tablet-2")


def append_latency(total: int = 1000) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        home = Path(tmp) / "home"
        save_author("B. Enchmark", home)
        folder = make_site(Path(tmp) / "site")
        site = load_site(folder)
        start = date(2026, 9, 7)

        def add(day: date, text: str) -> None:
            record_entry(
                folder,
                site,
                "note",
                day,
                {"text": text},
                today=date(2030, 1, 1),
                device=DEVICES[0],
                clock=CLOCK,
                home=home,
            )

        for i in range(total):
            add(start + timedelta(days=i // 20), f"note {i} " + "x" * 60)
        last = start + timedelta(days=(total - 1) // 20)
        target = folder / "log" / f"{last}_{DEVICES[0]}.toml"
        appends, bare, sigs = [], [], []
        key = Ed25519PrivateKey.generate()
        for k in range(15):
            t = time.perf_counter()
            add(last, f"timed {k}")
            appends.append(time.perf_counter() - t)
            data = target.read_bytes()
            t = time.perf_counter()
            atomic_write(folder / "log" / ".bench-copy", data)
            bare.append(time.perf_counter() - t)
            t = time.perf_counter()
            sign(key, "ab" * 32)
            sigs.append(time.perf_counter() - t)
        a, b, s = (statistics.median(x) * 1000 for x in (appends, bare, sigs))
        print(
            f"sign+append, app path, log of {total} entries (medians of 15): {a:.1f} ms "
            f"(target <= 25 ms); bare durable write {b:.1f} ms ({a / b:.1f}x); one Ed25519 "
            f"signature {s:.3f} ms"
        )


def build_log(folder: Path, days: int, per_day: int, signed: bool) -> int:
    """Write ``days`` working days of ``per_day`` entries from two devices; returns entries."""
    keys = {
        d: Ed25519PrivateKey.from_private_bytes(bytes([n + 1]) * 32) for n, d in enumerate(DEVICES)
    }
    log = folder / "log"
    log.mkdir()
    if signed:
        for d in DEVICES:  # sealed, as fieldlog seals every key file it writes
            record = DeviceRecord(
                d, public_hex(keys[d].public_key()), "B. Enchmark", date(2026, 3, 2), 1
            )
            register(folder, replace(record, seal=seal(keys[d], record)))
    seq = dict.fromkeys(DEVICES, 0)
    day, n = date(2026, 3, 2), 0
    for _ in range(days):
        while day.weekday() >= 5:
            day += timedelta(days=1)
        for d in DEVICES:
            prev, blocks = "", []
            for _ in range(per_day // len(DEVICES)):
                seq[d] += 1
                row = {
                    "id": f"{d}.{seq[d]}",
                    "seq": seq[d],
                    "kind": "note",
                    "day": day,
                    "written": datetime(day.year, day.month, day.day, 17, tzinfo=UTC),
                    "author": "B. Enchmark",
                    "device": d,
                    "text": f"pour {seq[d]} checked, slump within limits " + "x" * 40,
                    "prev": prev,
                }
                row["hash"] = entry_hash(row)
                if signed:
                    row["sig"] = sign(keys[d], row["hash"])
                prev = row["hash"]
                blocks.append("[[entry]]\n" + tomli_w.dumps(row))
                n += 1
            (log / f"{day}_{d}.toml").write_text("\n".join(blocks), encoding="utf-8")
        day += timedelta(days=1)
    return n


def timed_verify(folder: Path) -> tuple[float, int]:
    forget_checks()
    forget_signatures()
    t = time.perf_counter()
    found = verify(folder)
    took = time.perf_counter() - t
    assert found == [], found[:3]
    return took, len(read_journal(folder).entries)


def verify_time(days: int, per_day: int) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        signed_site = make_site(Path(tmp) / "signed")
        n = build_log(signed_site, days, per_day, signed=True)
        plain_site = make_site(Path(tmp) / "plain")
        build_log(plain_site, days, per_day, signed=False)
        sig_s, kept = timed_verify(signed_site)
        plain_s, _ = timed_verify(plain_site)
        assert kept == n
        files = len(list((signed_site / "log").iterdir()))
        print(
            f"verify, {days} working days x {per_day} entries/day, 2 devices = {n} entries "
            f"in {files} files: signed {sig_s:.2f} s, unsigned chain only {plain_s:.2f} s "
            f"({sig_s / plain_s:.2f}x); {sig_s / n * 1e6:.0f} us per entry"
        )
        shutil.rmtree(signed_site)


QUICK_ARGS = ("40", "10")  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    append_latency()
    verify_time(
        int(sys.argv[1]) if len(sys.argv) > 1 else 500,
        int(sys.argv[2]) if len(sys.argv) > 2 else 40,
    )
