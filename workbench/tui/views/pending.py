"""Views whose part of the product is not in this version yet.

Each says plainly what is missing: whether the project has tables for it
and that the view is not available yet.  A module named after the view
(`workbench.tui.views.linkage`, `.cam`, `.loads`) that calls `register_view`
with the same id replaces the stand-in — nothing else needs to change.
"""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.widgets import Static

from ...projectfile import PARTS, Project
from .base import WorkbenchView


class PendingView(WorkbenchView):
    """A stand-in that names the project-file table it would show and says it is not there yet."""

    part_key = ""  # the project-file key, e.g. "linkage"
    purpose = ""  # one line: what the real view will show

    DEFAULT_CSS = """
    PendingView { align: center middle; }
    PendingView > Static { width: auto; max-width: 72; padding: 1 2; border: round $secondary; }
    """

    def compose(self) -> ComposeResult:
        yield Static(id="pending-text")

    def message_for(self, project: Project | None) -> str:
        tables = (project.parts.get(self.part_key) if project is not None else None) or []
        if self.part_key not in PARTS:
            has = "This version does not read"
            found = f"{has} [[{self.part_key}]] tables yet"
        elif not tables:
            found = f"No [[{self.part_key}]] in this project"
        else:
            found = f"This project has {len(tables)} [[{self.part_key}]] table(s)"
        return (f"{self.title} view — not yet available.\n\n"
                f"{found}.\nWhen it comes, this view will show {self.purpose}.\n\n"
                "Axes (1) and Timing (2) work now.")

    def show_project(self, project: Project) -> None:
        self.query_one("#pending-text", Static).update(Text(self.message_for(project)))


class LinkagePending(PendingView):
    view_id, title, part_key = "linkage", "Linkage", "linkage"
    purpose = "the bodies, joints, driver and outputs, stepped through the cycle"


class CamPending(PendingView):
    view_id, title, part_key = "cam", "Cam", "cam"
    purpose = "the cam profile with its pressure angle and curvature around the cycle"


class LoadsPending(PendingView):
    view_id, title, part_key = "loads", "Loads", "loads"
    purpose = "forces and drive torque over the cycle"
