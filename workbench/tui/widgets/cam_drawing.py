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

from .braille import line_dots
from .cam_data import CamEntry, cam_picture, index_of, picture_bounds
from .scale_raster import CELL_ASPECT, ScaleRaster  # CELL_ASPECT: the views size the drawing by it


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


class Raster(ScaleRaster):
    """The cam's braille cells: lines by layer (`LAYERS`), symbols over them (`MARK_STYLE`)."""

    def __init__(self, columns: int, rows: int, bounds: tuple[float, float, float, float]):
        super().__init__(columns, rows, bounds, MARGIN_DOTS)

    def line(self, z: np.ndarray, layer: str) -> None:
        style, spacing = LAYERS[layer]
        self.dots(z, style, spacing)

    def mark(self, z: np.ndarray, symbol: str) -> None:
        """`symbol` in every cell the polyline (or single point) `z` passes through."""
        x, y = self.to_dots(z)
        px, py = line_dots(x, y)
        cells, _, _ = self.cells(px, py)
        for c in np.unique(cells).tolist():
            self.marks[c] = (symbol, MARK_STYLE[symbol])


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
        self.marks = {s: sum(1 for m, _ in raster.marks.values() if m == s)
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

