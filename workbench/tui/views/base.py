"""What every view of the workbench provides.

A view is a widget that the app keeps in a content switcher.  Contract:

1. ``view_id`` and ``title`` — class attributes: a DOM id and the name on the view bar.
2. ``show_project(project)`` — called after every edit, undo and open, at once,
   with the new project (state flows down; a view hands its edits to
   `app.apply_edit` and never changes the history itself).
3. ``show_results(project, results)`` — called when the worker has finished the
   numbers for `project` (`workbench.tui.compute.AxisResult` by axis name).
4. Edits go to `app.apply_edit(project, note)` (at once, so the next key acts on them); status
   lines as `Status`.
5. ``focus_first()`` — put the keyboard focus where the view's work starts, at once
   (`screen.set_focus`, not `widget.focus()`, which comes a moment later: a key typed
   right after the one that showed the view must find the focus there).

Keys act in the order they were typed, even when they arrive in a bunch
(`on_key`).  Textual runs a binding only once its key has travelled up to
the app, by then behind keys that a widget or a dialog has already taken,
and a priority binding as soon as its key arrives, ahead of the keys before
it.  So a view runs the bindings as each key passes it — its own first
(they would be shadowed by the focused widget's, e.g. a scroll's ← →),
then those from the focused widget up to the app's — and none of a
view's bindings is a priority one.
"""

from __future__ import annotations

from textual import events
from textual.widget import Widget

from ...projectfile import Project
from ..compute import AxisResult


class WorkbenchView(Widget):
    view_id = ""
    title = ""

    DEFAULT_CSS = """
    WorkbenchView { height: 1fr; }
    """

    def __init__(self) -> None:
        super().__init__(id=self.view_id)

    def show_project(self, project: Project) -> None:
        """A new project state (edit, undo, open)."""

    def show_results(self, project: Project, results: dict[str, AxisResult]) -> None:
        """Numbers for `project` are ready."""

    def focus_first(self) -> None:
        self.screen.set_focus(None)

    async def on_key(self, event: events.Key) -> None:
        """A key that reached the view acts here, in its turn (`key_in_turn`)."""
        event.stop()
        event.prevent_default()
        await self.key_in_turn(event)

    async def key_in_turn(self, event: events.Key) -> None:
        """Act on a key now: hand it to a dialog that a key before it opened (`take_key`), or back to
        the app when a key before it took the focus elsewhere (another view), or run its binding —
        the view's own first, then from the focused widget up to the app's."""
        app = self.app
        covering = app.screen
        if covering is not self.screen:  # a key before this one opened a dialog (or help)
            take = getattr(covering, "take_key", None)
            if take is not None:
                take(event)
            else:
                app.post_message(events.Key(event.key, event.character))
        elif app.focused is None or self not in app.focused.ancestors_with_self:
            app.post_message(events.Key(event.key, event.character))  # as if typed now
        elif not await self._run_own_binding(event.key):
            await app._check_bindings(event.key)

    async def _run_own_binding(self, key: str) -> bool:
        """Run the view's binding of `key` (True if one ran; a binding its `check_action` turns off
        does not)."""
        for binding in self._bindings.key_to_bindings.get(key, ()):
            if await self.app.run_action(binding.action, self):
                return True
        return False
