"""What a screen may read from the app it runs in: the :class:`Host` protocol.

Screens and widgets never import the concrete App (:mod:`fieldlog.app.app`), not even for
types: that import ran back up the package (app -> screens -> app) and let every screen call
any of the App's methods. A screen now *reads* through this small protocol and *asks* for
everything else by posting a message (:mod:`fieldlog.app.messages`) that the App handles. The
App satisfies the protocol structurally; nothing here is Textual, so it costs no import time.

Every member is read-only on purpose: a screen that could set the snapshot or the status
directly could paint a state the log on disk does not hold.
"""

from __future__ import annotations

from pathlib import Path
from typing import Protocol

from fieldlog.app.forms import DayContext
from fieldlog.app.session import Snapshot


class Host(Protocol):
    """The read-only view of the running app that screens and widgets are typed against."""

    @property
    def snapshot(self) -> Snapshot:
        """The current snapshot (newest computed; a view paints from it)."""
        ...

    @property
    def status(self) -> tuple[str, bool]:
        """The status line: its text, and whether it reports a problem."""
        ...

    @property
    def plain(self) -> bool:
        """Plain mode: ASCII marks, no colour (``--ascii``, ``NO_COLOR``, ``TERM=dumb``)."""
        ...

    @property
    def site_folder(self) -> Path:
        """The site folder open in the app (for the log check, sync and prints)."""
        ...

    def day_context(self) -> DayContext:
        """What typed days are read against: today, and the site's earliest day."""
        ...
