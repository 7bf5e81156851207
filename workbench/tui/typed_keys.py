"""Keys typed ahead of a dialog, routed to it (`TypedAhead`, a mixin for the app).

Keys that arrive in a bunch are each handed to the screen on top when the
app receives them; a key that opens a dialog does so only once it has gone
through the view to the app's bindings, in order with the keys before it.
The keys typed after it have gone to the screen under the dialog by then:
they come back up unhandled, and here, before the app's bindings, they are
handed to the dialog (`take_key`, `screens.typed_ahead`).  Every key that arrives while such a
dialog is on top goes through its queue too.  (The Axes view hands on
the keys that reach it itself, `cell_editing.CellsInPlace.on_key`.)
"""

from __future__ import annotations

from textual import events

from .screens.typed_ahead import FieldDialog

TYPED_ON = "typed_on"  # the attribute a key gets: the screen on top when the app received it


class TypedAhead:
    """Route keys typed ahead of a dialog to it."""

    async def on_event(self, event: events.Event) -> None:
        if isinstance(event, events.Key) and not event.is_forwarded:
            screen = self.screen
            if isinstance(screen, FieldDialog):
                # every key to a dialog's fields goes through its queue, one at a time: a field
                # takes a character at once but Backspace, Tab or Enter only at the app's bindings
                # (the app has no priority bindings, so ctrl+q too waits its turn)
                screen.take_key(event)
                return
            setattr(event, TYPED_ON, screen)
        await super().on_event(event)

    async def _on_key(self, event: events.Key) -> None:
        """A key typed on a screen that a dialog has covered since goes to the dialog, in its turn
        with the others (even Tab or Escape: the dialog's bindings act on it there, in order);
        any other key goes on to the app's bindings."""
        screen = self.screen
        typed_on = getattr(event, TYPED_ON, None)
        take = getattr(screen, "take_key", None)
        if typed_on is not None and typed_on is not screen and take is not None:
            event.prevent_default()  # not the app's bindings: the dialog's, when the key reaches it
            take(event)
