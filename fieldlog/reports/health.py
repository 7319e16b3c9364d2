"""The health report as text (for reading and printing) and JSON (for other tools).

Text: one line per check with its outcome, value, count and pass mark, then what to review
under every failed check (at most :data:`MAX_ITEMS` ids each), then where each mark comes from
and the usual cautions. JSON carries every field and every id.
"""

from __future__ import annotations

import json

from fieldlog.checks import HealthReport
from fieldlog.checks.result import CheckResult, Outcome

MAX_ITEMS = 12
"""Ids listed per failed check in the text report; JSON lists them all."""

CAUTION = (
    "These marks are a starting point for review, not compliance triggers (GAO-16-89G). "
    "A schedule is a plan, not a permit: the contract, local codes and licensed "
    "professionals govern the work."
)


def format_value(check: CheckResult) -> str:
    """The value as printed: ``12.5%``, ``0.97`` or ``600 d``; ``-`` when there is none."""
    if check.value is None:
        return "-"
    if check.unit == "ratio":
        return f"{check.value:.2f}"
    if check.unit == "days":
        return f"{check.value:.0f} d"
    return f"{check.value:.1f}%"


def _counted(check: CheckResult) -> str:
    if check.unit == "%" or check.number == 14:
        return f"{check.count} of {check.population}"
    if check.number == 13:
        return f"TF {check.count:+d}, CPL {check.population}"
    return ""


def render_text(report: HealthReport) -> str:
    """The report for a person; ``*`` marks a pass mark that was recalled, not read."""
    out = [
        f"Schedule health: {report.site_name}, revision {report.revision}, "
        f"as of end of {report.as_of.isoformat()}",
        f"Baseline: {report.baseline}",
        "",
        " #  Check               Result  Value    Counted           Mark",
    ]
    for c in report.checks:
        star = "*" if c.threshold.recalled else " "
        out.append(
            f"{c.number:>2}  {c.name:<19} {c.outcome.value.upper():<7} "
            f"{format_value(c):>7}  {_counted(c):<17} {c.threshold.text}{star}".rstrip()
        )
    failed = report.failed
    out.append("")
    out.append(
        f"{len(failed)} of {len(report.checks)} checks outside their mark."
        if failed
        else "Every check is within its mark."
    )
    for c in report.checks:
        if c.outcome is not Outcome.FAIL and not (c.note and c.number in (12, 13)):
            continue
        out.append("")
        out.append(f"{c.number} {c.name}: {c.what}")
        if c.note:
            out.append(f"   {c.note}")
        if c.failed and c.items:
            shown = ", ".join(c.items[:MAX_ITEMS])
            more = len(c.items) - MAX_ITEMS
            out.append(f"   review: {shown}" + (f" and {more} more" if more > 0 else ""))
    out.append("")
    out.append("Where each mark comes from:")
    out.extend(f"{c.number:>3} {c.name}: {c.threshold.source}" for c in report.checks)
    out.append("* mark recalled rather than read in the guidance: confirm it before relying on it.")
    out.append(CAUTION)
    return "\n".join(out) + "\n"


def render_json(report: HealthReport) -> str:
    """Every field of every check."""
    data = {
        "site": report.site_name,
        "revision": report.revision,
        "as_of": report.as_of.isoformat(),
        "baseline": report.baseline,
        "failed": [c.number for c in report.failed],
        "checks": [
            {
                "number": c.number,
                "name": c.name,
                "outcome": c.outcome.value,
                "value": c.value,
                "unit": c.unit,
                "count": c.count,
                "population": c.population,
                "what": c.what,
                "mark": c.threshold.text,
                "mark_source": c.threshold.source,
                "mark_recalled": c.threshold.recalled,
                "items": list(c.items),
                "note": c.note,
            }
            for c in report.checks
        ],
        "caution": CAUTION,
    }
    return json.dumps(data, indent=2, ensure_ascii=False) + "\n"
