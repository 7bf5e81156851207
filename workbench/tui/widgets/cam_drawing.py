"""The cam drawn to scale in braille dots, turned to the current cam angle, with its follower.

Equal scale in x and y: a terminal cell is about twice as tall as it is
wide (`CELL_ASPECT`), and a braille cell holds 2 × 4 dots, so a dot is as
tall as it is wide and one scale serves both directions.  Lines differ by
pattern as well as colour: the profile is solid, the pitch curve dashed,
the base circle sparsely dotted.  Stretches of undercut or cusp are drawn
as `TROUBLE_MARK` cells and corners as `CORNER_MARK`, so they read without
colour too.
"""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual.widget import Widget

from .braille import BRAILLE_BASE, DOT_BITS, DOTS_X, DOTS_Y, line_dots
from .cam_data import CamEntry, cam_picture, index_of, picture_bounds

CELL_ASPECT = 2.0  # height / width of a terminal cell (most fonts: 1.9–2.2)
DOT_ASPECT = CELL_ASPECT * DOTS_X / DOTS_Y  # height / width of one braille dot
MARGIN_DOTS = 1  # dots kept free at each edge
TROUBLE_MARK = "×"
CORNER_MARK = "◆"
CENTRE_MARK = "+"
# layer: (style, dot spacing along the line — 0 solid, n: one dot every n), drawn in this order;
# where layers share a cell, the later one gives the colour
LAYERS = {
    "base": ("bright_black", 4.0),
    "zero": ("bright_black", 0),
    "pitch": ("blue", 2.0),
    "profile": ("bold bright_white", 0),
    "follower": ("bold bright_yellow", 0),
}
MARK_STYLE = {TROUBLE_MARK: "bold red", CORNER_MARK: "bold red", CENTRE_MARK: "bright_black"}


def spaced_dots(x: np.ndarray, y: np.ndarray, spacing: float) -> tuple[np.ndarray, np.ndarray]:
    """Dots every `spacing` dots of arc length along the polyline (x, y) (already in dots)."""
    step = np.hypot(np.diff(x), np.diff(y))
    length = np.concatenate([[0.0], np.cumsum(step)])
    if length[-1] <= 0:
        return np.floor(x[:1]).astype(np.int64), np.floor(y[:1]).astype(np.int64)
    at = np.arange(0.0, length[-1], spacing)
    return (np.floor(np.interp(at, length, x)).astype(np.int64),
            np.floor(np.interp(at, length, y)).astype(np.int64))


class Raster:
    """Braille cells of `columns` × `rows`, filled layer by layer, plus symbol cells on top."""

    def __init__(self, columns: int, rows: int, bounds: tuple[float, float, float, float]):
        self.columns, self.rows = columns, rows
        self.masks = np.zeros(columns * rows, dtype=np.int64)
        self.styles: dict[int, str] = {}
        self.marks: dict[int, str] = {}
        x0, x1, y0, y1 = bounds
        width, height = columns * DOTS_X - 2 * MARGIN_DOTS, rows * DOTS_Y - 2 * MARGIN_DOTS
        span_x, span_y = max(x1 - x0, 1e-9), max(y1 - y0, 1e-9)
        self.scale = min(width / span_x, height * DOT_ASPECT / span_y)  # dots per mm, across
        """Dots per mm across (down: `scale / DOT_ASPECT`)."""
        self.cx = MARGIN_DOTS + (width - span_x * self.scale) / 2 - x0 * self.scale
        self.cy = MARGIN_DOTS + (height - span_y * self.scale / DOT_ASPECT) / 2 + y1 * self.scale / DOT_ASPECT

    def to_dots(self, z: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return self.cx + z.real * self.scale, self.cy - z.imag * self.scale / DOT_ASPECT

    def _cells(self, px: np.ndarray, py: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        inside = (px >= 0) & (px < self.columns * DOTS_X) & (py >= 0) & (py < self.rows * DOTS_Y)
        px, py = px[inside], py[inside]
        return (py // DOTS_Y) * self.columns + px // DOTS_X, px, py

    def line(self, z: np.ndarray, layer: str) -> None:
        style, spacing = LAYERS[layer]
        x, y = self.to_dots(z)
        px, py = spaced_dots(x, y, spacing) if spacing else line_dots(x, y)
        cells, px, py = self._cells(px, py)
        np.bitwise_or.at(self.masks, cells, DOT_BITS[py % DOTS_Y, px % DOTS_X])
        for c in np.unique(cells).tolist():
            self.styles[c] = style

    def mark(self, z: np.ndarray, symbol: str) -> None:
        """`symbol` in every cell the polyline (or single point) `z` passes through."""
        x, y = self.to_dots(z)
        px, py = line_dots(x, y)
        cells, _, _ = self._cells(px, py)
        for c in np.unique(cells).tolist():
            self.marks[c] = symbol

    def text(self) -> Text:
        out = Text(no_wrap=True, overflow="crop")
        for r in range(self.rows):
            if r:
                out.append("\n")
            row = []
            for c in range(self.columns):
                i = r * self.columns + c
                if i in self.marks:
                    row.append((self.marks[i], MARK_STYLE[self.marks[i]]))
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


class CamDrawing(Widget, can_focus=True):
    """The cam of `entry` at cam angle `angle` (deg), to scale; empty without a study."""

    DEFAULT_CSS = """
    CamDrawing { height: 1fr; }
    """

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.entry: CamEntry | None = None
        self.angle = 0.0
        """Cam angle on view, deg."""
        self._bounds: tuple[float, float, float, float] | None = None
        self.scale: float | None = None
        """Dots per mm across at the last paint (for the tests: equal scale both ways)."""
        self.marks: dict[str, int] = {}
        """How many cells carry each symbol at the last paint."""

    def show(self, entry: CamEntry | None, angle: float) -> None:
        if entry is not self.entry:
            self.entry = entry
            self._bounds = picture_bounds(entry.study) if entry and entry.study else None
        self.angle = angle
        self.refresh()

    def render(self) -> Text:
        entry = self.entry
        w, h = self.size
        if entry is None or entry.study is None or w < 4 or h < 2:
            return Text("")
        raster = Raster(w, h, self._bounds)
        self.scale = raster.scale
        pic = cam_picture(entry.study, index_of(entry.study, self.angle))
        raster.line(pic.base, "base")
        raster.line(pic.zero_mark, "zero")
        if pic.pitch is not None:
            raster.line(pic.pitch, "pitch")
        raster.line(pic.profile, "profile")
        for shape in pic.follower:
            raster.line(shape, "follower")
        raster.mark(np.array([0j]), CENTRE_MARK)
        for stretch in pic.trouble:
            raster.mark(stretch, TROUBLE_MARK)
        for corner in pic.corners:
            raster.mark(np.array([corner]), CORNER_MARK)
        self.marks = {s: sum(1 for m in raster.marks.values() if m == s)
                      for s in (TROUBLE_MARK, CORNER_MARK, CENTRE_MARK)}
        return raster.text()


def legend(entry: CamEntry | None) -> Text:
    """What the drawing's lines and marks mean, in words beside a sample of each."""
    out = Text(no_wrap=False)
    if entry is None or entry.study is None:
        return out
    a = entry.study.analysis
    items = [("⠉⠉", "profile", LAYERS["profile"][0])]
    if a.pitch is not None:
        items.append(("⠁⠁", "pitch curve", LAYERS["pitch"][0]))
    items += [("⠁ ⠁", "base circle", LAYERS["base"][0]), ("⠉⠉", "follower", LAYERS["follower"][0])]
    if a.undercut or a.cusp:
        items.append((TROUBLE_MARK, "undercut" if a.undercut else "cusp", MARK_STYLE[TROUBLE_MARK]))
    if a.corners:
        items.append((CORNER_MARK, "corner", MARK_STYLE[CORNER_MARK]))
    for i, (sample, word, style) in enumerate(items):
        if i:
            out.append("  ")
        out.append(sample, style=style)
        out.append(f" {word}")
    return out


def turning_words(sigma: int) -> str:
    return "turns clockwise ↻" if sigma < 0 else "turns counter-clockwise ↺"

