"""Messages that travel up from views and workers to the app."""

from __future__ import annotations

from textual.message import Message

from ..projectfile import Project
from .compute import AxisResult


class ProjectEdited(Message):
    """A view made an edit: `project` is the new state, `note` says what changed (for undo)."""

    def __init__(self, project: Project, note: str) -> None:
        super().__init__()
        self.project = project
        self.note = note


class ResultsReady(Message):
    """A worker finished the numbers for `project`; a newer one replaces an older one in the queue."""

    def __init__(self, project: Project, results: dict[str, AxisResult]) -> None:
        super().__init__()
        self.project = project
        self.results = results

    def can_replace(self, message: Message) -> bool:
        return isinstance(message, ResultsReady)


class Status(Message):
    """A line for the status bar; `error` marks a refusal."""

    def __init__(self, text: str, error: bool = False) -> None:
        super().__init__()
        self.text = text
        self.error = error
