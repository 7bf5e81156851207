"""A dialog of a few typed fields tried together on the model (an axis's or a cam's limits).

Every keystroke tries all the fields at once (`attempt(texts)`, which returns
the edited model or raises `EditError`); the reason a value is refused, or a
one-line preview of what the typed values would give, shows under them.
Enter accepts only what the model accepts; Escape leaves everything as it
was.  A blank field shows, greyed, what blank means (its placeholder).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Input, Label, Static

from ...editing import EditError
from .edit_value import accepted
from .model_dialog import ModelDialog


@dataclass(frozen=True)
class Field:
    """One typed field: `key` (its id), the label beside it, the text it opens with, what blank means."""

    key: str
    label: str
    value: str
    blank: str


class FieldsDialog(ModelDialog):
    """Several inputs; every key re-checks all of them, Enter applies when the model accepts them."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", tooltip="Close without changing anything")]

    def __init__(self, title: str, fields: list[Field], attempt: Callable[[tuple[str, ...]], Any],
                 explain: Callable[[Any], str] | None = None, hint: str = ""):
        super().__init__()
        self.title_text = title
        self.fields = fields
        self.attempt = attempt
        """Texts typed, in the order of `fields` → the edited model (or `EditError`)."""
        self.explain = explain
        """The edited model → a line that previews it."""
        self.hint = hint
        self.error: str | None = None
        """The reason what is typed is refused (None when it is accepted)."""

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(self.title_text), classes="dialog-title")
            for f in self.fields:
                with Horizontal(classes="field"):
                    yield Label(Text(f.label), classes="field-label")
                    yield Input(f.value, id=f.key, placeholder=f.blank, select_on_focus=True, compact=True)
            yield Static("", id="feedback")
            if self.hint:
                yield Label(Text(self.hint), classes="dialog-hint")
            yield Label(Text("tab: next   enter: apply   esc: cancel"), classes="dialog-hint")

    def on_mount(self) -> None:
        self.query_one(f"#{self.fields[0].key}", Input).focus()
        self._check()

    def typed(self) -> tuple[str, ...]:
        """The texts in the fields, in order."""
        return tuple(self.query_one(f"#{f.key}", Input).value for f in self.fields)

    def _check(self) -> Any:
        """Try what is typed; show the reason or the preview; return the model or None."""
        feedback = self.query_one("#feedback", Static)
        texts = self.typed()
        try:
            result = self.tried(texts, lambda: self.attempt(texts))
        except EditError as exc:
            self.error = exc.message
            feedback.update(Text(f"✗ {exc.message}", style="bold red"))
            return None
        self.error = None
        preview = self.explain(result) if self.explain else ""
        feedback.update(accepted(preview))
        self.offer(result)
        return result

    def on_input_changed(self, event: Input.Changed) -> None:
        self._check()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        result = self._check()
        if result is None:
            self.stay()
        else:
            self.accept(result)
