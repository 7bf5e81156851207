"""A drop-down field of a dialog whose Enter submits the dialog, as its typed fields' Enter does.

Textual's `Select` opens its list on Enter, so a dialog with the focus on a
drop-down would never take Enter as "apply"; here ↑, ↓ or Space open the
list, and Enter posts `FieldSelect.Submitted` for the dialog to act on.
"""

from __future__ import annotations

from textual.binding import Binding
from textual.message import Message
from textual.widgets import Select


class FieldSelect(Select, inherit_bindings=False):
    """A `Select` in a dialog: ↑ ↓ Space open the list; Enter submits the dialog."""

    BINDINGS = [
        Binding("down,space,up", "show_overlay", "Show the list", show=False),
        Binding("enter", "submit", "Apply", show=False),
    ]

    class Submitted(Message):
        """Enter on the field (its list closed)."""

    def action_submit(self) -> None:
        self.post_message(self.Submitted())
