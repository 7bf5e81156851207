"""A question with a few one-key answers (the quit guard, opening over unsaved changes)."""

from __future__ import annotations

from textual import events
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Label


class ChoiceDialog(ModalScreen[str | None]):
    """Answers are (key, word, description); pressing a key dismisses with its word."""

    BINDINGS = [Binding("escape", "choose('')", "Cancel", tooltip="Go back without doing anything")]

    def __init__(self, title: str, question: str, answers: list[tuple[str, str, str]]):
        super().__init__()
        self.title_text = title
        self.question = question
        self.answers = answers

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(self.title_text, classes="dialog-title")
            yield Label(self.question)
            for key, _, text in self.answers:
                yield Label(f"  [b]{key}[/b]  {text}")
            yield Label("  [b]esc[/b]  cancel", classes="dialog-hint")

    def on_key(self, event) -> None:
        """An answer's key, or Escape, here: in the order typed (a binding would run later).  A key
        that comes after the answer is for what the answer opens: back to the app with it."""
        if self.app.screen is not self:
            event.stop()
            event.prevent_default()
            self.app.post_message(events.Key(event.key, event.character))
            return
        for key, word, _ in self.answers:
            if event.key == key:
                event.stop()
                self.dismiss(word)
                return
        if event.key == "escape":
            event.stop()
            event.prevent_default()
            self.dismiss(None)

    def dismiss(self, result=None):
        """Close with `result` (once: a second answer that reaches a closing question does nothing)."""
        if not self.is_attached or self.app.screen is not self:
            return None
        return super().dismiss(result)

    def take_key(self, key: events.Key) -> None:
        """A key typed before the question was up (it went to the screen under it): an answer."""
        if self.is_attached and self.app.screen is self:
            self._forward_event(events.Key(key.key, key.character))

    def action_choose(self, word: str) -> None:
        self.dismiss(word or None)
