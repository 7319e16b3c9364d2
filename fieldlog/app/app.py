"""The Textual app: seven views over one site, and the write-then-recompute loop.

Every action that records something follows the same path:

1. the entry is appended to the journal at once, on the UI thread (a short, durable write; if
   the journal refuses it, the form stays open with the reason and nothing is written);
2. the schedule and lookahead are recomputed in a worker thread from the log on disk, so the
   screen never freezes on a big site;
3. the view on screen repaints from the new snapshot; hidden views repaint when shown.

Snapshots carry a version taken when their computation *started*, so a slow, older recompute
that finishes late can never paint over a newer one.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Mapping, Sequence
from datetime import date, timedelta
from pathlib import Path
from typing import Any, ClassVar

from textual.app import App
from textual.filter import LineFilter, Monochrome
from textual.screen import Screen
from textual.timer import Timer
from textual.worker import get_current_worker

from fieldlog.app.commands import FieldlogCommands
from fieldlog.app.forms import DayContext, Form
from fieldlog.app.history_rows import summarize
from fieldlog.app.messages import (
    AskForEntry,
    OpenForm,
    Recompute,
    RecordEntry,
    RunKey,
    ShowHelp,
    ShowStatus,
)
from fieldlog.app.plain import AsciiMarks
from fieldlog.app.recording import DAY_FIELD, entry_fields, record
from fieldlog.app.screens.author import author_screen
from fieldlog.app.screens.base import ViewScreen
from fieldlog.app.screens.form import FormScreen, Submit
from fieldlog.app.screens.help import HelpScreen
from fieldlog.app.screens.today import TodayScreen
from fieldlog.app.session import SiteSession, Snapshot
from fieldlog.commands.arguments import shift_day
from fieldlog.day_words import earliest_day, long_day
from fieldlog.engine.calendars import HorizonExceeded
from fieldlog.errors import FieldlogError
from fieldlog.journal.entries import Entry
from fieldlog.journal.keys import saved_author, take_warnings
from fieldlog.reports.words import count, working_days


def lazy_screen(module: str, name: str) -> Callable[[], Screen]:
    """A mode factory that imports its screen's module on first use (faster first screen)."""

    def make() -> Screen:
        return getattr(importlib.import_module(module), name)()

    return make


BUSY_NOTE_AFTER = 0.25
"""Seconds before the status line says a recompute is running (a quick one shows nothing:
no flicker, and no repaint competing with the recompute for the CPU)."""


class FieldlogApp(App[None]):
    """The end-of-shift app for one site folder.

    Args:
        session: the site, loaded (see :func:`make_app`).
        notice: the first line of the status line (``fieldlog demo`` says which day it opened).
        plain: plain mode for a terminal without colour: ASCII marks, no colour at all, so
            nothing can depend on colour (``--ascii``, ``NO_COLOR``, ``TERM=dumb``).
    """

    CSS_PATH = "app.tcss"
    TITLE = "fieldlog"
    MODES: ClassVar[dict[str, Any]] = {
        "today": TodayScreen,
        "lookahead": lazy_screen("fieldlog.app.screens.lookahead", "LookaheadScreen"),
        "float": lazy_screen("fieldlog.app.screens.float_list", "FloatScreen"),
        "journal": lazy_screen("fieldlog.app.screens.history", "JournalScreen"),
        "sync": lazy_screen("fieldlog.app.screens.sync", "SyncScreen"),
        "forecast": lazy_screen("fieldlog.app.screens.forecast", "ForecastScreen"),
        "report": lazy_screen("fieldlog.app.screens.report", "ReportScreen"),
    }
    """One mode per view. Only the end-of-shift view is imported at start; the others (with
    the printing and sync code they pull in) load the first time they are shown."""
    COMMANDS = App.COMMANDS | {FieldlogCommands}

    def __init__(self, session: SiteSession, *, notice: str = "", plain: bool = False) -> None:
        super().__init__()
        self.plain = plain
        self.set_class(plain, "-plain")
        self._plain_filters: tuple[LineFilter, ...] = (AsciiMarks(), Monochrome())
        if session.latest is None:
            session.load()
        assert session.latest is not None
        self.session = session
        self.snapshot: Snapshot = session.latest
        self.status: tuple[str, bool] = (notice or opening_words(self.snapshot), False)
        self._pending = ""
        self._alert = ""
        """A warning about the entry just written; it leads the next status line (out of
        sequence), where the line's right edge cannot cut it off."""
        self._busy_note: Timer | None = None
        self.drafts: dict[str, dict[str, Any]] = {}
        """Forms closed with Esc, by draft key: reopened with what was typed."""

    def on_mount(self) -> None:
        """Open on the end-of-shift view; on a device's first run, ask the author's name."""
        self.switch_mode("today")
        try:
            needs_name = saved_author() is None
        except FieldlogError as exc:
            self.set_status(exc.message, problem=True)
            return
        if needs_name:
            self.push_screen(author_screen())

    @property
    def site_folder(self) -> Path:
        """The site folder open in the app (read by screens through the Host protocol)."""
        return self.session.folder

    def get_line_filters(self) -> Sequence[LineFilter]:
        """Plain mode: ASCII marks, and black and white whatever the terminal claims."""
        filters = list(super().get_line_filters())
        if self.plain:
            filters.extend(self._plain_filters)
        return filters

    # -- status line ----------------------------------------------------------------------------

    def set_status(self, text: str, *, problem: bool = False) -> None:
        """Show ``text`` in the status line of the view on screen; the others show it when
        they are shown again (:meth:`ViewScreen.repaint_if_stale`)."""
        self.status = (text, problem)
        for screen in self.screen_stack:
            if isinstance(screen, ViewScreen) and screen.is_mounted:
                screen.say(text, problem=problem)

    # -- recording ------------------------------------------------------------------------------

    def write(
        self, kind: str, fields: Mapping[str, Any], day: date | None = None, note: str = ""
    ) -> str | None:
        """Append one entry now and start the recompute; ``note`` is added to what the status
        line says was recorded.

        Returns:
            None when written; otherwise the journal's reason for refusing it (also shown in
            the status line). Nothing is written on a refusal.
        """
        try:
            entry = record(self.session, kind, fields, day)
        except FieldlogError as exc:
            self.set_status(f"Not recorded: {exc.message}", problem=True)
            return exc.message
        self.recorded(entry, note)
        return None

    def recorded(self, entry: Entry, note: str = "") -> None:
        """Say what was recorded, for which day (always with its year), and recompute."""
        self._pending = f"recorded for {long_day(entry.day)}: {summarize(entry)} ({entry.id})"
        for warning in take_warnings():  # a new signing key that could not be made private
            self._pending += f" · {warning}"
        other_day = f"for {long_day(entry.day)}" if entry.day != self.session.today else ""
        self._alert = " · ".join(a for a in (note, other_day) if a)
        self.recompute()

    def day_context(self) -> DayContext:
        """What the forms' day fields are read against: today, and the site's earliest day."""
        return DayContext(self.session.today, earliest_day(self.snapshot.site.start))

    def open_form(self, form: Form, submit: Submit, draft_key: str) -> None:
        """Show ``form``, restoring its draft; Esc keeps what was typed under ``draft_key``."""

        def keep(raw: dict[str, Any] | None) -> None:
            if raw is None:
                self.drafts.pop(draft_key, None)
                return
            self.drafts[draft_key] = raw
            self.set_status(f"Not recorded: draft kept, the same key reopens it ({form.title})")

        self.push_screen(
            FormScreen(
                form,
                submit,
                days=self.day_context(),
                draft=self.drafts.get(draft_key),
                keep_draft=keep,
            )
        )

    # -- what screens ask for (messages bubble up from a screen to the App) -------------------

    def on_record_entry(self, message: RecordEntry) -> None:
        """A record key with nothing to ask: write the entry now."""
        self.write(message.kind, message.fields, message.day, message.note)

    def on_ask_for_entry(self, message: AskForEntry) -> None:
        """A record key with a form: open it; when it reads, append an entry of the message's
        kind with its fixed fields (the submit callback is the App's).

        The form's "Day" field, when it has one, gives the entry's day. A form closed with Esc
        keeps its typing as a draft under the message's draft key (default: the kind and the
        fixed fields, so the same key on the same activity opens it again).
        """
        kind, fixed, day = message.kind, message.fixed, message.day

        def submit(values: dict[str, Any]) -> str | None:
            values = dict(values)
            typed_day = values.pop(DAY_FIELD, None)
            return self.write(kind, entry_fields(values, fixed), typed_day or day)

        self.open_form(message.form, submit, message.draft_key or draft_name(kind, fixed))

    def on_open_form(self, message: OpenForm) -> None:
        """A form whose values stand for entries the screen reads; written here, in order."""
        read, partial = message.read, message.partial

        def submit(values: dict[str, Any]) -> str | None:
            pending = read(values)
            if isinstance(pending, str):
                return pending
            for k, p in enumerate(pending):
                refused = self.write(p.kind, p.fields, p.day)
                if refused is not None:
                    return refused + (f" ({partial.format(k=k)})" if k and partial else "")
            return None

        self.open_form(message.form, submit, message.draft_key)

    def on_recompute(self, message: Recompute) -> None:
        """Recompute (after a sync, or F5)."""
        self.recompute(reload_site=message.reload_site, note=message.note)

    def on_show_status(self, message: ShowStatus) -> None:
        """A line for the status line (a print finished, a sync's progress)."""
        self.set_status(message.text, problem=message.problem)

    def on_show_help(self, message: ShowHelp) -> None:
        """The help key or tab."""
        self.action_help()

    async def on_run_key(self, message: RunKey) -> None:
        """A command palette entry."""
        await self.run_key(message.key_id)

    # -- recompute ------------------------------------------------------------------------------

    def recompute(self, *, reload_site: bool = False, note: str = "") -> None:
        """Recompute schedule and lookahead in a worker thread, then repaint.

        Args:
            reload_site: read site.toml and schedule.toml again too (after a sync, F5).
            note: what the status line says before the finish change ("Sync done").
        """
        if note:
            self._pending = note
        self._cancel_busy_note()
        self._busy_note = self.set_timer(BUSY_NOTE_AFTER, self._say_busy)
        self.run_worker(
            lambda: self._compute(reload_site),
            thread=True,
            exclusive=True,
            group="recompute",
            name="recompute",
        )

    def _compute(self, reload_site: bool) -> None:
        """Worker body, step 1: the schedule and the end-of-shift list, handed to the UI."""
        worker = get_current_worker()
        try:
            if reload_site:
                self.session.reread_site()
            snap = self.session.recompute()
        except FieldlogError as exc:
            self.call_from_thread(self.set_status, f"Cannot recompute: {exc.message}", problem=True)
            return
        if not worker.is_cancelled:
            self.call_from_thread(self.show_snapshot, snap)

    def _complete(self, snap: Snapshot) -> None:
        """Worker body, step 2: the full lookahead for ``snap``."""
        full = self.session.complete(snap)
        if not get_current_worker().is_cancelled:
            self.call_from_thread(self.show_snapshot, full)

    def _start_lookahead(self, snap: Snapshot) -> None:
        """Step 2 starts once step 1 is on screen, so the two never compete for the CPU."""
        if snap.version == self.snapshot.version and self.snapshot.lookahead is None:
            self.run_worker(
                lambda: self._complete(snap),
                thread=True,
                exclusive=True,
                group="lookahead",
                name="lookahead",
            )

    def show_snapshot(self, snap: Snapshot) -> None:
        """Make ``snap`` current and repaint the views on screen (older snapshots are dropped).

        A snapshot without its lookahead (step 1) repaints the views that do not need it, then
        starts step 2; step 2 (same version, now with the lookahead) repaints the lookahead.
        """
        self._cancel_busy_note()
        current = self.snapshot
        if snap.version < current.version:
            return
        if snap.version == current.version:
            if current.lookahead is not None or snap.lookahead is None:
                return
            self.snapshot = snap
            for screen in self.screen_stack:
                if isinstance(screen, ViewScreen):
                    screen.repaint_if_stale()
            return
        if snap.lookahead is None:
            self.call_after_refresh(self._start_lookahead, snap)
        old, self.snapshot = self.snapshot, snap
        change = finish_change(old, snap)
        if self._pending:
            alert = f"{self._alert} · " if self._alert else ""
            self.status = (f"{alert}{change} · {self._pending}", False)
            self._pending = self._alert = ""
        else:
            self.status = (f"{change} · read again from disk", False)
        for screen in self.screen_stack:
            if isinstance(screen, ViewScreen):
                screen.repaint_if_stale()

    def _say_busy(self) -> None:
        """A recompute is taking a while: say so (quick ones never show this)."""
        self._busy_note = None
        self.set_status(f"Recomputing · {self._pending}" if self._pending else "Recomputing")

    def _cancel_busy_note(self) -> None:
        if self._busy_note is not None:
            self._busy_note.stop()
            self._busy_note = None

    # -- overlays and palette -------------------------------------------------------------------

    def action_help(self) -> None:
        """Open the help overlay (once)."""
        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    async def run_key(self, key_id: str) -> None:
        """Run the action of a keymap entry from the palette: switch view, then act."""
        from fieldlog.app.keymap import key
        from fieldlog.app.screens.record_keys import RecordView

        k = key(key_id)
        if k.area in self.MODES and self.current_mode != k.area:
            await self.switch_mode(k.area)
        elif k.area == "record" and not isinstance(self.screen, RecordView):
            await self.switch_mode("today")  # the record keys act on a list's activity
        await self.screen.run_action(k.action)


def draft_name(kind: str, fixed: Mapping[str, Any] | None) -> str:
    """The draft key of a form: its entry kind and the values the caller fixed."""
    return kind + "".join(f" {k}={v}" for k, v in sorted((fixed or {}).items()))


def opening_words(snap: Snapshot) -> str:
    """The first status line: the log's size, its last day, and where help is."""
    journal = snap.state.journal
    n = len(journal.entries)
    last = journal.last_day
    text = count(n, "log entry", "log entries")
    if last is not None:
        text += f", last day logged {last:%a %d %b %Y}"
    problems = len(snap.state.replay.problems)
    if problems:
        text += f" · {count(problems, 'log problem', 'log problems')}: see 4 Journal"
    return text + " · ? lists every key"


def finish_change(old: Snapshot, new: Snapshot) -> str:
    """How the forecast finish moved between two snapshots, in working days, in words.

    The change comes first because it is what the foreman wants to know after an entry, and
    the status line is cut at the right edge on a narrow screen.
    """
    a, b = old.state.schedule.finish, new.state.schedule.finish
    if a == b:
        return f"Finish unchanged, {b:%a %d %b}"
    schedule = new.state.schedule
    cal = schedule.calendars[schedule.site.calendar]
    try:
        n = cal.count(min(a, b) + timedelta(days=1), max(a, b) + timedelta(days=1))
    except HorizonExceeded:  # the old finish lies outside the new calendar's range
        moved = count(abs((b - a).days), "calendar day", "calendar days")
    else:
        moved = working_days(n)
    way = "later" if b > a else "earlier"
    return f"Finish {moved} {way}, {b:%a %d %b} (was {a:%a %d %b})"


def make_app(
    site_folder: Path | str,
    today: date,
    *,
    session: SiteSession | None = None,
    notice: str = "",
    machine_today: date | None = None,
    plain: bool = False,
) -> FieldlogApp:
    """The app for ``site_folder`` as of the end of ``today``; shared by the CLI and the tests.

    Args:
        site_folder: the site folder.
        today: the shift being recorded.
        session: an already loaded session (``fieldlog open`` loads first, to fail before the
            terminal is taken over).
        notice: first status line.
        machine_today: this computer's date; ``today`` may not be later. Default: read
            here, at the app's edge (the one place the app reads the clock).
        plain: plain mode (see :class:`FieldlogApp`).

    Raises:
        FieldlogError: the site cannot be loaded (only when no session is given).
        OutOfBounds: ``today`` is later than the machine's date.
    """
    shift_day(today, machine_today or date.today())
    if session is None:
        session = SiteSession(site_folder, today)
        session.load()
    return FieldlogApp(session, notice=notice, plain=plain)
