"""The printable daily report: one day of the field journal on paper, 80 columns, plain text.

What goes in follows what public construction-records guides ask a daily record to hold
(e.g. a state transportation department's construction contract administration manual: date,
temperature, weather conditions, contractor and subcontractor work hours, the controlling item
of work based on the schedule; its utility manual adds inclement weather and down time,
verbal authorisations and notable incidents), plus what a delay analysis later needs: actual
starts and finishes, remaining days, lost time with its cause and the calendars it hit,
readiness items, instructions, corrections and the schedule's forecast that evening.

The report shows the log as it reads now (corrections recorded since are applied and listed)
and the schedule as of the end of the day. It is deterministic: no printing time, stable
order, ``\\n`` line ends, so the same log always prints the same bytes.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from datetime import date

from fieldlog.engine.progress import Status
from fieldlog.journal import Entry
from fieldlog.reports.text_fit import fit, right, wrap
from fieldlog.reports.words import against_required, working_days
from fieldlog.workspace import SiteState

WIDTH = 80
CAUTION = (
    "A schedule is a plan, not a permit: excavation, lifting, concrete and access work "
    "go ahead only under their own permits and method statements. Local codes, the "
    "contract and licensed professionals govern."
)


def _d(day: date | None) -> str:
    return day.strftime("%a %d %b %Y") if day else "-"


def _n(value: float) -> str:
    return f"{value:g}"


def _stop(text: str) -> str:
    """``text`` ending in a full stop (not two)."""
    return text if text.rstrip().endswith((".", "!", "?")) else text + "."


class _Page:
    """Lines of the report, with headings and wrapped text that never pass 80 columns.

    Widths are display cells (:mod:`fieldlog.reports.text_fit`), not characters: a crew
    company or a note in Chinese, or with an emoji, takes two cells a character on paper.
    """

    def __init__(self) -> None:
        self.lines: list[str] = []

    def add(self, text: str = "") -> None:
        self.lines.append(text.rstrip())

    def heading(self, title: str) -> None:
        self.add()
        self.add(title.upper())

    def wrap(self, text: str, indent: int = 2, hang: int = 4) -> None:
        self.lines += wrap(text, WIDTH, indent=" " * (indent + hang), first=" " * indent)

    def none(self) -> None:
        self.add("  none recorded")

    def text(self) -> str:
        return "\n".join(self.lines) + "\n"


def render_daily_report(state: SiteState, day: date) -> str:
    """The daily report of ``day`` from a site loaded as of the end of that day."""
    site, rp = state.site, state.replay
    todays = [e for e in rp.effective if e.day == day]
    raw = [e for e in state.journal.entries if e.day == day]
    p = _Page()
    p.add("=" * WIDTH)
    title = "DAILY REPORT"
    name = fit(site.name, WIDTH - len(title) - 2).rstrip()
    p.add(title + right(name, WIDTH - len(title)))
    rev = f"Schedule revision {site.revision}"
    when = day.strftime("%A %d %B %Y")
    p.add(f"{when}{rev:>{WIDTH - len(when)}}")
    p.add("=" * WIDTH)
    authors = sorted({f"{e.author} ({e.device})" for e in raw})
    p.wrap("Recorded by: " + (", ".join(authors) if authors else "nobody (no entries)"), 0)
    p.wrap(_calendar_line(state, day), 0)

    _weather(p, todays)
    _lost_time(p, todays, site)
    _crews(p, todays)
    _work(p, todays, state)
    _schedule(p, state)
    _readiness(p, todays, state, day)
    for kind, title in (
        ("plant", "Plant and equipment"),
        ("delivery", "Deliveries"),
        ("inspection", "Inspections and tests"),
        ("visitor", "Visitors"),
        ("instruction", "Instructions received"),
        ("incident", "Incidents"),
        ("safety", "Safety observations"),
        ("note", "Notes"),
    ):
        p.heading(title)
        items = [e for e in todays if e.kind == kind]
        for e in items:
            for k, line in enumerate(_describe(e, state).split("\n")):
                p.wrap(line, 2 if k == 0 else 6, 4 if k == 0 else 0)  # a note's lines kept
        if not items:
            p.none()
    _corrections(p, raw, rp.superseded)
    problems = [pr.message for pr in rp.problems]
    if problems:
        p.heading("Problems in the log (settle each with a correction)")
        for msg in problems:
            p.wrap("- " + msg, 2, 2)
    p.add()
    p.add("-" * WIDTH)
    ids = [e.id for e in raw]
    p.wrap(f"{len(ids)} log entries for this day" + (f": {', '.join(ids)}" if ids else "."), 0)
    p.wrap(CAUTION, 0, 0)
    return p.text()


def _calendar_line(state: SiteState, day: date) -> str:
    site = state.site
    cal = state.schedule.calendars[site.calendar]
    lost = day in state.replay.lost_days.get(site.calendar, frozenset())
    if lost:
        status = "lost day (see time lost)"
    elif cal.is_working(day):
        count = cal.count(site.start, day) + 1 if day >= site.start else 0
        status = f"working day {count} of the job" if count else "working day (before start)"
    else:
        status = "non-working day"
    return f"Calendar '{site.calendar}': {status}. Status as of the end of this day."


def _weather(p: _Page, todays: list[Entry]) -> None:
    p.heading("Weather")
    items = [e for e in todays if e.kind == "weather"]
    if not items:
        p.add("  NOT RECORDED")
    for e in items:
        f = e.fields
        parts = [f["conditions"]]
        unit = f.get("unit", "C")
        if "high" in f or "low" in f:
            temps = [f"{k} {_n(f[k])} {unit}" for k in ("high", "low") if k in f]
            parts.append(", ".join(temps))
        if "precip_mm" in f:
            parts.append(f"precipitation {_n(f['precip_mm'])} mm")
        if f.get("wind"):
            parts.append(f"wind {f['wind']}")
        p.wrap("; ".join(parts) + ".", 2, 4)
        effect = "Work stopped by weather" if f.get("stopped") else "Work not stopped by weather"
        if f.get("hours_lost"):
            effect += f", {_n(f['hours_lost'])} hours lost"
        p.wrap(effect + f". [{e.id}]", 2, 4)


def _lost_time(p: _Page, todays: list[Entry], site) -> None:
    p.heading("Time lost and down time")
    items = [e for e in todays if e.kind == "lost-time"]
    for e in items:
        f = e.fields
        how = "whole day lost" if f.get("whole_day") else f"{_n(f['hours'])} hours lost"
        cals = ", ".join(f.get("calendars") or site.calendars) if f.get("whole_day") else ""
        text = f"{how}; cause: {f['cause']}"
        if cals:
            text += f"; non-working day on calendar(s): {cals}"
        if f.get("activities"):
            text += f"; activities hit: {', '.join(f['activities'])}"
        if f.get("note"):
            text += f"; {f['note']}"
        p.wrap(_stop(text) + f" [{e.id}]", 2, 4)
    if not items:
        p.none()


def _crews(p: _Page, todays: list[Entry]) -> None:
    p.heading("Crews on site (contractor and subcontractor work hours)")
    items = [e for e in todays if e.kind == "crew"]
    if not items:
        p.none()
        return
    p.add(f"  {'Trade':<18} {'Company':<34} {'People':>7} {'Hours':>8}")
    heads, hours, unknown = 0, 0.0, False
    for e in items:
        f = e.fields
        h = f.get("hours")
        unknown = unknown or h is None
        hours += h or 0.0
        heads += f["headcount"]
        p.add(
            f"  {fit(f['trade'], 18, '')} {fit(f.get('company', ''), 34, '')} "
            f"{f['headcount']:>7} {'-' if h is None else _n(h):>8}"
        )
    p.add(f"  {'Total':<53} {heads:>7} {_n(hours) + ('+' if unknown else ''):>8}")


def _work(p: _Page, todays: list[Entry], state: SiteState) -> None:
    p.heading("Work on activities")
    labels = {
        "started": "Started",
        "finished": "Finished",
        "remaining": "Remaining",
        "percent": "Complete",
    }
    items = [e for e in todays if e.kind in labels]
    for e in items:
        aid = e.fields["activity"]
        extra = ""
        if e.kind == "remaining":
            n = e.fields["days"]
            extra = f": {working_days(n)} left"
        elif e.kind == "percent":
            extra = f": {_n(e.fields['percent'])}% physically complete"
        p.wrap(f"{labels[e.kind]:<10} {aid} {_name(state, aid)}{extra} [{e.id}]", 2, 11)
    if not items:
        p.none()
    running = [r for r in state.schedule.activities if r.status is Status.IN_PROGRESS]
    p.add()
    p.add("  In progress at the end of the day:")
    if not running:
        p.add("    none")
        return
    p.add(
        f"    {'ID':<10} {'Activity':<28} {'Started':<11} {'Left':>4} {'Fcst finish':<11} {'TF':>4}"
    )
    for r in sorted(running, key=lambda r: (r.total_float or 0, r.id)):
        p.add(
            f"    {fit(r.id, 10, '')} {fit(r.name, 28, '')} {_short(r.actual_start):<11} "
            f"{r.remaining:>4} {_short(r.early_finish):<11} {_tf(r.total_float):>4}"
        )


def _short(day: date | None) -> str:
    return day.strftime("%d %b %y") if day else "-"


def _tf(value: int | None) -> str:
    return "-" if value is None else str(value)


def _name(state: SiteState, aid: str) -> str:
    if state.site.has_activity(aid):
        return state.site.activity(aid).name
    return "(no longer in the schedule)"


def _schedule(p: _Page, state: SiteState) -> None:
    sched = state.schedule
    p.heading("Schedule as of the end of the day")
    text = f"Forecast finish {_d(sched.finish)}"
    if state.site.finish_by is not None and sched.finish_float is not None:
        text += f"; required {_d(state.site.finish_by)}: {against_required(sched.finish_float)}"
    p.wrap(text + ".", 2, 4)
    driving = [sched.by_id[a] for a in sched.driving_path if sched.by_id[a].is_open][:3]
    if driving:
        p.wrap(
            "Controlling work (driving path): "
            + "; ".join(
                f"{r.id} {r.name} ({r.status.value}, total float {_tf(r.total_float)})"
                for r in driving
            )
            + ".",
            2,
            4,
        )
    late = sorted((r for r in sched.activities if r.late), key=lambda r: (r.total_float, r.id))
    if late:
        p.wrap(
            "Late (negative float): " + ", ".join(f"{r.id} ({r.total_float})" for r in late) + ".",
            2,
            4,
        )
    for o in sched.out_of_sequence:
        p.wrap(f"Out of sequence: {o.describe()}.", 2, 4)


def _readiness(p: _Page, todays: list[Entry], state: SiteState, day: date) -> None:
    p.heading("Readiness items")
    any_line = False
    for e in todays:
        if e.kind == "need":
            f = e.fields
            exp = f"expected {_d(f['expected'])}" if f.get("expected") else "no expected date"
            p.wrap(
                f"Opened: {f['activity']} needs {f['what']} ({f['category']}), {exp}. [{e.id}]",
                2,
                4,
            )
            any_line = True
        elif e.kind == "cleared":
            item = state.replay.current.get(e.fields["item"], e.fields["item"])
            need = next((n for n in state.replay.effective if n.id == item), None)
            what = f"{need.fields['activity']} {need.fields['what']}" if need else item
            note = f" ({e.fields['note']})" if e.fields.get("note") else ""
            p.wrap(f"Cleared: {what}{note}. [{e.id}]", 2, 4)
            any_line = True
    for item in state.replay.readiness:
        flag = item.flag(day)
        exp = f"expected {_d(item.expected)}" if item.expected else "no expected date"
        p.wrap(
            f"Still open: {item.activity} needs {item.what} ({item.kind}), opened "
            f"{_d(item.opened)}, {exp}" + (" - CHASE" if flag else "") + f". [{item.entry_id}]",
            2,
            4,
        )
        any_line = True
    if not any_line:
        p.none()


def _describe(e: Entry, state: SiteState) -> str:
    f = e.fields
    act = f"{f['activity']} {_name(state, f['activity'])}: " if f.get("activity") else ""
    acts = f" Activities: {', '.join(f['activities'])}." if f.get("activities") else ""
    bits: Iterable[str | None]  # an optional field not given is None, left out below
    if e.kind == "delivery":
        bits = (f["what"], f.get("quantity"), f.get("supplier") and f"from {f['supplier']}")
    elif e.kind == "inspection":
        bits = (
            f["what"],
            f"result: {f['result']}",
            f.get("inspector") and f"by {f['inspector']}",
            f.get("reference") and f"ref. {f['reference']}",
        )
    elif e.kind == "visitor":
        t_in, t_out = f.get("time_in"), f.get("time_out")
        bits = (
            f["name"],
            f.get("company"),
            f.get("purpose"),
            f"in {t_in:%H:%M}" if t_in else None,
            f"out {t_out:%H:%M}" if t_out else None,
        )
    elif e.kind == "plant":
        bits = (
            f"{f['count']} x {f['what']}" if f.get("count") else f["what"],
            f.get("supplier") and f"from {f['supplier']}",
            f"{_n(f['hours_worked'])} h worked" if "hours_worked" in f else None,
            ("BROKE DOWN" + (f", {_n(f['hours_down'])} h out of use" if "hours_down" in f else ""))
            if f.get("broken_down")
            else None,
        )
    elif e.kind == "instruction":
        bits = (
            f"{f['form'].upper()} from {f['given_by']}",
            f.get("reference") and f"ref. {f['reference']}",
            f'"{f["text"]}"',
        )
    elif e.kind == "incident":
        bits = (
            f["text"],
            "INJURY" if f.get("injury") else "no injury",
            f.get("reported_to") and f"reported to {f['reported_to']}",
        )
    elif e.kind == "safety":
        bits = (f["text"], f.get("action") and f"action: {f['action']}")
    else:
        bits = (f["text"],)
    note = f" Note: {_stop(f['note'])}" if f.get("note") and e.kind != "note" else ""
    return act + _stop("; ".join(b for b in bits if b)) + note + acts + f" [{e.id}]"


def _corrections(p: _Page, raw: list[Entry], superseded: Mapping[str, Entry]) -> None:
    p.heading("Corrections")
    items = [e for e in raw if e.kind == "correction"]
    later = sorted(
        {
            c.id: c
            for e in raw
            if e.id in superseded
            for c in (superseded[e.id],)
            if c.day != e.day
        }.values(),
        key=Entry.sort_key,
    )
    for c in items:
        f = c.fields
        what = "withdrawn" if f.get("withdraw") else "replaced"
        changes = [
            f"{k} = {v}"
            for k, v in f.items()
            if k not in ("supersedes", "reason", "corrects", "withdraw")
        ]
        text = (
            f"{f['supersedes']} ({f['corrects']}) {what} by {c.id}, written "
            f"{c.written:%d %b %Y %H:%M} UTC: {f['reason']}"
        )
        if changes:
            text += "; now " + ", ".join(changes)
        p.wrap(_stop(text), 2, 4)
    for c in later:
        p.wrap(
            f"{c.fields['supersedes']} was moved to {_d(c.day)} by {c.id}: {c.fields['reason']}.",
            2,
            4,
        )
    if not items and not later:
        p.none()
