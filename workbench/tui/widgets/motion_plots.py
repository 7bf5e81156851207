"""Braille plots against master or cam angle on textual-plot's `PlotWidget`.

`MotionPlot` is the base of the Cam, Loads and Linkage views' angle plots
(`cam_plots.AnglePlot`): braille lines drawn with numpy, ticks sized to the
plot's height, 0–360° scale, the title left-aligned above the plot.
Subclasses decide what to draw in `redraw`.  (The Axes view draws its own
plots from cached strips: `axis_plots`.)
"""

from __future__ import annotations

from contextlib import ExitStack
from typing import Sequence

from textual.app import ComposeResult
from textual.containers import Grid
from textual_hires_canvas import Canvas, TextAlign
from textual_plot import HiResMode, PlotWidget
from textual_plot.plot_widget import Legend
from textual_plot.axis_formatter import AxisFormatter

from .axis_chart import ROWS_PER_TICK, compact, nice_ticks
from .braille import DOTS_X as BRAILLE_DOTS_X, braille_cells

__all__ = ["BRAILLE_DOTS_X", "ROWS_PER_TICK", "AngleFormatter", "FrameCanvas", "MotionPlot",
           "TickFormatter", "compact", "nice_ticks"]


class TickFormatter(AxisFormatter):
    """Ticks sized for the plot's height, labels kept short."""

    def __init__(self, count: int = 4):
        self.count = count

    def get_ticks(self, min_: float, max_: float, max_ticks: int = 8) -> list[float]:
        return nice_ticks(min_, max_, min(self.count, max_ticks))

    def get_labels_for_ticks(self, ticks: Sequence[float]) -> list[str]:
        return [compact(t) for t in ticks]


class AngleFormatter(AxisFormatter):
    """Master angle ticks every 90°."""

    def get_ticks(self, min_: float, max_: float, max_ticks: int = 8) -> list[float]:
        return [t for t in (0.0, 90.0, 180.0, 270.0, 360.0) if min_ <= t <= max_]

    def get_labels_for_ticks(self, ticks: Sequence[float]) -> list[str]:
        return [f"{t:g}°" for t in ticks]


class FrameCanvas(Canvas):
    """A canvas that works out its base style once per repaint, not once per line.

    (The stock canvas asks for `rich_style` on every line, which walks the
    widget's ancestors each time: most of a plot's repaint.)"""

    _frame_style = None

    @property
    def rich_style(self):
        if self._frame_style is not None:
            return self._frame_style
        return super().rich_style

    def render_lines(self, crop):
        self._frame_style = super().rich_style
        try:
            return super().render_lines(crop)
        finally:
            self._frame_style = None


class MotionPlot(PlotWidget, can_focus=False):
    """A braille plot against an angle, 0–360° (deg); subclasses draw in `redraw`."""

    DEFAULT_CSS = """
    MotionPlot { height: 1fr; min-height: 5; }
    """

    def __init__(self, quantity: str, **kwargs):
        super().__init__(allow_pan_and_zoom=False, **kwargs)
        self.quantity = quantity
        self.points_drawn = 0
        """Points handed to the plot after downsampling (for the benchmark and tests)."""
        self.title = ""
        """The line above the plot: quantity, unit, peak and limit in words."""

    def on_mount(self) -> None:
        super().on_mount()
        self.margin_top = 1
        self.margin_bottom = 1
        self.margin_left = 7
        self._y_tick_format = TickFormatter()
        self.set_y_formatter(self._y_tick_format)
        self.set_x_formatter(AngleFormatter())
        self.set_xlimits(0.0, 360.0)

    def compose(self) -> ComposeResult:
        """The stock layout of `PlotWidget`, with `FrameCanvas` in place of `Canvas`."""
        with Grid():
            yield FrameCanvas(1, 1, id="margin-top")
            yield FrameCanvas(1, 1, id="margin-left")
            yield FrameCanvas(1, 1, id="plot")
            yield FrameCanvas(1, 1, id="margin-bottom")
        yield Legend(id="legend")

    def _render_plot(self) -> None:
        """Draw with each canvas's refresh held until the end (one refresh, not one per cell)."""
        with ExitStack() as stack:
            for canvas in self.query(Canvas):
                stack.enter_context(canvas.batch_refresh())
            super()._render_plot()

    def _render_line_plot(self, dataset) -> None:
        """Braille lines drawn with numpy (`braille.braille_cells`); other modes as stock."""
        if dataset.hires_mode is not HiResMode.BRAILLE or dataset.x.size == 0:
            super()._render_line_plot(dataset)
            return
        canvas = self.query_one("#plot", Canvas)
        region = self._scale_rectangle
        x = region.x + (dataset.x - self._x_min) * (region.right - region.x) / (self._x_max - self._x_min)
        y = region.bottom + (dataset.y - self._y_min) * (region.y - region.bottom) / (self._y_max - self._y_min)
        size = canvas._canvas_size
        columns, rows, chars = braille_cells(x, y, size.width, size.height)
        buffer, styles = canvas._buffer, canvas._styles
        for c, r, ch in zip(columns.tolist(), rows.tolist(), chars):
            buffer[r][c] = ch
            styles[r][c] = dataset.line_style
        canvas.refresh()

    def _render_y_label(self) -> None:
        """The title, left-aligned across the top margin (the stock label is centred on the axis)."""
        margin = self.query_one("#margin-top", Canvas)
        margin.write_text(0, 0, self._y_label, TextAlign.LEFT)

    def _render_x_label(self) -> None:
        """No x label: the ticks say degrees."""

    def on_resize(self) -> None:
        self.call_after_refresh(self.redraw)

    def redraw(self) -> None:
        """Draw again at the current size; subclasses say what."""
