"""Braille cells at one scale across and down: the ground both to-scale drawings (cam, linkage) stand on.

A terminal cell is about twice as tall as it is wide (`CELL_ASPECT`) and
holds 2 × 4 braille dots, so a dot is square and one scale (dots per mm)
serves both directions.  Lines set dots and give their cells a style (the
latest line in a cell wins); marks put a symbol with its own style in a
cell, over any dots.
"""

from __future__ import annotations

import numpy as np
from rich.text import Text

from .braille import BRAILLE_BASE, DOT_BITS, DOTS_X, DOTS_Y, line_dots

CELL_ASPECT = 2.0  # height / width of a terminal cell (most fonts: 1.9–2.2)
DOT_ASPECT = CELL_ASPECT * DOTS_X / DOTS_Y  # height / width of one braille dot: 1, square


def spaced_dots(x: np.ndarray, y: np.ndarray, spacing: float) -> tuple[np.ndarray, np.ndarray]:
    """Dots every `spacing` dots of arc length along the polyline (x, y) (already in dots)."""
    step = np.hypot(np.diff(x), np.diff(y))
    length = np.concatenate([[0.0], np.cumsum(step)])
    if length[-1] <= 0:
        return np.floor(x[:1]).astype(np.int64), np.floor(y[:1]).astype(np.int64)
    at = np.arange(0.0, length[-1], spacing)
    return (np.floor(np.interp(at, length, x)).astype(np.int64),
            np.floor(np.interp(at, length, y)).astype(np.int64))


class ScaleRaster:
    """Braille cells of `columns` × `rows` showing `bounds` (x0, x1, y0, y1 in mm) centred at one
    scale, `margin` dots kept free at each edge; `marks` maps a cell index to (symbol, style)."""

    def __init__(self, columns: int, rows: int, bounds: tuple[float, float, float, float], margin: int):
        self.columns, self.rows = columns, rows
        self.masks = np.zeros(columns * rows, dtype=np.int64)
        self.styles: dict[int, str] = {}
        self.marks: dict[int, tuple[str, str]] = {}
        x0, x1, y0, y1 = bounds
        width, height = columns * DOTS_X - 2 * margin, rows * DOTS_Y - 2 * margin
        span_x, span_y = max(x1 - x0, 1e-9), max(y1 - y0, 1e-9)
        self.scale = max(min(width / span_x, height * DOT_ASPECT / span_y), 1e-12)
        """Dots per mm across (down: `scale / DOT_ASPECT`)."""
        self.cx = margin + (width - span_x * self.scale) / 2 - x0 * self.scale
        self.cy = margin + (height - span_y * self.scale / DOT_ASPECT) / 2 + y1 * self.scale / DOT_ASPECT

    def to_dots(self, z) -> tuple[np.ndarray, np.ndarray]:
        """Dot coordinates (across, down) of points z (complex, mm)."""
        z = np.asarray(z, dtype=complex)
        return self.cx + z.real * self.scale, self.cy - z.imag * self.scale / DOT_ASPECT

    def cells(self, px: np.ndarray, py: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(cell index, px, py) of the dots inside the raster."""
        inside = (px >= 0) & (px < self.columns * DOTS_X) & (py >= 0) & (py < self.rows * DOTS_Y)
        px, py = px[inside], py[inside]
        return (py // DOTS_Y) * self.columns + px // DOTS_X, px, py

    def dots(self, z, style: str, spacing: float = 0.0) -> None:
        """The polyline z (mm): solid, or one dot every `spacing` dots along it; its cells take `style`."""
        x, y = self.to_dots(np.atleast_1d(z))
        px, py = spaced_dots(x, y, spacing) if spacing else line_dots(x, y)
        cells, px, py = self.cells(px, py)
        np.bitwise_or.at(self.masks, cells, DOT_BITS[py % DOTS_Y, px % DOTS_X])
        for c in np.unique(cells).tolist():
            self.styles[c] = style

    def text(self) -> Text:
        out = Text(no_wrap=True, overflow="crop")
        for r in range(self.rows):
            if r:
                out.append("\n")
            row = []
            for c in range(self.columns):
                i = r * self.columns + c
                if i in self.marks:
                    row.append(self.marks[i])
                elif self.masks[i]:
                    row.append((chr(BRAILLE_BASE + int(self.masks[i])), self.styles.get(i, "")))
                else:
                    row.append((" ", ""))
            _append_runs(out, row)
        return out


def _append_runs(out: Text, cells: list[tuple[str, str]]) -> None:
    """Append cells, joining neighbours of one style into one span (fewer spans, faster paint)."""
    run, style = [], None
    for ch, st in cells:
        if st != style and run:
            out.append("".join(run), style=style or None)
            run = []
        run.append(ch)
        style = st
    if run:
        out.append("".join(run), style=style or None)
