"""Plots of a quantity against cam angle with limit lines and a cursor (Cam and Loads views).

`AnglePlot` reuses the Axes view's `MotionPlot` drawing (braille lines,
ticks sized to the height, 0–360° scale) for any curve against cam angle:
it takes `Curve`s and horizontal `RefLine`s and marks the cursor angle with
a vertical line.  A curve that runs off the y range (a radius of curvature
going through infinity at an inflection) is clipped at the edge and broken
where it jumps from one edge to the other, so no false vertical line
appears.  `pressure_angle_plot` and `radius_plot` build the Cam view's two
plots from a `CamEntry`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from rich.markup import escape
from textual_hires_canvas import Canvas
from textual_plot import HiResMode

from ...axisreport import fmt
from ...camfile import COMMON_PRACTICE
from ..sampling import downsample_minmax
from .braille import BRAILLE_BASE, braille_cells
from .cam_data import MM, CamEntry
from .cam_verdicts import angle, num
from .motion_plots import BRAILLE_DOTS_X, ROWS_PER_TICK, MotionPlot

CURSOR_STYLE = "bold bright_white"
LIMIT_STYLE = "red"  # limit lines
WARN_LINE_STYLE = "bright_yellow"  # a threshold that is not a limit (undercut, zero contact)
# kind of horizontal line: (style, pattern as (period, cells drawn) along the line, word for titles).
# Lines differ by pattern as well as colour, so titles name the pattern: it reads in 16 colours
# (where a theme may render "red" as magenta) and without colour.
LINE_KINDS = {
    "limit": (LIMIT_STYLE, (3, 2), "dashed"),
    "threshold": (WARN_LINE_STYLE, (2, 1), "dotted"),
    "zero": ("bright_black", (4, 1), ""),
}
TITLE_GAP = 1  # columns kept free after a title, so two plots' titles side by side stay apart
PAD = 0.06  # share of the y range left free above and below the data
RADIUS_CAP = 2.0  # the radius plot shows ± this many cam sizes; larger radii are near-flat anyway


@dataclass(frozen=True)
class Curve:
    """y against cam angle (deg); `style` its colour."""

    theta: np.ndarray
    values: np.ndarray
    style: str


@dataclass(frozen=True)
class RefLine:
    """A horizontal line at `value`; `kind` one of `LINE_KINDS` ("limit", "threshold", "zero")."""

    value: float
    kind: str = "limit"

    @property
    def style(self) -> str:
        return LINE_KINDS[self.kind][0]


def pattern_word(kind: str) -> str:
    """How a line of `kind` looks, for titles: "dashed", "dotted"."""
    return LINE_KINDS[kind][2]


@dataclass(frozen=True)
class PlotSpec:
    """Everything one plot shows: title parts (words, units; the first always shown, the
    others as far as the width allows), curves, lines, y range (None: fit)."""

    parts: tuple[str, ...]
    curves: tuple[Curve, ...] = ()
    lines: tuple[RefLine, ...] = ()
    y_range: tuple[float, float] | None = None
    extras: dict = field(default_factory=dict)

    @property
    def title(self) -> str:
        return "  ".join(self.parts)

    def fitted(self, width: int) -> str:
        """The title parts that fit in `width` columns, in order."""
        out = self.parts[0]
        for part in self.parts[1:]:
            if len(out) + 2 + len(part) > width:
                break
            out += "  " + part
        return out


def runs(values: np.ndarray, lo: float, hi: float) -> list[slice]:
    """Slices of `values` to draw as unbroken lines within [lo, hi]: breaks at non-finite
    values and where the curve leaves one edge and comes back at the other."""
    v = np.asarray(values, dtype=float)
    finite = np.isfinite(v)
    side = np.where(v > hi, 1, np.where(v < lo, -1, 0))
    jump = (side[:-1] * side[1:] < 0) | ~finite[:-1] | ~finite[1:]
    cuts = np.flatnonzero(jump) + 1
    out, start = [], 0
    for cut in [*cuts.tolist(), v.size]:
        piece = slice(start, cut)
        if np.any(finite[piece]):
            # drop non-finite ends of the piece
            idx = np.flatnonzero(finite[piece]) + start
            out.append(slice(int(idx[0]), int(idx[-1]) + 1))
        start = cut
    return out


class AnglePlot(MotionPlot):
    """A quantity against cam angle 0–360°, with reference lines and a cursor."""

    def __init__(self, **kwargs):
        super().__init__("angle", **kwargs)
        self.spec: PlotSpec | None = None
        self.cursor: float | None = None
        """Cursor cam angle in deg (None: no cursor)."""
        self._line_patterns: dict[int, tuple[int, int]] = {}
        """Dash pattern (period, cells drawn) of each reference line's dataset, by id."""

    def show_spec(self, spec: PlotSpec | None, cursor: float | None = None) -> None:
        self.spec, self.cursor = spec, cursor
        self.redraw()

    def set_cursor(self, cursor: float | None) -> None:
        self.cursor = cursor
        self.redraw()

    def show(self, result) -> None:  # the axis-result entry point of MotionPlot is not used here
        return

    def redraw(self) -> None:
        if not self.is_mounted or not self.display or self.size.width == 0:
            return
        self._needs_canvas_resize = True
        self.clear()
        spec = self.spec
        if spec is None:
            self.title = ""
            self.set_ylabel("")
            return
        lo, hi = spec.y_range or self._fit(spec)
        self.set_ylimits(lo, hi)
        rows = max(1, self.size.height - self.margin_top - self.margin_bottom)
        self._y_tick_format.count = max(2, rows // ROWS_PER_TICK + 1)
        columns = max(8, self.size.width - self.margin_left - 2)
        self._line_patterns = {}
        for line in sorted(spec.lines, key=lambda ref: ref.kind == "limit"):  # limits last: on top
            if lo <= line.value <= hi:
                self.plot([0.0, 360.0], [line.value, line.value], line_style=line.style,
                          hires_mode=HiResMode.BRAILLE)
                self._line_patterns[id(self._datasets[-1])] = LINE_KINDS[line.kind][1]
        drawn = 0
        for curve in spec.curves:
            for piece in runs(curve.values, lo, hi):
                x, y = curve.theta[piece], np.clip(curve.values[piece], lo, hi)
                xs, ys = downsample_minmax(x, y, columns * BRAILLE_DOTS_X)
                drawn += int(xs.size)
                self.plot(xs, ys, line_style=curve.style, hires_mode=HiResMode.BRAILLE)
        self.points_drawn = drawn
        if self.cursor is not None:
            self.add_v_line(self.cursor % 360.0, CURSOR_STYLE)
        self.title = spec.fitted(self.size.width - TITLE_GAP)
        self.set_ylabel(escape(self.title))

    def _render_line_plot(self, dataset) -> None:
        """Braille lines; a reference line is drawn in its dash pattern and its dots join those of
        another reference line in the same cell (two limits sharing a row of cells both stay
        visible; the later gives the colour), while a curve takes its cells over (so no line
        appears in the curve's colour)."""
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
        pattern = self._line_patterns.get(id(dataset))
        for c, r, ch in zip(columns.tolist(), rows.tolist(), chars):
            if pattern is not None and c % pattern[0] >= pattern[1]:
                continue
            old = buffer[r][c]
            if pattern is not None and len(old) == 1 and BRAILLE_BASE <= ord(old) < BRAILLE_BASE + 0x100:
                ch = chr(ord(old) | ord(ch))
            buffer[r][c] = ch
            styles[r][c] = dataset.line_style
        canvas.refresh()

    def _render_y_label(self) -> None:
        """The title on a cleared top margin (a shorter title must not leave the end of a longer one)."""
        self.query_one("#margin-top", Canvas).reset()
        super()._render_y_label()

    @staticmethod
    def _fit(spec: PlotSpec) -> tuple[float, float]:
        values = [c.values[np.isfinite(c.values)] for c in spec.curves]
        values += [np.array([line.value]) for line in spec.lines]
        v = np.concatenate(values) if values else np.zeros(1)
        lo, hi = float(v.min()), float(v.max())
        if hi - lo < 1e-12 * max(1.0, abs(hi)):
            lo, hi = lo - 1.0, hi + 1.0
        pad = PAD * (hi - lo)
        return lo - pad, hi + pad


# --- the Cam view's plots ------------------------------------------------------------


def _source_mark(entry: CamEntry, quantity: str) -> str:
    return "*" if entry.study.limit_source.get(quantity) == COMMON_PRACTICE else ""


def pressure_angle_plot(entry: CamEntry) -> PlotSpec:
    """Pressure angle (deg, signed) around the cam, with ± the limit."""
    study = entry.study
    a = study.analysis
    theta = np.degrees(a.theta)
    phi = np.degrees(a.pressure_angle)
    theta, phi = np.append(theta, 360.0), np.append(phi, phi[:1])
    largest = math.degrees(a.max_pressure_angle.value)
    parts = ["pressure angle [°]"]
    lines = [RefLine(0.0, "zero")]
    top = max(largest, 1.0)
    limit = study.limits.pressure_angle
    if limit is not None:
        deg = math.degrees(limit)
        parts.append(f"limit ±{fmt(deg)}°{_source_mark(entry, 'pressure_angle')} ({pattern_word('limit')})")
        lines += [RefLine(deg), RefLine(-deg)]
        top = max(top, deg)
    parts.append(f"largest {num(largest)}° at {angle(a.max_pressure_angle.at)}")
    top *= 1 + PAD
    return PlotSpec(tuple(parts), (Curve(theta, phi, "bright_cyan"),), tuple(lines), (-top, top),
                    {"largest": largest})


def radius_plot(entry: CamEntry) -> PlotSpec:
    """Radius of curvature (mm) around the cam: the pitch curve of a roller follower (what the
    curvature ratio and undercut are judged on), the profile of a flat face; + convex, − concave."""
    study = entry.study
    a, f = study.analysis, study.cam.follower
    theta = np.append(np.degrees(a.theta), 360.0)
    roller = a.pitch_radius is not None
    rho = (a.pitch_radius if roller else a.profile_radius) * MM
    rho = np.append(rho, rho[:1])
    radii = a.pitch_radii if roller else a.profile_radii
    least = radii.convex.value * MM
    parts = ["pitch ρ [mm]" if roller else "profile ρ [mm]"]
    lines = [RefLine(0.0, "zero")]
    marks = []
    limits = study.limits
    if roller and limits.curvature_ratio is not None and f.roller_radius > 0:
        value = limits.curvature_ratio * f.roller_radius * MM
        marks.append((value, "limit", f"limit ≥ {fmt(value)} mm{_source_mark(entry, 'curvature_ratio')}"))
    if limits.min_radius is not None:  # on the profile: for a roller, pitch radius = profile + r
        value = limits.min_radius * MM + (f.roller_radius * MM if roller else 0.0)
        marks.append((value, "limit", f"limit ≥ {fmt(value)} mm"))
    if roller and f.roller_radius > 0:
        marks.append((f.roller_radius * MM, "threshold", f"undercut ≤ {fmt(f.roller_radius * MM)} mm"))
    for value, kind, words in marks:
        lines.append(RefLine(value, kind))
        parts.append(f"{words} ({pattern_word(kind)})")
    if not roller:
        parts.append("cusp ≤ 0")
    parts.append(f"least convex {num(least)} mm at {angle(radii.convex.at)}")
    cap = RADIUS_CAP * a.size * MM
    visible = rho[np.isfinite(rho) & (np.abs(rho) <= cap)]  # radii beyond the cap are near-straight
    lo = min(float(visible.min()) if visible.size else 0.0, 0.0)
    hi = max(float(visible.max()) if visible.size else cap, *(m[0] for m in marks), 1.0)
    pad = PAD * (hi - lo)
    return PlotSpec(tuple(parts), (Curve(theta, rho, "bright_green"),), tuple(lines), (lo - pad, hi + pad),
                    {"least": least})
