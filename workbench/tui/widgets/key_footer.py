"""The footer of key hints, rebuilt only when the keys it shows change.

Textual's `Footer` rebuilds all its key widgets whenever the screen's
bindings are announced as updated — after every focus change and every
dialog that closes — and the rebuild lays out and repaints the whole
screen (~30 ms of UI time at 120×40, before an edit made in the dialog
can reach the screen).  Most of those announcements change nothing it
shows: closing a dialog brings back the very keys that were there before
it opened.  `KeyFooter` compares what it would show with what it shows
and rebuilds only on a difference.
"""

from __future__ import annotations

from textual.widgets import Footer


class KeyFooter(Footer):
    """A `Footer` that skips rebuilding when its keys (key, label, action, enabled, tooltip) stay the same."""

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self._shown: tuple | None = None

    def _keys(self, screen) -> tuple:
        """What the footer shows for `screen`: its displayed bindings and the palette key, in order."""
        keys = tuple((b.key, b.description, b.action, b.group, enabled, tooltip)
                     for (_, b, enabled, tooltip) in screen.active_bindings.values() if b.show)
        return keys, self.show_command_palette, self.compact

    def bindings_changed(self, screen) -> None:
        if self.is_attached and screen is self.screen and screen.app.app_focus:
            keys = self._keys(screen)
            if self._bindings_ready and keys == self._shown:
                return
            self._shown = keys
        super().bindings_changed(screen)
