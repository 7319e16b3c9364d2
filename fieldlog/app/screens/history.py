"""Journal: every entry, newest first; corrections are the only way to change the past.

The list shows each entry's day, id, what it records and whether a later correction replaced
or withdrew it. ``c`` corrects the selected entry: a form opens with its values filled in and a
reason to give; the new entry supersedes the old one, which stays in the log for good. ``v``
checks the log files (an entry edited, removed or reordered outside fieldlog is named).
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any, ClassVar

from rich.text import Text
from textual import on, work
from textual.binding import BindingType
from textual.containers import VerticalScroll
from textual.widget import Widget
from textual.widgets import Static

from fieldlog.app.forms import YES_NO, Field, Form
from fieldlog.app.history_rows import HistoryRow, history_rows
from fieldlog.app.messages import OpenForm, Pending
from fieldlog.app.recording import KIND_TITLES, entry_form
from fieldlog.app.screens.base import ViewScreen, bindings
from fieldlog.app.session import Snapshot
from fieldlog.app.widgets.row_list import Column, RowList, fit_columns
from fieldlog.errors import FieldlogError
from fieldlog.journal import Finding, verify
from fieldlog.journal.entries import Entry
from fieldlog.journal.verify import integrity_findings
from fieldlog.reports.words import count

COLUMNS = (
    Column("day", "Day", 9),
    Column("id", "Entry", 14),
    Column("what", "What", 30),
    Column("status", "Status", 24),
)
"""The journal list's columns; "What" takes whatever width is left."""


def check_words(findings: Iterable[Finding], n_entries: int, n_files: int) -> tuple[str, bool]:
    """The log check in one line, and whether it found a problem."""
    findings = list(findings)
    if not findings:
        return (
            f"Log check: OK, {count(n_entries, 'entry', 'entries')} in "
            f"{count(n_files, 'file', 'files')}, none altered"
        ), False
    first = findings[0]
    more = f" (and {len(findings) - 1} more)" if len(findings) > 1 else ""
    problems = count(len(findings), "problem", "problems").upper()
    return f"Log check: {problems}: {first}{more}", True


def correction_form(entry: Entry) -> Form:
    """The form correcting ``entry``: a reason, withdraw or not, and its values to change."""
    base = entry_form(entry.kind, defaults=dict(entry.fields))
    own = (
        Field("reason", "Reason", required=True, placeholder="why the entry was wrong"),
        Field(
            "withdraw",
            "Withdraw it",
            YES_NO,
            placeholder="recorded in error: drop it (new values are then ignored)",
        ),
    )
    return Form(
        f"Correct {entry.id}",
        own + base.fields,
        intro=f"{KIND_TITLES.get(entry.kind, entry.kind)} of {entry.day:%a %d %b %Y}: "
        "the old entry stays in the log, marked as replaced",
    )


def correction_fields(entry: Entry, values: dict[str, Any]) -> dict[str, Any]:
    """What to record for a correction: only the values that changed (or the withdrawal)."""
    out: dict[str, Any] = {"supersedes": entry.id, "reason": values["reason"]}
    if values.get("withdraw"):
        out["withdraw"] = True
        return out
    for k, v in values.items():
        if k in ("reason", "withdraw"):
            continue
        old = entry.fields.get(k)
        if isinstance(old, list | tuple) and isinstance(v, str):
            v = [p.strip() for p in v.split(",") if p.strip()]
            old = list(old)
        if v != old:
            out[k] = v
    return out


class JournalScreen(ViewScreen):
    """The journal, newest first."""

    AUTO_FOCUS = "#journal-table"
    VIEW = "journal"
    BINDINGS: ClassVar[list[BindingType]] = bindings("journal")

    def __init__(self) -> None:
        super().__init__()
        self.rows: list[HistoryRow] = []

    def compose_body(self) -> Iterable[Widget]:
        """Log check line, entry list, the selected entry in full, replay problems."""
        yield Static(id="journal-check", classes="view-head")
        yield RowList(id="journal-table")
        yield Static(id="journal-detail", classes="detail-line")
        with VerticalScroll(id="journal-problems"):
            yield Static(id="journal-problem-text")

    def paint(self, snap: Snapshot) -> None:
        """Fill the list and the check line from the snapshot's journal."""
        journal = snap.state.journal
        findings = integrity_findings(journal)
        words, bad = check_words(findings, len(journal.entries), len(journal.files))
        self.show_check(words, bad)
        table = self.query_one("#journal-table", RowList)
        self.rows = history_rows(journal.entries, snap.state.replay.superseded)
        id_width = max([len(r.entry.id) for r in self.rows] + [5])
        # The status column never takes more than a fifth of the line (the detail line under
        # the list always shows it in full).
        status_width = min(
            max([len(r.status) for r in self.rows] + [6]), max(10, self.size.width // 5)
        )
        columns = [
            Column(c.key, c.heading, id_width)
            if c.key == "id"
            else Column(c.key, c.heading, status_width)
            if c.key == "status"
            else c
            for c in COLUMNS
        ]
        lines = []
        for row in self.rows:
            e = row.entry
            mark = "x " if row.superseded else ""
            lines.append((e.id, (f"{e.day:%d %b %y}", e.id, mark + row.summary, row.status)))
        table.set_rows(fit_columns(columns, self.size.width - 2, "what"), lines, keep=table.current)
        problems = snap.state.replay.problems
        box = self.query_one("#journal-problems")
        box.display = bool(problems)
        text = Text()
        for p in problems:
            text.append(f"!! {p.message}\n")
        self.query_one("#journal-problem-text", Static).update(text)
        self.show_detail()

    def show_check(self, words: str, bad: bool) -> None:
        """The log-check line."""
        head = self.query_one("#journal-check", Static)
        head.update(Text(("!! " if bad else "") + words))
        head.set_class(bad, "-problem")

    def selected_id(self) -> str | None:
        """Id of the entry under the cursor, or None."""
        return self.query_one("#journal-table", RowList).current

    def selected(self) -> HistoryRow | None:
        """The row under the cursor."""
        eid = self.selected_id()
        return next((r for r in self.rows if r.entry.id == eid), None)

    @on(RowList.Highlighted, "#journal-table")
    def _moved(self, event: RowList.Highlighted) -> None:
        event.stop()
        self.show_detail()

    def show_detail(self) -> None:
        """The selected entry in full: who, when written, what."""
        row = self.selected()
        line = self.query_one("#journal-detail", Static)
        if row is None:
            line.update(Text("The log is empty: record something on 1 Today"))
            return
        e = row.entry
        status = f" · {row.status}" if row.status else ""
        line.update(
            Text(
                f"{e.id} ({KIND_TITLES.get(e.kind, e.kind)}, day {e.day:%a %d %b %Y}) "
                f"by {e.author} on {e.device}, written {e.written:%d %b %H:%M} UTC"
                f"{status}: {row.summary}"
            )
        )

    # -- keys -----------------------------------------------------------------------------------

    async def action_day_report(self) -> None:
        """Show the daily report of the selected entry's day (the Report view)."""
        row = self.selected()
        if row is None:
            self.say("No entry is selected: the journal is empty", problem=True)
            return
        await self.app.switch_mode("report")
        show_day = getattr(self.app.screen, "show_day", None)
        if show_day is not None:
            show_day(row.entry.day)

    def action_correct(self) -> None:
        """Correct the selected entry with a new entry that supersedes it.

        A replaced entry is corrected through the entry standing for it now (its newest
        version), so a second correction builds on the first instead of being refused.
        """
        row = self.selected()
        if row is None:
            return
        replay = self.host.snapshot.state.replay
        standing_id = replay.current.get(row.entry.id, row.entry.id)
        entry = next((e for e in replay.effective if e.id == standing_id), None)
        if entry is None:
            self.say(
                f"{row.entry.id} is {row.status or 'withdrawn'}: nothing left to correct",
                problem=True,
            )
            return
        if standing_id != row.entry.id:
            self.say(
                f"{row.entry.id} was {row.status}; correcting its newest version {standing_id}"
            )
        form = correction_form(entry)

        def read(values: dict[str, Any]) -> list[Pending]:
            return [Pending("correction", correction_fields(entry, values))]

        self.post_message(OpenForm(form, read, f"correction {entry.id}"))

    def action_verify(self) -> None:
        """Check the log files again, now."""
        self.show_check("Log check: reading every log file", False)
        self._verify()

    @work(thread=True, exclusive=True, group="verify")
    def _verify(self) -> None:
        folder = self.host.site_folder
        try:
            findings = verify(folder)
        except FieldlogError as exc:
            self.app.call_from_thread(self.show_check, f"Log check failed: {exc.message}", True)
            return
        journal = self.host.snapshot.state.journal
        words, bad = check_words(findings, len(journal.entries), len(journal.files))
        self.app.call_from_thread(self.show_check, words, bad)
