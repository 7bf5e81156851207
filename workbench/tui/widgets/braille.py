"""Lines in braille dots, rasterized with numpy (2×4 dots per character cell).

Drawing a curve point by point in Python costs more than everything else
in a plot's repaint; here all segments are stepped at once and the dots are
OR-ed into per-cell masks.  Unicode braille: U+2800 + a bit per dot.
"""

from __future__ import annotations

import numpy as np

DOTS_X, DOTS_Y = 2, 4  # braille dots per character cell
# bit of the dot at [row, column] inside a cell (Unicode braille dot numbering)
DOT_BITS = np.array([[0x01, 0x08], [0x02, 0x10], [0x04, 0x20], [0x40, 0x80]])
BRAILLE_BASE = 0x2800


def line_dots(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Integer dot coordinates of the polyline through (x, y) (already in dots), every
    segment stepped one dot at a time along its longer side (no gaps)."""
    x = np.floor(np.asarray(x, dtype=float)).astype(np.int64)
    y = np.floor(np.asarray(y, dtype=float)).astype(np.int64)
    if x.size == 1:
        return x, y
    x0, y0, dx, dy = x[:-1], y[:-1], np.diff(x), np.diff(y)
    steps = np.maximum(np.abs(dx), np.abs(dy))
    counts = steps + 1
    seg = np.repeat(np.arange(steps.size), counts)
    k = np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)
    frac = k / np.maximum(steps[seg], 1)
    px = np.rint(x0[seg] + frac * dx[seg]).astype(np.int64)
    py = np.rint(y0[seg] + frac * dy[seg]).astype(np.int64)
    return px, py


def braille_grid(x: np.ndarray, y: np.ndarray, columns: int, rows: int) -> np.ndarray:
    """Dot masks (`rows` × `columns`, 0 where no dot) of the polyline through (x, y), given in
    cell units; dots outside the area are left out.  Character = chr(BRAILLE_BASE + mask)."""
    px, py = line_dots(np.asarray(x, dtype=float) * DOTS_X, np.asarray(y, dtype=float) * DOTS_Y)
    inside = (px >= 0) & (px < columns * DOTS_X) & (py >= 0) & (py < rows * DOTS_Y)
    px, py = px[inside], py[inside]
    masks = np.zeros(columns * rows, dtype=np.int64)
    np.bitwise_or.at(masks, (py // DOTS_Y) * columns + px // DOTS_X, DOT_BITS[py % DOTS_Y, px % DOTS_X])
    return masks.reshape(rows, columns)


def braille_cells(x: np.ndarray, y: np.ndarray, columns: int, rows: int):
    """(column, row, character) of every cell the polyline touches; (x, y) in cell units,
    points outside the `columns` × `rows` area are left out."""
    masks = braille_grid(x, y, columns, rows).ravel()
    cells = np.flatnonzero(masks)
    chars = [chr(BRAILLE_BASE + int(m)) for m in masks[cells]]
    return cells % columns, cells // columns, chars
