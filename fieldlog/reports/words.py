"""Plain words shared by everything fieldlog prints, so every report says a thing the same way."""

from __future__ import annotations


def working_days(n: int) -> str:
    """``1 working day`` / ``3 working days`` / ``0 working days``."""
    return f"{n} working day{'' if n == 1 else 's'}"
