"""The fewest-people answer in words, shared by the printed sheet and the app.

One sentence per crew, always with its proof beside it: "groundworks: 8 people, optimal" when
the plan meets its lower bound or the search ruled out anything smaller, else "8 people; no plan
needs fewer than 7". Then the starts to move, then any crew the moves put above its early-start
peak (a crew settled later makes room for one settled before it, within its headcount: the
rule is printed where it applies, so a higher number is never a surprise), then what the bound
rests on, then the caution that a smaller crew is a suggestion and not a safe staffing level.
"""

from __future__ import annotations

from datetime import date
from typing import TYPE_CHECKING

from fieldlog.lookahead.reasons import date_text, working_days
from fieldlog.reports.words import people

if TYPE_CHECKING:  # the search itself loads only when a lookahead has an answer to word
    from fieldlog.lookahead.fewest_bounds import LowerBound
    from fieldlog.lookahead.fewest_people import CrewAnswer, FewestPeople, Raised


def title(fewest: FewestPeople) -> str:
    """The heading line of the section."""
    return (
        f"Fewest people on the window's busiest day, keeping every link, every late "
        f"finish and the forecast finish {date_text(fewest.finish)}:"
    )


def crew_line(answer: CrewAnswer) -> str:
    """``groundworks: 8 people, optimal (has 10; 12 if all work starts early)``."""
    headcount = people(answer.peak)
    proof = "optimal" if answer.optimal else f"no plan needs fewer than {answer.bound.people}"
    sep = ", " if answer.optimal else "; "
    return (
        f"{answer.crew}: {headcount}{sep}{proof} (has {answer.available}; "
        f"{answer.early_peak} if all work starts early)"
    )


def moves_line(fewest: FewestPeople) -> str:
    """``With groundworks 8: move A (name) to Tue 10 Mar 2026, ...`` or why nothing moves."""
    crews = ", ".join(f"{a.crew} {a.peak}" for a in fewest.crews)
    if not fewest.moves:
        return f"With {crews}: every start stays on its early date."
    moves = ", ".join(f"{m.activity} ({m.name}) to {date_text(m.start)}" for m in fewest.moves)
    return f"With {crews}: move {moves}."


def raised_line(raised: Raised) -> str:
    """``fixers rises to 4 people (3 if all work starts early) to make room for carpenters;
    never above its headcount of 4.``"""
    room = ", ".join(raised.room_for)
    return (
        f"{raised.crew} rises to {people(raised.peak)} ({raised.early_peak} if all work starts "
        f"early) to make room for {room}; never above its headcount of {raised.available}."
    )


def bound_line(answer: CrewAnswer, days: tuple[date, ...]) -> str | None:
    """What the crew's lower bound rests on, in a foreman's words (None: nothing to say)."""
    b: LowerBound = answer.bound
    if b.reason == "must":
        return (
            f"{answer.crew}: work that cannot move needs {people(b.people)} on "
            f"{date_text(days[b.first])}."
        )
    if b.reason == "energy":
        return (
            f"{answer.crew}: {b.person_days} person-days must fall between "
            f"{date_text(days[b.first])} and {date_text(days[b.last])}, on "
            f"{working_days(b.work_days)} the crew can work: at least "
            f"{people(b.people)} a day."
        )
    if b.reason == "days":
        chosen = ", ".join(date_text(days[d]) for d in b.days)
        return (
            f"{answer.crew}: {b.person_days} person-days must fall on these "
            f"{working_days(b.work_days)}, whatever starts the work takes ({chosen}): at least "
            f"{people(b.people)} a day."
        )
    if b.reason == "headcount":
        return f"{answer.crew}: one activity alone needs {people(b.people)}."
    return None


def search_line(fewest: FewestPeople) -> str:
    """How hard the search looked, so "not proven" has a reason beside it."""
    if all(a.optimal for a in fewest.crews):
        if not fewest.nodes:
            return "Every answer meets its lower bound: none can be smaller."
        return f"Every answer proven optimal ({fewest.nodes} starts tried)."
    return (
        f"The search stopped at its limit of {fewest.budget} starts tried: the plan is "
        "the best found, and the bound is what is proven."
    )


def lines(fewest: FewestPeople, days: tuple[date, ...]) -> list[str]:
    """Every sentence of the section after the title, in print order."""
    from fieldlog.lookahead.fewest_people import CAUTION

    out = [crew_line(a) for a in fewest.crews]
    out.append(moves_line(fewest))
    out += [raised_line(r) for r in fewest.raised]
    out += [t for a in fewest.crews if (t := bound_line(a, days)) is not None]
    out.append(search_line(fewest))
    out.append(CAUTION)
    return out
