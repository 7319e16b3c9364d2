"""The cache of checked journal files never makes a forged, edited or re-keyed log read intact.

The reference for every answer is the same log read with nothing cached (a fresh check of
every file, as before the cache existed). Between reads the in-process memories are emptied,
so each read is what a new ``fieldlog`` process sees. The attacker here can read and rewrite
the cache folder's packs (pickle is no secret, nor is sha256) but not the user's cache
secret; HMAC-SHA256 (RFC 2104, Python's ``hmac``) is what stops them.
"""

from __future__ import annotations

import hashlib
import hmac
import os
import pickle
import sys
import warnings
from pathlib import Path

import pytest
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

from fieldlog.journal import check_cache, filecheck, read_journal, reader, verify
from fieldlog.journal.keys import public_hex
from fieldlog.journal.registry import key_file_bytes, parse_key_file
from fieldlog.journal.signing import forget_signatures

DAY_FILE = "2026-09-08_site-laptop-1.toml"
LAPTOP_KEY = "devices/site-laptop-1.toml"


def new_process() -> None:
    """Forget what this process checked, as a new command would start."""
    reader.forget_checks()
    forget_signatures()


def packs(home: Path) -> list[Path]:
    return sorted((home / "cache").glob("journal-*.pack"))


def no_parsing(monkeypatch: pytest.MonkeyPatch) -> list[str]:
    """Record every file checked afresh (a cache miss)."""
    parsed: list[str] = []
    real = filecheck.check_bytes

    def spy(name: str, data: bytes) -> filecheck.FileCheck:
        parsed.append(name)
        return real(name, data)

    monkeypatch.setattr(reader, "check_bytes", spy)
    return parsed


def forge(site: Path) -> None:
    """Change one value of a signed entry, as a text editor would."""
    path = site / "log" / DAY_FILE
    path.write_bytes(path.read_bytes().replace(b"showers clearing", b"dry and bright"))


def test_warm_read_is_the_cold_read_without_parsing(
    sample_site: Path, monkeypatch: pytest.MonkeyPatch, _isolated_home: Path
) -> None:
    before = sorted(p.relative_to(sample_site) for p in sample_site.rglob("*"))
    cold = read_journal(sample_site)
    assert cold.entries and not cold.findings and len(packs(_isolated_home)) == 1
    new_process()
    parsed = no_parsing(monkeypatch)
    assert read_journal(sample_site) == cold  # reference: the uncached read above
    assert parsed == []
    # Nothing is written into the site folder, which travels to the office.
    assert sorted(p.relative_to(sample_site) for p in sample_site.rglob("*")) == before


def test_an_edited_file_is_checked_afresh(
    sample_site: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    read_journal(sample_site)
    forge(sample_site)
    new_process()
    parsed = no_parsing(monkeypatch)
    found = {(f.file, f.problem) for f in verify(sample_site)}
    assert parsed == [DAY_FILE]  # only what changed is parsed again
    assert {(DAY_FILE, "edited"), (DAY_FILE, "forged")} <= found


def _poison(home: Path, site: Path, mac_secret: bytes | None) -> None:
    """Point the forged file's record at the genuine file's check, rewrite the pack with a
    fresh sha256, and sign it with ``mac_secret`` (None: keep the old, now wrong, HMAC)."""
    (pack,) = packs(home)
    data = pack.read_bytes()
    header_end = data.index(b"\n", len(b"fieldlog-journal-cache\n")) + 1
    header, mac, payload = (
        data[:header_end],
        data[header_end : header_end + 32],
        data[header_end + 64 :],
    )
    records = pickle.loads(payload)
    device_key = parse_key_file("site-laptop-1.toml", (site / LAPTOP_KEY).read_bytes()).public_key
    genuine = (site / "log" / DAY_FILE).read_bytes()
    forge(site)
    forged = (site / "log" / DAY_FILE).read_bytes()
    records[check_cache.record_key(DAY_FILE, forged, device_key)] = records[
        check_cache.record_key(DAY_FILE, genuine, device_key)
    ]
    payload = pickle.dumps(records)
    if mac_secret is not None:
        mac = hmac.new(mac_secret, header + payload, "sha256").digest()
    pack.write_bytes(header + mac + hashlib.sha256(payload).digest() + payload)


@pytest.mark.parametrize("mac_secret", [None, b"an attacker's guess at the secret"])
def test_a_poisoned_pack_is_never_trusted(
    sample_site: Path, _isolated_home: Path, mac_secret: bytes | None
) -> None:
    read_journal(sample_site)
    _poison(_isolated_home, sample_site, mac_secret)
    new_process()
    found = {(f.file, f.problem) for f in verify(sample_site)}
    assert {(DAY_FILE, "edited"), (DAY_FILE, "forged")} <= found


@pytest.mark.parametrize("damage", ["truncate", "garbage", "flip"])
def test_a_damaged_pack_is_a_miss_and_rebuilt(
    sample_site: Path, monkeypatch: pytest.MonkeyPatch, _isolated_home: Path, damage: str
) -> None:
    cold = read_journal(sample_site)
    (pack,) = packs(_isolated_home)
    data = pack.read_bytes()
    pack.write_bytes(
        {
            "truncate": data[: len(data) // 2],
            "garbage": os.urandom(len(data)),
            "flip": data[:-10] + bytes([data[-10] ^ 1]) + data[-9:],
        }[damage]
    )
    new_process()
    assert read_journal(sample_site) == cold  # reference: the uncached read
    new_process()
    parsed = no_parsing(monkeypatch)
    assert read_journal(sample_site) == cold and parsed == []  # rebuilt whole


def test_a_changed_key_file_is_never_served_old_verdicts(sample_site: Path) -> None:
    cold = read_journal(sample_site)
    laptop = [e for e in cold.entries if e.device == "site-laptop-1"]
    assert laptop and cold.forged == 0
    path = sample_site / LAPTOP_KEY
    record = parse_key_file(path.name, path.read_bytes())
    other = public_hex(Ed25519PrivateKey.from_private_bytes(b"\x05" * 32).public_key())
    path.write_bytes(key_file_bytes(record.__class__(**{**record.__dict__, "public_key": other})))
    new_process()
    journal = read_journal(sample_site)
    assert journal.forged == len(laptop)  # every laptop signature now fails (Ed25519)
    assert not any(e.device == "site-laptop-1" for e in journal.entries)


def test_a_removed_key_file_is_never_served_old_verdicts(sample_site: Path) -> None:
    read_journal(sample_site)
    (sample_site / LAPTOP_KEY).unlink()
    new_process()
    findings = [f for f in verify(sample_site) if f.problem == "forged"]
    assert findings and all("no registered key" in f.detail for f in findings)


def test_other_code_never_reads_an_old_pack(
    sample_site: Path, monkeypatch: pytest.MonkeyPatch, _isolated_home: Path
) -> None:
    read_journal(sample_site)
    new_process()
    monkeypatch.setattr(check_cache, "_fingerprint", lambda: "a later fieldlog")
    parsed = no_parsing(monkeypatch)
    read_journal(sample_site)
    assert len(parsed) == len(list((sample_site / "log").glob("*.toml")))


def test_least_recently_used_packs_go_first(
    sample_site: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch, _isolated_home: Path
) -> None:
    import shutil

    monkeypatch.setattr(check_cache, "KEEP", 2)
    copies = [sample_site]
    for n in range(2):
        copies.append(tmp_path / f"copy-{n}")
        shutil.copytree(sample_site, copies[-1])
    for site in copies:
        read_journal(site)
    assert len(packs(_isolated_home)) == 2


@pytest.mark.skipif(sys.platform == "win32", reason="POSIX permission bits")
def test_the_secret_is_the_users_alone(sample_site: Path, _isolated_home: Path) -> None:
    read_journal(sample_site)
    secret = _isolated_home / "cache" / check_cache.SECRET_NAME
    assert secret.stat().st_mode & 0o077 == 0 and len(secret.read_bytes()) == 32


def test_an_unusable_cache_folder_only_warns(sample_site: Path, _isolated_home: Path) -> None:
    (_isolated_home / "cache").write_text("not a folder", encoding="utf-8")
    new_process()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        journal = read_journal(sample_site)
    assert journal.entries and not journal.findings
    assert any(issubclass(w.category, check_cache.JournalCacheWarning) for w in caught)


def test_a_truncated_file_is_checked_afresh(sample_site: Path) -> None:
    """Cutting a day file short after it was cached: the whole-log numbering check (run on
    every read, never cached) names the entries that are gone."""
    cold = read_journal(sample_site)
    path = sample_site / "log" / DAY_FILE
    data = path.read_bytes()
    path.write_bytes(data[: data.rindex(b"[[entry]]")])
    gone = max((e for e in cold.entries if e.file == DAY_FILE), key=lambda e: e.seq)
    new_process()
    removed = {f.entry_id for f in verify(sample_site) if f.problem == "removed"}
    assert gone.id in removed
