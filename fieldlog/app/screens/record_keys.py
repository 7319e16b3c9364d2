"""The record keys, the same on Today, Two weeks and Float: one fact per key, any activity.

A view that mixes in :class:`RecordKeys` says which activity is selected
(:meth:`RecordKeys.selected_id`); every key then records against it, whatever list it sits in.
Work that is not on Today's list (not ready, out of sequence, finished early elsewhere) is
recorded from Float or Two weeks, or found by part of its id or name (``/`` on Today and Two
weeks, :mod:`fieldlog.app.screens.find`), which offers the same keys in a menu.

Starting work whose predecessors are not finished is allowed (out-of-sequence work is real);
the status line says which predecessors are still open, so nobody does it by accident.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any, ClassVar

from textual.binding import BindingType

from fieldlog.app.crews import crew_entries, crew_form, last_crews
from fieldlog.app.forms import Form
from fieldlog.app.keymap import Key, keys_for
from fieldlog.app.messages import AskForEntry, OpenForm, Pending, RecordEntry
from fieldlog.app.recording import KIND_TITLES, PICK_INCIDENT, PICK_VISIT, entry_form
from fieldlog.app.screens.base import ViewScreen, bindings
from fieldlog.app.screens.pick import PickScreen
from fieldlog.app.session import Snapshot
from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult

ACTIVITY_ACTIONS = ("started", "finished", "remaining", "percent", "note", "readiness")
"""The record keys about one activity, offered as a menu for a picked or found activity."""


def activity_keys() -> list[Key]:
    """The keymap entries of :data:`ACTIVITY_ACTIONS`, in that order."""
    by_action = {k.action: k for k in keys_for("record")}
    return [by_action[a] for a in ACTIVITY_ACTIONS]


def open_predecessors(snap: Snapshot, aid: str) -> list[str]:
    """Predecessors of ``aid`` not finished yet: starting it now is out of sequence."""
    schedule = snap.state.schedule
    out = []
    for link in snap.site.links:
        if link.succ == aid:
            pred = schedule.by_id.get(link.pred)
            if pred is not None and pred.status is not Status.FINISHED:
                out.append(link.pred)
    return out


class RecordView(ViewScreen):
    """A view with the record keys (Textual calls ``action_<name>``)."""

    BINDINGS: ClassVar[list[BindingType]] = bindings("record")

    def ask(self, form: Form, kind: str, *, fixed: Mapping[str, Any] | None = None) -> None:
        """Ask the App to open ``form`` and record what it reads as an entry of ``kind``."""
        self.post_message(AskForEntry(form, kind, fixed=fixed))

    def selected_id(self) -> str | None:
        """The activity the keys record against (override); None when there is none."""
        return None

    def _target(self, aid: str) -> ActivityResult | None:
        """The activity ``aid`` (given by a menu) or the selected one; None with a hint."""
        aid = aid or self.selected_id() or ""
        if not aid:
            self.say(
                "No activity is selected: move to one, or / finds one by id or name", problem=True
            )
            return None
        return self.host.snapshot.state.schedule.by_id.get(aid)

    # -- one activity ---------------------------------------------------------------------------

    def action_started(self, aid: str = "") -> None:
        """The activity started today; says so when its predecessors are still open."""
        r = self._target(aid)
        if r is None:
            return
        waiting = open_predecessors(self.host.snapshot, r.id)
        note = (
            f"{r.id} started OUT OF SEQUENCE: {', '.join(waiting)} not finished (allowed)"
            if waiting
            else ""
        )
        self.post_message(RecordEntry("started", {"activity": r.id}, note=note))

    def action_finished(self, aid: str = "") -> None:
        """The activity finished today (a milestone: reached today)."""
        r = self._target(aid)
        if r is not None:
            self.post_message(RecordEntry("finished", {"activity": r.id}))

    def action_remaining(self, aid: str = "") -> None:
        """Ask for the working days the activity still needs after today."""
        r = self._target(aid)
        if r is not None:
            intro = f"{r.id} {r.name}: working days still needed after the day"
            self.ask(
                entry_form(
                    "remaining",
                    intro=intro,
                    fixed={"activity": r.id},
                    defaults={"days": r.remaining or None},
                    dated=True,
                ),
                "remaining",
                fixed={"activity": r.id},
            )

    def action_percent(self, aid: str = "") -> None:
        """Ask for the activity's physical percent complete."""
        r = self._target(aid)
        if r is not None:
            intro = f"{r.id} {r.name}: how much is built (does not change the days left)"
            self.ask(
                entry_form(
                    "percent",
                    intro=intro,
                    fixed={"activity": r.id},
                    defaults={"percent": r.percent},
                    dated=True,
                ),
                "percent",
                fixed={"activity": r.id},
            )

    def action_note(self, aid: str = "") -> None:
        """A note, about the activity when one is selected (clear it for a note on the day)."""
        aid = aid or self.selected_id() or ""
        self.ask(
            entry_form(
                "note",
                defaults={"activity": aid or None},
                dated=True,
                intro="Several lines are fine; Ctrl+S records. Clear the "
                "activity to make it a note on the day",
            ),
            "note",
        )

    def action_readiness(self, aid: str = "") -> None:
        """List every open readiness item to clear one, or open a new one for the activity."""
        aid = aid or self.selected_id() or ""
        items = [i for i in self.host.snapshot.state.replay.readiness if i.entry_id]
        options = []
        for i in items:
            when = f"expected {i.expected:%a %d %b}" if i.expected else "no date"
            options.append(
                (f"clear:{i.entry_id}", f"Clear: {i.activity} needs {i.what} ({i.kind}, {when})")
            )
        if aid:
            options.append(("need", f"New: {aid} needs something before it can start"))
        if not options:
            self.say("No readiness items are open; select an activity to open one", problem=True)
            return
        schedule = self.host.snapshot.state.schedule

        def picked(choice: str | None) -> None:
            if choice == "need":
                r = schedule.by_id[aid]
                intro = f"{r.id} {r.name}: what it needs, and when it is expected"
                self.ask(
                    entry_form("need", intro=intro, fixed={"activity": r.id}, dated=True),
                    "need",
                    fixed={"activity": r.id},
                )
            elif choice is not None:
                item = next(i for i in items if i.entry_id == choice.split(":", 1)[1])
                self.ask(
                    entry_form(
                        "cleared",
                        intro=f"{item.activity} had {item.what}: how it was cleared",
                        dated=True,
                    ),
                    "cleared",
                    fixed={"item": item.entry_id},
                )

        self.app.push_screen(
            PickScreen("Readiness items", options, intro=f"{len(items)} open"), picked
        )

    def action_menu(self, aid: str) -> None:
        """The record keys for one activity as a menu (a tap, Enter, or a find)."""
        r = self.host.snapshot.state.schedule.by_id.get(aid)
        if r is None:
            return
        keys = activity_keys()
        options = [(k.action, f"{k.shown_key}  {k.label}") for k in keys]
        hotkeys = {k.keys.split(",")[0]: k.action for k in keys}
        state = {
            Status.FINISHED: "finished",
            Status.IN_PROGRESS: "running",
            Status.NOT_STARTED: "not started",
        }[r.status]

        def chosen(action: str | None) -> None:
            if action is not None:
                self.call_later(self.run_action, f"{action}('{r.id}')")

        self.app.push_screen(
            PickScreen(
                f"{r.id} {r.name}", options, hotkeys=hotkeys, intro=f"{state} · what happened?"
            ),
            chosen,
        )

    def action_find(self) -> None:
        """Find any activity by part of its id or name, then offer its record keys."""
        from fieldlog.app.screens.find import FindScreen

        def found(aid: str | None) -> None:
            if aid is not None:
                self.call_later(self.action_menu, aid)

        self.app.push_screen(FindScreen(self.host.snapshot.state.schedule.activities), found)

    # -- the day --------------------------------------------------------------------------------

    def action_weather(self) -> None:
        """The day's weather: stopped and hours lost are the first fields after conditions."""
        self.ask(entry_form("weather", defaults={"unit": "C"}, dated=True), "weather")

    def action_crews(self) -> None:
        """Every crew of the last day logged, ready to record again: Enter keeps them all."""
        snap = self.host.snapshot
        before = last_crews(snap.state.replay.effective, snap.today)
        form = crew_form(before, snap.site.crews, self.selected_id())

        def read(values: dict[str, Any]) -> list[Pending] | str:
            try:
                entries, day = crew_entries(values, before)
            except ValueError as exc:
                return str(exc)
            if not entries:
                return "no crew given: type a headcount, or Esc"
            return [Pending("crew", fields, day) for fields in entries]

        partial = "{k} crews recorded before it: see 4 Journal"
        self.post_message(OpenForm(form, read, "crews", partial))

    def action_lost(self) -> None:
        """Time lost and why; a whole lost day moves the forecast."""
        self.ask(
            entry_form(
                "lost-time",
                defaults={"cause": "weather"},
                dated=True,
                intro="A whole lost day is a non-working day: the forecast moves",
            ),
            "lost-time",
        )

    def action_plant(self) -> None:
        """Plant or equipment on site, and any breakdown."""
        self.ask(
            entry_form(
                "plant",
                defaults={"activity": self.selected_id()},
                dated=True,
                intro="One machine or item per entry; a breakdown's lost "
                "hours are lost time too (l)",
            ),
            "plant",
        )

    def action_visit(self) -> None:
        """A delivery, inspection, visitor, instruction or note."""
        self._pick_then_ask("What came or was said today?", PICK_VISIT)

    def action_incident(self) -> None:
        """An incident or a safety observation."""
        self._pick_then_ask("What happened?", PICK_INCIDENT)

    def _pick_then_ask(self, title: str, kinds: tuple[str, ...]) -> None:
        aid = self.selected_id()

        def picked(kind: str | None) -> None:
            if kind is not None:
                defaults = {"activity": aid} if kind not in ("visitor",) else {}
                self.ask(entry_form(kind, defaults=defaults, dated=True), kind)

        options = [(k, KIND_TITLES[k]) for k in kinds]
        self.app.push_screen(PickScreen(title, options), picked)
