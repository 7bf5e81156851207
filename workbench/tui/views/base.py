"""What every view of the workbench provides.

A view is a widget that the app keeps in a content switcher.  Contract:

1. ``view_id`` and ``title`` — class attributes: a DOM id and the name on the view bar.
2. ``show_project(project)`` — called after every edit, undo and open, at once,
   with the new project (state flows down; a view hands its edits to
   `app.apply_edit` and never changes the history itself).
3. ``show_results(project, results)`` — called when the worker has finished the
   numbers for `project` (`workbench.tui.compute.AxisResult` by axis name).
4. Edits go to `app.apply_edit(project, note)` (at once, so the next key acts on them); status
   lines as `Status`.
5. ``focus_first()`` — put the keyboard focus where the view's work starts.
"""

from __future__ import annotations

from textual.widget import Widget

from ...projectfile import Project
from ..compute import AxisResult


class WorkbenchView(Widget):
    view_id = ""
    title = ""

    DEFAULT_CSS = """
    WorkbenchView { height: 1fr; }
    """

    def __init__(self) -> None:
        super().__init__(id=self.view_id)

    def show_project(self, project: Project) -> None:
        """A new project state (edit, undo, open)."""

    def show_results(self, project: Project, results: dict[str, AxisResult]) -> None:
        """Numbers for `project` are ready."""

    def focus_first(self) -> None:
        self.screen.set_focus(None)
