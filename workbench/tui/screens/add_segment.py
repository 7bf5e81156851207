"""Insert a segment after the one under the cursor, its span taken from a chosen segment."""

from __future__ import annotations

from typing import Any, Callable

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Input, Label, Select, Static

from motionlaws import law_ids

from ...editing import EditError, parse_number
from .edit_value import accepted
from .field_select import FieldSelect
from .model_dialog import ModelDialog

AddAttempt = Callable[[str, float, float | None, int], Any]


class AddSegmentDialog(ModelDialog):
    """Law, span [deg], end position (moving laws) and the segment that gives the span."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", tooltip="Add nothing")]

    def __init__(self, title: str, unit: str, position: float, donors: list[tuple[str, int]],
                 donor: int, attempt: AddAttempt, explain: Callable[[Any], str], span: float = 30.0):
        super().__init__()
        self.span = span
        self.title_text = title
        self.unit = unit
        self.position = position
        self.donors = donors
        self.donor = donor
        self.attempt = attempt
        self.explain = explain
        self.error: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(self.title_text), classes="dialog-title")
            with Horizontal(classes="field"):
                yield Label(Text("law"), classes="field-label")
                yield FieldSelect([(law, law) for law in law_ids()], value="dwell", allow_blank=False, compact=True, id="law")
            with Horizontal(classes="field"):
                yield Label(Text("span [deg]"), classes="field-label")
                yield Input(f"{self.span:g}", id="span", select_on_focus=True, compact=True)
            with Horizontal(classes="field"):
                yield Label(Text(f"to [{self.unit}]"), classes="field-label")
                yield Input(f"{self.position:g}", id="to", select_on_focus=True, compact=True)
            with Horizontal(classes="field"):
                yield Label(Text("span from"), classes="field-label")
                yield FieldSelect(self.donors, value=self.donor, allow_blank=False, compact=True, id="donor")
            yield Static("", id="feedback")
            yield Label(Text("tab: next field   ↓: a list   enter: add   esc: cancel"), classes="dialog-hint")

    def on_mount(self) -> None:
        self.query_one("#law", Select).focus()
        self._check()

    def _check(self):
        feedback = self.query_one("#feedback", Static)
        law = str(self.query_one("#law", Select).value)
        self.query_one("#to", Input).disabled = law == "dwell"
        try:
            span = parse_number(self.query_one("#span", Input).value, "span", positive=True,
                                units=("deg", "°"))
            to = None if law == "dwell" else parse_number(self.query_one("#to", Input).value, "to",
                                                           units=(self.unit,))
            donor = int(self.query_one("#donor", Select).value)
            result = self.tried((law, span, to, donor), lambda: self.attempt(law, span, to, donor))
        except EditError as exc:
            self.error = exc.message
            feedback.update(Text(f"✗ {exc.message}", style="bold red"))
            return None
        self.error = None
        feedback.update(accepted(self.explain(result)))
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
        if result is None:
            self.stay()
        else:
            self.accept(result)
