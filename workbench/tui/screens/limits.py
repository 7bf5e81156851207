"""Limits of an axis: velocity, acceleration, jerk; blank for no limit."""

from __future__ import annotations

from typing import Any, Callable

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Input, Label, Static

from motionlaws import Limits

from ...editing import QUANTITIES, EditError, parse_number
from ..format import unit_of
from .model_dialog import ModelDialog


class LimitsDialog(ModelDialog):
    """Three inputs; every key re-checks all three, Enter applies when all are accepted."""

    BINDINGS = [Binding("escape", "cancel", "Cancel", tooltip="Keep the limits as they are")]

    def __init__(self, axis_name: str, unit: str, limits: Limits, attempt: Callable[[Limits], Any],
                 explain: Callable[[Any], str] | None = None):
        super().__init__()
        self.explain = explain
        """The axis's verdict under the typed limits, in a line."""
        self.axis_name = axis_name
        self.unit = unit
        self.limits = limits
        self.attempt = attempt
        self.error: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(f"Limits of axis {self.axis_name}"), classes="dialog-title")
            for q, value in self.limits.items():
                with Horizontal(classes="field"):
                    yield Label(Text(f"{q} [{unit_of(q, self.unit)}]"), classes="field-label")
                    yield Input("" if value is None else f"{value:g}", id=q, select_on_focus=True, compact=True)
            yield Static("", id="feedback")
            yield Label(Text("tab: next   enter: apply   esc: cancel   blank: no limit"), classes="dialog-hint")

    def on_mount(self) -> None:
        self.query_one("#velocity", Input).focus()

    def _parsed(self) -> Limits:
        values = {}
        for q in QUANTITIES:
            text = self.query_one(f"#{q}", Input).value
            values[q] = parse_number(text, f"{q} limit", positive=True, allow_blank=True,
                                     units=(unit_of(q, self.unit),))
        return Limits(**values)

    def _check(self):
        feedback = self.query_one("#feedback", Static)
        try:
            typed = tuple(self.query_one(f"#{q}", Input).value for q in QUANTITIES)
            result = self.tried(typed, lambda: self.attempt(self._parsed()))
        except EditError as exc:
            self.error = exc.message
            feedback.update(Text(f"✗ {exc.message}", style="bold red"))
            return None
        self.error = None
        preview = self.explain(result) if self.explain else ""
        feedback.update(Text(f"✓ {preview or 'ok'}", style="green"))
        self.offer(result)
        return result

    def on_input_changed(self, event: Input.Changed) -> None:
        self._check()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        result = self._check()
        if result is None:
            self.app.bell()
        else:
            self.accept(result)
