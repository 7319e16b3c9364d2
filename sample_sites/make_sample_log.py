"""Write the sample site's field journal (kestrel-yard/log/) through fieldlog's own recorder.

Three working weeks, Monday 7 to Friday 25 September 2026, of what a site manager would log
at the end of each shift on the invented Kestrel Yard job: starts, finishes and remaining
days, the weather and crews every day, one day lost to rain, a set-out that let the digger
start before the grid was finished (an out-of-sequence start), readiness items opened and
cleared, deliveries, inspections, instructions, notes, a near miss, and a correction.

Every entry goes through :func:`fieldlog.journal.record_entry`, exactly as ``fieldlog record``
and the app write them (so the same checks apply), and is signed. The device ids, authors,
``written`` times and signing keys are fixed (each sample device's key is derived from a fixed
seed here; Ed25519 signatures are deterministic), so running the script again gives
byte-identical files. Only the public keys are shipped, in the sample's ``devices/`` folder;
the private keys exist only while this script runs::

    python sample_sites/make_sample_log.py   # rewrites sample_sites/kestrel-yard/log/, devices/

Every name, company and event here is invented.
"""

from __future__ import annotations

import hashlib
import shutil
from datetime import UTC, date, datetime, timedelta
from pathlib import Path

from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

from fieldlog.journal import record_entry
from fieldlog.journal.registry import devices_folder
from fieldlog.site.files import load_site

SITE = Path(__file__).resolve().parent / "kestrel-yard"
LAPTOP = ("site-laptop-1", "R. Okafor")  # site manager (invented)
TABLET = ("tablet-2", "D. Lindqvist")  # site engineer (invented)

GW = "Tarnmoor Civils (invented)"  # groundworks subcontractor
FENCE = "Brackwell Fencing (invented)"
SURVEY = "Linebrook Survey (invented)"
SPARKS = "Halden Electrical (invented)"
CLIENT_PM = "K. Adeyemi, client's project manager (invented)"


def d(n: int) -> date:
    """Day n of September 2026."""
    return date(2026, 9, n)


def weather(
    conditions: str,
    high: float,
    low: float,
    precip: float,
    wind: str,
    stopped: bool = False,
    hours_lost: float | None = None,
) -> tuple:
    return (
        "weather",
        {
            "conditions": conditions,
            "high": high,
            "low": low,
            "precip_mm": precip,
            "wind": wind,
            "stopped": stopped,
            "hours_lost": hours_lost,
        },
    )


def crew(trade: str, company: str, people: int, hours: float, *acts: str) -> tuple:
    return (
        "crew",
        {
            "trade": trade,
            "company": company,
            "headcount": people,
            "hours": hours,
            "activities": list(acts),
        },
    )


def started(aid: str) -> tuple:
    return ("started", {"activity": aid})


def finished(aid: str) -> tuple:
    return ("finished", {"activity": aid})


def remaining(aid: str, days: int) -> tuple:
    return ("remaining", {"activity": aid, "days": days})


def note(text: str, activity: str | None = None) -> tuple:
    return ("note", {"text": text, "activity": activity})


# Day -> entries in the order they are recorded that evening. A 3-tuple's third item is a
# label; a correction names the label of the entry it supersedes.
LOG: dict[date, list[tuple]] = {
    d(7): [
        weather("dry, sunny spells", 19, 9, 0, "light westerly"),
        finished("KEY-000"),
        started("SITE-010"),
        started("SITE-020"),
        crew("groundworks", GW, 6, 51, "SITE-010"),
        crew("fencing", FENCE, 3, 25.5, "SITE-020"),
        (
            "visitor",
            {
                "name": "K. Adeyemi",
                "company": "client (invented)",
                "purpose": "handed over the site; walked the boundary",
            },
        ),
        note(
            "Site possession taken 07:30. Boundary pegs checked against the plot plan: "
            "all present. Estate road gate is the only access until the haul road is in."
        ),
    ],
    d(8): [
        weather("showers clearing", 17, 10, 2.5, "moderate south-westerly"),
        remaining("SITE-010", 1),
        remaining("SITE-020", 2),
        crew("groundworks", GW, 6, 51, "SITE-010"),
        crew("fencing", FENCE, 3, 25.5, "SITE-020"),
        (
            "delivery",
            {
                "what": "hoarding panels and gates",
                "quantity": "120 panels, 2 gates",
                "supplier": FENCE,
                "activity": "SITE-020",
            },
        ),
    ],
    d(9): [
        weather("dry, overcast", 18, 11, 0, "light"),
        finished("SITE-010"),
        remaining("SITE-020", 1),
        crew("groundworks", GW, 5, 42.5, "SITE-010"),
        crew("fencing", FENCE, 3, 25.5, "SITE-020"),
        (
            "need",
            {
                "activity": "SITE-050",
                "what": "grid setting-out drawing rev B",
                "category": "drawings",
                "expected": d(14),
            },
            "grid-drawing",
        ),
    ],
    d(10): [
        weather("dry, sunny", 20, 10, 0, "calm"),
        finished("SITE-020"),
        started("SITE-030"),
        started("EW-010"),
        crew("groundworks", GW, 7, 59.5, "SITE-030", "EW-010"),
        (
            "delivery",
            {
                "what": "welfare and office cabins",
                "quantity": "5 units",
                "supplier": "Fellgate Site Cabins (invented)",
                "activity": "SITE-030",
                "note": "craned off at the compound; one door frame damaged, reported",
            },
        ),
    ],
    d(11): [
        weather("rain from midday", 15, 11, 9, "fresh south-westerly"),
        remaining("SITE-030", 2),
        remaining("EW-010", 4),
        crew("groundworks", GW, 7, 52.5, "SITE-030", "EW-010"),
        (
            "instruction",
            {
                "text": "keep the topsoil stockpile 10 m clear of the north hedge",
                "given_by": CLIENT_PM,
                "form": "verbal",
                "activities": ["EW-010"],
            },
        ),
        note("Cabin hook-up slowed by the rain: the hire firm's fitter left at 14:00."),
    ],
    d(14): [
        weather("heavy rain all day", 13, 10, 31, "strong southerly gusts", True, 8),
        (
            "lost-time",
            {
                "cause": "weather",
                "whole_day": True,
                "calendars": ["weekdays"],
                "activities": ["SITE-030", "EW-010"],
                "note": "ground waterlogged; plant stood down at 08:30",
            },
        ),
        crew("groundworks", GW, 2, 8, "EW-010"),
        note(
            "Two operatives pumped out the haul road drainage run and left at 12:30. "
            "Cure time (seven-day calendar) is not affected."
        ),
    ],
    d(15): [
        weather("dry, bright", 16, 8, 0, "moderate westerly"),
        finished("SITE-030"),
        started("EW-020"),
        remaining("EW-010", 3),
        crew("groundworks", GW, 8, 68, "SITE-030", "EW-010", "EW-020"),
        ("cleared", {"item": "@grid-drawing", "note": "rev B received by e-mail 09:10"}),
    ],
    d(16): [
        weather("dry", 18, 9, 0, "light"),
        started("SITE-050"),
        started("SITE-040"),
        remaining("EW-010", 2),
        remaining("EW-020", 7),
        crew("groundworks", GW, 8, 68, "EW-010", "EW-020"),
        crew("setting out", SURVEY, 2, 17, "SITE-050"),
        crew("electrical", SPARKS, 2, 16, "SITE-040"),
        (
            "inspection",
            {
                "what": "cabin electrics and earthing",
                "result": "passed",
                "inspector": SPARKS,
                "reference": "test cert TC-0916",
                "activity": "SITE-040",
            },
        ),
    ],
    d(17): [
        weather("dry, sunny spells", 19, 10, 0, "light"),
        finished("SITE-040"),
        remaining("SITE-050", 2),
        remaining("EW-010", 1),
        remaining("EW-020", 6),
        crew("groundworks", GW, 8, 68, "EW-010", "EW-020"),
        crew("setting out", SURVEY, 2, 17, "SITE-050"),
        (
            "need",
            {
                "activity": "FND-020",
                "what": "rebar for pads, bending schedule 1",
                "category": "material",
                "expected": d(21),
            },
            "pad-rebar",
        ),
        note(
            "Dumper knocked out four grid pegs on line C; surveyor re-setting them, "
            "one more day on the set-out.",
            "SITE-050",
        ),
    ],
    d(18): [
        weather("dry, cloudy", 17, 11, 0, "moderate north-westerly"),
        finished("EW-010"),
        started("FND-010"),
        remaining("SITE-050", 1),
        (*remaining("EW-020", 4), "ew020-fri"),
        crew("groundworks", GW, 9, 76.5, "EW-010", "EW-020", "FND-010"),
        crew("setting out", SURVEY, 1, 8.5, "SITE-050"),
        (
            "visitor",
            {
                "name": "S. Varga",
                "company": "building control (invented)",
                "purpose": "commencement visit, no issues raised",
            },
        ),
        note(
            "Digger started the pads on grids A-B where the pegs are checked; the rest of "
            "the grid is still being set out.",
            "FND-010",
        ),
        (
            "correction",
            {
                "supersedes": "@ew020-fri",
                "reason": "typed 4; the soft spot at grid C needs another day of dig and replace",
                "days": 5,
            },
        ),
    ],
    d(21): [
        weather("dry, bright", 18, 7, 0, "light"),
        finished("SITE-050"),
        remaining("FND-010", 4),
        remaining("EW-020", 4),
        crew("groundworks", GW, 8, 68, "EW-020", "FND-010"),
        (
            "delivery",
            {
                "what": "pad rebar, bending schedule 1",
                "quantity": "6.5 t",
                "supplier": "Oakhurst Reinforcement (invented)",
                "activity": "FND-020",
            },
        ),
        ("cleared", {"item": "@pad-rebar", "note": "delivered and checked against schedule"}),
    ],
    d(22): [
        weather("showers", 16, 9, 4, "moderate"),
        started("FND-020"),
        remaining("FND-010", 3),
        remaining("EW-020", 3),
        crew("groundworks", GW, 10, 85, "EW-020", "FND-010", "FND-020"),
        (
            "need",
            {
                "activity": "STL-010",
                "what": "holding-down bolt check by the steel erector before pads are poured",
                "category": "inspection",
                "expected": date(2026, 9, 28),
            },
        ),
    ],
    d(23): [
        weather("heavy showers", 14, 9, 12, "gusty", False, 2),
        (
            "lost-time",
            {
                "cause": "weather",
                "hours": 2,
                "activities": ["FND-010", "FND-020"],
                "note": "pad holes pumped out before blinding",
            },
        ),
        remaining("FND-010", 3),
        remaining("EW-020", 2),
        remaining("FND-020", 7),
        crew("groundworks", GW, 10, 80, "EW-020", "FND-010", "FND-020"),
        (
            "inspection",
            {
                "what": "pad formations grids A-C, bearing check",
                "result": "passed",
                "inspector": "structural engineer (invented)",
                "reference": "SE visit note 07",
                "activity": "FND-010",
            },
        ),
    ],
    d(24): [
        weather("dry", 17, 8, 0, "light"),
        remaining("FND-010", 2),
        remaining("EW-020", 1),
        remaining("FND-020", 6),
        crew("groundworks", GW, 10, 85, "EW-020", "FND-010", "FND-020"),
        (
            "instruction",
            {
                "text": "add two 100 mm ducts under the entrance for the gate barrier",
                "given_by": CLIENT_PM,
                "form": "written",
                "reference": "SI-003",
            },
        ),
    ],
    d(25): [
        weather("dry, sunny", 19, 9, 0, "light"),
        finished("EW-020"),
        remaining("FND-010", 1),
        remaining("FND-020", 5),
        ("percent", {"activity": "FND-020", "percent": 25}),
        crew("groundworks", GW, 9, 76.5, "EW-020", "FND-010", "FND-020"),
        note("End of week 3: earthworks complete, pads on grids A-C poured, D-F blinded."),
    ],
}

TABLET_LOG: dict[date, list[tuple]] = {
    d(17): [
        (
            "safety",
            {
                "text": "excavator slewing near the haul road without a banksman",
                "action": "stopped the machine; toolbox talk for the plant crew",
                "activity": "EW-020",
            },
        )
    ],
    d(22): [note("Photos of grid pegs A-F taken for the record (folder 2026-09-22).")],
    d(24): [
        (
            "incident",
            {
                "text": "near miss: dumper reversed towards the rebar store "
                "without a banksman; nobody hurt",
                "injury": False,
                "reported_to": "R. Okafor, site manager",
            },
        )
    ],
}


def sample_key(device: str) -> Ed25519PrivateKey:
    """The sample device's signing key, from a fixed seed: for the invented demo only."""
    seed = hashlib.sha256(b"fieldlog sample site demo key, not secret: " + device.encode())
    return Ed25519PrivateKey.from_private_bytes(seed.digest())


def _clock(day: date, hour: int, minute: int):
    """Written times: from HH:MM UTC on ``day``, one minute per entry."""
    now = datetime(day.year, day.month, day.day, hour, minute, tzinfo=UTC)

    def tick() -> datetime:
        nonlocal now
        now += timedelta(minutes=1)
        return now

    return tick


def write(site_folder: Path = SITE) -> int:
    """Rewrite the sample journal; returns the number of entries written."""
    log = site_folder / "log"
    for folder in (log, devices_folder(site_folder)):
        if folder.exists():
            shutil.rmtree(folder)
    site = load_site(site_folder)
    labels: dict[str, str] = {}
    count = 0
    for day in sorted(set(LOG) | set(TABLET_LOG)):
        for (device, author), items, start in (
            (LAPTOP, LOG.get(day, []), (15, 30)),
            (TABLET, TABLET_LOG.get(day, []), (14, 50)),
        ):
            clock = _clock(day, *start)
            for item in items:
                kind, fields = item[0], dict(item[1])
                for key, value in fields.items():
                    if isinstance(value, str) and value.startswith("@"):
                        fields[key] = labels[value[1:]]
                # A correction describes the day of the entry it corrects (day=None).
                entry = record_entry(
                    site_folder,
                    site,
                    kind,
                    None if kind == "correction" else day,
                    fields,
                    today=day,
                    author=author,
                    device=device,
                    clock=clock,
                    key=sample_key(device),
                )
                if len(item) == 3:
                    labels[item[2]] = entry.id
                count += 1
    for lock in log.glob(".*.lock"):  # fieldlog's lock files: not part of the sample
        lock.unlink()
    return count


if __name__ == "__main__":
    print(f"{write()} signed entries written to {SITE / 'log'}")
