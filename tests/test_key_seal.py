"""The seal of a device key file: an edited author, registration day or first signed entry is
found by ``verify``; the entries of that device are still checked and used.

Outside check: each seal is verified here with the cryptography library's Ed25519 (RFC 8032;
the library itself is checked against the RFC's vectors in tests/test_signing.py) over the
message the module documents, rebuilt in this file from the five values with hashlib.
"""

from __future__ import annotations

import hashlib
import tomllib
from datetime import date
from pathlib import Path

import pytest
from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

from fieldlog.cli import main
from fieldlog.errors import JournalError
from fieldlog.journal import verify
from fieldlog.journal.registry import parse_key_file
from tests.helpers.sync_helpers import append_entry

LAPTOP = Path("devices") / "site-laptop-1.toml"


def run_verify(capsys: pytest.CaptureFixture[str], site: Path) -> tuple[int, str]:
    code = main(["verify", str(site)])
    return code, capsys.readouterr().out


def documented_message(doc: dict) -> bytes:
    """The sealed message as key_seal's docstring states it, rebuilt independently."""
    values = [doc["device"], doc["public_key"], doc["author"]]
    values += [doc["registered"].isoformat(), str(doc["signed_from"])]
    digest = hashlib.sha256("\n".join(values).encode("utf-8")).digest()
    return b"fieldlog device key file v1\n" + digest


def test_the_samples_key_files_carry_good_seals(sample_site: Path, capsys) -> None:
    for path in sorted((sample_site / "devices").glob("*.toml")):
        doc = tomllib.loads(path.read_text(encoding="utf-8"))
        public = Ed25519PublicKey.from_public_bytes(bytes.fromhex(doc["public_key"]))
        public.verify(bytes.fromhex(doc["seal"]), documented_message(doc))  # raises if bad
    code, out = run_verify(capsys, sample_site)
    assert code == 0 and "log intact" in out


def test_a_new_device_seals_the_key_file_it_writes(sample_site: Path, capsys) -> None:
    append_entry(sample_site, date(2026, 9, 28), "tablet-new-3", "crane booked for Thursday")
    path = sample_site / "devices" / "tablet-new-3.toml"
    doc = tomllib.loads(path.read_text(encoding="utf-8"))
    public = Ed25519PublicKey.from_public_bytes(bytes.fromhex(doc["public_key"]))
    public.verify(bytes.fromhex(doc["seal"]), documented_message(doc))
    assert verify(sample_site) == []


@pytest.mark.parametrize(
    ("old", "new"),
    [
        ('author = "R. Okafor"', 'author = "Q. Nobody"'),
        ("registered = 2026-09-07", "registered = 2026-09-21"),
        ("signed_from = 1", "signed_from = 2"),
    ],
    ids=["author", "registered", "signed_from"],
)
def test_an_edited_value_breaks_the_seal_and_is_named(
    sample_site: Path, capsys, old: str, new: str
) -> None:
    code, _ = run_verify(capsys, sample_site)  # a warm report cache must not hide the edit
    assert code == 0
    path = sample_site / LAPTOP
    text = path.read_text(encoding="utf-8")
    assert old in text
    path.write_text(text.replace(old, new), encoding="utf-8")
    code, out = run_verify(capsys, sample_site)
    assert code == 1
    assert "devices/site-laptop-1.toml: bad key file: its seal does not match" in out
    assert "106 entries used" in out  # the entries are still checked against the key and kept
    assert "forged" not in out


def test_a_removed_seal_is_a_finding(sample_site: Path, capsys) -> None:
    path = sample_site / LAPTOP
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    path.write_text("".join(line for line in lines if not line.startswith("seal")), "utf-8")
    code, out = run_verify(capsys, sample_site)
    assert code == 1
    assert "devices/site-laptop-1.toml: bad key file: it carries no seal" in out
    assert [f.problem for f in verify(sample_site)] == ["bad key file"]


@pytest.mark.parametrize("value", ['"abc"', '"' + "g" * 128 + '"', "12"])
def test_a_seal_that_is_not_a_signature_is_refused_by_name(sample_site: Path, value: str) -> None:
    path = sample_site / LAPTOP
    lines = path.read_text(encoding="utf-8").splitlines()
    lines = [f"seal = {value}" if line.startswith("seal") else line for line in lines]
    with pytest.raises(JournalError, match="seal is not 128 hex digits"):
        parse_key_file(path.name, "\n".join(lines).encode())


def test_schedule_still_reads_a_log_whose_key_file_was_edited(sample_site: Path, capsys) -> None:
    path = sample_site / LAPTOP
    path.write_text(path.read_text("utf-8").replace("R. Okafor", "Q. Nobody"), "utf-8")
    assert main(["schedule", str(sample_site)]) == 0
    assert "KEY-900" in capsys.readouterr().out
