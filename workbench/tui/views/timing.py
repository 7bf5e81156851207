"""The Timing view: every axis over one cycle, a cursor to read them at one master angle."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding

from ...projectfile import Project
from ..compute import AxisResult
from ..widgets.timing_chart import TimingChart, TimingReadout
from ..widgets.view_scroll import ViewScroll
from .base import WorkbenchView

COARSE_STEP = 5.0  # deg per left/right
FINE_STEP = 1.0  # deg per shift+left/right


class TimingView(WorkbenchView):
    view_id = "timing"
    title = "Timing"

    BINDINGS = [
        Binding("right", "step(5)", "+5°", key_display="→", tooltip="Cursor 5° later in the cycle"),
        Binding("left", "step(-5)", "-5°", key_display="←", tooltip="Cursor 5° earlier in the cycle"),
        Binding("shift+right", "step(1)", "+1°", show=False, tooltip="Cursor 1° later"),
        Binding("shift+left", "step(-1)", "-1°", show=False, tooltip="Cursor 1° earlier"),
        Binding("home", "go(0)", "0°", show=False, tooltip="Cursor to master 0°"),
    ]

    def __init__(self) -> None:
        super().__init__()
        self.project: Project | None = None
        self.results: dict[str, AxisResult] = {}
        self.angle = 0.0
        """Cursor master angle in deg."""

    def compose(self) -> ComposeResult:
        with ViewScroll():
            yield TimingChart(id="timing-chart")
            yield TimingReadout(id="timing-readout")

    def show_project(self, project: Project) -> None:
        self.project = project
        self._redraw()

    def show_results(self, project: Project, results: dict[str, AxisResult]) -> None:
        self.project, self.results = project, results
        self._redraw()

    def _redraw(self) -> None:
        chart = self.query_one(TimingChart)
        chart.show(self.project, self.results if self.results else {})
        chart.set_angle(self.angle)
        self.query_one(TimingReadout).show(self.project, self.results, self.angle)

    def focus_first(self) -> None:
        self.screen.set_focus(self.query_one(TimingChart))  # now: the next key finds it

    def action_step(self, step: float) -> None:
        self.action_go((self.angle + step) % 360.0)

    def action_go(self, angle: float) -> None:
        self.angle = float(angle) % 360.0
        self.query_one(TimingChart).set_angle(self.angle)
        self.query_one(TimingReadout).show(self.project, self.results, self.angle)
