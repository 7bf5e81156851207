"""The `[[linkage]]` part of the project file: a planar linkage, its drivers and outputs.

```toml
[[linkage]]
name = "pusher"                     # unique among the linkages

[linkage.ground]                    # fixed points, machine coordinates (mm)
O = [0.0, 0.0]
G = [0.0, 20.0]

[[linkage.body]]
name = "crank"
place = [0.0, 0.0, 0.0]             # roughly where it is at master 0°: x, y (mm), angle (deg)
points = { O = [0.0, 0.0], A = [55.0, 0.0] }    # in the body's own frame (mm)

[[linkage.joint]]
name = "A"
pin = ["crank.A", "rod.A"]          # or slider = [guide, sliding point], or weld = [a, b]
# axis = [1.0, 0.0]                 # slider: direction of travel in the guide's frame
# angle = 0.0                       # slider, weld: angle of the second body to the first (deg)

[[linkage.driver]]
name = "motor"
joint = "O"                         # moves: joint | angle (a body) | x | y (a point)
turns = 1.0                         # per machine cycle; or axis = "name" to follow an axis
offset = 0.0                        # value of the coordinate where the motion reads 0

[[linkage.output]]
name = "stroke"
joint = "slide"                     # joint | angle | x | y | transmission (at a pin)

[linkage.output.limits]             # optional, as for an axis (unit/s, unit/s², unit/s³)
velocity = 600.0
```

A joint's coordinate is a pin's angle (deg, second body to first) or a
slider's travel (mm, from the guide point along `axis`).  A transmission
output may name the two points its lines run to, `toward = ["coupler.A",
"rocker.O4"]`; without it, each body's one other joint point is taken.
`[linkage.loads]` is reserved for the masses of the bodies; a loads module
registers its reader with `register_linkage_loads`.

Values are kept as the file gives them (mm, deg, None where absent) so that
dumps round-trip; `build_linkage` converts to SI once, here at the edge.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING, Any, Callable

from motionlaws import Limits
from solver.kinematics import GROUND

from .tomlcheck import Table

if TYPE_CHECKING:
    from .projectfile import Project

PART_KEY = "linkage"
JOINT_KINDS = ("pin", "slider", "weld")
DRIVEN = ("joint", "angle", "x", "y")  # what a driver can move
REPORTED = DRIVEN + ("transmission",)  # what an output can report
FULL_TURN = 360.0  # deg
WHOLE = 1e-9  # a number of turns this close to a whole number counts as whole


# --- the file's values -----------------------------------------------------------


@dataclass(frozen=True)
class Target:
    """What a driver moves or an output reports: `kind` in REPORTED and what it names.

    `of` is a joint or pin name, a body name (angle) or "body.point" (x, y);
    `toward` the two "body.point" a transmission angle's lines run to, as
    written (None: taken from the joints).
    """

    kind: str
    of: str
    toward: tuple[str, str] | None = None


@dataclass(frozen=True)
class BodySpec:
    """A moving body: rough placement at master 0 (mm, mm, deg) and its points (mm, body frame)."""

    name: str
    place: tuple[float, float, float]
    points: tuple[tuple[str, tuple[float, float]], ...]


@dataclass(frozen=True)
class JointSpec:
    """A pin, slider or weld between two "body.point" references; `axis`, `angle` (deg) as written."""

    name: str
    kind: str
    first: str
    second: str
    axis: tuple[float, float] | None = None
    angle: float | None = None


@dataclass(frozen=True)
class DriverSpec:
    """Holds `target` to an axis (`axis`) or turns it at a steady rate (`turns` per cycle)."""

    name: str
    target: Target
    axis: str | None = None
    turns: float | None = None
    offset: float | None = None  # mm or deg: the coordinate where the motion reads 0


@dataclass(frozen=True)
class OutputSpec:
    """A reported coordinate and its limits (unit/s^k, file units)."""

    name: str
    target: Target
    limits: Limits = Limits()


@dataclass(frozen=True)
class LinkageSpec:
    """One `[[linkage]]` table in file units; frozen, compares by value."""

    name: str
    ground: tuple[tuple[str, tuple[float, float]], ...]
    bodies: tuple[BodySpec, ...]
    joints: tuple[JointSpec, ...]
    drivers: tuple[DriverSpec, ...] = ()
    outputs: tuple[OutputSpec, ...] = ()
    loads: Any = None  # what the registered loads reader made of [linkage.loads]

    @property
    def label(self) -> str:
        return linkage_label(self.name, None)

    def points(self, body: str) -> dict[str, tuple[float, float]]:
        """The named points of `body` (the ground included), mm."""
        if body == GROUND:
            return dict(self.ground)
        return dict(next(b.points for b in self.bodies if b.name == body))

    def joint(self, name: str) -> JointSpec | None:
        return next((j for j in self.joints if j.name == name), None)

    def output(self, name: str) -> OutputSpec | None:
        return next((o for o in self.outputs if o.name == name), None)


def linkage_label(name: str | None, number: int | None) -> str:
    return f'linkage "{name}"' if name else f"linkage {number}"


def linkage_specs(project: Project) -> list[LinkageSpec]:
    """The project's linkages (empty when it has none)."""
    return list(project.parts.get(PART_KEY) or [])


def find_linkage(project: Project, name: str) -> LinkageSpec | None:
    return next((s for s in linkage_specs(project) if s.name == name), None)


def split_ref(ref: str) -> tuple[str, str]:
    """"body.point" → (body, point)."""
    body, _, point = ref.partition(".")
    return body, point


def target_unit(spec: LinkageSpec, target: Target) -> str:
    """"mm" or "deg": the unit of a driven or reported coordinate."""
    if target.kind in ("x", "y"):
        return "mm"
    if target.kind == "joint":
        return "mm" if spec.joint(target.of).kind == "slider" else "deg"
    return "deg"


def describe(target: Target, spec: LinkageSpec | None = None) -> str:
    """The coordinate in words: "travel on slider slide", "angle at pin O", "angle of rocker",
    "x of slider.B" (with `spec`, a joint is named by its kind)."""
    if target.kind == "joint":
        kind = spec.joint(target.of).kind if spec is not None and spec.joint(target.of) else None
        if kind == "slider":
            return f"travel on slider {target.of}"
        if kind == "pin":
            return f"angle at pin {target.of}"
        return f"joint {target.of}"
    if target.kind == "angle":
        return f"angle of {target.of}"
    if target.kind == "transmission":
        return f"transmission angle at {target.of}"
    return f"{target.kind} of {target.of}"


# --- the loads place -------------------------------------------------------------


@dataclass(frozen=True)
class LinkageLoads:
    """How `[linkage.loads]` is read and written.

    `parse(table, spec)` gets the `Table` (errors name its key) and the
    linkage read so far (bodies, joints, drivers, outputs) and returns the
    object kept in `LinkageSpec.loads`; `dump(loads)` returns its plain TOML
    data.
    """

    parse: Callable[[Table, LinkageSpec], Any]
    dump: Callable[[Any], dict]


LOADS: list[LinkageLoads] = []  # the registered reader (at most one); empty: [linkage.loads] is refused


def register_linkage_loads(reader: LinkageLoads) -> None:
    LOADS[:] = [reader]


def axis_fault(project: Project, name: str, unit: str, what: str) -> str | None:
    """Why axis `name` cannot drive a coordinate in `unit` (`what` in words), or None."""
    names = [a.name for a in project.axes]
    if name not in names:
        return f"no axis {name!r} in this file (axes: {', '.join(names) or 'none'})"
    axis = project.axis(name)
    if axis.unit != unit:
        return f"axis {name!r} is in {axis.unit}, but {what} is in {unit}"
    if axis.index and (unit == "mm" or abs(axis.index / FULL_TURN - round(axis.index / FULL_TURN)) > WHOLE):
        return (f"axis {name!r} advances {axis.index:g} {unit} every cycle: a linkage repeats every cycle, "
                "so only whole turns of an angle can index")
    return None


def transmission_toward(spec: LinkageSpec, pin_name: str) -> tuple[str, str]:
    """The two "body.point" a pin's transmission lines run to when the file gives none.

    For each body of the pin, its one other point used by a joint (at a
    different place from the pin).  Raises ValueError saying what to write
    when a body has none or several.
    """
    pin = spec.joint(pin_name)
    out = []
    for ref in (pin.first, pin.second):
        body, point = split_ref(ref)
        here = spec.points(body)[point]
        others = []
        for j in spec.joints:
            for other in (j.first, j.second):
                b, p = split_ref(other)
                if j.name != pin.name and b == body and spec.points(b)[p] != here and other not in others:
                    others.append(other)
        if len(others) != 1:
            found = ", ".join(others) or "none"
            raise ValueError(f"say which points the lines run to, e.g. toward = [\"{body}.P\", ...]: "
                             f"body {body!r} has {len(others)} other joint points ({found})")
        out.append(others[0])
    return out[0], out[1]


def parse_linkages(tables: list, project: Project, file) -> list[LinkageSpec]:
    """Check every `[[linkage]]` table against the project's axes (raises `ProjectError`)."""
    from .linkageread import read_linkages  # noqa: PLC0415 - the reader needs this module loaded first

    return read_linkages(tables, project, file)


# --- writing ---------------------------------------------------------------------------


def _target_data(target: Target) -> dict:
    data: dict[str, Any] = {target.kind: target.of}
    if target.toward is not None:
        data["toward"] = list(target.toward)
    return data


def _drop_none(d: dict) -> dict:
    return {k: v for k, v in d.items() if v is not None}


def dump_linkages(specs) -> list[dict]:
    """Plain TOML data for the linkages, in the order and shape the parser reads."""
    out = []
    for spec in specs or []:
        entry: dict[str, Any] = {"name": spec.name}
        if spec.ground:
            entry["ground"] = {p: list(xy) for p, xy in spec.ground}
        entry["body"] = [{"name": b.name, "place": list(b.place), "points": {p: list(xy) for p, xy in b.points}}
                         for b in spec.bodies]
        if spec.joints:
            entry["joint"] = [
                _drop_none({"name": j.name, j.kind: [j.first, j.second],
                            "axis": None if j.axis is None else list(j.axis), "angle": j.angle})
                for j in spec.joints
            ]
        if spec.drivers:
            entry["driver"] = [
                _drop_none({"name": d.name, **_target_data(d.target), "axis": d.axis, "turns": d.turns,
                            "offset": d.offset})
                for d in spec.drivers
            ]
        if spec.outputs:
            entry["output"] = []
            for o in spec.outputs:
                data = {"name": o.name, **_target_data(o.target)}
                limits = _drop_none(dict(o.limits.items()))
                if limits:
                    data["limits"] = limits
                entry["output"].append(data)
        if spec.loads is not None and LOADS:
            entry["loads"] = LOADS[0].dump(spec.loads)
        out.append(entry)
    return out


# Imported last: projectfile loads every part module (this one included) when it is first imported.
from .projectfile import Part, register_part  # noqa: E402

register_part(Part(PART_KEY, parse_linkages, dump_linkages))
