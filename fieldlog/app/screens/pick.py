"""Pick one thing from a short list (which kind of entry, which readiness item to clear).

A list may give hotkeys: the activity menu answers the same letters as the record keys, so
``s`` in the menu is "started" as it is everywhere else.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import ClassVar

from rich.text import Text
from textual import events, on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option


class PickScreen(ModalScreen[str | None]):
    """Up/Down and Enter (or a click) picks; Esc cancels. Dismisses with the option id.

    Args:
        title: what is being picked.
        options: ``(id, words)`` pairs in the order shown.
        intro: one line above the list.
        hotkeys: Textual key name -> option id, picked by that key alone.
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel", id="pick.cancel"),
    ]

    def __init__(
        self,
        title: str,
        options: Sequence[tuple[str, str]],
        intro: str = "",
        hotkeys: Mapping[str, str] | None = None,
    ) -> None:
        super().__init__(classes="pick-screen")
        self.title_text = title
        self.options = list(options)
        self.intro = intro
        self.hotkeys = dict(hotkeys or {})

    def compose(self) -> ComposeResult:
        """The list in a bordered box."""
        with Vertical(id="pick-box") as box:
            box.border_title = self.title_text
            box.border_subtitle = "Enter picks · Esc cancels"
            if self.intro:
                yield Static(Text(self.intro), id="pick-intro")
            yield OptionList(
                *(Option(Text(words), id=oid) for oid, words in self.options), id="pick-list"
            )

    def on_mount(self) -> None:
        """Focus the list on its first option."""
        lst = self.query_one(OptionList)
        lst.highlighted = 0
        lst.focus()

    def on_key(self, event: events.Key) -> None:
        """A hotkey picks its option at once."""
        choice = self.hotkeys.get(event.key)
        if choice is not None:
            event.stop()
            self.dismiss(choice)

    @on(OptionList.OptionSelected)
    def _picked(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        """Close without picking."""
        self.dismiss(None)
