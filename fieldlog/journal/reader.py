"""Reading a site's whole journal: every file of every device, in replay order.

Reading never stops at a damaged file and never hides one either: entries that can be read are
returned, and everything wrong (a file that is not TOML, an edited entry, a stray file) comes
back as :class:`~fieldlog.journal.filecheck.Finding` values on the journal, which ``verify``
prints and which replay turns into problems, so every screen and report shows them.
"""

from __future__ import annotations

from collections import OrderedDict
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

from fieldlog.errors import JournalError, OutOfBounds
from fieldlog.guarded_read import read_capped
from fieldlog.journal.check_cache import Cached, CheckPack, Verdicts, record_key
from fieldlog.journal.entries import REPLAY_ORDER, Entry
from fieldlog.journal.filecheck import FileCheck, Finding, check_bytes
from fieldlog.journal.names import LOG_DIR, is_working_file, parse_file_name
from fieldlog.journal.registry import DeviceRecord, read_registry
from fieldlog.journal.signing import check_signatures, signature_ok


@dataclass(frozen=True)
class Journal:
    """Every entry read from a site's log folder, in replay order, and what is wrong with it.

    The findings travel with the entries in this one value, so whatever replays the journal
    (:func:`fieldlog.journal.replay` takes the journal itself) also reports a damaged file.
    """

    entries: tuple[Entry, ...] = ()
    """The entries that may be used: forged and content-edited entries are left out (they
    are in :attr:`findings`)."""
    findings: tuple[Finding, ...] = ()
    """What is wrong with the files (empty for a sound journal)."""
    files: tuple[str, ...] = ()
    """Journal file names found, sorted."""
    devices: Mapping[str, DeviceRecord] = field(default_factory=dict)
    """The site's registered device keys (``devices/``), by device id."""
    signed: int = 0
    unsigned: int = 0
    """Entries kept although unsigned: written before this site's devices signed."""
    forged: int = 0

    @property
    def last_day(self) -> date | None:
        """The latest day any entry describes."""
        return max((e.day for e in self.entries), default=None)

    def by_id(self, entry_id: str) -> Entry | None:
        """The entry with this id, or None."""
        for e in self.entries:
            if e.id == entry_id:
                return e
        return None


def log_folder(folder: Path | str) -> Path:
    """The ``log/`` folder of a site folder."""
    return Path(folder) / LOG_DIR


def scan(
    folder: Path | str,
    devices: Mapping[str, DeviceRecord] | None = None,
    verdicts: dict[int, bool] | None = None,
) -> list[FileCheck]:
    """Check every file in the site's ``log/`` folder (fieldlog's working files excepted).

    Files whose check is cached (:mod:`fieldlog.journal.check_cache`) for their exact bytes
    and their device's key in ``devices`` are not parsed again; their signature verdicts go
    into ``verdicts`` by ``id()`` of the entry returned (the checks returned keep every entry
    alive while :func:`check_signatures` reads them).
    """
    log = log_folder(folder)
    if log.is_symlink():  # never followed: it could lead anywhere on the machine
        return [
            FileCheck(
                "",
                (),
                (
                    Finding(
                        "",
                        "",
                        "bad name",
                        "log/ is a link to another "
                        "folder; replace the link with the log folder "
                        "itself, fieldlog never follows it",
                    ),
                ),
            )
        ]
    if not log.exists():
        return []
    if not log.is_dir():
        raise JournalError(
            "'log' is not a folder",
            file=log,
            fix="rename that file; fieldlog keeps the field log in log/",
        )
    checks = []
    pack = CheckPack.open(log)
    keys = {d: r.public_key for d, r in (devices or {}).items()}
    for path in sorted(log.iterdir(), key=lambda p: p.name):
        if is_working_file(path.name):
            continue
        if path.is_symlink() or not path.is_file():
            what = "a link" if path.is_symlink() else "a folder"
            checks.append(
                FileCheck(
                    path.name,
                    (),
                    (
                        Finding(
                            path.name,
                            "",
                            "bad name",
                            f"{what} inside log/; only journal files belong "
                            "there, and fieldlog never follows a link",
                        ),
                    ),
                )
            )
            continue
        try:
            data = read_capped(path, "journal", follow_links=False)
        except OutOfBounds as exc:
            checks.append(
                FileCheck(path.name, (), (Finding(path.name, "", "not TOML", exc.problem),))
            )
            continue
        except OSError as exc:
            raise JournalError(f"cannot read the log file: {exc.strerror}", file=path) from exc
        checks.append(_cached_check(pack, path.name, data, keys, verdicts))
    pack.save()
    return checks


def _cached_check(
    pack: CheckPack,
    name: str,
    data: bytes,
    keys: Mapping[str, str],
    verdicts: dict[int, bool] | None,
) -> FileCheck:
    """One file's check: from this process, from the cache, or made afresh (then cached).

    A file this process has checked already is not unpickled again, but its record is kept
    in the pack (or added), so the next command finds it too.
    """
    device = file_device(name)
    key = keys.get(device, "") if device else ""
    record = record_key(name, data, key)
    found = _CACHE.get((name, data))
    if found is not None:
        _CACHE.move_to_end((name, data))
        if not pack.keep(record):
            pack.store(record, Cached(found, _verdicts(found, device, key)))
        return found
    cached = pack.lookup(record)
    if cached is None:
        check = check_bytes(name, data)
        cached = Cached(check, _verdicts(check, device, key))
        pack.store(record, cached)
    if verdicts is not None:
        for e, ok in zip(cached.check.entries, cached.verdicts, strict=True):
            if ok is not None:
                verdicts[id(e)] = ok
    return remember(name, data, cached.check)


def file_device(name: str) -> str:
    """The device a journal file's name says it belongs to (``""`` for a bad name)."""
    try:
        return parse_file_name(name)[1]
    except JournalError:
        return ""


def _verdicts(check: FileCheck, device: str, key: str) -> Verdicts:
    """Whether each entry of the file's own device verifies against ``key`` (None: not
    decided here, see :data:`fieldlog.journal.check_cache.Verdicts`)."""
    return tuple(
        signature_ok(key, e.hash, e.sig) if key and e.sig and e.device == device else None
        for e in check.entries
    )


_CACHE: OrderedDict[tuple[str, bytes], FileCheck] = OrderedDict()
_CACHE_SIZE = 4096


def checked(name: str, data: bytes) -> FileCheck:
    """:func:`check_bytes`, remembered per name and exact content.

    Checking is a pure function of the name and the bytes, so a file whose bytes have not
    changed need not be parsed again: the app, which re-reads the log after every entry,
    then parses nothing it has seen (the writer remembers what it appended, see
    :func:`remember`).
    """
    key = (name, data)
    found = _CACHE.get(key)
    if found is None:
        found = remember(name, data, check_bytes(name, data))
    else:
        _CACHE.move_to_end(key)
    return found


def remember(name: str, data: bytes, check: FileCheck) -> FileCheck:
    """Store the check of ``data`` (the writer calls it with old check + the new entry)."""
    _CACHE[(name, data)] = check
    while len(_CACHE) > _CACHE_SIZE:
        _CACHE.popitem(last=False)
    return check


def forget_checks() -> None:
    """Empty the cache (benchmarks measure a cold read with it)."""
    _CACHE.clear()


def read_journal(folder: Path | str) -> Journal:
    """Read every journal file of the site folder ``folder``.

    Raises:
        JournalError: the log folder or one of its files cannot be read at all (permissions);
            damaged content is reported as findings instead.
    """
    registry = read_registry(folder)
    verdicts: dict[int, bool] = {}
    checks = scan(folder, registry.devices, verdicts)
    entries = [e for c in checks for e in c.entries]
    entries.sort(key=REPLAY_ORDER)
    findings = [*registry.findings, *(f for c in checks for f in c.findings)]
    findings += cross_file_findings(entries)
    signatures = check_signatures(entries, registry, findings, verdicts)
    findings += signatures.findings
    files = tuple(c.name for c in checks if c.entries)
    return Journal(
        signatures.kept,
        tuple(findings),
        files,
        registry.devices,
        signatures.signed,
        signatures.unsigned,
        signatures.forged,
    )


def cross_file_findings(entries: Iterable[Entry]) -> list[Finding]:
    """Checks across files: an id used twice, or a device's sequence with a hole in it.

    Every device numbers its entries 1, 2, 3 ... across all its files, so a missing number
    means an entry was removed, even when it was the last one of its file.
    """
    out: list[Finding] = []
    by_device: dict[str, dict[int, Entry]] = {}
    for e in entries:
        seqs = by_device.setdefault(e.device, {})
        if e.seq in seqs and seqs[e.seq].file != e.file:
            out.append(
                Finding(e.file, e.id, "duplicate id", f"the same id is also in {seqs[e.seq].file}")
            )
        seqs.setdefault(e.seq, e)
    for device, seqs in sorted(by_device.items()):
        out += _gaps(device, seqs)
    return out


GAP_NAMED = 10
"""A gap of up to this many missing numbers names each; a longer one is one finding."""


def _gaps(device: str, seqs: dict[int, Entry]) -> list[Finding]:
    """Findings for the numbers missing from one device's sequence 1, 2, 3 ...

    Runs over the numbers present (sorted), never over the range up to the highest: a
    hostile entry numbered 10**9 costs one finding, not a billion loop turns.
    """
    out: list[Finding] = []
    before = 0
    for n in sorted(seqs):
        missing = n - before - 1
        if missing > 0:
            after = seqs[n]
            where = f"it is in no file, yet {after.id} (in {after.file}) was written after it"
            if missing <= GAP_NAMED:
                out += [
                    Finding("", f"{device}.{k}", "removed", where) for k in range(before + 1, n)
                ]
            else:
                out.append(
                    Finding(
                        "",
                        f"{device}.{before + 1}",
                        "removed",
                        f"{missing:,} entries, {device}.{before + 1} to "
                        f"{device}.{n - 1}, are in no file, yet {after.id} (in "
                        f"{after.file}) was written after them",
                    )
                )
        before = n
    return out
