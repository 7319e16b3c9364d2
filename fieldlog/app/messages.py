"""The requests a screen or widget sends the App: small domain messages, handled in one place.

A screen never calls the App's methods (it only reads through :class:`fieldlog.app.host.Host`);
it posts one of these and the App's ``on_<message>`` handler acts. A Textual message posted on
a screen (or a widget on it) bubbles up the DOM to the screen's parent, the App, so no screen
needs a reference to the concrete App class; posting is also safe from a worker thread.

Recording keeps its one synchronous path inside the App: a form's submit must return the
journal's refusal while the form is still open, so a refused entry stays on the form with its
reason and nothing typed is lost. A screen therefore never records from a form itself; it says
which form to open and how the typed values become entries (:data:`Reading`), and the App owns
the submit callback that writes them.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date
from typing import Any

from textual.message import Message

from fieldlog.app.forms import Form


@dataclass(frozen=True)
class Pending:
    """One entry a form's values stand for, not written yet."""

    kind: str
    fields: Mapping[str, Any] = field(default_factory=dict)
    day: date | None = None
    """The entry's day; None: the shift being recorded."""


Reading = Callable[[dict[str, Any]], Sequence[Pending] | str]
"""Turns what was typed on a form into the entries to record, or a refusal (the form stays
open showing it)."""


class RecordEntry(Message):
    """Append one entry now and recompute; ``note`` is added to what the status line says."""

    def __init__(
        self, kind: str, fields: Mapping[str, Any], day: date | None = None, note: str = ""
    ) -> None:
        super().__init__()
        self.kind = kind
        self.fields = dict(fields)
        self.day = day
        self.note = note


class AskForEntry(Message):
    """Open ``form``; what it reads becomes one entry of ``kind`` with the ``fixed`` fields.

    The form's "Day" field, when it has one, gives the entry's day (else ``day``). Esc keeps
    the typing as a draft under ``draft_key`` (default: the kind and the fixed fields).
    """

    def __init__(
        self,
        form: Form,
        kind: str,
        *,
        fixed: Mapping[str, Any] | None = None,
        day: date | None = None,
        draft_key: str = "",
    ) -> None:
        super().__init__()
        self.form = form
        self.kind = kind
        self.fixed = dict(fixed) if fixed is not None else None
        self.day = day
        self.draft_key = draft_key


class OpenForm(Message):
    """Open ``form``; on submit, ``read`` turns the values into entries the App writes in order.

    The first refused entry stops the rest and keeps the form open with the journal's reason;
    when entries were written before it, ``partial`` (with ``{k}``, their number) says so.
    """

    def __init__(self, form: Form, read: Reading, draft_key: str, partial: str = "") -> None:
        super().__init__()
        self.form = form
        self.read = read
        self.draft_key = draft_key
        self.partial = partial


class Recompute(Message):
    """Recompute schedule and lookahead (``reload_site``: read the site files again too)."""

    def __init__(self, *, reload_site: bool = False, note: str = "") -> None:
        super().__init__()
        self.reload_site = reload_site
        self.note = note


class ShowStatus(Message):
    """Show ``text`` in the status line of every view (``problem``: it needs attention)."""

    def __init__(self, text: str, *, problem: bool = False) -> None:
        super().__init__()
        self.text = text
        self.problem = problem


class ShowHelp(Message):
    """Open the help overlay (once)."""


class RunKey(Message):
    """Run a keymap entry's action (the command palette): switch view first when needed."""

    def __init__(self, key_id: str) -> None:
        super().__init__()
        self.key_id = key_id
