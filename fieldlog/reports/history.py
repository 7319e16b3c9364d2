"""Print a forecast history as text (80 or 132 columns), JSON or CSV."""

from __future__ import annotations

from fieldlog.history.values import History
from fieldlog.reports.history_data import render_csv, render_json
from fieldlog.reports.history_text import render_text

FORMATS = ("text", "json", "csv")


def render_history(history: History, fmt: str, width: int = 80) -> str:
    """``history`` in ``fmt`` (one of :data:`FORMATS`); ``width`` applies to text."""
    if fmt == "json":
        return render_json(history)
    if fmt == "csv":
        return render_csv(history)
    if fmt == "text":
        return render_text(history, width)
    raise ValueError(f"unknown format {fmt!r} (known: {', '.join(FORMATS)})")
