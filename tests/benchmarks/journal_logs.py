"""Signed journal logs on the sample network for the journal benchmarks (invented data).

:func:`signed_log` writes a site folder holding the 116-activity sample network, moved six
years back so that even a two-year log lies before today, and a log of
``working_days`` working days (40 entries a day from two devices, as in bench_history.py), every
entry signed by its device's registered key, written straight to day files with fieldlog's
own chain and signing functions (building it through ``record_entry`` would take hours).
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

import bench_history  # noqa: E402

from fieldlog.journal.key_seal import seal  # noqa: E402
from fieldlog.journal.keys import public_hex  # noqa: E402
from fieldlog.journal.registry import DeviceRecord, register  # noqa: E402
from fieldlog.site.files import load_site  # noqa: E402

DEVICES = bench_history.DEVICES
KEYS = {d: Ed25519PrivateKey.from_private_bytes(bytes([n + 7]) * 32) for n, d in enumerate(DEVICES)}
"""Fixed keys, so every run writes the same log."""


def signed_log(folder: Path, working_days: int) -> int:
    """Write the site folder ``folder`` with a signed log; returns the number of entries."""
    folder.mkdir(parents=True)
    for part in ("site.toml", "schedule.toml"):
        text = (bench_history.SAMPLE / part).read_text(encoding="utf-8")
        for year, back in (("2026-", "2020-"), ("2027-", "2021-")):
            text = text.replace(year, back)  # six years back: same weekdays, log ends in 2022
        (folder / part).write_text(text, encoding="utf-8")
    site = load_site(folder)
    for d in DEVICES:  # sealed as fieldlog seals every key file it writes
        record = DeviceRecord(d, public_hex(KEYS[d].public_key()), "Bench Foreman", site.start, 1)
        register(folder, replace(record, seal=seal(KEYS[d], record)))
    return bench_history.generate(site, folder, working_days, keys=KEYS)


if __name__ == "__main__":
    n = signed_log(Path(sys.argv[1]), int(sys.argv[2]))
    print(f"{n} entries")
