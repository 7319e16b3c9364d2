"""First run on a device: ask whose name stands on every entry recorded here.

Asked once per device: the name is kept with the device's signing key in fieldlog's data
folder (:func:`fieldlog.journal.keys.save_author`) and written into the device's key file in
the site. The login name is never used: a shared site laptop's login says nothing about who
wrote the day's log. Until a name is given, the journal refuses entries and says why.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from fieldlog.app.forms import TEXT, Field, Form
from fieldlog.app.screens.form import FormScreen
from fieldlog.errors import FieldlogError
from fieldlog.journal.keys import MAX_AUTHOR, save_author

AUTHOR_FORM = Form(
    "Who records on this device?",
    (
        Field(
            "author",
            "Your name",
            TEXT,
            required=True,
            placeholder=f"as it should stand on the daily report (1-{MAX_AUTHOR} characters)",
        ),
    ),
    intro="Asked once: every entry from this device carries this name and is signed.",
    submit="Save",
)


def author_screen(home: Path | None = None) -> FormScreen:
    """The first-run form; Enter keeps the name (a bad name keeps the form open, saying why)."""

    def keep(values: dict[str, Any]) -> str | None:
        try:
            save_author(str(values.get("author") or ""), home)
        except FieldlogError as exc:
            return exc.message
        return None

    return FormScreen(AUTHOR_FORM, keep)
