"""Plots of position, velocity, acceleration and jerk against master angle.

`MotionPlot` wraps textual-plot's `PlotWidget`: braille lines, segment
boundaries as vertical lines, the ± limit as horizontal lines, ticks sized
to the plot's height.  Curves are reduced to about two points per pixel
column (min and max per bucket) before drawing, since drawing costs per point.
`PlotPanel` shows one plot at a time in a short terminal and all four when
there is room.
"""

from __future__ import annotations

import math
from contextlib import ExitStack
from typing import Sequence

import numpy as np
from rich.markup import escape
from textual.app import ComposeResult
from textual.containers import Grid
from textual.reactive import reactive
from textual.widgets import Static
from textual_hires_canvas import Canvas, TextAlign
from textual_plot import HiResMode, PlotWidget
from textual_plot.plot_widget import Legend
from textual_plot.axis_formatter import AxisFormatter

from ..compute import QUANTITIES, AxisResult
from ...axisreport import fmt
from ..format import unit_of
from ..sampling import downsample_minmax
from .braille import braille_cells

CURVE_STYLE = {"position": "bright_cyan", "velocity": "bright_green",
               "acceleration": "bright_yellow", "jerk": "bright_blue"}
LIMIT_STYLE = "red"  # the limit lines; the title says "limit ±…" in words too
BOUNDARY_STYLE = "bright_black"
ROWS_PER_TICK = 3  # a y tick label every 3 rows at most, so labels never touch
MIN_ROWS_FOR_GRID = 14  # below this height only one plot is shown at a time
MIN_COLUMNS_FOR_GRID = 100  # 2×2 grid needs this width; narrower stacks them
BRAILLE_DOTS_X = 2  # braille cells are 2 dots wide


def compact(value: float) -> str:
    """Short tick label: 25k, -1.2M, 0.5."""
    a = abs(value)
    if a >= 1e6:
        return f"{value / 1e6:.3g}M"
    if a >= 1e4:
        return f"{value / 1e3:.3g}k"
    if a == 0:
        return "0"
    return f"{value:.4g}"


def nice_ticks(lo: float, hi: float, count: int) -> list[float]:
    """About `count` ticks at 1-2-5 steps covering [lo, hi]."""
    if hi <= lo or count < 2:
        return [lo]
    raw = (hi - lo) / count
    power = 10 ** math.floor(math.log10(raw))
    step = max(m * power for m in (1, 2, 2.5, 5, 10) if m * power <= raw * (1 + 1e-9))
    first = math.ceil(lo / step - 1e-9) * step
    return [float(t) for t in np.arange(first, hi + step * 1e-6, step)]


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
    """One quantity of one axis against master angle (deg)."""

    DEFAULT_CSS = """
    MotionPlot { height: 1fr; min-height: 5; }
    """

    def __init__(self, quantity: str, **kwargs):
        super().__init__(allow_pan_and_zoom=False, **kwargs)
        self.quantity = quantity
        self.result: AxisResult | None = None
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

    def show(self, result: AxisResult | None) -> None:
        if result is self.result:
            return
        self.result = result
        self.redraw()

    def redraw(self) -> None:
        """Draw the curve again at the current size (skipped while hidden)."""
        if not self.is_mounted or not self.display or self.size.width == 0:
            return
        # the canvases may have changed size without this widget changing (margins): recheck
        self._needs_canvas_resize = True
        self.clear()
        result = self.result
        if result is None:
            self.title = ""
            self.set_ylabel("")
            return
        q = self.quantity
        unit = unit_of(q, result.unit)
        y = result.curves.of(q)
        columns = max(8, self.size.width - self.margin_left - 2)
        xs, ys = downsample_minmax(result.curves.theta, y, columns * BRAILLE_DOTS_X)
        self.points_drawn = int(xs.size)
        lo, hi = float(np.min(ys)), float(np.max(ys))
        limit = None
        if q != "position":
            check = next((c for c in result.report.checks if c.quantity == q), None)
            if check is not None:
                limit = check.limit
                lo, hi = min(lo, -limit), max(hi, limit)
        if hi - lo < 1e-12 * max(1.0, abs(hi)):
            lo, hi = lo - 1.0, hi + 1.0
        pad = 0.05 * (hi - lo)
        self.set_ylimits(lo - pad, hi + pad)
        rows = max(1, self.size.height - self.margin_top - self.margin_bottom)
        self._y_tick_format.count = max(2, rows // ROWS_PER_TICK + 1)
        for b in result.bounds:
            self.add_v_line(b, BOUNDARY_STYLE)
        if limit is not None:
            for sign in (1.0, -1.0):
                self.plot([0.0, 360.0], [sign * limit, sign * limit], line_style=LIMIT_STYLE,
                          hires_mode=HiResMode.BRAILLE)
        self.plot(xs, ys, line_style=CURVE_STYLE[q], hires_mode=HiResMode.BRAILLE)
        self.title = self._title(result, limit)
        self.set_ylabel(escape(self.title))

    def _title(self, result: AxisResult, limit: float | None) -> str:
        q = self.quantity
        unit = unit_of(q, result.unit)
        if q == "position":
            s = result.curves.position
            return f"position [{unit}]  {fmt(float(s.min()))} … {fmt(float(s.max()))}"
        peak = result.report.peaks[q]
        text = f"{q} [{unit}]  peak "
        text += "infinite" if peak.infinite else fmt(peak.value)
        if limit is not None:
            text += f"  limit ±{fmt(limit)} (red)"
        return text


class PlotPanel(Grid):
    """Up to four `MotionPlot`s; `shown` is the one on view when only one fits."""

    DEFAULT_CSS = """
    PlotPanel { height: 1fr; grid-size: 1; grid-gutter: 0 1; }
    PlotPanel.-grid { grid-size: 2 2; }
    PlotPanel.-stack { grid-size: 1 4; }
    PlotPanel.-single MotionPlot { display: none; }
    PlotPanel.-single MotionPlot.-shown { display: block; }
    """

    shown: reactive[str] = reactive("velocity")
    """The quantity on view when the panel shows one plot at a time."""

    def compose(self) -> ComposeResult:
        for q in QUANTITIES:
            yield MotionPlot(q, id=f"plot-{q}")

    def on_mount(self) -> None:
        self._layout()

    def on_resize(self) -> None:
        self._layout()

    def _layout(self) -> None:
        w, h = self.size
        grid = h >= MIN_ROWS_FOR_GRID and w >= MIN_COLUMNS_FOR_GRID
        stack = not grid and h >= 4 * 7
        self.set_class(grid, "-grid")
        self.set_class(stack, "-stack")
        self.set_class(not (grid or stack), "-single")
        self.watch_shown(self.shown)

    @property
    def single(self) -> bool:
        return self.has_class("-single")

    def watch_shown(self, quantity: str) -> None:
        for plot in self.query(MotionPlot):
            plot.set_class(plot.quantity == quantity, "-shown")
            self.call_after_refresh(plot.redraw)

    def next_quantity(self) -> str:
        i = QUANTITIES.index(self.shown)
        self.shown = QUANTITIES[(i + 1) % len(QUANTITIES)]
        return self.shown

    def show(self, result: AxisResult | None) -> None:
        for plot in self.query(MotionPlot):
            plot.show(result)

    def plot(self, quantity: str) -> MotionPlot:
        return self.query_one(f"#plot-{quantity}", MotionPlot)
