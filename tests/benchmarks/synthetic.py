"""Synthetic sites for benchmarks: a layered random network of any size, deterministic per seed.

The network looks like a big job cut into work packages: activities sit in layers (roughly
sqrt(n) of them), each activity waits on one to three activities of the previous few layers,
links are mostly finish-to-start with some SS/FF/SF links, lags and leads, durations run from
0 (milestones) to 15 working days, and one activity in five runs on a seven-day calendar
(cure and drying time) while the rest work Monday to Friday with a few holidays.

Use it from Python (:func:`synthetic_site`) or write a site folder that ``fieldlog schedule``
can read (:func:`write_site_folder`, or ``python tests/benchmarks/synthetic.py N FOLDER``).
All names are invented.
"""

from __future__ import annotations

import math
import random
import sys
from datetime import date
from pathlib import Path
from types import MappingProxyType

from fieldlog.site.model import (
    WEEKDAY_NAMES,
    Activity,
    CalendarSpec,
    Crew,
    Link,
    LinkType,
    Site,
)

START = date(2026, 3, 2)
WEEKDAYS = CalendarSpec(
    "weekdays",
    frozenset(range(5)),
    frozenset({date(2026, 4, 3), date(2026, 12, 25), date(2027, 1, 1), date(2027, 12, 24)}),
)
ALLWEEK = CalendarSpec("allweek", frozenset(range(7)))
_TYPES = (LinkType.FS,) * 14 + (LinkType.SS,) * 3 + (LinkType.FF,) * 2 + (LinkType.SF,)


def synthetic_site(n: int, *, seed: int = 7) -> Site:
    """A site with ``n`` activities in a layered random network (same seed, same site)."""
    rng = random.Random(seed)
    layers = max(2, round(math.sqrt(n)))
    per_layer = math.ceil(n / layers)
    ids = [f"A{k:06d}" for k in range(n)]
    layer_of = [k // per_layer for k in range(n)]
    acts = []
    links = []
    for k, aid in enumerate(ids):
        duration = 0 if rng.random() < 0.05 else rng.randint(1, 15)
        cal = "allweek" if rng.random() < 0.2 else "weekdays"
        acts.append(Activity(aid, f"Work package {k}", duration, cal))
        layer = layer_of[k]
        if layer == 0:
            continue
        lo = max(0, (layer - 3) * per_layer)
        hi = layer * per_layer  # exclusive: only earlier layers, so the network has no loop
        for p in rng.sample(range(lo, hi), k=min(rng.randint(1, 3), hi - lo)):
            kind = rng.choice(_TYPES)
            lag = rng.randint(-2, 5) if rng.random() < 0.3 else 0
            links.append(Link(ids[p], aid, kind, lag))
    return Site(
        name="Synthetic works",
        start=START,
        calendar="weekdays",
        calendars=MappingProxyType({"weekdays": WEEKDAYS, "allweek": ALLWEEK}),
        crews=MappingProxyType({"groundworks": Crew("groundworks", 8)}),
        revision=1,
        activities=tuple(acts),
        links=tuple(links),
    )


def site_toml(site: Site) -> str:
    """``site.toml`` text for ``site``."""
    lines = [
        "[site]",
        f'name = "{site.name}"',
        f"start = {site.start.isoformat()}",
        f'calendar = "{site.calendar}"',
    ]
    if site.finish_by:
        lines.append(f"finish_by = {site.finish_by.isoformat()}")
    for spec in site.calendars.values():
        days = ", ".join(f'"{WEEKDAY_NAMES[d]}"' for d in sorted(spec.workdays))
        lines += ["", f"[calendars.{spec.name}]", f"workdays = [{days}]"]
        if spec.holidays:
            lines.append(
                "holidays = [" + ", ".join(d.isoformat() for d in sorted(spec.holidays)) + "]"
            )
    for crew in site.crews.values():
        lines += ["", f"[crews.{crew.name}]", f"available = {crew.available}"]
    return "\n".join(lines) + "\n"


def schedule_toml(site: Site) -> str:
    """``schedule.toml`` text: plain FS links as ``after``, the others as ``[[link]]``."""
    after: dict[str, list[str]] = {a.id: [] for a in site.activities}
    typed = []
    for lk in site.links:
        if lk.type is LinkType.FS and lk.lag == 0:
            after[lk.succ].append(lk.pred)
        else:
            typed.append(lk)
    out = [f"revision = {site.revision}", ""]
    for a in site.activities:
        out += ["[[activity]]", f'id = "{a.id}"', f'name = "{a.name}"', f"duration = {a.duration}"]
        if a.calendar != site.calendar:
            out.append(f'calendar = "{a.calendar}"')
        if after[a.id]:
            out.append("after = [" + ", ".join(f'"{p}"' for p in after[a.id]) + "]")
        out.append("")
    for lk in typed:
        out += [
            "[[link]]",
            f'from = "{lk.pred}"',
            f'to = "{lk.succ}"',
            f'type = "{lk.type.value}"',
            f"lag = {lk.lag}",
            "",
        ]
    return "\n".join(out)


def write_site_folder(site: Site, folder: Path) -> Path:
    """Write ``site.toml`` and ``schedule.toml`` for ``site`` into ``folder``."""
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "site.toml").write_text(site_toml(site), encoding="utf-8", newline="\n")
    (folder / "schedule.toml").write_text(schedule_toml(site), encoding="utf-8", newline="\n")
    return folder


if __name__ == "__main__":
    size, target = int(sys.argv[1]), Path(sys.argv[2])
    write_site_folder(synthetic_site(size), target)
    print(target)
