"""DCMA checks 1-5: is the network logic sound enough for its float to mean anything?

Logic, leads, lags, relationship types and hard constraints look only at the office's
schedule: which activities wait on which, by how much, and which dates are pinned. The GAO
Schedule Assessment Guide's page "Common Barriers to Valid Float" gives the reason they come
first: "Missing activities, missing or convoluted logic, and date constraints prevent the valid
calculation of total float".

Populations: the checks count over *unfinished* activities, and over links *into* unfinished
activities, because finished work can no longer be re-planned (common practice in applying the
DCMA checks).
"""

from __future__ import annotations

from fieldlog.checks.result import CheckResult, Counting, Threshold
from fieldlog.checks.sources import DCMA_GAO, DCMA_SECONDARY
from fieldlog.engine.result import ScheduleResult
from fieldlog.site.model import Link, LinkType, Site

MAX_MISSING_LOGIC_PCT = 5.0
"""Check 1: at most 5% of unfinished activities without a predecessor or a successor."""
MAX_LAG_PCT = 5.0
"""Check 3: at most 5% of links carry a positive lag."""
MIN_FS_PCT = 90.0
"""Check 4: at least 90% of links are finish-to-start."""
MAX_HARD_CONSTRAINT_PCT = 5.0
"""Check 5: at most 5% of unfinished activities carry a hard date constraint."""

LOGIC = Counting(
    1,
    "Logic",
    Threshold("<= 5%", DCMA_GAO),
    "unfinished activities with no predecessor or no successor",
    most_pct=MAX_MISSING_LOGIC_PCT,
)
LEADS = Counting(
    2,
    "Leads",
    Threshold("0 links", DCMA_SECONDARY),
    "links into unfinished activities with a negative lag (lead)",
)
LAGS = Counting(
    3,
    "Lags",
    Threshold("<= 5%", DCMA_SECONDARY),
    "links into unfinished activities with a positive lag",
    most_pct=MAX_LAG_PCT,
)
RELATIONSHIP_TYPES = Counting(
    4,
    "Relationship types",
    Threshold(">= 90% FS", DCMA_SECONDARY),
    "links into unfinished activities that are finish-to-start",
    least_pct=MIN_FS_PCT,
)
HARD_CONSTRAINTS = Counting(
    5,
    "Hard constraints",
    Threshold("<= 5%", DCMA_SECONDARY),
    "unfinished activities with a 'finish not after' date",
    most_pct=MAX_HARD_CONSTRAINT_PCT,
)
"""Checks 1-5, one row each: the functions below find the items, these say how to judge them."""


def open_ids(result: ScheduleResult) -> list[str]:
    """Unfinished activities, in schedule order."""
    return [r.id for r in result.activities if r.is_open]


def open_links(site: Site, result: ScheduleResult) -> list[Link]:
    """Links whose successor is not finished yet, in schedule order."""
    return [k for k in site.links if result.by_id[k.succ].is_open]


def _link_name(link: Link) -> str:
    return f"{link.pred}->{link.succ}"


def check_logic(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 1, missing logic: unfinished activities with no predecessor or no successor.

    The job's start milestone (a milestone nothing precedes) and its finish milestone (a
    milestone nothing follows) are meant to be open-ended and are not counted (common
    practice).
    """
    has_pred = {k.succ for k in site.links}
    has_succ = {k.pred for k in site.links}
    population = open_ids(result)
    missing = []
    for aid in population:
        milestone = site.activity(aid).is_milestone
        no_pred = aid not in has_pred and not milestone
        no_succ = aid not in has_succ and not milestone
        if no_pred or no_succ or (aid not in has_pred and aid not in has_succ):
            missing.append(aid)
    return LOGIC.result(missing, len(population))


def check_leads(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 2, leads: links with a negative lag (a successor starting before its cue)."""
    links = open_links(site, result)
    leads = [_link_name(k) for k in links if k.lag < 0]
    return LEADS.result(leads, len(links))


def check_lags(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 3, lags: links with a positive lag, which hide work or waiting time."""
    links = open_links(site, result)
    lags = [_link_name(k) for k in links if k.lag > 0]
    return LAGS.result(lags, len(links))


def check_relationship_types(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 4, relationship types: the share of finish-to-start links.

    Items are the links of other types (SS, FF, SF), so the reader sees what to review.
    """
    links = open_links(site, result)
    fs = sum(1 for k in links if k.type is LinkType.FS)
    others = [f"{_link_name(k)} {k.type.value}" for k in links if k.type is not LinkType.FS]
    return RELATIONSHIP_TYPES.result(others, len(links), count=fs)


def check_hard_constraints(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 5, hard constraints: unfinished activities pinned by a "finish not after" date.

    A "finish not after" date stops the backward pass from letting logic set the late dates,
    so DCMA's definition counts it as hard (recalled: its list of hard constraints also names
    must-start-on, must-finish-on and start-no-later-than, which fieldlog does not have). A
    "start not before" date only holds work back and is a soft constraint, not counted.
    """
    population = open_ids(result)
    pinned = [aid for aid in population if site.activity(aid).finish_not_after is not None]
    return HARD_CONSTRAINTS.result(
        pinned,
        len(population),
        note="'finish not after' counted as hard (recalled from DCMA's definition)",
    )
