"""What every view shares: the bars, the view keys, and repainting from the latest snapshot.

A view paints itself from the app's current :class:`~fieldlog.app.session.Snapshot`. The app
repaints only the view on screen after a recompute; the others repaint when they are shown
again (they compare the snapshot's version with the one they last painted), so recording an
entry costs one view's repaint, not seven.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import ClassVar, cast

from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.screen import Screen
from textual.widget import Widget
from textual.widgets import Footer, Input

from fieldlog.app.host import Host
from fieldlog.app.keymap import keys_for
from fieldlog.app.messages import Recompute, ShowHelp
from fieldlog.app.session import Snapshot
from fieldlog.app.widgets.bars import SiteBar, StatusLine, ViewStrip


def bindings(area: str) -> list[BindingType]:
    """Textual bindings for the keys of ``area`` (from :data:`fieldlog.app.keymap.KEYS`)."""
    return [
        Binding(
            k.keys,
            k.action,
            k.label,
            show=k.show,
            key_display=k.display,
            tooltip=k.help,
            id=k.id,
            priority=k.priority,
        )
        for k in keys_for(area)
        if k.bound
    ]


class ViewScreen(Screen[None]):
    """Base of the views (one Textual mode each)."""

    VIEW: ClassVar[str] = ""
    """The view id (a key of :data:`fieldlog.app.keymap.VIEWS`)."""

    BINDINGS: ClassVar[list[BindingType]] = bindings("views")

    def __init__(self) -> None:
        super().__init__(id=f"view-{self.VIEW}")
        self.painted_version = 0

    @property
    def host(self) -> Host:
        """What this view may read from the app (it asks for the rest with messages)."""
        return cast("Host", self.app)

    def compose(self) -> ComposeResult:
        """Site bar, view strip, the view's own body, status line, footer."""
        yield SiteBar(id="site-bar")
        yield ViewStrip(self.VIEW)
        yield from self.compose_body()
        yield StatusLine()
        yield Footer(compact=True)

    def compose_body(self) -> Iterable[Widget]:
        """The view's own widgets (override)."""
        return ()

    def on_mount(self) -> None:
        """Paint the first time."""
        self.repaint_if_stale()

    def on_resize(self) -> None:
        """Another terminal size: lay the lists out again for the new width."""
        if self.painted_version:
            self.painted_version = -1
            self.repaint_if_stale()

    def on_screen_resume(self) -> None:
        """Shown again: repaint when a recompute happened while hidden."""
        self.repaint_if_stale()

    def is_stale(self, snap: Snapshot) -> bool:
        """True when ``snap`` is newer than what this view shows."""
        return snap.version != self.painted_version

    def repaint_if_stale(self) -> None:
        """Repaint from the app's snapshot when it is newer than what is on screen."""
        snap = self.host.snapshot
        if self.is_stale(snap):
            self.query_one(SiteBar).show(snap.state.schedule, snap.today)
            self.paint(snap)
            self.painted_version = snap.version
        text, problem = self.host.status
        self.query_one(StatusLine).say(text, problem=problem)

    def paint(self, snap: Snapshot) -> None:
        """Show ``snap`` (override)."""

    def say(self, text: str, *, problem: bool = False) -> None:
        """Show a line in this view's status line."""
        self.query_one(StatusLine).say(text, problem=problem)

    # -- keys every view has ------------------------------------------------------------------

    async def action_view(self, view: str) -> None:
        """Switch to another view, and only then take the next key.

        The view keys are priority keys (run by the app in typing order) and the switch is
        awaited, so the keys typed right after ``3`` go to the Float view, even the first time
        it loads; before, they reached the view being left (where ``f`` records a finish).
        """
        await self.app.switch_mode(view)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        """In a text box a digit is typed, not a view key."""
        return not (action == "view" and isinstance(self.focused, Input))

    def action_help(self) -> None:
        """Open the help overlay."""
        self.post_message(ShowHelp())

    def action_reload(self) -> None:
        """Read the site files and the log again."""
        self.post_message(Recompute(reload_site=True))
