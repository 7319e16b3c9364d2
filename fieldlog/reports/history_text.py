"""The forecast history printed for a desk or a binder, at 80 or 132 columns.

Readable without colour: the finish of every window is a bar of ``=`` (one mark per working
day, or per few days when the spread is wide), ``|`` marks the required finish and turns into
``!`` when the bar runs past it (the job is late). Then why each window moved (only windows
that moved or hold evidence), the movement by cause over the range, and plan reliability.
"""

from __future__ import annotations

from fieldlog.history.causes import BUCKETS
from fieldlog.history.values import History, WeekReliability
from fieldlog.reports.text_fit import fit, right, wrap

CAUTION = (
    "Read from the log only: a cause is shown where an entry names it, anything else is 'not "
    "explained by the log'. This is a record, not an entitlement finding. A schedule is a "
    "plan, not a permit: the contract, local codes and licensed professionals govern."
)


MARGIN = 5
"""Working days drawn left of the earliest finish, when there is room."""


def signed(n: int) -> str:
    """``+2``, ``0``, ``-1``."""
    return f"{n:+d}" if n else "0"


def render_text(history: History, width: int = 80) -> str:
    """The whole printout, ``width`` columns wide (at least 60)."""
    h, out = history, []
    out.append(fit(f"Forecast history: {h.site} (schedule revision {h.revision})", width).rstrip())
    span = f"{h.windows[0].first} to {h.windows[-1].last}" if h.windows else "no logged days"
    req = f"required finish {h.finish_by}" if h.finish_by else "no required finish set"
    out += wrap(
        f"By {h.by}, {span}; {req}. Moves are working days of calendar "
        f"'{h.calendar}' (+ later, - earlier).",
        width,
    )
    out += wrap(
        f"Starting point (log as of {h.baseline_status}): finish {h.baseline_finish}, "
        f"float {_float(h.baseline_float)}.",
        width,
    )
    out.append("")
    out += _chart(h, width)
    out.append("")
    out += _why(h, width)
    out += _totals(h)
    out.append("")
    out += _reliability(h.weeks, width)
    if h.problems:
        out.append("")
        out.append(f"Log problems ({len(h.problems)}), see 'fieldlog verify':")
        for p in h.problems:
            out += wrap(p, width, indent="    ", first="  - ")
    out.append("")
    out += wrap(CAUTION, width)
    return "\n".join(line.rstrip() for line in out) + "\n"


def _float(f: int | None) -> str:
    return "-" if f is None else signed(f)


def _chart(h: History, width: int) -> list[str]:
    label_w = max([len(w.label) for w in h.windows] + [10])
    head = f"{'Window':<{label_w}}  {'Finish':<10}  Float   Move  "
    cells = max(10, width - len(head))
    positions, run = [], 0
    for w in h.windows:
        run += w.movement
        positions.append(run)
    required = h.baseline_float if h.finish_by is not None else None
    low = min([0, *positions] + ([required] if required is not None else []))
    high = max([0, *positions] + ([required] if required is not None else []))
    low -= min(MARGIN, max(0, cells - 1 - (high - low)))  # a bar is never a single mark
    step = max(1, -(-(high - low + 1) // (cells - 1)))
    scale = "one working day" if step == 1 else f"{step} working days"
    out = [head + "Finish line"]
    for w, pos in zip(h.windows, positions, strict=True):
        bar = ["="] * ((pos - low) // step + 1)
        if required is not None:
            r = (required - low) // step
            if r < len(bar):
                bar[r] = "|" if r == len(bar) - 1 else "!"
            else:
                bar += [" "] * (r - len(bar)) + ["|"]
        out.append(
            f"{w.label:<{label_w}}  {w.finish.isoformat()}  "
            f"{right(_float(w.finish_float), 5)}  {right(signed(w.movement), 5)}  " + "".join(bar)
        )
    out.append(f"(= {scale}; | required finish; ! finish past it)")
    return out


def _why(h: History, width: int) -> list[str]:
    out = ["Why it moved (split by cause; evidence from the entries of each window)"]
    path: tuple[str, ...] = ()
    shown = 0
    for w in h.windows:
        if not w.movement and not w.steps and not w.evidence and w.driving_path == path:
            continue
        shown += 1
        parts = [f"{b} {signed(d)}" for b, d in w.split.items() if d]
        out += wrap(
            ", ".join(parts) or "no movement",
            width,
            indent=" " * 4,
            first=f"{w.label}  {signed(w.movement)}: ",
        )
        for s in w.steps:
            out += wrap(s.what, width, indent=" " * 6, first=f"  {s.bucket} {signed(s.days)}: ")
        for e in w.evidence:
            out += wrap(e.text, width, indent=" " * 6, first=f"  {e.day:%m-%d} {e.kind}: ")
        if w.driving_path != path:
            out.append(path_line(w.driving_path, width))
            path = w.driving_path
    if not shown:
        out.append("  nothing moved and nothing was recorded that bears on the finish")
    out.append("")
    return out


def path_line(path: tuple[str, ...], width: int) -> str:
    """The driving path on one line: as many ids from its start as fit, then its end."""
    first = "  driving path now: "
    if not path:
        return first + "none (all work finished)"
    whole = first + " ".join(path)
    if len(whole) <= width:
        return whole
    tail = f" ... {path[-1]} ({len(path)} activities)"
    line = first.rstrip()
    for aid in path[:-1]:
        if len(line) + 1 + len(aid) + len(tail) > width:
            break
        line += " " + aid
    return line + tail


def _totals(h: History) -> list[str]:
    out = ["Movement by cause over the range (working days)"]
    split = h.split
    for b in BUCKETS:
        out.append(f"  {b:<28}{right(signed(split[b]), 5)}")
    end = h.windows[-1].finish if h.windows else h.baseline_finish
    out.append(
        f"  {'total':<28}{right(signed(h.total_movement), 5)}  ({h.baseline_finish} to {end})"
    )
    return out


def _reliability(weeks: tuple[WeekReliability, ...], width: int) -> list[str]:
    out = [
        "Plan reliability: PPC = planned assignments done as planned / planned",
        "(the plan: MUST and MAY work of the lookahead as of the Sunday before)",
        f"{'Week from':<12}{'Planned':>8}{'Done':>6}{'PPC':>6}   MUST done/planned",
    ]
    for wk in weeks:
        ppc = "-" if wk.ppc is None else f"{wk.ppc:.0f}%"
        out.append(
            f"{wk.first.isoformat():<12}{wk.planned:>8}{wk.done:>6}{ppc:>6}"
            f"   {wk.must_done}/{wk.must_planned}"
        )
        for a in wk.assignments:
            if a.done:
                continue
            what = f"  missed {a.activity} ({'MUST' if a.must else 'MAY'}, {a.required}): "
            out += wrap("; ".join(a.reasons), width, indent=" " * 6, first=what)
    if not weeks:
        out.append("  no week in the range")
    return out
