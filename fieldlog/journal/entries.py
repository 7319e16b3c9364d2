"""What a foreman can record at the end of a shift: the entry kinds and their fields.

An entry is one flat TOML table (scalars, arrays of text, dates) so that a new entry can be
written by appending text to a day file, never by rewriting it. Every entry carries the same
header (who, when, which device, which day it describes, its place in the hash chain) and the
fields of its kind. The kinds, and why each exists:

========== ==================================================================================
started     an activity's actual start (the day it describes is the start date)
finished    an activity's actual finish
remaining   working days an open activity still needs, as of the end of the day
percent     physical percent complete, kept apart from the remaining days on purpose: the
            remaining days drive the schedule, the percent is what was built
weather     conditions, high/low temperature, precipitation, wind, whether work stopped
crew        a crew on site: trade, company, headcount, hours worked in total
lost-time   time lost and why (weather, plant breakdown, labour, client, design, access,
            materials, other); a whole lost day is a non-working day for the calendars it
            affects
plant       plant or equipment on site (how many, hours worked) and any breakdown
need        a readiness item: something an activity needs before it can start
cleared     a readiness item has been dealt with
delivery    material or equipment that arrived
inspection  an inspection or test and its result
visitor     someone who came to site, with the times they came and left
instruction an instruction received: from whom, verbal or written, reference
incident    something that went wrong (injury, damage, near miss)
safety      a safety observation and what was done about it
note        anything else
correction  supersedes an earlier entry with a reason; nothing is ever edited or deleted
========== ==================================================================================

Field values are checked here for shape only (type, range, choice); whether they make sense
against the schedule and the rest of the log is :mod:`fieldlog.journal.rules`' job.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from datetime import date, datetime, time
from operator import attrgetter
from types import MappingProxyType
from typing import Any

from fieldlog.bounds import MAX_DAYS, MAX_HEADCOUNT
from fieldlog.engine.readiness import READINESS_KINDS
from fieldlog.journal.fields import FieldProblem, FieldSpec, coerce

__all__ = ["FieldProblem", "FieldSpec", "coerce"]  # re-exported: the app builds forms from them

LOST_TIME_CAUSES = (
    "weather",
    "plant-breakdown",
    "labour",
    "client",
    "design",
    "access",
    "materials",
    "other",
)
"""Why time was lost: weather, plant or equipment broken down, labour short (crew absent or
too few), a client instruction, missing design information, no access, materials not there,
anything else."""

INSPECTION_RESULTS = ("passed", "failed", "partial", "held")
INSTRUCTION_FORMS = ("verbal", "written")
TEMPERATURE_UNITS = ("C", "F")

HEADER_KEYS = ("id", "seq", "kind", "day", "written", "author", "device")
"""Keys every entry has, before its kind's fields; ``prev`` and ``hash`` come last."""
CHAIN_KEYS = ("prev", "hash")
SIG_KEY = "sig"
"""The entry's Ed25519 signature (hex), written last; absent on entries of older fieldlogs."""


def _f(name: str, type_: str, help_: str, **kw: Any) -> FieldSpec:
    return FieldSpec(name, type_, help=help_, **kw)


_ACTIVITY = _f("activity", "activity", "activity id", required=True, cli="positional")
_OPT_ACTIVITY = _f("activity", "activity", "activity id it concerns")
_OPT_ACTIVITIES = _f("activities", "ids", "activity ids it concerns, comma separated")

KINDS: Mapping[str, tuple[FieldSpec, ...]] = MappingProxyType(
    {
        "started": (_ACTIVITY,),
        "finished": (_ACTIVITY,),
        "remaining": (
            _ACTIVITY,
            _f(
                "days",
                "int",
                "working days still needed after this day",
                required=True,
                low=1,
                high=MAX_DAYS,
                cli="positional",
            ),
        ),
        "percent": (
            _ACTIVITY,
            _f(
                "percent",
                "float",
                "physical percent complete, 0-100",
                required=True,
                low=0,
                high=100,
                cli="positional",
            ),
        ),
        "weather": (
            _f("conditions", "text", "e.g. dry, showers, heavy rain, snow, fog", required=True),
            _f("high", "float", "highest temperature", low=-80, high=140),
            _f("low", "float", "lowest temperature", low=-80, high=140),
            _f("unit", "choice", "temperature unit", choices=TEMPERATURE_UNITS),
            _f("precip_mm", "float", "precipitation in millimetres", low=0, high=2000),
            _f("wind", "text", "wind in words, e.g. 'gusty 40 km/h'"),
            _f("stopped", "bool", "weather stopped work"),
            _f("hours_lost", "float", "hours of work lost to the weather", low=0, high=24),
        ),
        "crew": (
            _f("trade", "text", "trade, e.g. concrete, steel fixers", required=True),
            _f("company", "text", "company (contractor or subcontractor)"),
            _f("headcount", "int", "people on site", required=True, low=0, high=MAX_HEADCOUNT),
            _f(
                "hours",
                "float",
                "hours worked by the whole crew (person-hours)",
                low=0,
                high=MAX_HEADCOUNT * 24,
            ),
            _OPT_ACTIVITIES,
        ),
        "lost-time": (
            _f("cause", "choice", "why", required=True, choices=LOST_TIME_CAUSES),
            _f("whole_day", "bool", "the whole working day was lost"),
            _f("hours", "float", "hours lost, when less than the whole day", low=0, high=24),
            _OPT_ACTIVITIES,
            _f("calendars", "names", "calendars the lost day affects (default: all)"),
            _f("note", "text", "what happened"),
        ),
        "plant": (
            _f(
                "what",
                "text",
                "machine or equipment, e.g. '13 t excavator'",
                required=True,
                cli="positional",
            ),
            _f("count", "int", "how many of them on site", low=1, high=500),
            _f("hours_worked", "float", "hours each worked today", low=0, high=24),
            _f("broken_down", "bool", "it broke down today"),
            _f("hours_down", "float", "hours out of use because of the breakdown", low=0, high=24),
            _f("supplier", "text", "owner or hire company"),
            _OPT_ACTIVITY,
            _f("note", "text", "what failed, when it is back"),
        ),
        "need": (
            _ACTIVITY,
            _f(
                "what",
                "text",
                "what is needed, e.g. 'rebar shop drawings rev B'",
                required=True,
                cli="positional",
            ),
            _f(
                "category",
                "choice",
                "what kind of need",
                required=True,
                choices=READINESS_KINDS,
                cli="--kind",
            ),
            _f("expected", "date", "when it is expected (leave out if nobody knows)"),
        ),
        "cleared": (
            _f(
                "item",
                "entry",
                "id of the 'need' entry that is now dealt with",
                required=True,
                cli="positional",
            ),
            _f("note", "text", "how it was cleared"),
        ),
        "delivery": (
            _f("what", "text", "what arrived", required=True, cli="positional"),
            _f("supplier", "text", "who delivered it"),
            _f("quantity", "text", "how much, with its unit"),
            _OPT_ACTIVITY,
            _f("note", "text", "condition, where stored, ticket number"),
        ),
        "inspection": (
            _f("what", "text", "what was inspected or tested", required=True, cli="positional"),
            _f("result", "choice", "outcome", required=True, choices=INSPECTION_RESULTS),
            _f("inspector", "text", "who inspected (person or body)"),
            _f("reference", "text", "report or certificate reference"),
            _OPT_ACTIVITY,
            _f("note", "text", "findings"),
        ),
        "visitor": (
            _f("name", "text", "who came", required=True, cli="positional"),
            _f("company", "text", "organisation"),
            _f("purpose", "text", "why they came"),
            _f("time_in", "time", "when they arrived, e.g. 09:15"),
            _f("time_out", "time", "when they left, e.g. 11:40"),
        ),
        "instruction": (
            _f("text", "text", "what was instructed", required=True, cli="positional"),
            _f("given_by", "text", "who gave it", required=True, cli="--from"),
            _f("form", "choice", "verbal or written", required=True, choices=INSTRUCTION_FORMS),
            _f("reference", "text", "letter, site instruction or RFI reference"),
            _OPT_ACTIVITIES,
        ),
        "incident": (
            _f("text", "text", "what happened", required=True, cli="positional"),
            _f("injury", "bool", "someone was hurt"),
            _f("reported_to", "text", "who it was reported to"),
            _OPT_ACTIVITY,
        ),
        "safety": (
            _f("text", "text", "what was observed", required=True, cli="positional"),
            _f("action", "text", "what was done about it"),
            _OPT_ACTIVITY,
        ),
        "note": (
            _f("text", "text", "the note", required=True, cli="positional"),
            _OPT_ACTIVITY,
        ),
        "correction": (
            _f(
                "supersedes",
                "entry",
                "id of the entry this one replaces",
                required=True,
                cli="positional",
            ),
            _f("reason", "text", "why the earlier entry was wrong", required=True),
            _f(
                "corrects",
                "choice",
                "kind of the entry corrected (filled in by fieldlog)",
                required=True,
                choices=(),
            ),
            _f("withdraw", "bool", "the earlier entry was recorded in error: drop it"),
        ),
    }
)
"""Every entry kind and its own fields, in the order they are written."""

CORRECTION_OWN = frozenset(s.name for s in KINDS["correction"])
"""A correction's own fields; any other field is a replacement value for the corrected kind."""

PROGRESS_KINDS = frozenset({"started", "finished", "remaining", "percent"})
"""Kinds that report progress of one activity (the app lists them with the activity, not in the
day panel)."""


def spec(kind: str, name: str) -> FieldSpec | None:
    """The spec of field ``name`` of ``kind``, or None."""
    for s in KINDS.get(kind, ()):
        if s.name == name:
            return s
    return None


def check_fields(kind: str, fields: Mapping[str, Any]) -> dict[str, Any]:
    """Check every field of an entry of ``kind``; returns them normalised, in spec order.

    A correction may also carry replacement values for the kind it corrects (named in its
    ``corrects`` field); those are checked against that kind's specs.

    Raises:
        FieldProblem: unknown kind, unknown or missing field, or a bad value.
    """
    if kind not in KINDS:
        raise FieldProblem(f"unknown entry kind '{kind}' (known: {', '.join(KINDS)})")
    specs = KINDS[kind]
    if (
        kind == "weather"
        and fields.get("unit") is None
        and (fields.get("high") is not None or fields.get("low") is not None)
    ):
        fields = {**fields, "unit": "C"}  # temperatures given without a unit are Celsius
    out: dict[str, Any] = {}
    extra = {k: v for k, v in fields.items() if spec(kind, k) is None}
    for s in specs:
        if s.name not in fields or fields[s.name] is None:
            if s.required:
                raise FieldProblem(f"{kind} needs {s.name} ({s.help})")
            continue
        if kind == "correction" and s.name == "corrects":
            target = fields[s.name]
            if target not in KINDS or target == "correction":
                raise FieldProblem(f"corrects '{target}' is not a kind that can be corrected")
            out[s.name] = target
            continue
        out[s.name] = coerce(s, fields[s.name])
    if kind == "correction":
        target = out["corrects"]
        for k, v in extra.items():
            ts = spec(target, k)
            if ts is None:
                raise FieldProblem(
                    f"a {target} entry has no field '{k}' to correct "
                    f"(its fields: {', '.join(s.name for s in KINDS[target])})"
                )
            if v is not None:
                out[k] = coerce(ts, v)
    elif extra:
        raise FieldProblem(
            f"{kind} has no field '{next(iter(extra))}' "
            f"(its fields: {', '.join(s.name for s in specs)})"
        )
    _cross_field(kind, out)
    return out


def _cross_field(kind: str, f: Mapping[str, Any]) -> None:
    """Checks between two fields of one entry."""
    if kind == "weather":
        if "high" in f and "low" in f and f["low"] > f["high"]:
            raise FieldProblem(f"low {f['low']} is above high {f['high']}")
    elif kind == "crew":
        if "hours" in f and f["hours"] > f["headcount"] * 24:
            raise FieldProblem(
                f"{f['hours']} hours is more than {f['headcount']} people can work in a day"
            )
    elif kind == "lost-time":
        if f.get("whole_day") and "hours" in f:
            raise FieldProblem("give either a whole lost day or the hours lost, not both")
        if not f.get("whole_day") and "hours" not in f:
            raise FieldProblem("say how much was lost: a whole day, or the hours")
    elif kind == "plant":
        if "hours_down" in f and not f.get("broken_down"):
            raise FieldProblem("hours_down is for a breakdown: say broken_down too")
        if f.get("hours_worked", 0) + f.get("hours_down", 0) > 24:
            raise FieldProblem(
                f"{f.get('hours_worked', 0):g} hours worked and "
                f"{f.get('hours_down', 0):g} down is more than a day"
            )
    elif kind == "visitor" and f.get("time_out", time.max) < f.get("time_in", time.min):
        raise FieldProblem(f"time_out {f['time_out']:%H:%M} is before time_in {f['time_in']:%H:%M}")


@dataclass(frozen=True)
class Entry:
    """One journal entry as stored, with its place in its file.

    ``fields`` holds the kind's own fields; the header (``id`` .. ``device``) and the chain
    (``prev``, ``hash``) are attributes. ``file`` and ``position`` say where it was read from
    (``position`` counts from 0 within the file) and are not part of the stored entry.
    """

    id: str
    seq: int
    kind: str
    day: date
    written: datetime
    author: str
    device: str
    fields: Mapping[str, Any] = field(default_factory=lambda: MappingProxyType({}))
    prev: str = ""
    hash: str = ""
    sig: str = ""
    """Ed25519 signature over ``hash`` (see :mod:`fieldlog.journal.signing`); ``""`` when
    the entry was written by a fieldlog that did not sign yet."""
    file: str = ""
    position: int = 0

    @property
    def activity(self) -> str | None:
        """The one activity this entry is about, when it names exactly one."""
        return self.fields.get("activity")

    def activities(self) -> tuple[str, ...]:
        """Every activity id the entry names (``activity`` and ``activities``)."""
        out = []
        if self.fields.get("activity"):
            out.append(self.fields["activity"])
        out.extend(self.fields.get("activities", ()))
        return tuple(out)

    def stored(self) -> dict[str, Any]:
        """The entry as the TOML table it is written as, without ``hash``."""
        body: dict[str, Any] = {
            "id": self.id,
            "seq": self.seq,
            "kind": self.kind,
            "day": self.day,
            "written": self.written,
            "author": self.author,
            "device": self.device,
        }
        for k, v in self.fields.items():
            body[k] = list(v) if isinstance(v, tuple) else v
        body["prev"] = self.prev
        return body

    def sort_key(self) -> tuple[date, str, int]:
        """Replay order: the day described, then device id, then place in the file."""
        return (self.day, self.device, self.position)


REPLAY_ORDER: Callable[[Entry], tuple[date, str, int]] = attrgetter("day", "device", "position")
""":meth:`Entry.sort_key` as a sort key evaluated in C: the same tuple, a third of the time on
a log of tens of thousands of entries."""
