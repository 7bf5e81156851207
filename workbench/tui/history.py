"""Undo and redo over immutable project snapshots, with a mark for the one last saved.

UI-free: the app keeps one `History`; every edit of `workbench.editing`
returns a new project, which is pushed here.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from ..editing import EditError
from ..projectfile import Project


@dataclass(frozen=True)
class Step:
    """One state in the history: the project and what was done to reach it."""

    project: Project
    note: str


class History:
    """Undo/redo over immutable project snapshots, with a mark for the saved one."""

    def __init__(self, project: Project, limit: int = 500):
        self._past: list[Step] = []
        self._future: list[Step] = []
        self._now = Step(project, "opened")
        self._saved: Project | None = project
        self.limit = limit  # snapshots kept for undo; the oldest go first

    @property
    def current(self) -> Project:
        return self._now.project

    @property
    def can_undo(self) -> bool:
        return bool(self._past)

    @property
    def can_redo(self) -> bool:
        return bool(self._future)

    @property
    def modified(self) -> bool:
        """True unless the current project is the one last saved (or opened)."""
        return self._saved is not self._now.project

    def push(self, project: Project, note: str) -> None:
        self._past.append(self._now)
        del self._past[: max(0, len(self._past) - self.limit)]
        self._future.clear()
        self._now = Step(project, note)

    def undo(self) -> str:
        """Go one step back; returns the note of the edit undone."""
        if not self._past:
            raise EditError("nothing to undo")
        note = self._now.note
        self._future.append(self._now)
        self._now = self._past.pop()
        return note

    def redo(self) -> str:
        if not self._future:
            raise EditError("nothing to redo")
        self._past.append(self._now)
        self._now = self._future.pop()
        return self._now.note

    def mark_saved(self) -> None:
        """The current state is the one on disk now."""
        self._saved = self._now.project

    def move_to(self, path: Path) -> None:
        """The project's file is `path` from now on, in every state undo or redo can reach: the
        file a project is saved to is not something undo takes back.  The snapshots keep their
        identity (the views and the numbers' cache know them by it); only their `path` changes."""
        for step in (*self._past, self._now, *self._future):
            step.project.path = path
