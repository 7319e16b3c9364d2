"""Crews "same as the last day": one form with every crew of the last day logged, pre-filled.

Most days the same gangs are on site. The crews form lists each crew recorded on the last day
before today that has crews, with that day's headcount as the field's current value: Enter
records them all again (one ``crew`` entry each), typing a number changes one, ``0`` leaves a
crew out, and the last two fields add a crew that was not there before. Pure: the screen only
shows the form and writes the entries this module returns.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from datetime import date
from typing import Any

from fieldlog.app.forms import Field, Form
from fieldlog.app.recording import DAY_FIELD, day_field, entry_form, form_field
from fieldlog.journal.entries import Entry, check_fields, spec
from fieldlog.site.model import Crew

NEW_TRADE, NEW_HEADCOUNT = "new_trade", "new_headcount"
"""The fields adding a crew that was not on site on the last day."""


def last_crews(entries: Iterable[Entry], today: date) -> list[Entry]:
    """The crew entries of the latest day before ``today`` that has any, in log order."""
    crews = [e for e in entries if e.kind == "crew" and e.day < today]
    if not crews:
        return []
    last = max(e.day for e in crews)
    return [e for e in crews if e.day == last]


def _crew_name(e: Entry) -> str:
    company = e.fields.get("company")
    return f"{e.fields['trade']} ({company})" if company else str(e.fields["trade"])


def crew_form(
    before: Sequence[Entry], site_crews: Mapping[str, Crew], activity: str | None
) -> Form:
    """The crews form: the last day's crews pre-filled, or the one-crew form when none."""
    headcount = spec("crew", "headcount")
    trade = spec("crew", "trade")
    assert headcount is not None and trade is not None  # both are crew fields
    hint = ", ".join(site_crews) or "concrete, steel fixers"
    if not before:
        return entry_form(
            "crew",
            intro="One crew per entry; c again for the next",
            hints={"trade": f"e.g. {hint}"},
            defaults={"activities": activity},
            dated=True,
        )
    fields: list[Field] = []
    for k, e in enumerate(before):
        f = form_field(headcount, e.fields["headcount"])
        fields.append(Field(f"crew_{k}", _crew_name(e), f.kind, default=f.default, spec=f.spec))
    fields.append(
        Field(NEW_TRADE, "Another trade", placeholder=f"not there before, e.g. {hint}", spec=trade)
    )
    fields.append(Field(NEW_HEADCOUNT, "Its headcount", form_field(headcount).kind, spec=headcount))
    fields.append(day_field())
    return Form(
        "Crews on site",
        tuple(fields),
        intro=f"Same as {before[0].day:%a %d %b}: Enter "
        "records them all; type a number to change one, 0 leaves a crew out",
    )


def crew_entries(
    values: Mapping[str, Any], before: Sequence[Entry]
) -> tuple[list[dict[str, Any]], date | None]:
    """The crew entries a read crews form stands for, checked, and the day they describe.

    A crew with its headcount unchanged keeps its hours and activities; a changed one keeps
    its activities only (the hours were for other people).

    Raises:
        ValueError: a new trade without a headcount (or the reverse), or a value the journal
            would refuse; nothing should be written then.
    """
    day = values.get(DAY_FIELD)
    if not before:
        one = {k: v for k, v in values.items() if v is not None and k != DAY_FIELD}
        return [check_fields("crew", one)], day
    out = []
    for k, e in enumerate(before):
        n = values.get(f"crew_{k}")
        if not n:
            continue
        fields: dict[str, Any] = {"trade": e.fields["trade"], "headcount": n}
        for name in ("company", "activities"):
            if e.fields.get(name):
                fields[name] = e.fields[name]
        if n == e.fields["headcount"] and "hours" in e.fields:
            fields["hours"] = e.fields["hours"]
        out.append(check_fields("crew", fields))
    trade, count = values.get(NEW_TRADE), values.get(NEW_HEADCOUNT)
    if (trade is None) != (count is None):
        raise ValueError("a new crew needs both its trade and its headcount")
    if trade is not None:
        out.append(check_fields("crew", {"trade": trade, "headcount": count}))
    return out, day
