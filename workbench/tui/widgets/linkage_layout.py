"""Where the Linkage view puts the drawing, the figures and the plots, for a terminal size.

A pure function of sizes (no Textual), so it can be checked on its own:
plots take a third of the height (within `PLOT_ROWS`); the drawing goes
beside the readout and the peaks table, or above them — they then stand
side by side under it — when that draws the linkage clearly larger (a
long, flat linkage such as a slider-crank on a wide screen).  Beside, the
drawing is as wide as its scale needs, and gives way to the table's
share-of-limit bars while it keeps `WIDE_DRAWING` columns.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .scale_raster import CELL_ASPECT

PLOT_ROWS = (7, 13)  # least and most rows for the plots; a third of the view between them
READOUT_WIDTH = 52  # columns the readout needs ("acceleration -12,345 deg/s² · jerk -1.234e+06 deg/s³")
SIDE_FRAME = 2  # the side's left padding and its scroll bar
MIN_DRAWING = 14  # columns: at 80 the figures come first (z gives the drawing the whole view)
WIDE_DRAWING = 40  # the drawing gives way to the bars only while it keeps this many columns
ABOVE_GAIN = 1.2  # the drawing goes above only when that draws it this much larger
MIN_DRAWING_ROWS = 6  # rows the drawing keeps above the readout and the table

# The view's parts and the classes `arrange` and the zoom key switch: "-above" on #lk-top (the drawing
# above the figures, which then stand side by side), "-zoom" on the view (the drawing and the readout only).
VIEW_CSS = """
LinkageView { layout: vertical; }
#lk-top { height: 1fr; }
#lk-drawing { width: 30; height: 100%; }
#lk-drawing:focus { background: $boost; }
#lk-side { width: 1fr; height: 1fr; padding: 0 0 0 1; scrollbar-size-vertical: 1; }
#lk-info { height: auto; margin-bottom: 1; }
#lk-readout { height: auto; }
.lk-legend { height: auto; }
#lk-legend { display: none; }
#lk-legend-last { margin-top: 1; }
#lk-top.-above #lk-legend { display: block; }
#lk-top.-above #lk-legend-last { display: none; }
#lk-top.-above { layout: vertical; }
#lk-top.-above #lk-drawing { width: 100%; height: 1fr; }
#lk-top.-above #lk-side { layout: horizontal; width: 100%; height: 12; }
#lk-top.-above #lk-info { width: 54; margin-bottom: 0; padding-right: 2; }
#lk-top.-above #lk-report { width: 1fr; }
LinkageView.-zoom #lk-report, LinkageView.-zoom #lk-legend-last {
    display: none;
}
LinkageView.-zoom #lk-top { layout: vertical; }
LinkageView.-zoom #lk-drawing { height: 1fr; }
LinkageView.-zoom #lk-side { height: auto; max-height: 8; }
LinkageView.-zoom #lk-legend { display: block; }
#lk-plots { height: 9; }
#lk-plots LinkagePlot { width: 1fr; }
#lk-empty { padding: 1 2; }
"""


@dataclass(frozen=True)
class Arrangement:
    """Plot rows (0: none), whether the drawing is above the figures, the figures' height when it
    is (rows), and the drawing's width beside them (columns; None when above: the whole width)."""

    plot_rows: int
    above: bool
    side_rows: int | None
    drawing_width: int | None


def arrange(width: int, height: int, extent: tuple[float, float], table: int, wide_table: int,
            figure_rows: int, plots: bool) -> Arrangement:
    """The arrangement for a view of `width` × `height` cells showing a linkage whose drawing spans
    `extent` (mm across, mm down), a peaks table `table` columns wide (`wide_table` with its bars)
    and figures `figure_rows` tall when side by side; `plots`: whether there are plots to show."""
    plot_rows = max(PLOT_ROWS[0], min(PLOT_ROWS[1], height // 3)) if plots else 0
    top = max(1, height - 1 - plot_rows)
    sx, sy = max(extent[0], 1e-9), max(extent[1], 1e-9)
    side = max(READOUT_WIDTH, table) + SIDE_FRAME
    beside = max(MIN_DRAWING, width - side)
    scale_beside = min(beside / sx, top * CELL_ASPECT / sy)
    scale_above = min(width / sx, (top - figure_rows) * CELL_ASPECT / sy) if width >= side + READOUT_WIDTH else 0.0
    if top - figure_rows >= MIN_DRAWING_ROWS and scale_above > ABOVE_GAIN * scale_beside:
        return Arrangement(plot_rows, True, figure_rows, None)
    needed = int(math.ceil(top * CELL_ASPECT * sx / sy)) + 1
    drawing = min(beside, needed)
    wide_side = wide_table + SIDE_FRAME
    if width - drawing < wide_side and width - wide_side >= WIDE_DRAWING:
        drawing = width - wide_side  # room for the share-of-limit bars
    return Arrangement(plot_rows, False, None, max(MIN_DRAWING, drawing))
