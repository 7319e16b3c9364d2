"""Every key of the app as data: one table feeds the bindings, the help overlay and the palette.

Each key has a stable id (``"today.finished"``) so that a later keymap file can remap keys
without touching code (Textual's ``App.set_keymap`` looks bindings up by id), and so that tests
and the help overlay never drift from what the screens really bind.

Keys are chosen for a tired person with gloves on: one letter, no chords, the letter is the
first letter of the word on the label wherever that is free.

The record keys (area ``record``) are the same on Today, Two weeks and Float, so a fact is one
letter whatever list the activity is in; the views' own keys never take one of those letters:

===============  ================================================================
record           s started, f finished, r days left, % percent, n note, y readiness,
                 w weather, c crews, l lost time, e plant, d delivery/visitor/...,
                 i incident
Today            / find any activity by id or name
Two weeks        / find, p print, , and . a week back/on, a all rows, h the headcount
                 plan with the fewest people
Float            / search the list, v next filter, a all, g go to the driver
Journal          c correct, v check the log
Sync             s sync now
History          d, w, m one line per day, week or month (no record keys: it only reads)
===============  ================================================================
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

AREAS: dict[str, str] = {
    "views": "Anywhere",
    "record": "Recording (Today, Two weeks and Float)",
    "today": "Today (end of shift)",
    "lookahead": "Two weeks (lookahead)",
    "float": "Float",
    "journal": "Journal",
    "sync": "Office sync",
    "forecast": "History (how the forecast moved)",
    "report": "Daily report",
    "moving": "Moving around",
}
"""Area id -> heading in the help overlay, in the order shown."""

VIEWS: dict[str, str] = {
    "today": "Today",
    "lookahead": "Two weeks",
    "float": "Float",
    "journal": "Journal",
    "sync": "Sync",
    "forecast": "History",
    "report": "Report",
}
"""View (screen mode) id -> short name used in the view strip and palette."""


@dataclass(frozen=True)
class Key:
    """One key of the app."""

    id: str
    """Stable id, ``area.name``; never reuse an id for another meaning."""
    keys: str
    """Textual key names, comma separated (``"question_mark,f1"``)."""
    action: str
    """Textual action run on the screen of the area (``"finished"`` -> ``action_finished``)."""
    label: str
    """Short label for the footer."""
    help: str
    """One sentence for the help overlay and the command palette."""
    show: bool = True
    """Shown in the footer (secondary keys are only in the help overlay)."""
    display: str | None = None
    """How the key is written in the help overlay and footer, when not the key name itself."""
    bound: bool = True
    """False for keys the widgets already handle (arrows, tab); listed in help only."""
    priority: bool = False
    """Run by the app before the key reaches the focused widget: for a key that moves the
    focus, so that the keys typed right after it go to the new place (see ``float.search``)."""

    @property
    def area(self) -> str:
        """The area id (the part of :attr:`id` before the dot)."""
        return self.id.split(".", 1)[0]

    @property
    def shown_key(self) -> str:
        """Every key of the entry as a person reads it: ``"? F1"``, ``"Ctrl+P"``."""
        if not self.bound:
            return self.display or key_words(self.keys)
        return key_words(self.keys)


KEYS: tuple[Key, ...] = (
    # -- anywhere ---------------------------------------------------------------------------------
    Key(
        "views.today",
        "1",
        "view('today')",
        "Today",
        "show today's activities and the day's record (end of shift)",
        show=False,
        priority=True,
    ),
    Key(
        "views.lookahead",
        "2",
        "view('lookahead')",
        "2 wks",
        "show the two-week lookahead: what must, may and cannot run each day",
        show=False,
        priority=True,
    ),
    Key(
        "views.float",
        "3",
        "view('float')",
        "Float",
        "show every activity with its dates and float",
        show=False,
        priority=True,
    ),
    Key(
        "views.journal",
        "4",
        "view('journal')",
        "Journal",
        "show the journal, newest first, and correct an entry",
        show=False,
        priority=True,
    ),
    Key(
        "views.sync",
        "5",
        "view('sync')",
        "Sync",
        "show the office sync status and sync now",
        show=False,
        priority=True,
    ),
    Key(
        "views.forecast",
        "6",
        "view('forecast')",
        "History",
        "show how the forecast finish moved day by day, why, and plan reliability per week",
        show=False,
        priority=True,
    ),
    Key(
        "views.report",
        "7",
        "view('report')",
        "Report",
        "show the printable daily report of the shift (, and . for other days)",
        show=False,
        priority=True,
    ),
    Key(
        "views.help",
        "question_mark,f1",
        "help",
        "Help",
        "list every key (this overlay)",
        display="?",
    ),
    Key(
        "views.reload",
        "f5",
        "reload",
        "Reload",
        "read the site files and the log again from disk",
        show=False,
    ),
    Key(
        "views.palette",
        "ctrl+p",
        "command_palette",
        "Commands",
        "search every action by name (command palette)",
        display="Ctrl+P",
        show=False,
        bound=False,
    ),
    Key(
        "views.quit",
        "ctrl+q",
        "quit",
        "Quit",
        "leave the app; everything is already written, there is nothing to save",
        display="Ctrl+Q",
        show=False,
        bound=False,
    ),
    # -- recording (Today, Two weeks, Float) -------------------------------------------------------
    Key(
        "record.started",
        "s",
        "started",
        "Started",
        "mark the selected activity started today (out-of-sequence work is allowed, and said)",
    ),
    Key(
        "record.finished",
        "f",
        "finished",
        "Finished",
        "mark the selected activity finished today (a milestone: reached)",
    ),
    Key(
        "record.remaining",
        "r",
        "remaining",
        "Days left",
        "set how many working days the selected activity still needs",
    ),
    Key(
        "record.percent",
        "percent_sign",
        "percent",
        "Percent",
        "set the selected activity's physical percent complete",
        display="%",
        show=False,
    ),
    Key(
        "record.note",
        "n",
        "note",
        "Note",
        "add a note of one or more lines, about the selected activity or the day",
    ),
    Key(
        "record.readiness",
        "y",
        "readiness",
        "Readiness",
        "list the open readiness items to clear one, or open one for the selected activity",
    ),
    Key(
        "record.weather",
        "w",
        "weather",
        "Weather",
        "record the day's weather, whether it stopped work and the hours lost",
    ),
    Key(
        "record.crews",
        "c",
        "crews",
        "Crews",
        "record the crews on site: the last day's crews are filled in, Enter keeps them",
    ),
    Key(
        "record.lost",
        "l",
        "lost",
        "Lost time",
        "record time lost and its cause (a whole lost day moves the forecast)",
    ),
    Key(
        "record.plant",
        "e",
        "plant",
        "Plant",
        "record plant or equipment on site and any breakdown",
        show=False,
    ),
    Key(
        "record.visit",
        "d",
        "visit",
        "Delivery",
        "record a delivery, an inspection, a visitor, an instruction or a note",
        show=False,
    ),
    Key(
        "record.incident",
        "i",
        "incident",
        "Incident",
        "record an incident or a near miss",
        show=False,
    ),
    # -- today ------------------------------------------------------------------------------------
    Key(
        "today.find",
        "slash",
        "find",
        "Find",
        "find any activity by part of its id or name, then record against it",
        display="/",
    ),
    # -- lookahead --------------------------------------------------------------------------------
    Key(
        "lookahead.print",
        "p",
        "print_sheet",
        "Print",
        "write the printable two-week sheet to a file; print it if a printer is set up",
    ),
    Key(
        "lookahead.find",
        "slash",
        "find",
        "Find",
        "find any activity by part of its id or name, then record against it",
        display="/",
        show=False,
    ),
    Key(
        "lookahead.earlier",
        "comma",
        "shift_week(-1)",
        "Week back",
        "show the lookahead from a week earlier",
        display=",",
        show=False,
    ),
    Key(
        "lookahead.later",
        "full_stop",
        "shift_week(1)",
        "Week on",
        "show the lookahead from a week later",
        display=".",
        show=False,
    ),
    Key(
        "lookahead.all",
        "a",
        "toggle_all",
        "All rows",
        "show every unfinished activity, not only those with work in these two weeks",
    ),
    Key(
        "lookahead.fewest",
        "h",
        "fewest",
        "Fewest",
        "see the plan with the fewest people per crew: the starts to move, and the bound",
    ),
    # -- float ------------------------------------------------------------------------------------
    Key("float.all", "a", "filter('all')", "All", "show every activity"),
    Key(
        "float.next",
        "v",
        "next_filter",
        "Filter",
        "next filter: all, behind, critical, near critical, the next two weeks",
    ),
    Key(
        "float.search",
        "slash",
        "search",
        "Search",
        "find activities by id or name",
        display="/",
        priority=True,
    ),
    Key(
        "float.driver",
        "g",
        "goto_driver",
        "Go to driver",
        "move to the driving predecessor of the selected activity",
    ),
    Key(
        "float.clear",
        "escape",
        "clear_search",
        "Clear search",
        "clear the search and show the filter's whole list again",
        display="Esc",
        show=False,
    ),
    # -- journal ----------------------------------------------------------------------------------
    Key(
        "journal.correct",
        "c",
        "correct",
        "Correct",
        "correct the selected entry: a new entry replaces it, with a reason (nothing is erased)",
    ),
    Key(
        "journal.report",
        "d",
        "day_report",
        "Day report",
        "show the daily report of the selected entry's day",
    ),
    Key(
        "journal.verify",
        "v",
        "verify",
        "Check",
        "check the log files for entries altered or removed outside fieldlog",
    ),
    # -- sync -------------------------------------------------------------------------------------
    Key(
        "sync.run",
        "s,enter",
        "sync",
        "Sync now",
        "send the field log to the office folder and bring new schedule revisions back "
        "(in the folder box, letters type and Enter syncs)",
    ),
    Key(
        "sync.leave",
        "escape",
        "leave_folder",
        "Leave box",
        "leave the folder box, so the view keys 1-7 work again",
        display="Esc",
        show=False,
    ),
    # -- forecast history ---------------------------------------------------------------------
    Key("forecast.day", "d", "group('day')", "By day", "one line per logged day"),
    Key("forecast.week", "w", "group('week')", "By week", "one line per week (Monday to Sunday)"),
    Key("forecast.month", "m", "group('month')", "By month", "one line per month"),
    # -- daily report -----------------------------------------------------------------------------
    Key(
        "report.print",
        "p",
        "print_report",
        "Print",
        "write the daily report shown to prints/; print it if a printer is set up",
    ),
    Key(
        "report.earlier",
        "comma",
        "shift_day(-1)",
        "Day back",
        "show the daily report of the day before",
        display=",",
        show=False,
    ),
    Key(
        "report.later",
        "full_stop",
        "shift_day(1)",
        "Day on",
        "show the daily report of the day after (up to the shift)",
        display=".",
        show=False,
    ),
    # -- moving around (handled by the widgets; listed for the help overlay) ---------------------
    Key("moving.rows", "up,down", "", "", "move between rows", display="Up/Down", bound=False),
    Key(
        "moving.pages",
        "pageup,pagedown",
        "",
        "",
        "move a page up or down",
        display="PgUp/PgDn",
        bound=False,
    ),
    Key(
        "moving.columns",
        "left,right",
        "",
        "",
        "move between days in the lookahead grid",
        display="Left/Right",
        bound=False,
    ),
    Key(
        "moving.focus",
        "tab",
        "",
        "",
        "move between the list and the panels of a view",
        display="Tab",
        bound=False,
    ),
    Key(
        "moving.cancel",
        "escape",
        "",
        "",
        "close a form or this overlay without recording",
        display="Esc",
        bound=False,
    ),
    Key(
        "moving.confirm",
        "enter",
        "",
        "",
        "record what a form holds (Ctrl+S from any field)",
        display="Enter",
        bound=False,
    ),
    Key(
        "moving.tick",
        "space",
        "",
        "",
        "tick or untick a yes/no box in a form",
        display="Space",
        bound=False,
    ),
)


_KEY_WORDS = {
    "question_mark": "?",
    "slash": "/",
    "percent_sign": "%",
    "comma": ",",
    "full_stop": ".",
    "pageup": "PgUp",
    "pagedown": "PgDn",
    "escape": "Esc",
    "enter": "Enter",
    "tab": "Tab",
    "up": "Up",
    "down": "Down",
    "left": "Left",
    "right": "Right",
}


def key_words(keys: str) -> str:
    """Textual key names as a person reads them: ``"question_mark,f1"`` -> ``"? F1"``."""
    words = []
    for name in keys.split(","):
        parts = name.strip().split("+")
        shown = [
            _KEY_WORDS.get(p, p.upper() if len(p) > 1 and p[0] == "f" and p[1:].isdigit() else p)
            for p in parts
        ]
        words.append(
            "+".join(w.capitalize() if w in ("ctrl", "shift", "alt") else w for w in shown)
        )
    return " ".join(words)


def keys_for(area: str) -> Iterator[Key]:
    """Every key of ``area`` in table order."""
    return (k for k in KEYS if k.area == area)


def key(key_id: str) -> Key:
    """The key with this id (KeyError when there is none)."""
    for k in KEYS:
        if k.id == key_id:
            return k
    raise KeyError(key_id)
