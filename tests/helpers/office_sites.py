"""Many small invented sites with journals, for the office database and the roll-up.

One template journal is written through :func:`fieldlog.journal.record_entry` (the one
writer); each generated site gets its own small random network (same activity ids, so the
journal fits every one of them) and the first ``k % days + 1`` day files of the template, so
sites differ in how much they logged. Deterministic: the same ``count`` gives the same bytes.
All names are invented.
"""

from __future__ import annotations

import shutil
from datetime import UTC, date, datetime, timedelta
from pathlib import Path

from fieldlog.journal import record_entry
from fieldlog.site.files import load_site
from tests.benchmarks.synthetic import START, synthetic_site, write_site_folder

ACTIVITIES = 12
TODAY = date(2026, 6, 1)
WRITTEN = datetime(2026, 6, 1, 18, 0, tzinfo=UTC)
DEVICE = "office-test-1"


def _day(n: int) -> date:
    """The n-th weekday from the synthetic site start (a Monday)."""
    return START + timedelta(days=n + 2 * (n // 5))


TEMPLATE = (
    (0, "started", {"activity": "A000000"}),
    (
        0,
        "crew",
        {"trade": "groundworks", "company": "Invented Earthworks", "headcount": 4, "hours": 32},
    ),
    (
        0,
        "need",
        {
            "activity": "A000003",
            "what": "pump booking",
            "category": "equipment",
            "expected": _day(3),
        },
    ),
    (1, "weather", {"conditions": "heavy rain", "stopped": True}),
    (1, "lost-time", {"cause": "weather", "whole_day": True, "note": "site flooded"}),
    (2, "crew", {"trade": "groundworks", "headcount": 5, "hours": 40}),
    (2, "crew", {"trade": "steel", "headcount": 2, "hours": 12.5}),
    (2, "need", {"activity": "A000004", "what": "rebar delivery", "category": "material"}),
    (3, "finished", {"activity": "A000000"}),
    (3, "cleared", {"item": "ref:need0"}),
    (3, "lost-time", {"cause": "access", "hours": 2.5}),
    (4, "lost-time", {"cause": "weather", "whole_day": True}),
    (4, "note", {"text": "gate code changed"}),
)
"""(weekday number, kind, fields); ``ref:need0`` is the id of the first ``need`` entry."""


def write_template(folder: Path, home: Path) -> Path:
    """A site with the template journal; returns its folder."""
    write_site_folder(synthetic_site(ACTIVITIES, seed=0), folder)
    site = load_site(folder)
    needs: list[str] = []
    for n, kind, fields in TEMPLATE:
        values = dict(fields)
        if values.get("item") == "ref:need0":
            values["item"] = needs[0]
        entry = record_entry(
            folder,
            site,
            kind,
            _day(n),
            values,
            today=TODAY,
            author="Test Foreman",
            device=DEVICE,
            clock=lambda: WRITTEN,
            home=home,
        )
        if kind == "need":
            needs.append(entry.id)
    return folder


def make_sites(root: Path, count: int, home: Path) -> list[Path]:
    """``count`` site folders ``root/site-000`` ... with part of the template journal."""
    template = write_template(root / "_template", home)
    day_files = sorted((template / "log").glob("*.toml"))
    sites = []
    for k in range(count):
        folder = write_site_folder(synthetic_site(ACTIVITIES, seed=k), root / f"site-{k:03}")
        toml = folder / "site.toml"
        toml.write_text(
            toml.read_text(encoding="utf-8").replace(
                'name = "Synthetic works"', f'name = "Synthetic works {k}"'
            ),
            encoding="utf-8",
        )
        (folder / "log").mkdir()
        for path in day_files[: k % len(day_files) + 1]:
            shutil.copyfile(path, folder / "log" / path.name)
        shutil.copytree(template / "devices", folder / "devices")  # the key that signed them
        sites.append(folder)
    shutil.rmtree(template)
    return sites
