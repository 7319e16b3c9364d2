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

from fieldlog.checks.result import (
    CheckResult,
    Threshold,
    at_least,
    at_most,
    none_allowed,
    share,
)
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
    value = share(len(missing), len(population))
    return CheckResult(
        1,
        "Logic",
        at_most(value, MAX_MISSING_LOGIC_PCT),
        value,
        len(missing),
        len(population),
        Threshold("<= 5%", DCMA_GAO),
        "unfinished activities with no predecessor or no successor",
        tuple(missing),
    )


def check_leads(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 2, leads: links with a negative lag (a successor starting before its cue)."""
    links = open_links(site, result)
    leads = [_link_name(k) for k in links if k.lag < 0]
    return CheckResult(
        2,
        "Leads",
        none_allowed(len(leads), len(links)),
        share(len(leads), len(links)),
        len(leads),
        len(links),
        Threshold("0 links", DCMA_SECONDARY),
        "links into unfinished activities with a negative lag (lead)",
        tuple(leads),
    )


def check_lags(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 3, lags: links with a positive lag, which hide work or waiting time."""
    links = open_links(site, result)
    lags = [_link_name(k) for k in links if k.lag > 0]
    value = share(len(lags), len(links))
    return CheckResult(
        3,
        "Lags",
        at_most(value, MAX_LAG_PCT),
        value,
        len(lags),
        len(links),
        Threshold("<= 5%", DCMA_SECONDARY),
        "links into unfinished activities with a positive lag",
        tuple(lags),
    )


def check_relationship_types(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 4, relationship types: the share of finish-to-start links.

    Items are the links of other types (SS, FF, SF), so the reader sees what to review.
    """
    links = open_links(site, result)
    fs = [k for k in links if k.type is LinkType.FS]
    others = tuple(f"{_link_name(k)} {k.type.value}" for k in links if k.type is not LinkType.FS)
    value = share(len(fs), len(links))
    return CheckResult(
        4,
        "Relationship types",
        at_least(value, MIN_FS_PCT),
        value,
        len(fs),
        len(links),
        Threshold(">= 90% FS", DCMA_SECONDARY),
        "links into unfinished activities that are finish-to-start",
        others,
    )


def check_hard_constraints(site: Site, result: ScheduleResult) -> CheckResult:
    """Check 5, hard constraints: unfinished activities pinned by a "finish not after" date.

    A "finish not after" date stops the backward pass from letting logic set the late dates,
    so DCMA's definition counts it as hard (recalled: its list of hard constraints also names
    must-start-on, must-finish-on and start-no-later-than, which fieldlog does not have). A
    "start not before" date only holds work back and is a soft constraint, not counted.
    """
    population = open_ids(result)
    pinned = [aid for aid in population if site.activity(aid).finish_not_after is not None]
    value = share(len(pinned), len(population))
    return CheckResult(
        5,
        "Hard constraints",
        at_most(value, MAX_HARD_CONSTRAINT_PCT),
        value,
        len(pinned),
        len(population),
        Threshold("<= 5%", DCMA_SECONDARY),
        "unfinished activities with a 'finish not after' date",
        tuple(pinned),
        note="'finish not after' counted as hard (recalled from DCMA's definition)",
    )
