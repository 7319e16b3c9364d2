"""A small modal form for any :class:`~fieldlog.app.forms.Form`: type, Enter records, Esc closes.

One line per field (label, then a borderless input) so a six-field form fits at 80x24; a note
of several lines gets a small text box (Enter starts a new line there, Ctrl+S records). A field
that does not read shows why right under it and takes the focus; nothing is returned until the
whole form reads. A day field says the day it read, with its year, as it is typed.

Esc never throws typing away: a form with anything typed is kept as a draft and opens again
with its values (the caller keeps drafts, see ``keep_draft``); Ctrl+D discards the draft. The
form only collects values: the caller writes the entry.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, ClassVar

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Checkbox, Input, Label, Select, Static, TextArea

from fieldlog.app.forms import (
    CHOICE,
    DAY,
    LINES,
    YES_NO,
    DayContext,
    Field,
    Form,
    initial_text,
    placeholder_text,
    read_field,
    read_form,
)
from fieldlog.app.widgets.exact_input import ExactInput, ExactTextArea
from fieldlog.day_words import long_day


def yes_no(value: bool) -> str:
    """The words beside a tick box: "YES" when ticked, "no" when not (Space toggles)."""
    return "YES" if value else "no (Space: yes)"


Submit = Callable[[dict[str, Any]], "str | None"]
"""Called with the read values; returns None when the entry was written, else why not."""

KeepDraft = Callable[["dict[str, Any] | None"], None]
"""Called with what the widgets hold when the form is closed unrecorded (None: no draft)."""


class FormScreen(ModalScreen[dict[str, Any] | None]):
    """Ask for the fields of ``form``; dismisses with the typed values, or None on Esc.

    Args:
        form: what to ask.
        submit: writes the entry; a refusal (its message) keeps the form open with the message
            shown, so nothing typed is lost.
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Close (draft kept)", id="form.cancel"),
        Binding("ctrl+s", "submit", "Record", id="form.submit", show=False, priority=True),
        Binding("ctrl+d", "discard", "Discard", id="form.discard", show=False, priority=True),
    ]

    def __init__(
        self,
        form: Form,
        submit: Submit | None = None,
        *,
        days: DayContext | None = None,
        draft: dict[str, Any] | None = None,
        keep_draft: KeepDraft | None = None,
    ) -> None:
        super().__init__(classes="form-screen")
        self.form = form
        self.submit = submit
        self.days = days
        self.draft = draft
        self.keep_draft = keep_draft

    def compose(self) -> ComposeResult:
        """Title, intro, one row per field, the buttons."""
        with Vertical(id="form-box") as box:
            box.border_title = self.form.title
            if self.form.intro:
                yield Static(Text(self.form.intro), id="form-intro")
            with VerticalScroll(id="form-fields"):
                for f in self.form.fields:
                    with Horizontal(classes="form-row -lines" if f.kind == LINES else "form-row"):
                        mark = "*" if f.required else " "
                        yield Label(Text(f"{f.label}{mark}"), classes="form-label")
                        yield self._widget(f)
                    yield Static("", id=f"problem-{f.name}", classes="form-problem")
            yield Static(
                Text("Draft restored: Ctrl+D discards it") if self.draft else "",
                id="form-refused",
                classes="-shown" if self.draft else "",
            )
            with Horizontal(id="form-buttons"):
                enter = "Ctrl+S" if any(f.kind == LINES for f in self.form.fields) else "Enter"
                yield Button(f"{self.form.submit} ({enter})", id="form-submit", compact=True)
                yield Button("Close (Esc)", id="form-cancel", compact=True)
                if any(f.required for f in self.form.fields):
                    yield Static(Text("* needed"), id="form-needed")

    def _widget(self, f: Field) -> Input | Select[str] | Checkbox | TextArea:
        """The widget for ``f``, holding the draft's value when there is one.

        Every typed field is a plain text input: Textual's number inputs drop the characters
        they dislike (``2.5`` became ``25``), and a dropped character is an altered value.
        """
        wid = f"field-{f.name}"
        held = self.draft.get(f.name) if self.draft else None
        if f.kind == YES_NO:
            value = bool(held) if self.draft else bool(f.default)
            return Checkbox(yes_no(value), value, id=wid, compact=True)
        if f.kind == CHOICE:
            chosen = held if self.draft else f.default
            return Select(
                [(c, c) for c in f.choices],
                value=chosen if chosen in f.choices else Select.NULL,
                allow_blank=not f.required or f.default is None,
                prompt=f.placeholder or "choose",
                id=wid,
                compact=True,
            )
        text = str(held) if self.draft and held is not None else initial_text(f)
        if f.kind == LINES:
            return ExactTextArea(
                text,
                id=wid,
                compact=True,
                placeholder=f.placeholder,
                show_cursor=True,
                highlight_cursor_line=False,
            )
        return ExactInput(
            text, placeholder=placeholder_text(f), id=wid, compact=True, select_on_focus=False
        )

    def on_mount(self) -> None:
        """Cursor steady (stable snapshots, calmer on a tablet) and focus on the first field."""
        for inp in self.query(Input):
            inp.cursor_blink = False
        for area in self.query(TextArea):
            area.cursor_blink = False
        if self.form.fields:
            self.query_one(f"#field-{self.form.fields[0].name}").focus()
        for f in self.form.fields:
            if f.kind == DAY and self.draft:
                self._echo_day(f)

    def raw_values(self) -> dict[str, Any]:
        """What the widgets hold now, before reading."""
        raw: dict[str, Any] = {}
        for f in self.form.fields:
            w = self.query_one(f"#field-{f.name}")
            if isinstance(w, Select):
                raw[f.name] = None if w.value is Select.NULL else w.value
            elif isinstance(w, TextArea):
                raw[f.name] = w.text
            else:
                raw[f.name] = w.value  # type: ignore[attr-defined]
        return raw

    def blank_values(self) -> dict[str, Any]:
        """What the widgets held when the form opened without a draft."""
        blank: dict[str, Any] = {}
        for f in self.form.fields:
            if f.kind == YES_NO:
                blank[f.name] = bool(f.default)
            elif f.kind == CHOICE:
                blank[f.name] = f.default if f.default in f.choices else None
            else:
                blank[f.name] = initial_text(f)
        return blank

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        """A day field says which day it reads as, with the year, while it is typed."""
        name = (event.input.id or "").removeprefix("field-")
        f = next((f for f in self.form.fields if f.name == name), None)
        if f is not None and f.kind == DAY:
            event.stop()
            self._echo_day(f)

    def _echo_day(self, f: Field) -> None:
        box = self.query_one(f"#problem-{f.name}", Static)
        raw = self.query_one(f"#field-{f.name}", Input).value
        if not raw.strip():
            box.update("")
            box.set_class(False, "-shown")
            return
        try:
            day = read_field(f, raw, self.days)
        except ValueError as exc:
            box.update(Text(f"!! {exc}"))
        else:
            box.update(Text(f"= {long_day(day)}"))
        box.set_class(True, "-shown")

    @on(Checkbox.Changed)
    def _ticked(self, event: Checkbox.Changed) -> None:
        """Say yes or no in words: the box's own mark looks the same both ways without colour."""
        event.stop()
        event.checkbox.label = yes_no(event.value)

    @on(Input.Submitted)
    def _enter(self, event: Input.Submitted) -> None:
        event.stop()
        self.action_submit()

    @on(Button.Pressed, "#form-submit")
    def _submit_button(self, event: Button.Pressed) -> None:
        event.stop()
        self.action_submit()

    @on(Button.Pressed, "#form-cancel")
    def _cancel_button(self, event: Button.Pressed) -> None:
        event.stop()
        self.action_cancel()

    def action_submit(self) -> None:
        """Read the form; dismiss with the values, or show what is wrong."""
        reading = read_form(self.form, self.raw_values(), self.days)
        first_bad = None
        for f in self.form.fields:
            problem = reading.problems.get(f.name, "")
            box = self.query_one(f"#problem-{f.name}", Static)
            box.update(Text(f"!! {problem}" if problem else ""))
            box.set_class(bool(problem), "-shown")
            if problem and first_bad is None:
                first_bad = f
        if first_bad is not None:
            self.query_one(f"#field-{first_bad.name}").focus()
            return
        values = dict(reading.values)
        refused = self.submit(values) if self.submit is not None else None
        box = self.query_one("#form-refused", Static)
        box.update(Text(f"!! Not recorded: {refused}" if refused else ""))
        box.set_class(bool(refused), "-shown")
        if refused is None:
            if self.keep_draft is not None:
                self.keep_draft(None)
            self.dismiss(values)

    def action_cancel(self) -> None:
        """Close without recording; anything typed is kept as a draft for the next time."""
        raw = self.raw_values()
        if self.keep_draft is not None:
            self.keep_draft(raw if raw != self.blank_values() else None)
        self.dismiss(None)

    def action_discard(self) -> None:
        """Close without recording and forget the draft."""
        if self.keep_draft is not None:
            self.keep_draft(None)
        self.dismiss(None)
