"""A text box that keeps exactly what was typed or pasted, emoji sequences included.

Textual's ``Input`` drops every key whose character is not "printable" in Python's sense.
That throws away the format characters (Unicode category Cf) that hold emoji sequences
together: the zero width joiner of a family or a profession emoji, and the tag characters of
a subdivision flag. A foreman's note "crane lift 👷‍♀️ ok" then went into the journal as two
separate emoji, a silent change to a legal record. This box inserts those characters too.

A paste of several lines goes into a one-line box as one line, the line breaks replaced by
" / " (visible, so nothing disappears); Textual's ``Input`` kept the first line only.
"""

from __future__ import annotations

import unicodedata

from textual import events
from textual.widgets import Input, TextArea

LINE_JOIN = " / "
"""What stands for a line break pasted into a one-line box."""


def keeps(character: str | None) -> bool:
    """True for a format character (ZWJ, tags, joiners) that Textual's ``Input`` would drop."""
    return character is not None and len(character) == 1 and unicodedata.category(character) == "Cf"


def one_line(text: str) -> str:
    """Pasted text as one line: its lines joined with :data:`LINE_JOIN`, blank ones dropped."""
    lines = [line for line in text.splitlines() if line.strip()]
    return LINE_JOIN.join(lines)


class ExactInput(Input):
    """``Input`` that records every character typed or pasted (see the module docstring)."""

    async def _on_key(self, event: events.Key) -> None:
        if not event.is_printable and keeps(event.character):
            event.stop()
            event.prevent_default()
            assert event.character is not None
            self._put(event.character)
            return
        await super()._on_key(event)

    def _on_paste(self, event: events.Paste) -> None:
        event.stop()
        event.prevent_default()  # Input's own handler would paste the first line again
        if event.text:
            self._put(one_line(event.text))

    def _put(self, text: str) -> None:
        """Insert ``text`` at the cursor, replacing a selection."""
        selection = self.selection
        if selection.is_empty:
            self.insert_text_at_cursor(text)
        else:
            self.replace(text, *selection)


class ExactTextArea(TextArea):
    """``TextArea`` (a note of several lines) that keeps format characters too; a paste keeps
    its lines, since this box has lines."""

    async def _on_key(self, event: events.Key) -> None:
        if not event.is_printable and keeps(event.character) and not self.read_only:
            event.stop()
            event.prevent_default()
            assert event.character is not None
            self._replace_via_keyboard(event.character, *self.selection)
            return
        await super()._on_key(event)

    async def _on_paste(self, event: events.Paste) -> None:
        event.stop()  # unstopped, the screen hands the paste to the focused box a second time
        event.prevent_default()
        await super()._on_paste(event)
