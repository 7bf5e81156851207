"""All axes of the machine over one cycle on one master-angle scale.

Each axis is a band: a strip of its segments (number, law, ↑ rise / ↓ return
and end position; motion drawn ━, dwell ─) over a trace of its position,
normalized to the axis's own travel, in eighth-blocks.  A cursor column
marks one master angle; `TimingReadout` lists every axis at that angle.
"""

from __future__ import annotations

import math

import numpy as np
from rich.table import Table
from rich.text import Text
from textual.widget import Widget
from textual.widgets import Static

from ...axisreport import percent
from ...editing import segment_ends
from ...projectfile import Project
from ..compute import AxisResult
from ..format import OK_STYLE, OVER_STYLE, degrees, number, tidy, unit_of

NAME_WIDTH = 14  # columns for the axis name at the left of each band
TRACE_ROWS = 2  # rows of position trace per axis (16 levels in eighth-blocks)
BLOCKS = " ▁▂▃▄▅▆▇█"
SHORT_LAW = {"dwell": "dwell", "constant-velocity": "const-v", "harmonic": "harm", "cycloidal": "cyc",
             "poly345": "345", "poly4567": "4567", "modified-trapezoid": "mtrap",
             "modified-sine": "msine", "polynomial": "poly", "blend": "blend"}
MOTION_STYLE = "bold bright_cyan"
CURSOR_STYLE = "reverse"


def columns_to_angles(width: int) -> np.ndarray:
    """Master angle (deg) at the centre of each of `width` columns spanning 0–360°."""
    return (np.arange(width) + 0.5) * (360.0 / width)


def column_of(angle: float, width: int) -> int:
    return min(width - 1, max(0, int(angle / 360.0 * width)))


def normalized_position(result: AxisResult, angles: np.ndarray) -> np.ndarray:
    """Position at `angles` scaled to 0…1 over the axis's travel in the cycle (0 where it never moves)."""
    theta, s = result.curves.theta, result.curves.position
    values = np.interp(angles, theta, s)
    lo, hi = float(s.min()), float(s.max())
    if hi - lo <= 1e-12 * max(1.0, abs(hi)):
        return np.zeros_like(values)
    return (values - lo) / (hi - lo)


def trace_rows(norm: np.ndarray, rows: int = TRACE_ROWS) -> list[str]:
    """Eighth-block rows, top first, for values in 0…1 (a floor of ▁ keeps the trace visible)."""
    levels = np.clip(np.rint(norm * 8 * rows), 1, 8 * rows).astype(int)
    out = []
    for r in range(rows):
        part = np.clip(levels - 8 * (rows - 1 - r), 0, 8)
        out.append("".join(BLOCKS[k] for k in part))
    return out


def segment_strip(project: Project, axis_name: str, width: int) -> Text:
    """The segments of an axis laid along `width` columns."""
    axis = project.axis(axis_name)
    text = Text()
    theta = 0.0
    for number_, (seg, (p0, p1)) in enumerate(zip(axis.segments, segment_ends(axis)), start=1):
        a = column_of(theta, width)
        theta += seg.span
        b = width if theta >= 360.0 - 1e-9 else column_of(theta, width)
        cells = max(0, b - a)
        if cells == 0:
            continue
        moving = seg.law != "dwell"
        mark = ("↑" if p1 > p0 else "↓" if p1 < p0 else "") + (f"{p1:g}" if moving else "")
        label = f"│{number_} {SHORT_LAW.get(seg.law, seg.law)}{' ' + mark if mark else ''} "
        fill = "━" if moving else "─"
        body = (label + fill * cells)[:cells]
        text.append(body, style=MOTION_STYLE if moving else "dim")
    return text


class TimingChart(Widget, can_focus=True):
    """The bands of every axis; `angle` is the cursor's master angle in deg."""

    DEFAULT_CSS = """
    TimingChart { height: auto; }
    TimingChart:focus { background: $boost; }
    """

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.project: Project | None = None
        self.results: dict[str, AxisResult] = {}
        self.angle = 0.0

    def show(self, project: Project | None, results: dict[str, AxisResult]) -> None:
        self.project, self.results = project, results
        self.refresh(layout=True)

    def set_angle(self, angle: float) -> None:
        self.angle = angle % 360.0
        self.refresh()

    def get_content_height(self, container, viewport, width) -> int:
        axes = len(self.project.axes) if self.project else 0
        return 1 + axes * (1 + TRACE_ROWS + 1)

    def render(self) -> Text:
        width = max(10, self.size.width - NAME_WIDTH)
        out = Text(no_wrap=True, overflow="crop")
        out.append_text(self._scale(width))
        if self.project is None:
            return out
        cursor = column_of(self.angle, width)
        angles = columns_to_angles(width)
        for axis in self.project.axes:
            result = self.results.get(axis.name)
            out.append("\n")
            out.append(f"{axis.name[:NAME_WIDTH - 1]:<{NAME_WIDTH}}", style="bold")
            out.append_text(self._with_cursor(segment_strip(self.project, axis.name, width), cursor))
            rows = trace_rows(normalized_position(result, angles)) if result else [" " * width] * TRACE_ROWS
            for r, row in enumerate(rows):
                out.append("\n")
                label = f" [{axis.unit}]" if r == 0 else ""
                out.append(f"{label:<{NAME_WIDTH}}", style="dim")
                out.append_text(self._with_cursor(Text(row, style="bright_green"), cursor))
            out.append("\n")
        return out

    @staticmethod
    def _with_cursor(text: Text, column: int) -> Text:
        text.stylize(CURSOR_STYLE, column, column + 1)
        return text

    def _scale(self, width: int) -> Text:
        line = [" "] * width
        for deg in (0, 90, 180, 270, 360):
            label = f"{deg}°"
            col = min(width - len(label), column_of(deg, width))
            line[col:col + len(label)] = label
        text = Text(f"{'master':<{NAME_WIDTH}}", style="dim")
        text.append("".join(line[:width]), style="dim")
        return text


WIDE_READOUT = 100  # columns from which the readout has room for the cycle column
NARROW_CAPTION = "✓ ✗ the axis within / over its limits over the cycle"
CYCLE_HEADER = "over the cycle"  # the last column: not at the cursor, the axis's most used limit


def cycle_verdict(result: AxisResult) -> Text:
    """The axis's most used limit over the whole cycle: "✗ acceleration 133 %", "✓ jerk 74 %", or
    "· no limits"."""
    checks = result.report.checks
    if not checks:
        return Text("· no limits", style="dim")
    worst = max(checks, key=lambda c: c.used)
    share = "∞ %" if math.isinf(worst.used) else percent(worst.used)
    ok = result.report.ok
    return Text(f"{'✓' if ok else '✗'} {worst.quantity} {share}", style=OK_STYLE if ok else OVER_STYLE)


class TimingReadout(Static):
    """Every axis at the cursor's master angle: segment, position, velocity, acceleration, and
    whether the axis keeps within its limits over the cycle."""

    DEFAULT_CSS = "TimingReadout { height: auto; }"

    def show(self, project: Project | None, results: dict[str, AxisResult], angle: float) -> None:
        wide = self.app.size.width >= WIDE_READOUT  # the terminal's columns
        table = Table(box=None, padding=(0, 1), show_edge=False, header_style="bold",
                      title=Text(f"at master {degrees(angle)}", style="bold"), title_justify="left",
                      caption=None if wide else NARROW_CAPTION, caption_justify="left", caption_style="dim")
        headers = ("axis", "segment", "position", "velocity", "acceleration") + ((CYCLE_HEADER,) if wide else ())
        for header in headers:
            table.add_column(header, justify="left" if header in ("axis", "segment", CYCLE_HEADER) else "right")
        if project is not None:
            for axis in project.axes:
                result = results.get(axis.name)
                if result is None:
                    continue
                theta = result.curves.theta
                k = int(np.argmin(np.abs(theta - angle)))
                seg = int(np.searchsorted(np.array(result.bounds), angle, side="right"))
                law = result.report.segments[seg].law
                curves = result.curves
                row = [number(tidy(float(values[k]), float(np.max(np.abs(values)))),
                              unit_of(quantity, axis.unit))
                       for quantity, values in (("position", curves.position), ("velocity", curves.velocity),
                                                ("acceleration", curves.acceleration))]
                verdict = cycle_verdict(result)
                if wide:
                    table.add_row(axis.name, f"{seg + 1} {law}", *row, verdict)
                else:  # the verdict's mark before the name; the whole of it where it fits
                    name = Text.assemble((verdict.plain[0], verdict.style), " ", axis.name)
                    table.add_row(name, f"{seg + 1} {law}", *row)
        self.update(table)
