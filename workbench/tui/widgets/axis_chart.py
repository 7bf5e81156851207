"""One Axes-view plot as a grid of character cells, computed with numpy (no UI imports).

`draw(chart, width, height)` lays out a title row, y tick labels, a heavy
frame with outward tick marks, x labels every 90° and, inside the frame,
the curve in braille dots, the ± limit as dashed braille lines and the
segment boundaries as thin vertical lines.  It returns two integer arrays
of the same shape: the character code of every cell and what the cell
shows (`KINDS`), from which a widget makes one styled strip per row.
Where a curve and a limit line share a cell the curve takes it (only the
curve's dots, in the curve's colour); a boundary only fills empty cells,
so it never hides the curve.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .braille import BRAILLE_BASE, DOT_BITS, DOTS_X, DOTS_Y, braille_grid

# what a cell shows (index into the widget's styles)
TEXT, FRAME, TICK, BOUNDARY, LIMIT, CURVE = range(6)
KINDS = ("text", "frame", "tick", "boundary", "limit", "curve")

LEFT = 7  # columns left of the frame for y tick labels (6 characters and a space)
ROWS_PER_TICK = 3  # a y tick label every 3 rows at most, so labels never touch
MIN_HEIGHT = 5  # title, frame top, one data row, frame bottom, x labels
MIN_DATA_COLUMNS = 4  # narrower than this only the title is drawn
LIMIT_DASH = (3, 2)  # limit lines: of every 3 cells along the line the first 2 drawn ("dashed")
X_TICKS = (0.0, 90.0, 180.0, 270.0, 360.0)  # master angle, deg
CYCLE = 360.0  # deg: the x axis spans one cycle

HEAVY = {"h": "━", "v": "┃", "tl": "┏", "tr": "┓", "bl": "┗", "br": "┛",
         "tick_up": "┻", "tick_down": "┳", "tick_left": "┫", "tick_right": "┣",
         "join_top": "┯", "join_bottom": "┷", "tick_join_top": "╇", "tick_join_bottom": "╈"}
LIGHT_VERTICAL = "│"  # a segment boundary inside the frame


@dataclass(frozen=True, eq=False)
class Chart:
    """Everything one plot shows: curve `values` against master angle `theta` (deg),
    the y range `lo`…`hi` in the curve's unit, the ± `limit` (None: no limit lines),
    segment `bounds` (deg) and the `title` line."""

    title: str
    theta: np.ndarray
    values: np.ndarray
    lo: float
    hi: float
    limit: float | None = None
    bounds: tuple[float, ...] = ()

    def same(self, other: Chart | None) -> bool:
        """True when `other` draws exactly the same picture (so it need not be drawn again)."""
        return (other is not None and self.title == other.title and self.lo == other.lo
                and self.hi == other.hi and self.limit == other.limit and self.bounds == other.bounds
                and np.array_equal(self.theta, other.theta) and np.array_equal(self.values, other.values))


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


def y_ticks(scale: Scale, count: int) -> list[float]:
    """About `count` ticks at 1-2-5 steps, fewer where two would share a row: a label names the
    values of its own row (with two ticks in a row, a "-10k" would sit on the zero line)."""
    while True:
        ticks = nice_ticks(scale.lo, scale.hi, count)
        rows = [scale.row(t) for t in ticks if 0 <= scale.row(t) < scale.rows]
        if len(set(rows)) == len(rows) or count <= 2:
            return ticks
        count -= 1


def nice_ticks(lo: float, hi: float, count: int) -> list[float]:
    """About `count` ticks at 1-2-5 steps covering [lo, hi]."""
    if hi <= lo or count < 2:
        return [lo]
    raw = (hi - lo) / count
    power = 10 ** math.floor(math.log10(raw))
    step = max(m * power for m in (1, 2, 2.5, 5, 10) if m * power <= raw * (1 + 1e-9))
    first = math.ceil(lo / step - 1e-9) * step
    return [float(t) for t in np.arange(first, hi + step * 1e-6, step)]


@dataclass(frozen=True)
class Scale:
    """Data → dots inside the frame: `columns` × `rows` cells, y from `lo` (bottom) to `hi` (top)."""

    columns: int
    rows: int
    lo: float
    hi: float

    def x_dots(self, theta: np.ndarray) -> np.ndarray:
        """Master angle (deg) → dot column, as a float whose floor is the nearest dot."""
        return np.asarray(theta, dtype=float) / CYCLE * (self.columns * DOTS_X - 1) + 0.5

    def y_dots(self, value: np.ndarray) -> np.ndarray:
        """Value → dot row (0 at the top), as a float whose floor is the nearest dot."""
        return (self.hi - np.asarray(value, dtype=float)) / (self.hi - self.lo) * (self.rows * DOTS_Y - 1) + 0.5

    def column(self, theta: float) -> int:
        return int(math.floor(float(self.x_dots(theta)))) // DOTS_X

    def row(self, value: float) -> int:
        return int(math.floor(float(self.y_dots(value)))) // DOTS_Y

    def dots(self, theta: np.ndarray, values: np.ndarray) -> np.ndarray:
        """Braille masks (rows × columns) of the polyline; non-finite points left out."""
        ok = np.isfinite(values)
        x, y = self.x_dots(theta[ok]), self.y_dots(values[ok])
        return braille_grid(x / DOTS_X, y / DOTS_Y, self.columns, self.rows)

    def level(self, value: float) -> np.ndarray:
        """Braille masks of a line at `value` across the whole width (what `dots` gives for a
        horizontal line from 0 to 360°, without stepping along it)."""
        masks = np.zeros((self.rows, self.columns), dtype=np.int64)
        dot = int(math.floor(float(self.y_dots(value))))
        if 0 <= dot < self.rows * DOTS_Y:
            masks[dot // DOTS_Y, :] = DOT_BITS[dot % DOTS_Y, 0] | DOT_BITS[dot % DOTS_Y, 1]
        return masks


def _codes(text: str) -> np.ndarray:
    return np.frombuffer(text.encode("utf-32-le"), dtype=np.uint32)


def _put(codes: np.ndarray, kinds: np.ndarray, row: int, col: int, text: str, kind: int) -> None:
    """Write `text` at (row, col), cropped to the grid."""
    start, end = max(col, 0), min(col + len(text), codes.shape[1])
    if end > start:
        codes[row, start:end] = _codes(text[start - col:end - col])
        kinds[row, start:end] = kind


def draw(chart: Chart | None, width: int, height: int) -> tuple[np.ndarray, np.ndarray]:
    """Character codes and `KINDS` of a `height` × `width` plot; an empty grid for no chart."""
    codes = np.full((max(height, 0), max(width, 0)), ord(" "), dtype=np.uint32)
    kinds = np.zeros(codes.shape, dtype=np.int8)
    if chart is None or height < 1 or width < 1:
        return codes, kinds
    _put(codes, kinds, 0, 0, chart.title, TEXT)
    columns, rows = width - LEFT - 2, height - 4
    if height < MIN_HEIGHT or columns < MIN_DATA_COLUMNS:
        return codes, kinds
    scale = Scale(columns, rows, chart.lo, chart.hi)
    top, bottom, left, right = 1, height - 2, LEFT, width - 1
    inside = (slice(top + 1, bottom), slice(left + 1, right))
    data_codes, data_kinds = codes[inside], kinds[inside]  # views into the grid

    # frame
    codes[top, left + 1:right] = codes[bottom, left + 1:right] = ord(HEAVY["h"])
    codes[top + 1:bottom, left] = codes[top + 1:bottom, right] = ord(HEAVY["v"])
    for (r, c), corner in zip(((top, left), (top, right), (bottom, left), (bottom, right)), ("tl", "tr", "bl", "br")):
        codes[r, c] = ord(HEAVY[corner])
    kinds[top, left:] = kinds[bottom, left:] = FRAME
    kinds[top:bottom + 1, left] = kinds[top:bottom + 1, right] = FRAME

    # segment boundaries: thin lines, joined to the frame
    joined = set()
    for b in chart.bounds:
        c = scale.column(b)
        if 0 <= c < columns:
            data_codes[:, c] = ord(LIGHT_VERTICAL)
            data_kinds[:, c] = BOUNDARY
            codes[top, left + 1 + c] = ord(HEAVY["join_top"])
            codes[bottom, left + 1 + c] = ord(HEAVY["join_bottom"])
            joined.add(c)

    # limit lines, dashed, then the curve over them
    if chart.limit is not None:
        masks = scale.level(chart.limit) | scale.level(-chart.limit)
        period, drawn = LIMIT_DASH
        masks[:, np.arange(columns) % period >= drawn] = 0
        hit = masks > 0
        data_codes[hit] = BRAILLE_BASE + masks[hit]
        data_kinds[hit] = LIMIT
    masks = scale.dots(chart.theta, chart.values)
    hit = masks > 0
    data_codes[hit] = BRAILLE_BASE + masks[hit]
    data_kinds[hit] = CURVE

    # y ticks: labels right-aligned left of the frame, marks on both sides
    kept: list[int] = []
    for t in y_ticks(scale, max(2, (height - 2) // ROWS_PER_TICK + 1)):
        r = scale.row(t)
        if not 0 <= r < rows or r in kept:  # two ticks in one row even at the coarsest: the first
            continue
        kept.append(r)
        label = compact(t)[:LEFT - 1]
        _put(codes, kinds, top + 1 + r, LEFT - 1 - len(label), label, TICK)
        codes[top + 1 + r, left] = ord(HEAVY["tick_left"])
        codes[top + 1 + r, right] = ord(HEAVY["tick_right"])

    # x ticks: labels under the frame (0° from its left corner, 360° to its right corner)
    free = 0  # first column a label may use
    for t in X_TICKS:
        label = f"{t:g}°"
        c = scale.column(t)
        if t == X_TICKS[0]:
            start = left
        elif t == X_TICKS[-1]:
            start = right + 1 - len(label)
        else:
            start = left + 1 + c - len(label) // 2
            both = c in joined
            codes[top, left + 1 + c] = ord(HEAVY["tick_join_top" if both else "tick_up"])
            codes[bottom, left + 1 + c] = ord(HEAVY["tick_join_bottom" if both else "tick_down"])
        if start >= free and start + len(label) <= width:
            _put(codes, kinds, height - 1, start, label, TICK)
            free = start + len(label) + 1
    return codes, kinds
