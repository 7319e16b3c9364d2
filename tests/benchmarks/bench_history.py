"""Benchmark: the forecast history against recomputing every day from scratch, same run.

Run as a script (not collected by pytest)::

    .venv/bin/python tests/benchmarks/bench_history.py          # both cases
    .venv/bin/python tests/benchmarks/bench_history.py sample   # 2-year log, sample network
    .venv/bin/python tests/benchmarks/bench_history.py big      # 10k activities, 60 days

Two cases, each with a log generated here into a temporary site folder:

* ``sample``: the 116-activity sample network, a two-year log (about 500 working days, 40
  entries a working day from two devices: weather, crews, starts, finishes, remaining days
  that sometimes go up, lost days and hours, readiness items, instructions, deliveries,
  notes). Progress follows the schedule with random slips, so the finish really moves;
* ``big``: a 10,000-activity synthetic network (tests/benchmarks/synthetic.py), 60 days.

The day files are written in the journal's on-disk format with its own primitives
(``Entry.stored``, ``entry_hash``, ``tomli_w``, the file header), which is what
``record_entry`` appends, without its per-entry validation against the whole log (that would
take hours for 20,000 entries); the log is then read with ``read_journal`` and must have no
findings.

Printed per case: reading the journal, ``build_history`` by day (every logged day), and the
reference measured in the same run: for every logged day a full ``replay`` and
``compute_schedule`` (what ``fieldlog schedule --as-of D`` does after reading the files), and
the same with every activity's row read (the history reads them for its evidence and PPC),
and the ratios reference / history. Targets: sample <= 3 s, big <= 10 s for the history.
"""

from __future__ import annotations

import random
import sys
import tempfile
import time
from collections.abc import Mapping
from datetime import UTC, date, datetime, timedelta
from pathlib import Path
from types import MappingProxyType
from typing import Any

import tomli_w
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from synthetic import synthetic_site, write_site_folder  # noqa: E402

from fieldlog.engine.cpm import compute_schedule  # noqa: E402
from fieldlog.engine.progress import Progress, Status  # noqa: E402
from fieldlog.engine.readiness import holds  # noqa: E402
from fieldlog.history import build_history  # noqa: E402
from fieldlog.journal import read_journal, replay  # noqa: E402
from fieldlog.journal.chain import entry_hash  # noqa: E402
from fieldlog.journal.entries import Entry  # noqa: E402
from fieldlog.journal.names import file_name  # noqa: E402
from fieldlog.journal.record import FILE_HEADER  # noqa: E402
from fieldlog.journal.signing import sign  # noqa: E402
from fieldlog.site.files import load_site  # noqa: E402
from fieldlog.site.model import Site  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "sample_sites" / "kestrel-yard"
DEVICES = ("site-laptop-1", "tablet-2")
PER_DAY = 40


class Writer:
    """Day files in the journal's format, one hash chain per file, seq per device."""

    def __init__(self, folder: Path, keys: Mapping[str, Ed25519PrivateKey] | None = None) -> None:
        self.keys = keys or {}
        """Device -> signing key; a device without one writes unsigned entries."""
        self.log = folder / "log"
        self.log.mkdir(parents=True, exist_ok=True)
        self.seq = dict.fromkeys(DEVICES, 0)
        self.files: dict[str, list[bytes]] = {}
        self.prev: dict[str, str] = {}

    def add(self, device: str, kind: str, day: date, fields: dict[str, Any]) -> str:
        self.seq[device] += 1
        seq = self.seq[device]
        name = file_name(day, device)
        entry = Entry(
            id=f"{device}.{seq}",
            seq=seq,
            kind=kind,
            day=day,
            written=datetime(day.year, day.month, day.day, 16, tzinfo=UTC),
            author="Bench Foreman",
            device=device,
            fields=MappingProxyType({k: v for k, v in fields.items() if v is not None}),
            prev=self.prev.get(name, ""),
        )
        body = entry.stored()
        body["hash"] = entry_hash(body)
        if device in self.keys:
            body["sig"] = sign(self.keys[device], body["hash"])
        self.prev[name] = body["hash"]
        self.files.setdefault(name, []).append(b"[[entry]]\n" + tomli_w.dumps(body).encode())
        return entry.id

    def close(self) -> None:
        for name, blocks in self.files.items():
            (self.log / name).write_bytes(FILE_HEADER + b"\n" + b"\n".join(blocks))


def generate(
    site: Site,
    folder: Path,
    working_days: int,
    seed: int = 11,
    keys: Mapping[str, Ed25519PrivateKey] | None = None,
) -> int:
    """A log that follows the schedule with random slips (signed by ``keys`` per device);
    returns the number of entries."""
    rng = random.Random(seed)
    w = Writer(folder, keys)
    cal_name = site.calendar
    progress: dict[str, Progress] = {}
    lost: dict[str, set[date]] = {}
    needs: list[str] = []
    day, logged, count = site.start, 0, 0
    while logged < working_days:
        status = day - timedelta(days=1)
        result = compute_schedule(
            site, status, progress, lost_days={k: frozenset(v) for k, v in lost.items()}
        )
        cal = result.calendars[cal_name]
        if not cal.is_working(day):
            day += timedelta(days=1)
            continue
        logged += 1
        n = 0

        def add(device: str, kind: str, on: date = day, **fields: Any) -> str:
            nonlocal n
            n += 1
            return w.add(device, kind, on, fields)

        add(DEVICES[0], "weather", conditions="dry", high=15.0, low=5.0, unit="C")
        if rng.random() < 0.04:
            add(
                DEVICES[0],
                "lost-time",
                cause=rng.choice(["weather", "access", "client"]),
                whole_day=True,
                note="site stood down",
            )
            for name in site.calendars:
                lost.setdefault(name, set()).add(day)
        else:
            for r in result.activities:
                if n > PER_DAY - 12:
                    break
                if r.status is Status.NOT_STARTED and r.early_start <= day:
                    if rng.random() < 0.9:
                        add(DEVICES[0], "started", activity=r.id)
                        progress[r.id] = Progress(actual_start=day)
                elif r.status is Status.IN_PROGRESS:
                    if r.early_finish <= day and rng.random() < 0.85:
                        add(DEVICES[0], "finished", activity=r.id)
                        p = progress[r.id]
                        progress[r.id] = Progress(actual_start=p.actual_start, actual_finish=day)
                    elif rng.random() < 0.3:
                        left = max(1, r.remaining - 1 + (1 if rng.random() < 0.2 else 0))
                        add(DEVICES[0], "remaining", activity=r.id, days=left)
                        p = progress[r.id]
                        progress[r.id] = Progress(
                            actual_start=p.actual_start, remaining=left, remaining_as_of=day
                        )
            if rng.random() < 0.1:
                add(DEVICES[0], "lost-time", cause=rng.choice(["weather", "materials"]), hours=2.0)
        if rng.random() < 0.05:
            open_ = [r.id for r in result.activities if r.status is Status.NOT_STARTED]
            if open_:
                needs.append(
                    add(
                        DEVICES[1],
                        "need",
                        activity=rng.choice(open_),
                        what="shop drawings",
                        category="drawings",
                    )
                )
        if needs and rng.random() < 0.05:
            add(DEVICES[1], "cleared", item=needs.pop(0))
        if rng.random() < 0.05:
            add(
                DEVICES[1],
                "instruction",
                text="revise the set-out",
                given_by="client (inv.)",
                form="written",
            )
        for k in range(6):
            add(DEVICES[0], "crew", trade=f"trade {k}", headcount=rng.randint(2, 9), hours=40.0)
        while n < PER_DAY:
            device = DEVICES[n % 2]
            kind = rng.choice(["note", "delivery", "visitor"])
            if kind == "note":
                add(device, "note", text=f"routine note {n}")
            elif kind == "delivery":
                add(device, "delivery", what="ready-mix concrete", quantity="6 m3")
            else:
                add(device, "visitor", name="Inspector (invented)")
        count += n
        day += timedelta(days=1)
    w.close()
    return count


def from_scratch(site: Site, entries: Any, days: list[date], rows: bool = False) -> None:
    """The reference: every day replayed and scheduled on its own (with ``rows``, every
    activity's row read too, as the history's evidence and PPC read them)."""
    for d in days:
        rp = replay(site, entries, d)
        r = compute_schedule(
            site, d, rp.progress, lost_days=rp.lost_days, holds=holds(rp.readiness, d)
        )
        _ = (r.finish, r.driving_path, r.finish_float)
        if rows:
            _ = r.activities


def case(name: str, site_folder: Path, working_days: int, target: float) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "site"
        folder.mkdir()
        for part in ("site.toml", "schedule.toml"):
            (folder / part).write_bytes((site_folder / part).read_bytes())
        site = load_site(folder)
        t = time.perf_counter()
        n = generate(site, folder, working_days)
        print(
            f"[{name}] {len(site.activities)} activities, {working_days} working days, "
            f"{n} entries, generated in {time.perf_counter() - t:.1f} s"
        )
        t = time.perf_counter()
        journal = read_journal(folder)
        read = time.perf_counter() - t
        assert not journal.findings, journal.findings[:3]
        days = sorted({e.day for e in journal.entries})
        t = time.perf_counter()
        h = build_history(site, journal.entries, by="day")
        hist = time.perf_counter() - t
        t = time.perf_counter()
        from_scratch(site, journal.entries, days)
        ref = time.perf_counter() - t
        t = time.perf_counter()
        from_scratch(site, journal.entries, days, rows=True)
        ref_rows = time.perf_counter() - t
        print(
            f"[{name}] read journal {read:.2f} s; history by day {hist:.2f} s "
            f"(target <= {target:.0f} s: {'ok' if hist <= target else 'MISSED'})"
        )
        print(
            f"[{name}] every day from scratch: {ref:.2f} s (finish and paths only), "
            f"{ref_rows:.2f} s (rows read too); ratios {ref / hist:.1f}x and "
            f"{ref_rows / hist:.1f}x"
        )
        print(
            f"[{name}] finish moved {h.total_movement:+d} working days over "
            f"{len(h.windows)} days; weeks with PPC {len(h.weeks)}"
        )


def main(which: str) -> None:
    if which in ("sample", "all"):
        case("sample", SAMPLE, 500, 3.0)
    if which in ("big", "all"):
        with tempfile.TemporaryDirectory() as tmp:
            big = write_site_folder(synthetic_site(10_000), Path(tmp) / "big")
            case("big", big, 60, 10.0)


QUICK_ARGS = ("sample",)  # tests/benchmarks/run.py --quick


if __name__ == "__main__":
    main(sys.argv[1] if len(sys.argv) > 1 else "all")
