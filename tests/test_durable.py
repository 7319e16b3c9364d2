"""The durable-write primitives shared by the journal and sync."""

from __future__ import annotations

import errno
import os
from pathlib import Path

import pytest

from fieldlog import durable


def test_write_all_survives_partial_writes(tmp_path: Path, monkeypatch: pytest.MonkeyPatch):
    real = os.write
    monkeypatch.setattr(os, "write", lambda fd, data: real(fd, bytes(data[:3])))
    fd = os.open(tmp_path / "f", os.O_WRONLY | os.O_CREAT)
    try:
        durable.write_all(fd, b"a whole day of entries")
    finally:
        os.close(fd)
    assert (tmp_path / "f").read_bytes() == b"a whole day of entries"


@pytest.mark.parametrize("code", sorted(durable.FOLDER_FSYNC_REFUSALS))
def test_a_folder_fsync_refusal_is_tolerated(tmp_path, monkeypatch, code):
    def refuse(fd: int) -> None:
        raise OSError(code, os.strerror(code))

    monkeypatch.setattr(os, "fsync", refuse)
    durable.fsync_folder(tmp_path)  # the file itself was flushed already: nothing to raise


def test_other_folder_fsync_errors_are_raised(tmp_path, monkeypatch):
    def fail(fd: int) -> None:
        raise OSError(errno.EIO, "I/O error")

    monkeypatch.setattr(os, "fsync", fail)
    with pytest.raises(OSError, match="I/O error"):
        durable.fsync_folder(tmp_path)


def test_a_rename_held_open_for_good_gives_up(tmp_path, monkeypatch):
    """Windows-style refusals are retried REPLACE_TRIES times, then the error is raised."""
    calls = []

    def held(src, dst):
        calls.append(dst)
        raise PermissionError(errno.EACCES, "in use by another process")

    monkeypatch.setattr(durable, "RETRY_REPLACE", True)
    monkeypatch.setattr(durable.time, "sleep", lambda s: None)
    monkeypatch.setattr(os, "replace", held)
    with pytest.raises(PermissionError):
        durable.replace_with_retry(tmp_path / "a", tmp_path / "b")
    assert len(calls) == durable.REPLACE_TRIES


def test_make_temp_makes_a_new_private_file_as_mkstemp_does(tmp_path: Path):
    fd, path = durable.make_temp(tmp_path, ".~day.toml", ".tmp")
    try:
        os.write(fd, b"entry")
    finally:
        os.close(fd)
    name = Path(path).name
    assert Path(path).parent == tmp_path
    assert name.startswith(".~day.toml") and name.endswith(".tmp") and len(name) == 26
    assert Path(path).read_bytes() == b"entry"
    if os.name == "posix":
        assert os.stat(path).st_mode & 0o777 == 0o600  # as tempfile.mkstemp (its docs)


def test_make_temp_takes_another_name_when_one_is_taken_even_by_a_link(tmp_path, monkeypatch):
    draws = iter([b"\x00" * 6, b"\x00" * 6, b"\x01" * 6])
    monkeypatch.setattr(os, "urandom", lambda n: next(draws))
    taken = tmp_path / ".x000000000000.tmp"
    target = tmp_path / "elsewhere"
    taken.symlink_to(target)  # a planted link (dangling): never opened, never followed
    fd, path = durable.make_temp(tmp_path, ".x", ".tmp")
    os.close(fd)
    assert Path(path).name == ".x010101010101.tmp"
    assert not target.exists() and taken.is_symlink()


def test_make_temp_in_a_missing_folder_raises(tmp_path):
    with pytest.raises(FileNotFoundError):
        durable.make_temp(tmp_path / "gone", ".x", ".tmp")
