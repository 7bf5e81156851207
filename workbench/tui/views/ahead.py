"""Numbers computed ahead of an edit (`NumbersAhead`, a mixin for a view).

While a value is typed — over a cell, or in a dialog — the view is told the
state it would make (`want_numbers`) and computes that state's numbers in a
thread worker, so the Enter that makes it the edit finds them done: the
view's `show_project` hands them on with `take_ahead`, in the same screen
update as the edit, instead of waiting for the app's recompute.
"""

from __future__ import annotations

from textual import work
from textual.worker import get_current_worker

from ...projectfile import Project
from ..compute import AxisResult, compute_results


class NumbersAhead:
    """The numbers of the one state a view expects next, computed before it is the edit."""

    def _init_ahead(self) -> None:
        self._wanted: Project | None = None
        """The state whose numbers are wanted (what is typed now would make it)."""
        self._ahead: tuple[Project, dict[str, AxisResult]] | None = None
        """That state's numbers, once computed."""

    def want_numbers(self, project: Project) -> None:
        """Start the numbers of `project` (a newer wish replaces an older one)."""
        if project is self._wanted:
            return
        self._wanted, self._ahead = project, None
        self._numbers_ahead(project)

    def drop_ahead(self) -> None:
        """Nothing typed is on its way to be an edit any more."""
        self._wanted, self._ahead = None, None

    def take_ahead(self, project: Project) -> dict[str, AxisResult] | None:
        """The numbers of `project` if they were computed ahead (once)."""
        ahead = self._ahead
        self._wanted, self._ahead = None, None
        return ahead[1] if ahead is not None and ahead[0] is project else None

    @work(thread=True, exclusive=True, group="numbers-ahead", exit_on_error=False)
    def _numbers_ahead(self, project: Project) -> None:
        results = compute_results(project)
        if not get_current_worker().is_cancelled:
            self.app.call_from_thread(self._ahead_done, project, results)

    def _ahead_done(self, project: Project, results: dict[str, AxisResult]) -> None:
        if project is self._wanted:
            self._ahead = (project, results)
