"""Forgery, tried as an adversary who has read the code: ``fieldlog verify`` alone catches it.

Every case starts from a copy of the signed sample site and forges the log the way someone
with a text editor and this source code would: recomputing every hash fieldlog's own chain
function gives (:func:`fieldlog.journal.chain.entry_hash`), renumbering, inventing devices.
What they do not have is a device's private key. Each forgery must make ``verify`` exit 1
with a line naming the file and the entry, and a forged entry must never reach replay, the
schedule or the daily report. Everything runs through the command line in-process (no
traceback may escape), and two cases through a real process.
"""

from __future__ import annotations

import json
import os
import shutil
import tomllib
from collections.abc import Callable
from datetime import date
from pathlib import Path

import pytest
import tomli_w
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

from fieldlog.cli import main
from fieldlog.journal import read_journal
from fieldlog.journal.chain import entry_hash
from fieldlog.journal.signing import sign
from tests.helpers.journal_helpers import run_cli

LAPTOP = "site-laptop-1"
TABLET = "tablet-2"
FORGED_TEXT = "FORGED: concrete pour approved by the engineer"


# -- an attacker's tools: read a day file, rewrite it with fresh hashes ----------------------


def rows(path: Path) -> list[dict]:
    return tomllib.loads(path.read_text(encoding="utf-8"))["entry"]


def write_rows(
    path: Path, entries: list[dict], *, rechain: bool = True, key: Ed25519PrivateKey | None = None
) -> None:
    """Write ``entries`` as a journal file; with ``rechain``, recompute every prev and hash
    (and, given an attacker's ``key``, sign with it; otherwise keep whatever sig is there)."""
    prev = ""
    out = []
    for row in entries:
        row = dict(row)
        if rechain:
            row["prev"] = prev
            row.pop("hash", None)
            sig = row.pop("sig", None)
            row["hash"] = entry_hash(row)
            if key is not None:
                row["sig"] = sign(key, row["hash"])
            elif sig is not None:
                row["sig"] = sig
            prev = row["hash"]
        out.append(row)
    text = "".join("[[entry]]\n" + tomli_w.dumps(r) + "\n" for r in out)
    path.write_text(text, encoding="utf-8")


def device_files(site: Path, device: str) -> list[Path]:
    return sorted((site / "log").glob(f"*_{device}.toml"))


def next_row(site: Path, device: str, **fields) -> tuple[Path, dict]:
    """A new entry continuing ``device``'s numbering in its last file."""
    path = device_files(site, device)[-1]
    old = rows(path)
    top = max(r["seq"] for f in device_files(site, device) for r in rows(f))
    row = {
        **{k: old[-1][k] for k in ("kind", "day", "written", "author", "device")},
        "id": f"{device}.{top + 1}",
        "seq": top + 1,
        "kind": "note",
        **fields,
    }
    return path, row


# -- the five forgeries a hash chain alone let through ----------------------------------------


def append_with_next_number(site: Path) -> tuple[str, str]:
    path, row = next_row(site, LAPTOP, text=FORGED_TEXT)
    write_rows(path, [*rows(path), row])
    return path.name, row["id"]


def edit_a_value_and_rechain(site: Path) -> tuple[str, str]:
    path = next(
        p for p in device_files(site, LAPTOP) if any(r["kind"] == "remaining" for r in rows(p))
    )
    entries = rows(path)
    target = next(r for r in entries if r["kind"] == "remaining")
    target["days"] += 5
    write_rows(path, entries)
    return path.name, target["id"]


def a_new_day_file(site: Path) -> tuple[str, str]:
    _, row = next_row(site, LAPTOP, text=FORGED_TEXT)
    row["day"] = row["day"].replace(day=26)
    path = site / "log" / f"{row['day']}_{LAPTOP}.toml"
    write_rows(path, [row], key=Ed25519PrivateKey.generate())  # signed, with the wrong key
    return path.name, row["id"]


def a_file_from_an_invented_device(site: Path) -> tuple[str, str]:
    path = site / "log" / "2026-09-25_ghost-phone-7.toml"
    row = {
        "id": "ghost-phone-7.1",
        "seq": 1,
        "kind": "finished",
        "day": rows(device_files(site, LAPTOP)[-1])[0]["day"],
        "written": rows(device_files(site, LAPTOP)[-1])[0]["written"],
        "author": "R. Okafor",
        "device": "ghost-phone-7",
        "activity": "FND-020",
    }
    write_rows(path, [row])
    return path.name, row["id"]


def insert_mid_history_and_renumber(site: Path) -> tuple[str, str]:
    files = device_files(site, LAPTOP)
    inserted_in = files[2]
    seq = min(r["seq"] for r in rows(inserted_in)) + 1
    for path in files:
        entries = []
        for r in rows(path):
            if r["seq"] >= seq:
                r = {**r, "seq": r["seq"] + 1, "id": f"{LAPTOP}.{r['seq'] + 1}"}
            entries.append(r)
        if path == inserted_in:
            first = entries[0]
            entries.insert(
                1,
                {
                    **{k: first[k] for k in ("day", "written", "author", "device")},
                    "id": f"{LAPTOP}.{seq}",
                    "seq": seq,
                    "kind": "note",
                    "text": FORGED_TEXT,
                },
            )
            entries.sort(key=lambda r: r["seq"])
        write_rows(path, entries)
    return inserted_in.name, f"{LAPTOP}.{seq}"


FORGERIES: dict[str, Callable[[Path], tuple[str, str]]] = {
    "appended with the next number and a recomputed hash": append_with_next_number,
    "a value edited and the file re-chained": edit_a_value_and_rechain,
    "a new day file": a_new_day_file,
    "a file from an invented device": a_file_from_an_invented_device,
    "an entry inserted mid-history, everything renumbered": insert_mid_history_and_renumber,
}


def verify(capsys, site: Path) -> tuple[int, str, str]:
    code = main(["verify", str(site)])
    out, err = capsys.readouterr()
    return code, out, err


def test_the_untouched_sample_verifies_fully_signed(capsys, sample_site):
    code, out, err = verify(capsys, sample_site)
    assert code == 0 and err == "", out
    assert "every one signed" in out
    assert "device site-laptop-1: R. Okafor" in out and "device tablet-2: D. Lindqvist" in out


@pytest.mark.parametrize("forge", FORGERIES.values(), ids=FORGERIES.keys())
def test_verify_alone_names_each_forgery(capsys, sample_site, forge):
    file, entry = forge(sample_site)
    code, out, err = verify(capsys, sample_site)
    assert code == 1 and "Traceback" not in err + out
    line = next((ln for ln in out.splitlines() if f"entry {entry}: forged" in ln), None)
    assert line is not None and f"log/{file}" in line, out
    assert entry not in {e.id for e in read_journal(sample_site).entries}  # never used


@pytest.mark.parametrize(
    ("forge", "unchanged"),
    [
        (append_with_next_number, True),
        (a_file_from_an_invented_device, True),
        # Renumbering makes every later entry of the device forged too: none of them is used.
        (insert_mid_history_and_renumber, False),
    ],
)
def test_forged_entries_never_reach_the_schedule_or_the_report(
    capsys, sample_site, tmp_path, forge, unchanged
):
    clean = tmp_path / "clean"
    shutil.copytree(sample_site, clean)
    forge(sample_site)
    for args in (
        ["schedule", "--format", "json"],
        ["report", "--day", "2026-09-25"],
        ["lookahead", "--format", "json"],
    ):
        assert main([args[0], str(clean), *args[1:]]) == 0
        expected, _ = capsys.readouterr()
        assert main([args[0], str(sample_site), *args[1:]]) == 1  # the data, and exit 1
        got, err = capsys.readouterr()
        assert FORGED_TEXT not in got
        if args[0] == "report":  # the report names the problem instead
            assert "forged" in got or "forged" in err
        else:
            assert (got == expected) is unchanged  # the forged entry changed nothing
            assert "forged" in err  # and is reported on stderr


# -- the other tampering, each caught by verify alone ------------------------------------------


def plain_edit(site: Path) -> tuple[str, str, str]:
    path = device_files(site, LAPTOP)[1]
    data = path.read_text(encoding="utf-8")
    target = rows(path)[0]
    path.write_text(data.replace(target["conditions"], "dry, calm", 1), encoding="utf-8")
    return path.name, target["id"], "forged"


def reorder(site: Path) -> tuple[str, str, str]:
    path = device_files(site, LAPTOP)[0]
    entries = rows(path)
    entries[1], entries[2] = entries[2], entries[1]
    write_rows(path, entries, rechain=False)
    return path.name, entries[1]["id"], "reordered"


def swap_between_devices(site: Path) -> tuple[str, str, str]:
    """The tablet's entry moved into the laptop's file of the same day."""
    tablet = device_files(site, TABLET)[0]
    laptop = site / "log" / tablet.name.replace(TABLET, LAPTOP)
    moved = rows(tablet)[0]
    write_rows(laptop, [*rows(laptop), moved], rechain=False)
    tablet.unlink()
    return laptop.name, moved["id"], "misfiled"


def swap_device_names(site: Path) -> tuple[str, str, str]:
    """A tablet entry re-badged as the laptop's, renumbered and re-chained."""
    path, row = next_row(site, LAPTOP)
    stolen = rows(device_files(site, TABLET)[0])[0]
    row.update({k: v for k, v in stolen.items() if k not in ("id", "seq", "device", "day")})
    row["device"] = LAPTOP
    write_rows(path, [*rows(path), row])
    return path.name, row["id"], "forged"


def rename_a_file(site: Path) -> tuple[str, str, str]:
    path = device_files(site, LAPTOP)[2]
    moved = path.with_name(path.name.replace("2026-09-09", "2026-09-12"))
    path.rename(moved)
    return moved.name, rows(moved)[0]["id"], "misfiled"


def truncate_mid_entry(site: Path) -> tuple[str, str, str]:
    path = device_files(site, LAPTOP)[-1]
    data = path.read_bytes()
    path.write_bytes(data[: len(data) - 200])
    return path.name, "", "not TOML"


TAMPERING = {
    f.__name__: f
    for f in (
        plain_edit,
        reorder,
        swap_between_devices,
        swap_device_names,
        rename_a_file,
        truncate_mid_entry,
    )
}


@pytest.mark.parametrize("tamper", TAMPERING.values(), ids=TAMPERING.keys())
def test_verify_names_other_tampering(capsys, sample_site, tamper):
    file, entry, problem = tamper(sample_site)
    code, out, err = verify(capsys, sample_site)
    assert code == 1 and "Traceback" not in err + out
    what = f"entry {entry}: {problem}" if entry else problem
    assert any(f"log/{file}" in ln and what in ln for ln in out.splitlines()), out


def test_a_planted_unsigned_entry_after_signed_ones_is_forged_even_if_its_chain_is_sound(
    capsys, sample_site
):
    """Appending with every hash right but no signature: 'unsigned after signed'."""
    file, entry = append_with_next_number(sample_site)
    _, out, _ = verify(capsys, sample_site)
    assert f"log/{file}: entry {entry}: forged: unsigned, yet device {LAPTOP} signs" in out


def test_two_forgeries_through_a_real_process(sample_site):
    a_new_day_file(sample_site)
    a_file_from_an_invented_device(sample_site)
    r = run_cli("verify", str(sample_site), home=sample_site.parent / "home")
    assert r.returncode == 1 and r.stderr == "" and "Traceback" not in r.stdout
    assert "entry ghost-phone-7.1: forged: device ghost-phone-7 has no registered key" in r.stdout
    assert "does not match device site-laptop-1's registered key" in r.stdout


def test_json_schedule_still_reads_with_a_forged_log(capsys, sample_site):
    a_file_from_an_invented_device(sample_site)
    # It still reads; a forged log is a problem found: exit 1.
    assert main(["schedule", str(sample_site), "--format", "json"]) == 1
    out, err = capsys.readouterr()
    json.loads(out)
    assert "ghost-phone-7.1" in err and "forged" in err


# -- a log written before devices signed --------------------------------------------------------


def strip_signatures(site: Path) -> None:
    """The sample as an older fieldlog wrote it: no sig lines, no devices/ folder."""
    for path in (site / "log").glob("*.toml"):
        text = path.read_text(encoding="utf-8")
        path.write_text(
            "".join(ln for ln in text.splitlines(keepends=True) if not ln.startswith("sig = ")),
            encoding="utf-8",
        )
    shutil.rmtree(site / "devices")


def test_a_log_from_before_signing_says_unsigned_chain_intact(capsys, sample_site):
    strip_signatures(sample_site)
    code, out, err = verify(capsys, sample_site)
    assert code == 0 and err == "", out
    assert "106 of 106 entries are unsigned" in out
    *_, verdict, vouched = out.splitlines()  # never synced: the last line says so
    assert verdict.startswith("unsigned, chain intact: 18 file(s), 106 entries")
    assert vouched.startswith("not yet vouched for: this site has no office receipt")


def test_after_the_upgrade_a_device_signs_from_its_next_entry(capsys, sample_site):
    """The laptop records with a signing fieldlog: its old entries stay usable as unsigned;
    so do the tablet's, not yet registered, for the days up to the site's first signed day
    (the partner's genuine old record must not turn into forgeries)."""
    strip_signatures(sample_site)
    home = Path(os.environ["FIELDLOG_HOME"])  # this machine is the sample's laptop
    (home / "device.toml").write_text(f'device = "{LAPTOP}"\nauthor = "R. Okafor"\n')
    old_top = max(e.seq for e in read_journal(sample_site).entries if e.device == LAPTOP)
    assert (
        main(
            [
                "record",
                str(sample_site),
                "note",
                "first signed entry",
                "--on",
                "2026-09-25",
                "--today",
                "2026-09-25",
            ]
        )
        == 0
    )
    assert capsys.readouterr().out.strip() == f"{LAPTOP}.{old_top + 1}"
    journal = read_journal(sample_site)
    assert journal.devices[LAPTOP].signed_from == old_top + 1
    assert sum(e.device == LAPTOP for e in journal.entries) == old_top + 1  # all still used
    code, out, _ = verify(capsys, sample_site)
    assert code == 0, out
    assert "forged" not in out
    assert "106 of 107 entries are unsigned" in out


def test_an_unregistered_device_after_the_site_began_signing_is_forged(capsys, sample_site):
    """The same upgrade, then an unsigned tablet entry for a later day: forged."""
    strip_signatures(sample_site)
    home = Path(os.environ["FIELDLOG_HOME"])
    (home / "device.toml").write_text(f'device = "{LAPTOP}"\nauthor = "R. Okafor"\n')
    assert (
        main(
            [
                "record",
                str(sample_site),
                "note",
                "first signed entry",
                "--on",
                "2026-09-21",
                "--today",
                "2026-09-25",
            ]
        )
        == 0
    )
    capsys.readouterr()
    last = device_files(sample_site, TABLET)[-1]
    late = [r for r in rows(last) if r["day"] > date(2026, 9, 21)]
    assert late, "the sample's tablet logs after 21 Sep"
    code, out, _ = verify(capsys, sample_site)
    assert code == 1
    assert (
        f"entry {late[0]['id']}: forged: device {TABLET} has no registered key" in out
        and "since 2026-09-21" in out
    )


def test_a_key_file_claiming_a_later_start_does_not_unsign_entries(capsys, sample_site):
    """Planting signed_from = 500 and stripping the last signature: the device signed an
    earlier entry, so an unsigned later one is still forged."""
    key = sample_site / "devices" / f"{LAPTOP}.toml"
    key.write_text(key.read_text().replace("signed_from = 1", "signed_from = 500"))
    path = device_files(sample_site, LAPTOP)[-1]
    text = path.read_text(encoding="utf-8")
    last_sig = [ln for ln in text.splitlines(keepends=True) if ln.startswith("sig = ")][-1]
    path.write_text(text.replace(last_sig, ""), encoding="utf-8")
    last = rows(path)[-1]["id"]
    code, out, _ = verify(capsys, sample_site)
    assert (
        code == 1
        and f"entry {last}: forged: unsigned, yet device {LAPTOP} signed an earlier entry" in out
    )
