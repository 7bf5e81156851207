"""The list of laws with their peak coefficients; picking one tries it on the segment."""

from __future__ import annotations

from typing import Any, Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import DataTable, Label, Static

from ...editing import EditError, law_table
from .edit_value import accepted
from .model_dialog import ModelDialog

NOTES = {  # what a designer needs to know beside the coefficients
    "dwell": "holds position",
    "constant-velocity": "velocity jumps at a rest",
    "harmonic": "Cj inside; ∞ at a rest (acceleration jumps)",
    "polynomial": "from end conditions",
    "blend": "matches its neighbours",
}


class LawPicker(ModelDialog):
    """Choose a law; Cv, Ca, Cj are max |y'|, |y''|, |y'''| of the normalized rise."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", tooltip="Keep the law as it is")]

    def __init__(self, title: str, current: str, attempt: Callable[[str], Any],
                 explain: Callable[[Any], str] | None = None):
        super().__init__()
        self.title_text = title
        self.current = current
        self.attempt = attempt
        self.explain = explain
        """What the law under the cursor would do, in a line (shown as it is highlighted)."""
        self.error: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog wide"):
            yield Label(Text(self.title_text), classes="dialog-title")
            yield DataTable(cursor_type="row", id="laws")
            yield Static("", id="feedback")
            yield Label(Text("enter: use this law   esc: cancel   (C: peak coefficient of the rise)"),
                        classes="dialog-hint")

    def on_mount(self) -> None:
        table = self.query_one("#laws", DataTable)
        table.add_column("law", key="law")
        for key in ("Cv", "Ca", "Cj"):
            table.add_column(key, key=key)
        table.add_column("note", key="note")
        for law_id, coeffs in law_table():
            cells = [Text(f"{c:.3f}" if c < 1e6 else "∞", justify="right") for c in coeffs] if coeffs \
                else [Text("—", justify="right")] * 3
            table.add_row(law_id, *cells, NOTES.get(law_id, "rest to rest"), key=law_id)
        ids = [law_id for law_id, _ in law_table()]
        if self.current in ids:
            table.move_cursor(row=ids.index(self.current), animate=False)
        table.focus()

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        """The law under the cursor: what it would do, or why it cannot be; its numbers start."""
        event.stop()
        law = str(event.row_key.value)
        feedback = self.query_one("#feedback", Static)
        try:
            result = self.tried(law, lambda: self.attempt(law))
        except EditError as exc:
            feedback.update(Text(f"✗ {exc.message}", style="bold red"))
            return
        preview = self.explain(result) if self.explain else ""
        feedback.update(accepted(preview, empty=""))
        self.offer(result)

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        law = str(event.row_key.value)
        try:
            result = self.tried(law, lambda: self.attempt(law))
        except EditError as exc:
            self.error = exc.message
            self.query_one("#feedback", Static).update(Text(f"✗ {exc.message}", style="bold red"))
            self.stay()
            return
        self.accept(result)
