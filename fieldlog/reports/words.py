"""Plain words shared by everything fieldlog prints, so every report says a thing the same way.

Counts ("1 day", "3 days") and the job's finish against its required finish are built here
only: a plural made by hand beside them drifts ("1 days", "0 day") and a second wording of
the same fact makes a foreman wonder whether the two reports disagree.
"""

from __future__ import annotations


def count(n: int, one: str, many: str) -> str:
    """``1 file`` / ``0 files`` / ``3 files``: the number and the noun that agrees with it."""
    return f"{n} {one if n == 1 else many}"


def days(n: int) -> str:
    """``1 day`` / ``3 days`` (calendar days, or working days where the context says so)."""
    return count(n, "day", "days")


def working_days(n: int) -> str:
    """``1 working day`` / ``3 working days`` / ``0 working days``."""
    return count(n, "working day", "working days")


def people(n: int) -> str:
    """``1 person`` / ``8 people``: a crew's headcount."""
    return count(n, "person", "people")


def against_required(finish_float: int) -> str:
    """The forecast finish against the required finish: the one wording every report uses.

    ``on time, 3 working days to spare`` or ``LATE, 2 working days behind`` (finish float is
    counted in working days; zero is on time with none to spare).
    """
    if finish_float >= 0:
        return f"on time, {working_days(finish_float)} to spare"
    return f"LATE, {working_days(-finish_float)} behind"
