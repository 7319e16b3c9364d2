"""Find any activity by part of its id or name: type, Enter picks the top match (or Up/Down).

For work that is not on Today's list: not ready yet (an out-of-sequence start), far down the
float list, finished early by a subcontractor nobody told. Every word typed must appear in the
id or the name (case does not matter), so ``fnd 04`` finds FND-040. The caller then offers the
record keys for the activity found (:meth:`RecordView.action_menu`).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import ClassVar

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, OptionList, Static
from textual.widgets.option_list import Option

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult

MAX_SHOWN = 8
"""Matches listed at once (the box fits 80x24 with the keyboard of a tablet up)."""

STATE = {Status.FINISHED: "done", Status.IN_PROGRESS: "running", Status.NOT_STARTED: ""}


def matches(activities: Sequence[ActivityResult], query: str) -> list[ActivityResult]:
    """Activities whose id or name holds every word of ``query``; ids that start with the
    query first, then schedule order."""
    words = query.lower().split()
    found = [a for a in activities if all(w in f"{a.id} {a.name}".lower() for w in words)]
    first = query.strip().lower()
    return sorted(found, key=lambda a: not a.id.lower().startswith(first)) if first else found


class FindScreen(ModalScreen[str | None]):
    """Dismisses with the id of the activity picked, or None on Esc."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel", id="find.cancel"),
        Binding("down", "move(1)", "Next", show=False, priority=True),
        Binding("up", "move(-1)", "Previous", show=False, priority=True),
    ]

    def __init__(self, activities: Sequence[ActivityResult]) -> None:
        super().__init__(classes="pick-screen")
        self.activities = list(activities)
        self.shown: list[ActivityResult] = []

    def compose(self) -> ComposeResult:
        """The query line over the matches."""
        with Vertical(id="pick-box") as box:
            box.border_title = "Find an activity"
            box.border_subtitle = "Enter picks · Esc cancels"
            yield Input(placeholder="type part of the id or name", id="find-query", compact=True)
            yield OptionList(id="pick-list", compact=True)
            yield Static("", id="find-count")

    def on_mount(self) -> None:
        """Steady cursor; every activity listed until something is typed."""
        query = self.query_one("#find-query", Input)
        query.cursor_blink = False
        query.focus()
        self._fill("")

    def _fill(self, text: str) -> None:
        self.shown = matches(self.activities, text)
        lst = self.query_one(OptionList)
        lst.clear_options()
        lst.add_options(
            Option(Text(f"{a.id}  {a.name}  {STATE[a.status]}".rstrip()), id=a.id)
            for a in self.shown[:MAX_SHOWN]
        )
        if self.shown:
            lst.highlighted = 0
        more = len(self.shown) - MAX_SHOWN
        self.query_one("#find-count", Static).update(
            Text(
                "nothing matches"
                if not self.shown
                else f"{more} more: type more of the id or name"
                if more > 0
                else ""
            )
        )

    @on(Input.Changed, "#find-query")
    def _typed(self, event: Input.Changed) -> None:
        event.stop()
        self._fill(event.value)

    @on(Input.Submitted, "#find-query")
    def _enter(self, event: Input.Submitted) -> None:
        event.stop()
        lst = self.query_one(OptionList)
        if lst.highlighted is not None and self.shown:
            option = lst.get_option_at_index(lst.highlighted)
            self.dismiss(option.id)

    @on(OptionList.OptionSelected)
    def _picked(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def action_move(self, step: int) -> None:
        """Up/Down move through the matches while typing."""
        lst = self.query_one(OptionList)
        if lst.option_count:
            lst.highlighted = max(0, min(lst.option_count - 1, (lst.highlighted or 0) + step))

    def action_cancel(self) -> None:
        """Close without picking."""
        self.dismiss(None)
