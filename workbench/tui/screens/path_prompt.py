"""Ask for a file path (save as, open); `attempt(path)` decides and may refuse with a reason."""

from __future__ import annotations

from pathlib import Path
from typing import Any, Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Input, Label, Static

from ...editing import EditError
from .typed_ahead import FieldDialog


class PathDialog(FieldDialog):
    BINDINGS = [Binding("escape", "cancel", "Cancel", tooltip="Close without doing anything")]

    def __init__(self, title: str, path: str, attempt: Callable[[Path], Any], hint: str = ""):
        super().__init__()
        self.title_text = title
        self.path = path
        self.attempt = attempt
        self.hint = hint
        self.error: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog wide"):
            yield Label(Text(self.title_text), classes="dialog-title")
            yield Input(self.path, id="path", compact=True)
            yield Static("", id="feedback")
            yield Label(Text(self.hint or "enter: go   esc: cancel"), classes="dialog-hint")

    def on_mount(self) -> None:
        self.query_one("#path", Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        text = event.value.strip()
        try:
            if not text:
                raise EditError("type a file path")
            result = self.attempt(Path(text).expanduser())
        except EditError as exc:
            self.error = exc.message
            self.query_one("#feedback", Static).update(Text(f"✗ {exc.message}", style="bold red"))
            self.stay()
            return
        self.dismiss(result)

    def action_cancel(self) -> None:
        self.dismiss(None)
