"""The Axes view's plots: position, velocity, acceleration and jerk against master angle.

`AxisPlot` is a Line API widget: from an axis result it builds a `Chart`
(the curve, its y range, the ± limit, the segment boundaries, the title),
draws it with numpy into a grid of cells (`axis_chart.draw`) and keeps
one strip per row until the chart or the size changes.  A result whose
chart is the same as the one on screen (the position curve after a speed
change, every curve of an axis that is not on view) is not drawn again.
The strips are built when the screen is painted, so any number of results
arriving within one frame cost one drawing.

Limit lines are dashed and the title says so ("limit ±900 (dashed)"),
so nothing rests on colour (a 16-colour theme may show red as magenta).
`PlotPanel` shows one plot at a time in a short terminal and all four
when there is room.
"""

from __future__ import annotations

import numpy as np
from rich.segment import Segment
from rich.style import Style
from textual.app import ComposeResult
from textual.containers import Grid
from textual.reactive import reactive
from textual.strip import Strip
from textual.widget import Widget

from ...axisreport import fmt
from ..compute import QUANTITIES, AxisResult
from ..format import unit_of
from .axis_chart import CURVE, KINDS, LIMIT, Chart, draw

CURVE_STYLE = {"position": "bright_cyan", "velocity": "bright_green",
               "acceleration": "bright_yellow", "jerk": "bright_blue"}
LIMIT_STYLE = "red"  # limit lines; they are dashed and the title names the pattern as well
LIMIT_PATTERN = "dashed"  # how a limit line looks, for titles (`axis_chart.LIMIT_DASH`)
BOUNDARY_STYLE = "bright_black"
PAD = 0.05  # share of the y range left free above and below the data
MIN_ROWS_FOR_GRID = 14  # below this height only one plot is shown at a time
MIN_COLUMNS_FOR_GRID = 100  # 2×2 grid needs this width; narrower stacks them


def chart_of(result: AxisResult, quantity: str) -> Chart:
    """What the plot of `quantity` shows for an axis result: y range fitted to the curve and
    its ± limit (with `PAD` either side), the title with unit, peak and limit in words."""
    values = result.curves.of(quantity)
    lo, hi = float(np.min(values)), float(np.max(values))
    limit = None
    if quantity != "position":
        check = next((c for c in result.report.checks if c.quantity == quantity), None)
        if check is not None:
            limit = check.limit
            lo, hi = min(lo, -limit), max(hi, limit)
    if hi - lo < 1e-12 * max(1.0, abs(hi)):
        lo, hi = lo - 1.0, hi + 1.0
    pad = PAD * (hi - lo)
    return Chart(title_of(result, quantity, limit), result.curves.theta, values,
                 lo - pad, hi + pad, limit, tuple(result.bounds))


def title_of(result: AxisResult, quantity: str, limit: float | None) -> str:
    unit = unit_of(quantity, result.unit)
    if quantity == "position":
        s = result.curves.position
        return f"position [{unit}]  {fmt(float(s.min()))} … {fmt(float(s.max()))}"
    peak = result.report.peaks[quantity]
    text = f"{quantity} [{unit}]  peak "
    text += "infinite" if peak.infinite else fmt(peak.value)
    if limit is not None:
        text += f"  limit ±{fmt(limit)} ({LIMIT_PATTERN})"
    return text


class AxisPlot(Widget, can_focus=False):
    """One quantity of one axis against master angle (deg), painted from cached strips."""

    COMPONENT_CLASSES = {"axis-plot--frame", "axis-plot--tick"}

    DEFAULT_CSS = """
    AxisPlot { height: 1fr; min-height: 5; }
    AxisPlot > .axis-plot--frame { color: $secondary; }
    AxisPlot > .axis-plot--tick { color: $secondary; text-style: bold; }
    """

    def __init__(self, quantity: str, **kwargs):
        super().__init__(**kwargs)
        self.quantity = quantity
        self.result: AxisResult | None = None
        """The axis result last shown."""
        self.chart: Chart | None = None
        """What is drawn (None: nothing yet)."""
        self.builds = 0
        """How many times the strips were built (a chart or size change each; for tests)."""
        self._strips: list[Strip] = []
        self._built_for: tuple | None = None
        """(chart, size) the strips belong to."""
        self._style_cache: tuple = (None, [])
        """(the widget's base style, the styles of `KINDS` on it)."""

    @property
    def title(self) -> str:
        """The line above the plot: quantity, unit, peak and limit in words."""
        return self.chart.title if self.chart is not None else ""

    @property
    def points_drawn(self) -> int:
        """Points of the curve handed to the rasterizer."""
        return int(self.chart.values.size) if self.chart is not None else 0

    def show(self, result: AxisResult | None) -> None:
        """Draw `result`'s curve (when it differs from the one on screen)."""
        if result is self.result:
            return
        self.result = result
        chart = chart_of(result, self.quantity) if result is not None else None
        if chart is None and self.chart is None or chart is not None and chart.same(self.chart):
            return
        self.chart = chart
        self.refresh()

    def notify_style_update(self) -> None:
        self._built_for = None  # theme or CSS changed: colours must be looked up again
        self._style_cache = (None, [])
        super().notify_style_update()

    def render_line(self, y: int) -> Strip:
        size = self.size
        if self._built_for != (self.chart, size):
            self._strips = self._build(size.width, size.height)
            self._built_for = (self.chart, size)
        if y < len(self._strips):
            return self._strips[y]
        return Strip.blank(size.width, self.rich_style)

    def _styles(self) -> list[Style]:
        """Rich style of each cell kind (`axis_chart.KINDS`), on the widget's own colours
        (looked up again when those change)."""
        base = self.rich_style
        if self._style_cache[0] != base:
            self._style_cache = (base, self._styles_on(base))
        return self._style_cache[1]

    def _styles_on(self, base: Style) -> list[Style]:
        curve = CURVE_STYLE.get(self.quantity, "")
        extra = {
            "frame": self.get_component_rich_style("axis-plot--frame", partial=True),
            "tick": self.get_component_rich_style("axis-plot--tick", partial=True),
            "boundary": Style.parse(BOUNDARY_STYLE),
            "limit": Style.parse(LIMIT_STYLE),
            "curve": Style.parse(curve) if curve else Style(),
        }
        return [base + extra[kind] if kind in extra else base for kind in KINDS]

    def _build(self, width: int, height: int) -> list[Strip]:
        """One strip per row: runs of cells of one kind become one segment, and a blank cell
        joins the run before it (a space shows only the background, the same in every style),
        so a dashed line is one segment, not one per dash."""
        self.builds += 1
        codes, kinds = draw(self.chart, width, height)
        styles = self._styles()
        if codes.size:
            blank = codes == ord(" ")
            blank[:, 0] = False  # a row's first cell keeps its own kind
            columns = np.where(blank, 0, np.arange(width))
            kinds = np.take_along_axis(kinds, np.maximum.accumulate(columns, axis=1), axis=1)
        strips = []
        for code_row, kind_row in zip(codes, kinds):
            text = code_row.tobytes().decode("utf-32-le")
            cuts = [0, *(np.flatnonzero(np.diff(kind_row)) + 1).tolist(), width]
            segments = [Segment(text[a:b], styles[kind_row[a]]) for a, b in zip(cuts[:-1], cuts[1:])]
            strips.append(Strip(segments, width))
        return strips


class PlotPanel(Grid):
    """Up to four `AxisPlot`s; `shown` is the one on view when only one fits."""

    DEFAULT_CSS = """
    PlotPanel { height: 1fr; grid-size: 1; grid-gutter: 0 1; }
    PlotPanel.-grid { grid-size: 2 2; }
    PlotPanel.-stack { grid-size: 1 4; }
    PlotPanel.-single AxisPlot { display: none; }
    PlotPanel.-single AxisPlot.-shown { display: block; }
    """

    shown: reactive[str] = reactive("velocity")
    """The quantity on view when the panel shows one plot at a time."""

    def compose(self) -> ComposeResult:
        for q in QUANTITIES:
            yield AxisPlot(q, id=f"plot-{q}")

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
        for plot in self.query(AxisPlot):
            plot.set_class(plot.quantity == quantity, "-shown")

    def next_quantity(self) -> str:
        i = QUANTITIES.index(self.shown)
        self.shown = QUANTITIES[(i + 1) % len(QUANTITIES)]
        return self.shown

    def show(self, result: AxisResult | None) -> None:
        for plot in self.query(AxisPlot):
            plot.show(result)

    def plot(self, quantity: str) -> AxisPlot:
        return self.query_one(f"#plot-{quantity}", AxisPlot)
