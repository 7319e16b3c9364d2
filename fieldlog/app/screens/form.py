"""A small modal form for any :class:`~fieldlog.app.forms.Form`: type, Enter records, Esc cancels.

One line per field (label, then a borderless input) so a six-field form fits at 80x24. A field
that does not read shows why right under it and takes the focus; nothing is returned until the
whole form reads. The form only collects values: the caller writes the entry.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, ClassVar, Literal

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Checkbox, Input, Label, Select, Static

from fieldlog.app.forms import (
    CHOICE,
    DAY,
    NUMBER,
    WHOLE,
    YES_NO,
    Field,
    Form,
    initial_text,
    read_form,
)
from fieldlog.app.widgets.exact_input import ExactInput


def yes_no(value: bool) -> str:
    """The words beside a tick box: "YES" when ticked, "no" when not (Space toggles)."""
    return "YES" if value else "no (Space: yes)"


Submit = Callable[[dict[str, Any]], "str | None"]
"""Called with the read values; returns None when the entry was written, else why not."""

_InputType = Literal["integer", "number", "text"]
"""What Textual's ``Input(type=...)`` accepts (its own alias lives in a private module)."""
_INPUT_TYPE: dict[str, _InputType] = {WHOLE: "integer", NUMBER: "number"}


class FormScreen(ModalScreen[dict[str, Any] | None]):
    """Ask for the fields of ``form``; dismisses with the typed values, or None on Esc.

    Args:
        form: what to ask.
        submit: writes the entry; a refusal (its message) keeps the form open with the message
            shown, so nothing typed is lost.
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel", id="form.cancel"),
        Binding("ctrl+s", "submit", "Record", id="form.submit", show=False),
    ]

    def __init__(self, form: Form, submit: Submit | None = None) -> None:
        super().__init__(classes="form-screen")
        self.form = form
        self.submit = submit

    def compose(self) -> ComposeResult:
        """Title, intro, one row per field, the buttons."""
        with Vertical(id="form-box") as box:
            box.border_title = self.form.title
            if self.form.intro:
                yield Static(Text(self.form.intro), id="form-intro")
            with VerticalScroll(id="form-fields"):
                for f in self.form.fields:
                    with Horizontal(classes="form-row"):
                        mark = "*" if f.required else " "
                        yield Label(Text(f"{f.label}{mark}"), classes="form-label")
                        yield self._widget(f)
                    yield Static("", id=f"problem-{f.name}", classes="form-problem")
            yield Static("", id="form-refused")
            with Horizontal(id="form-buttons"):
                yield Button(f"{self.form.submit} (Enter)", id="form-submit", compact=True)
                yield Button("Cancel (Esc)", id="form-cancel", compact=True)
                if any(f.required for f in self.form.fields):
                    yield Static(Text("* needed"), id="form-needed")

    def _widget(self, f: Field) -> Input | Select[str] | Checkbox:
        wid = f"field-{f.name}"
        if f.kind == YES_NO:
            return Checkbox(yes_no(bool(f.default)), bool(f.default), id=wid, compact=True)
        if f.kind == CHOICE:
            return Select(
                [(c, c) for c in f.choices], value=f.default if f.default in f.choices
                else Select.NULL, allow_blank=not f.required or f.default is None,
                prompt=f.placeholder or "choose", id=wid, compact=True,
            )
        input_type = _INPUT_TYPE.get(f.kind, "text")
        placeholder = f.placeholder or ("YYYY-MM-DD" if f.kind == DAY else "")
        return ExactInput(initial_text(f), placeholder=placeholder, type=input_type, id=wid,
                          compact=True, select_on_focus=False)

    def on_mount(self) -> None:
        """Cursor steady (stable snapshots, calmer on a tablet) and focus on the first field."""
        for inp in self.query(Input):
            inp.cursor_blink = False
        if self.form.fields:
            self.query_one(f"#field-{self.form.fields[0].name}").focus()

    def raw_values(self) -> dict[str, Any]:
        """What the widgets hold now, before reading."""
        raw: dict[str, Any] = {}
        for f in self.form.fields:
            w = self.query_one(f"#field-{f.name}")
            if isinstance(w, Select):
                raw[f.name] = None if w.value is Select.NULL else w.value
            else:
                raw[f.name] = w.value  # type: ignore[attr-defined]
        return raw

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
        reading = read_form(self.form, self.raw_values())
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
            self.dismiss(values)

    def action_cancel(self) -> None:
        """Close without recording."""
        self.dismiss(None)
