"""A view's scrolling container that leaves ← → and Home to the view.

A focused widget's bindings and its containers' come before the view's in
Textual's key chain, so a plain `VerticalScroll` would claim ← → and Home
(scroll sideways, to the top) in the footer and the help, where the view's
step keys belong.  The view runs its own keys first anyway
(`WorkbenchView.key_in_turn`); this keeps what is shown true to that.
"""

from __future__ import annotations

from textual.containers import VerticalScroll

VIEW_KEYS = {"left", "right", "home", "ctrl+pageup", "ctrl+pagedown"}  # a view's, or sideways (no use)


class ViewScroll(VerticalScroll, inherit_bindings=False):
    """Scrolls up and down with ↑ ↓, the page keys and End; ← → and Home are the view's."""

    BINDINGS = [binding for binding in VerticalScroll.BINDINGS if binding.key not in VIEW_KEYS]
