"""A dialog that takes one typed value and tries it on the model as it is typed.

The dialog knows nothing about projects: it is given `attempt(text, choice)`,
which returns the edited model or raises `EditError` with the reason.  The
reason (or a preview of the change) shows under the input at every key;
Enter accepts only what the model accepts, Escape leaves everything as it was.
`try_value` is that check on its own; the cells of a table edited in place
(`widgets.cell_editor`) use it too.
"""

from __future__ import annotations

from typing import Any, Callable

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Input, Label, Select, Static

from ...editing import EditError
from .field_select import FieldSelect
from .model_dialog import ModelDialog

Attempt = Callable[[str, Any], Any]
Explain = Callable[[Any], str]


def try_value(attempt: Attempt, explain: Explain | None, text: str, choice: Any) -> tuple[Any, str | None, Text]:
    """Try `text` on the model: (edited model or None, the reason it is refused or None, a line to show)."""
    try:
        result = attempt(text, choice)
    except EditError as exc:
        return None, exc.message, Text(f"✗ {exc.message}", style="bold red")
    return result, None, accepted(explain(result) if explain else "")


def accepted(preview: str, empty: str = "ok") -> Text:
    """The line for a value that is accepted: "✓ " and what it makes — "! " when what it makes fails
    a check or a limit (no ✓ in front of a ✗)."""
    if "✗" in preview or "EXCEEDED" in preview:
        return Text(f"! {preview}", style="yellow")
    return Text(f"✓ {preview or empty}", style="green") if preview or empty else Text("")


class EditDialog(ModelDialog):
    """Type a value (and optionally pick who gives or takes the difference)."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", tooltip="Close without changing anything")]

    def __init__(self, title: str, prompt: str, value: str, attempt: Attempt,
                 explain: Explain | None = None, choices: list[tuple[str, Any]] | None = None,
                 choice_prompt: str = "", choice: Any = None, hint: str = ""):
        super().__init__()
        self.title_text = title
        self.prompt = prompt
        self.value = value
        self.attempt = attempt
        self.explain = explain
        self.choices = choices
        self.choice_prompt = choice_prompt
        self.choice = choice
        self.hint = hint
        self.error: str | None = None
        """The reason the typed value is refused (None when it is accepted)."""

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(self.title_text), classes="dialog-title")
            yield Label(Text(self.prompt))
            yield Input(self.value, id="value", select_on_focus=True, compact=True)
            if self.choices:
                yield Label(Text(self.choice_prompt))
                yield FieldSelect(self.choices, value=self.choice, allow_blank=False, compact=True, id="choice")
            yield Static("", id="feedback")
            yield Label(Text(self.hint or "enter: apply   esc: cancel"), classes="dialog-hint")

    def on_mount(self) -> None:
        self.query_one("#value", Input).focus()
        self._check()

    def _current(self) -> tuple[str, Any]:
        text = self.query_one("#value", Input).value
        choice = self.query_one("#choice", Select).value if self.choices else None
        return text, choice

    def _check(self) -> Any:
        """Try the typed value; show the reason or the preview; return the result or None."""
        text, choice = self._current()

        def attempt(t: str, c: Any) -> Any:
            return self.tried((t, c), lambda: self.attempt(t, c))

        result, self.error, line = try_value(attempt, self.explain, text, choice)
        self.query_one("#feedback", Static).update(line)
        self.offer(result)
        return result

    def on_input_changed(self, event: Input.Changed) -> None:
        self._check()

    def on_select_changed(self, event: Select.Changed) -> None:
        self._check()

    @on(Input.Submitted)
    @on(FieldSelect.Submitted)
    def submitted(self, event: Input.Submitted | FieldSelect.Submitted) -> None:
        event.stop()
        result = self._check()
        if result is not None:
            self.accept(result)
        else:
            self.stay()
