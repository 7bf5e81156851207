"""Keys typed ahead of a dialog go to its first field instead of being lost.

A quick hand, or keys arriving in a bunch over SSH, can reach a dialog
before any of its fields has the focus: the app then hands them to the
screen itself, which has nothing to do with them.  A `FieldDialog` keeps
them and gives them, in order, to the first field that takes the focus;
the keys after them go there anyway.  (The key that opens the dialog must
be a priority binding, so it runs as the app receives it, before the keys
behind it are handed to the screen under the dialog.)
"""

from __future__ import annotations

from textual import events
from textual.screen import ModalScreen
from textual.widget import Widget


class FieldDialog(ModalScreen):
    """A modal screen with at least one field that takes the focus when it is up."""

    def __init__(self) -> None:
        super().__init__()
        self._early_keys: list[events.Key] = []

    def _forward_event(self, event: events.Event) -> None:
        """The app hands a key to the screen itself while no field has the focus: keep it."""
        if isinstance(event, events.Key) and self.focused is None and not event.is_forwarded:
            self._early_keys.append(event)
            return
        super()._forward_event(event)

    def set_focus(self, widget: Widget | None, scroll_visible: bool = True, from_app_focus: bool = False) -> None:
        """Focus `widget`; the keys that came before any field had the focus go to it first."""
        super().set_focus(widget, scroll_visible, from_app_focus)
        if self.focused is not None and self._early_keys:
            early, self._early_keys = self._early_keys, []
            for key in early:
                self.focused._forward_event(key)
