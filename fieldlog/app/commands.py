"""The command palette (Ctrl+P): every action of the app by name, "area: action".

Titles come from the keymap, so every key has a palette entry and the two never drift; each
entry shows its key in the help text so the palette also teaches the keys. Choosing an entry
switches to its view first when needed, then runs the same action the key runs.
"""

from __future__ import annotations

from functools import partial

from textual.command import DiscoveryHit, Hit, Hits, Provider

from fieldlog.app.keymap import KEYS, VIEWS, Key
from fieldlog.app.messages import RunKey

_AREA_WORD = {
    "views": "view",
    "record": "record",
    "today": "today",
    "lookahead": "lookahead",
    "float": "float",
    "journal": "journal",
    "sync": "sync",
}


def palette_keys() -> list[Key]:
    """Keys offered in the palette: every bound key (the built-ins are Textual's own)."""
    return [k for k in KEYS if k.bound and k.area in _AREA_WORD]


def title(k: Key) -> str:
    """The palette title of a key: ``"today: finished"``, ``"view: two weeks"``,
    ``"app: reload"``."""
    if k.area == "views":
        if k.action.startswith("view("):
            return f"view: {VIEWS[k.id.split('.', 1)[1]].lower()}"
        return f"app: {k.label.lower()}"
    return f"{_AREA_WORD[k.area]}: {k.label.lower()}"


class FieldlogCommands(Provider):
    """Palette entries for every key of :data:`fieldlog.app.keymap.KEYS`."""

    def _run(self, key_id: str) -> partial:
        """The entry's command: ask the App to run the key (it switches view first)."""
        return partial(self.app.post_message, RunKey(key_id))

    async def discover(self) -> Hits:
        """Everything, before anything is typed."""
        for k in palette_keys():
            yield DiscoveryHit(title(k), self._run(k.id), help=f"{k.help} (key {k.shown_key})")

    async def search(self, query: str) -> Hits:
        """Entries whose title matches what was typed."""
        matcher = self.matcher(query)
        for k in palette_keys():
            name = title(k)
            score = matcher.match(name)
            if score > 0:
                yield Hit(
                    score,
                    matcher.highlight(name),
                    self._run(k.id),
                    text=name,
                    help=f"{k.help} (key {k.shown_key})",
                )
