"""Sync: the office folder, the last sync, conflicts, and a key to sync now.

Keys and words agree wherever the focus is, because the line above the folder says what the
next key does: while the folder box has the cursor, letters type into it and Enter syncs; on
the panel below it, ``s`` or Enter syncs and Tab goes back to the folder. The box has the
cursor when no folder is known yet (the first thing to do is type it), the panel otherwise.

The office folder is typed once (a network share, a USB stick, a cloud-synced folder) and
remembered through the last-sync record kept in this device's data folder, the same record
``fieldlog sync`` writes. A sync runs in a worker thread with its progress in the status line;
its summary is shown in full, and a newer office schedule revision is loaded at once.
"""

from __future__ import annotations

import time
from collections.abc import Iterable
from datetime import datetime
from pathlib import Path
from typing import ClassVar

from rich.text import Text
from textual import events, on, work
from textual.binding import BindingType
from textual.containers import Horizontal, VerticalScroll
from textual.widget import Widget
from textual.widgets import Input, Label, Static

from fieldlog.app.messages import Recompute, ShowStatus
from fieldlog.app.screens.base import ViewScreen, bindings
from fieldlog.app.session import Snapshot
from fieldlog.app.widgets.exact_input import ExactInput
from fieldlog.errors import FieldlogError
from fieldlog.sync import SyncOptions, SyncSummary, list_conflicts, sync_site
from fieldlog.sync.state import SyncRecord, last_sync, save_record
from fieldlog.sync.summary import render_text


def last_sync_words(record: SyncRecord | None) -> str:
    """The last sync in one line."""
    if record is None:
        return "Never synced from this device"
    return (
        f"Last sync {record.when:%a %d %b %Y %H:%M} with {record.target}: sent "
        f"{record.sent}, received {record.received}, conflicts {record.conflicts}, refused "
        f"{record.refused}; schedule revision {record.revision}"
    )


class SyncScreen(ViewScreen):
    """Office sync."""

    VIEW = "sync"
    AUTO_FOCUS = "#sync-panel"
    BINDINGS: ClassVar[list[BindingType]] = bindings("sync")

    def compose_body(self) -> Iterable[Widget]:
        """Last sync, target folder, summary of the last run, open conflicts."""
        yield Static(id="sync-last")
        yield Static(id="sync-hint", classes="view-head")
        with Horizontal(id="sync-target-row"):
            yield Label("Office folder ", id="sync-target-label")
            yield ExactInput(
                placeholder="e.g. /media/stick/kestrel-yard", id="sync-target", compact=True
            )
        with VerticalScroll(id="sync-panel"):
            yield Static(id="sync-summary")
            yield Static(id="sync-conflicts")

    def on_mount(self) -> None:
        """Fill the folder from the last sync; steady cursor."""
        target = self.query_one("#sync-target", Input)
        target.cursor_blink = False
        super().on_mount()
        if not target.value:
            target.focus()  # nothing to sync with yet: the first thing to do is type it
        self.show_hint()

    def on_descendant_focus(self, event: events.DescendantFocus) -> None:
        """The focus moved: say what the keys do now."""
        self.show_hint()

    def show_hint(self) -> None:
        """One line saying what the next key does, for where the focus is now."""
        target = self.query_one("#sync-target", Input)
        folder = target.value.strip()
        if self.focused is target:
            words = (
                "Type the office folder, then press Enter to sync"
                if not folder
                else "Edit the office folder if needed, then press Enter to sync"
            )
            words += " · Esc leaves the box"
        elif folder:
            words = f"Press s or Enter to sync with {folder} · Tab moves to the folder"
        else:
            words = "Press Tab, type the office folder, then press Enter to sync"
        self.query_one("#sync-hint", Static).update(Text(words))

    def paint(self, snap: Snapshot) -> None:
        """Last sync, and the conflicts waiting in the site folder."""
        folder = self.host.site_folder
        try:
            record = last_sync(folder)
        except FieldlogError as exc:
            record = None
            self.say(exc.message, problem=True)
        self.query_one("#sync-last", Static).update(Text(last_sync_words(record)))
        target = self.query_one("#sync-target", Input)
        if record is not None and not target.value:
            target.value = record.target
        conflicts = list_conflicts(folder)
        text = Text()
        if conflicts:
            text.append(f"Open conflicts: {len(conflicts)}\n", style="bold")
            for c in conflicts:
                text.append(f"!! {c.describe()}\n")
        else:
            text.append("No open conflicts")
        self.query_one("#sync-conflicts", Static).update(text)

    @on(Input.Submitted, "#sync-target")
    def _enter(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_sync()

    def action_leave_folder(self) -> None:
        """Leave the folder box for the panel (the view keys work there)."""
        self.query_one("#sync-panel").focus()

    def action_sync(self) -> None:
        """Sync with the office folder typed above."""
        raw = self.query_one("#sync-target", Input).value.strip()
        if not raw:
            self.say("Type the office folder first, then press Enter", problem=True)
            self.query_one("#sync-target", Input).focus()
            return
        self.post_message(ShowStatus(f"Syncing with {raw}"))
        self._sync(Path(raw).expanduser())

    @work(thread=True, exclusive=True, group="sync")
    def _sync(self, target: Path) -> None:
        folder = self.host.site_folder
        app = self.app

        def progress(done: int, total: int, copied: int) -> None:
            self.post_message(
                ShowStatus(f"Syncing: {done} of {total} files ({copied / 1048576:.1f} MB)")
            )

        try:
            summary = sync_site(folder, target, SyncOptions(progress=progress, now=time.time()))
        except FieldlogError as exc:
            self.post_message(ShowStatus(f"Sync stopped: {exc.message}", problem=True))
            return
        problem = ""
        try:
            save_record(
                SyncRecord.of(
                    folder, target, summary, datetime.now().astimezone().replace(microsecond=0)
                )
            )
        except FieldlogError as exc:  # the sync is complete; only the receipt is missing
            problem = f" (last-sync record not saved: {exc.message})"
        app.call_from_thread(self._synced, summary, problem)

    def _synced(self, summary: SyncSummary, problem: str) -> None:
        self.query_one("#sync-summary", Static).update(Text(render_text(summary)))
        # The folder is known now: the panel takes the keys again, so the view keys (1-6)
        # switch views instead of typing into the folder, and s or Enter syncs again.
        self.query_one("#sync-panel").focus()
        words = "Sync done: look at the summary" if summary.has_problems else "Sync done"
        self.post_message(
            ShowStatus(words + problem, problem=summary.has_problems or bool(problem))
        )
        self.painted_version = 0  # last sync and conflicts changed: repaint on the next snapshot
        self.post_message(Recompute(reload_site=True, note=words + problem))
