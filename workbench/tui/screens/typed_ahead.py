"""Keys typed ahead of a dialog reach its fields, in order, one at a time.

A quick hand, or keys arriving in a bunch over SSH, can send keys meant for
a dialog before it is up: they go to the screen under it (the Axes view and
the app hand those on, `cell_editing.CellsInPlace.on_key`,
`tui.typed_keys`, which also sends the dialog every key that arrives while
it is on top).  A `FieldDialog` queues such keys (`take_key`) and hands
them to its focused field one at a time, each once the one before has been
through the field and its parents up to the app (where the bindings of
Backspace, arrows and Enter run): Tab moves to the next field in its turn,
and after Enter the rest wait — for the dialog to stay (a refused value:
`stay`, the keys go on into it) or to close (they go back to the app, for
the screen underneath).  A key that closes a drop-down's list (Enter picks,
Escape leaves) holds the rest until the drop-down has the focus back, as it
takes it back a moment later.  Keys that arrive meanwhile join the queue,
so nothing overtakes.
"""

from __future__ import annotations

from textual import events
from textual.screen import ModalScreen
from textual.widget import Widget
from textual.widgets import DataTable, Input, Select

from .field_select import FieldSelect

FOCUS_KEYS = {"tab": "focus_next", "shift+tab": "focus_previous"}  # moved here, not by the field
HAND_WAIT_S = 0.3  # the longest a key in hand holds back the next (a widget on its way was removed)
SUBMITTING = (Input, DataTable, FieldSelect)  # fields whose Enter closes the dialog (`dismiss`) or is refused (`stay`)
CLOSING_A_LIST = ("enter", "escape")  # keys that close an open drop-down list (pick, leave)


class FieldDialog(ModalScreen):
    """A modal screen with at least one field that takes the focus when it is up."""

    def __init__(self) -> None:
        super().__init__()
        self._queue: list[events.Key] = []
        self._handing = False
        """A key is with a field and not yet handled."""
        self._after_enter = False
        """An Enter was handed over: the rest wait until the dialog stays or goes."""
        self._handed = 0
        """How many keys have been handed over (the one in hand is the last)."""
        self._refocus: Select | None = None
        """A drop-down whose list a key closed: the next keys wait until it has the focus back."""

    def take_key(self, key: events.Key) -> None:
        """A key meant for this dialog that reached it another way: queue it and hand it over in turn."""
        self._queue.append(events.Key(key.key, key.character))
        self._hand_next()

    def set_focus(self, widget: Widget | None, scroll_visible: bool = True, from_app_focus: bool = False) -> None:
        """Focus `widget`; queued keys go on to it."""
        super().set_focus(widget, scroll_visible, from_app_focus)
        if widget is not None and widget is self._refocus:
            self._refocus = None
        self._hand_next()

    def _hand_next(self) -> None:
        if self._handing or self._after_enter or self._refocus is not None or not self._queue or self.focused is None:
            return
        if not self.is_attached or self.app.screen is not self:
            return
        key = self._queue.pop(0)
        if key.key in FOCUS_KEYS:
            getattr(self, FOCUS_KEYS[key.key])()
            self._hand_next()
            return
        target = self.focused
        self._handing = True
        self._handed += 1
        listing = next((node for node in target.ancestors if isinstance(node, Select) and node.expanded), None)
        if listing is not None and key.key in CLOSING_A_LIST:
            self._refocus = listing  # it takes the focus back once its list is closed: wait for that
            self.set_timer(HAND_WAIT_S, lambda: self._refocus_waited(listing))
        self._after_enter = key.key == "enter" and isinstance(target, SUBMITTING)
        target._forward_event(key)
        n = self._handed
        self._after_each(n, [target, *target.ancestors])
        self.set_timer(HAND_WAIT_S, lambda: self._went_through(n))
        if self._after_enter:
            self.set_timer(HAND_WAIT_S, lambda: self._enter_waited(n))

    def _after_each(self, n: int, nodes: list) -> None:
        """Go on once key `n` has been through `nodes` in turn, up to the app (a field handles a
        character itself, but Backspace, arrows or Enter only as a binding, where the key ends
        up at the app): each node's queue holds the key ahead of this call."""
        nodes = [node for node in nodes if node.is_attached or node is self.app]
        if not nodes:
            self._went_through(n)
            return
        nodes[0].call_later(self._after_each, n, nodes[1:])

    def _went_through(self, n: int) -> None:
        """Key `n` has been handled (or `HAND_WAIT_S` passed: a widget on its way was removed, an
        Enter opened a list): the next may go."""
        if n != self._handed or not self._handing:
            return
        self._handing = False
        self._hand_next()

    def _refocus_waited(self, listing: Select) -> None:
        """`HAND_WAIT_S` after a key closed `listing`'s list it has not taken the focus back (the
        focus went elsewhere): the keys after it go on."""
        if self._refocus is listing:
            self._refocus = None
            self._hand_next()

    def _enter_waited(self, n: int) -> None:
        """`HAND_WAIT_S` after Enter `n` the dialog is still up and said nothing (an Enter that
        opened a drop-down list, say): the keys after it go on."""
        if n == self._handed and self._after_enter and self.is_attached and self.app.screen is self:
            self._after_enter = False
            self._hand_next()

    def stay(self) -> None:
        """The dialog refused what Enter would apply and stays: the keys typed after it go on."""
        self.app.bell()
        self._after_enter = False
        self._hand_next()

    def dismiss(self, result=None):
        """Close (once: a second Enter or Escape that reaches a closing dialog does nothing); keys
        still queued go back to the app, for the screen underneath."""
        if not self.is_attached or self.app.screen is not self:
            return None
        queued, self._queue = self._queue, []
        self._after_enter = False
        done = super().dismiss(result)
        for key in queued:
            self.app.post_message(events.Key(key.key, key.character))
        return done
