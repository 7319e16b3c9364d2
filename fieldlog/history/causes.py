"""Cause categories a movement of the forecast finish is split into, and how entries map to them.

The categories are the usual headings of a delay narrative (common practice): weather, access,
materials, design/instruction, labour, plant, client, other. Two more buckets keep the split
honest: movement the log records no cause for is "not explained by the log", and finish days
won back by progress recorded faster than planned are "gained by progress". Nothing is ever
moved into a cause the log does not name.

The mapping from what the journal records to a category is our own choice, written here once:

* a lost-time entry's ``cause`` maps by name (``design`` -> design/instruction); a cause this
  table does not know counts as other, never as a guess at a better one;
* a readiness item's kind: drawings -> design/instruction, material -> materials,
  equipment -> plant, access -> access; permit, inspection and other -> other;
* an instruction entry -> design/instruction.

The journal has no labour or plant lost-time cause today, so labour only fills when a lost-time
cause of that name is recorded, and plant only from equipment readiness items.
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

WEATHER, ACCESS, MATERIALS, DESIGN = "weather", "access", "materials", "design/instruction"
LABOUR, PLANT, CLIENT, OTHER = "labour", "plant", "client", "other"
NOT_EXPLAINED = "not explained by the log"
GAINED = "gained by progress"

CAUSES: tuple[str, ...] = (WEATHER, ACCESS, MATERIALS, DESIGN, LABOUR, PLANT, CLIENT, OTHER)
"""Cause categories, in the order every report lists them."""

BUCKETS: tuple[str, ...] = (*CAUSES, NOT_EXPLAINED, GAINED)
"""Everything a movement can be split into; the parts always add up to the movement."""

_LOST_TIME: Mapping[str, str] = MappingProxyType(
    {
        "weather": WEATHER,
        "access": ACCESS,
        "materials": MATERIALS,
        "design": DESIGN,
        "instruction": DESIGN,
        "labour": LABOUR,
        "labor": LABOUR,
        "plant": PLANT,
        "equipment": PLANT,
        "client": CLIENT,
        "other": OTHER,
    }
)

_READINESS: Mapping[str, str] = MappingProxyType(
    {
        "drawings": DESIGN,
        "material": MATERIALS,
        "equipment": PLANT,
        "access": ACCESS,
        "permit": OTHER,
        "inspection": OTHER,
        "other": OTHER,
    }
)


def lost_time_category(cause: str) -> str:
    """Category of a lost-time entry's ``cause`` (unknown causes: other)."""
    return _LOST_TIME.get(cause, OTHER)


def readiness_category(kind: str) -> str:
    """Category of a readiness item's kind (unknown kinds: other)."""
    return _READINESS.get(kind, OTHER)


def empty_split() -> dict[str, int]:
    """Every bucket at zero, in report order."""
    return dict.fromkeys(BUCKETS, 0)
