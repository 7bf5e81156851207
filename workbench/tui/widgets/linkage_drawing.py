"""The linkage drawn to scale in braille dots at one master angle.

Equal scale across and down: a terminal cell is about twice as tall as it
is wide (scale_raster.CELL_ASPECT) and holds 2 × 4 braille dots, so a dot is square
and one scale serves both directions.  The extent is that of the whole
cycle, so the scale holds while the angle steps.

Bodies are solid lines between their points, each body in its own colour;
slider guides are dashed, the paths of point outputs dotted.  Joints are
symbols — `GROUND_PIVOT` for a pin on the ground, `PIN`, `SLIDER` at the
sliding point, `WELD`, `OUTPUT_POINT` at a point an output reports — with
their names beside them where there is room.  The joints a dead point
involves are shown in red and their names end in `INVOLVED_MARK`, so they
read without colour too.
"""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual.widget import Widget

from solver.kinematics import GROUND

from ...linkagefile import split_ref
from .braille import DOTS_X, DOTS_Y
from .linkage_data import LinkageEntry, Pose, paths, pose_at
from .scale_raster import ScaleRaster


MARGIN_DOTS = 2  # dots kept free at each edge (room for a symbol on the outermost point)
GROUND_PIVOT = "▲"
PIN = "○"
SLIDER = "■"
WELD = "◆"
OUTPUT_POINT = "◎"
INVOLVED_MARK = "!"
BODY_STYLES = ("bright_cyan", "bright_green", "bright_yellow", "bright_blue", "cyan", "green", "yellow",
               "blue")  # one per body, in file order (16-colour names; no red or magenta: those mark a dead point)
GUIDE = ("bright_black", 2.0)  # (style, one dot every n dots along the line)
PATH = ("white", 3.0)
JOINT_STYLE = "bold bright_white"
INVOLVED_STYLE = "bold red"
LABEL_STYLE = "bright_black"
GAP_SPACING = 2.0  # the gap of a joint left open is dotted, one dot every 2
SYMBOLS = (GROUND_PIVOT, PIN, SLIDER, WELD, OUTPUT_POINT)


class Raster(ScaleRaster):
    """The linkage's braille cells over `bounds` (mm) at one scale, then symbols and labels."""

    def __init__(self, columns: int, rows: int, bounds: tuple[float, float, float, float]):
        super().__init__(columns, rows, bounds, MARGIN_DOTS)

    def cell_of(self, z: complex) -> tuple[int, int]:
        """(column, row) of the cell that holds point `z` (mm)."""
        x, y = self.to_dots(z)
        return int(np.floor(x)) // DOTS_X, int(np.floor(y)) // DOTS_Y

    def line(self, z, style: str, spacing: float = 0.0) -> None:
        self.dots(z, style, spacing)

    def inside(self, column: int, row: int) -> bool:
        return 0 <= column < self.columns and 0 <= row < self.rows

    def mark(self, z: complex, symbol: str, style: str) -> tuple[int, int] | None:
        """`symbol` in the cell of `z`; its (column, row), or None when outside."""
        c, r = self.cell_of(z)
        if not self.inside(c, r):
            return None
        self.marks[r * self.columns + c] = (symbol, style)
        return c, r

    def label(self, cell: tuple[int, int], words: str, style: str, force: bool = False) -> bool:
        """`words` beside `cell` — right, left, then the same one row up and one row down — on cells
        free of symbols and of lines (`force`: lines may be covered); False when nowhere has room."""
        c, r = cell
        places = [(c + 1, r), (c - len(words), r), (c + 1, r - 1), (c - len(words), r - 1), (c + 1, r + 1),
                  (c - len(words), r + 1)]
        for clear in (True, False) if force else (True,):
            for start, row in places:
                span = range(start, start + len(words))
                if not all(self.inside(k, row) for k in span):
                    continue
                taken = [row * self.columns + k for k in span]
                if any(i in self.marks for i in taken) or (clear and any(self.masks[i] for i in taken)):
                    continue
                for i, ch in zip(taken, words):
                    self.marks[i] = (ch, style)
                return True
        return False


def body_outline(entry: LinkageEntry, pose: Pose, body: str) -> np.ndarray:
    """A body as the polyline through its points in file order, closed when it has three or more."""
    names = [p for p, _ in next(b.points for b in entry.spec.bodies if b.name == body)]
    z = np.array([complex(pose.points[f"{body}.{p}"]) for p in names], dtype=complex)
    return np.append(z, z[:1]) if z.size >= 3 else z


def joint_place(entry: LinkageEntry, pose: Pose, joint) -> complex:
    """Where a joint's symbol goes: a slider at its sliding point, others at their first point."""
    return complex(pose.points[joint.second if joint.kind == "slider" else joint.first])


def joint_symbol(joint) -> str:
    if joint.kind == "slider":
        return SLIDER
    if joint.kind == "weld":
        return WELD
    on_ground = GROUND in (split_ref(joint.first)[0], split_ref(joint.second)[0])
    return GROUND_PIVOT if on_ground else PIN


class LinkageDrawing(Widget, can_focus=True):
    """The linkage of `entry` at master angle `angle` (deg), to scale; empty without an entry."""

    DEFAULT_CSS = """
    LinkageDrawing { height: 1fr; }
    """

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.entry: LinkageEntry | None = None
        self.angle = 0.0
        """Master angle asked for, deg (the drawing holds at the last solved one)."""
        self.pose: Pose | None = None
        """The pose drawn at the last paint."""
        self.raster: Raster | None = None
        """The last paint's raster (its scale and `cell_of`, for the tests)."""
        self.joint_cells: dict[str, tuple[int, int]] = {}
        """Cell of each joint's symbol at the last paint."""
        self._paths: dict[str, np.ndarray] = {}

    def show(self, entry: LinkageEntry | None, angle: float) -> None:
        if entry is not self.entry:
            self.entry = entry
            self._paths = paths(entry) if entry is not None else {}
        self.angle = angle
        self.refresh()

    def render(self) -> Text:
        entry = self.entry
        w, h = self.size
        if entry is None or w < 4 or h < 2:
            self.raster, self.joint_cells = None, {}
            return Text("")
        raster = Raster(w, h, entry.bounds)
        pose = pose_at(entry, self.angle)
        self.pose, self.raster = pose, raster
        for guide in pose.guides.values():
            raster.line(guide, *GUIDE)
        for path in self._paths.values():
            raster.line(path, *PATH)
        for k, b in enumerate(entry.spec.bodies):
            raster.line(body_outline(entry, pose, b.name), BODY_STYLES[k % len(BODY_STYLES)])
        involved = set(entry.involved)
        self.joint_cells = {}
        for ref in self._paths:
            raster.mark(complex(pose.points[ref]), OUTPUT_POINT, JOINT_STYLE)
        joints = sorted(entry.spec.joints, key=lambda j: j.kind == "slider")  # sliders on top of their pins
        for j in joints:
            style = INVOLVED_STYLE if j.name in involved else JOINT_STYLE
            cell = raster.mark(joint_place(entry, pose, j), joint_symbol(j), style)
            if cell is not None:
                self.joint_cells[j.name] = cell
            if j.name in involved and entry.gaps:  # a joint left open: both its points, and the gap
                ends = [complex(pose.points[j.first]), complex(pose.points[j.second])]
                raster.line(np.array(ends), INVOLVED_STYLE, GAP_SPACING)
                raster.mark(ends[1], joint_symbol(j), style)
        # names: the joints a dead point involves first (always shown), then the rest where there is room
        for j in sorted(joints, key=lambda j: j.name not in involved):
            cell = self.joint_cells.get(j.name)
            if cell is None:
                continue
            if j.name in involved:
                raster.label(cell, j.name + INVOLVED_MARK, INVOLVED_STYLE, force=True)
            else:
                raster.label(cell, j.name, LABEL_STYLE)
        return raster.text()


def legend(entry: LinkageEntry | None) -> Text:
    """What the drawing's symbols and lines mean, in words beside a sample of each."""
    out = Text()
    if entry is None:
        return out
    kinds = {j.kind for j in entry.spec.joints}
    ground_pins = any(joint_symbol(j) == GROUND_PIVOT for j in entry.spec.joints)
    items = []
    if ground_pins:
        items.append((GROUND_PIVOT, "ground pivot", JOINT_STYLE))
    if any(joint_symbol(j) == PIN for j in entry.spec.joints):
        items.append((PIN, "pin", JOINT_STYLE))
    if "slider" in kinds:
        items += [(SLIDER, "slider", JOINT_STYLE), ("⠁⠁", "guide", GUIDE[0])]
    if "weld" in kinds:
        items.append((WELD, "weld", JOINT_STYLE))
    if any(o.target.kind in ("x", "y") for o in entry.spec.outputs) and entry.runs:
        items += [(OUTPUT_POINT, "output point", JOINT_STYLE), ("⠁ ⠁", "its path", PATH[0])]
    if entry.dead_joints:
        items.append((f"A{INVOLVED_MARK}", "joint in the dead point", INVOLVED_STYLE))
    elif entry.gaps:
        items.append((f"A{INVOLVED_MARK}", "joint left open", INVOLVED_STYLE))
    for i, (sample, word, style) in enumerate(items):
        if i:
            out.append("  ")
        out.append(sample, style=style)
        out.append(f" {word}")
    return out
