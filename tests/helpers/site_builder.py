"""The one way tests write a small site folder: site.toml and schedule.toml built from values.

Tests used to carry their own copies of the same TOML text; a change to the file format then
had to be made in every copy, and a copy that drifted tested something else without saying so.
Here the text is built from values, one key per line in a fixed order (id, name, duration,
calendar, after, start_not_before, finish_not_after, crew), so an error's line number in a test
can be counted from the text (:func:`line_of`) rather than guessed.

:func:`changed` replaces a piece of text exactly once and fails loudly when the piece is not
there: a ``str.replace`` that silently matched nothing would leave a "bad input" test testing a
good file. All sites are invented.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path
from types import MappingProxyType

WEEKDAYS = ("mon", "tue", "wed", "thu", "fri")
ALL_WEEK = (*WEEKDAYS, "sat", "sun")
ONLY_WEEKDAYS: Mapping[str, Sequence[str]] = MappingProxyType({"weekdays": WEEKDAYS})
"""The default calendars: one Monday-to-Friday calendar named ``weekdays``."""
WEEKDAYS_AND_ALL_WEEK: Mapping[str, Sequence[str]] = MappingProxyType(
    {"weekdays": WEEKDAYS, "allweek": ALL_WEEK}
)
"""``weekdays`` plus a seven-day ``allweek`` calendar (curing, for example)."""
NO_ENTRIES: Mapping = MappingProxyType({})


@dataclass(frozen=True)
class Act:
    """One ``[[activity]]`` table; only the keys given are written."""

    id: str
    name: str
    duration: int
    after: tuple[str, ...] = ()
    calendar: str | None = None
    start_not_before: date | None = None
    finish_not_after: date | None = None
    crew: Mapping[str, int] = field(default_factory=dict)
    """Crew name -> headcount."""


@dataclass(frozen=True)
class Lnk:
    """One ``[[link]]`` table (a link of a type other than plain "after", or with a lag)."""

    pred: str
    succ: str
    type: str = "FS"
    lag: int | None = None


def _strings(items: Iterable[str]) -> str:
    return "[" + ", ".join(f'"{s}"' for s in items) + "]"


def site_toml(
    name: str,
    start: date,
    *,
    finish_by: date | None = None,
    calendar: str = "weekdays",
    calendars: Mapping[str, Sequence[str]] = ONLY_WEEKDAYS,
    holidays: Mapping[str, Sequence[date]] = NO_ENTRIES,
    crews: Mapping[str, int] = NO_ENTRIES,
) -> str:
    """The text of a site.toml: the site, its calendars (with holidays) and its crews."""
    lines = ["[site]", f'name = "{name}"', f"start = {start.isoformat()}"]
    if finish_by is not None:
        lines.append(f"finish_by = {finish_by.isoformat()}")
    lines.append(f'calendar = "{calendar}"')
    for cal, workdays in calendars.items():
        lines += ["", f"[calendars.{cal}]", f"workdays = {_strings(workdays)}"]
        if cal in holidays:
            lines.append(f"holidays = [{', '.join(d.isoformat() for d in holidays[cal])}]")
    for crew, available in crews.items():
        lines += ["", f"[crews.{crew}]", f"available = {available}"]
    return "\n".join(lines) + "\n"


def activity_toml(act: Act) -> str:
    """One ``[[activity]]`` table, preceded by a blank line."""
    lines = ["", "[[activity]]", f'id = "{act.id}"', f'name = "{act.name}"']
    lines.append(f"duration = {act.duration}")
    if act.calendar is not None:
        lines.append(f'calendar = "{act.calendar}"')
    if act.after:
        lines.append(f"after = {_strings(act.after)}")
    if act.start_not_before is not None:
        lines.append(f"start_not_before = {act.start_not_before.isoformat()}")
    if act.finish_not_after is not None:
        lines.append(f"finish_not_after = {act.finish_not_after.isoformat()}")
    if act.crew:
        lines.append("crew = { " + ", ".join(f"{c} = {n}" for c, n in act.crew.items()) + " }")
    return "\n".join(lines) + "\n"


def link_toml(link: Lnk) -> str:
    """One ``[[link]]`` table, preceded by a blank line."""
    lines = ["", "[[link]]", f'from = "{link.pred}"', f'to = "{link.succ}"']
    lines.append(f'type = "{link.type}"')
    if link.lag is not None:
        lines.append(f"lag = {link.lag}")
    return "\n".join(lines) + "\n"


def schedule_toml(revision: int, activities: Iterable[Act], links: Iterable[Lnk] = ()) -> str:
    """The text of a schedule.toml: its revision, activities in order, then links."""
    parts = [f"revision = {revision}\n"]
    parts += [activity_toml(a) for a in activities]
    parts += [link_toml(k) for k in links]
    return "".join(parts)


def chain(ids: Iterable[str], duration: int = 5) -> list[Act]:
    """Activities ``Work <id>`` of ``duration`` days, each after the one before."""
    acts: list[Act] = []
    for aid in ids:
        after = (acts[-1].id,) if acts else ()
        acts.append(Act(aid, f"Work {aid}", duration, after=after))
    return acts


def write_site(folder: Path, site: str | None, schedule: str | None, *, log: bool = False) -> Path:
    """Write the two files into ``folder`` (created); None leaves that file out.

    ``log`` also creates the empty ``log/`` folder a synced site has.
    """
    folder.mkdir(parents=True, exist_ok=True)
    if site is not None:
        (folder / "site.toml").write_text(site, encoding="utf-8")
    if schedule is not None:
        (folder / "schedule.toml").write_text(schedule, encoding="utf-8")
    if log:
        (folder / "log").mkdir(exist_ok=True)
    return folder


def changed(text: str, old: str, new: str) -> str:
    """``text`` with ``old`` replaced by ``new``; ``old`` must stand in it exactly once."""
    found = text.count(old)
    assert found == 1, f"{old!r} stands {found} times in the text, expected once"
    return text.replace(old, new)


def line_of(text: str, fragment: str, nth: int = 0) -> int:
    """The 1-based number of the ``nth`` line of ``text`` holding ``fragment``."""
    return [i for i, line in enumerate(text.splitlines(), 1) if fragment in line][nth]
