"""One error hierarchy for everything fieldlog can refuse.

Every message names where the problem is (file, line, activity id) and what to do about it,
because the person reading it is a foreman at the end of a shift, not a programmer::

    FieldlogError                 base: carries file / line / activity / fix
    ├── SiteError                 site.toml or schedule.toml is wrong (exit code 2)
    │   └── DependencyLoopError   activities wait on each other in a circle
    ├── CalendarError             a calendar cannot be built (unknown region, no working days)
    ├── JournalError              the field log cannot be read or written
    │   └── EntryRefused          an entry was refused before anything was written
    ├── SyncError                 a sync could not be completed
    ├── OutOfBounds               a value or file beyond fieldlog's limits (fieldlog/bounds.py)
    └── UnreadableToml            a TOML file that cannot be parsed (syntax, nesting, encoding)

The command line turns any of these into one line on stderr and exit code 2; nothing is
swallowed, and no traceback is shown for a mistake a user can make.
"""

from __future__ import annotations

from pathlib import Path


class FieldlogError(Exception):
    """Base of every error fieldlog reports to a user.

    Args:
        problem: what is wrong, in plain words.
        file: the file it is in, when there is one.
        line: the line in that file, when the parser gives one.
        activity: the activity id concerned, when there is one.
        fix: what the user should do about it.
    """

    exit_code = 2

    def __init__(
        self,
        problem: str,
        *,
        file: Path | str | None = None,
        line: int | None = None,
        activity: str | None = None,
        fix: str | None = None,
    ) -> None:
        self.problem = problem
        self.file = Path(file) if file is not None else None
        self.line = line
        self.activity = activity
        self.fix = fix
        super().__init__(self.message)

    @property
    def message(self) -> str:
        """The one line shown to the user: ``where: problem [activity X]. fix``."""
        where = ""
        if self.file is not None:
            where = str(self.file)
            if self.line is not None:
                where += f", line {self.line}"
            where += ": "
        text = where + self.problem
        if self.activity is not None and f"'{self.activity}'" not in self.problem:
            text += f" (activity '{self.activity}')"
        if self.fix:
            text += f". Fix: {self.fix}"
        return text


class SiteError(FieldlogError):
    """The site folder (site.toml, schedule.toml) has a mistake in it."""


class DependencyLoopError(SiteError):
    """Activities wait on each other in a circle, so no schedule exists.

    ``cycle`` lists every activity in the loop in order, the first repeated at the end,
    e.g. ``["A", "B", "C", "A"]``.
    """

    def __init__(self, cycle: list[str], *, file: Path | str | None = None) -> None:
        self.cycle = cycle
        super().__init__(
            "dependency loop: " + " -> ".join(cycle),
            file=file,
            activity=cycle[0] if cycle else None,
            fix="remove or reverse one of these links so the activities no longer wait on "
            "each other in a circle",
        )


class CalendarError(FieldlogError):
    """A calendar cannot be built, for example an unknown public-holiday region."""


class JournalError(FieldlogError):
    """The field log cannot be read or written."""


class EntryRefused(JournalError):
    """An entry was refused before anything was written (bad id, date, number)."""


class SyncError(FieldlogError):
    """A sync with the office folder could not be completed."""


class OutOfBounds(FieldlogError):
    """A value or a file beyond the limits in :mod:`fieldlog.bounds` (a date in 9999, a
    duration of a billion days, a 100 MB file). Raised without a location; the caller that
    knows the file, line and activity re-raises it as its own error or reports a finding."""


class UnreadableToml(FieldlogError):
    """A TOML text that cannot be parsed: a syntax error (``line`` set when known), nesting
    deeper than :data:`fieldlog.bounds.MAX_NESTING`, or a number too long to convert."""
