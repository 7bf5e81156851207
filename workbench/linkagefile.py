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

from .tomlcheck import ProjectError, Table

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


def describe(target: Target) -> str:
    """The coordinate in words: "joint slide", "angle of rocker", "x of slider.B"."""
    if target.kind == "joint":
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


# --- parsing -----------------------------------------------------------------------


def _refuse_unknown(t: Table, known) -> None:
    """Name a misspelt key first, before the "is missing" it would otherwise cause."""
    extra = [k for k in t.data if k not in known]
    if extra:
        raise t.error(extra[0], f"is not a known key here (known: {', '.join(sorted(known))})")


def _numbers(t: Table, key: str, count: int, what: str, *, required=False):
    """A list of `count` finite numbers as a tuple of floats, or None when absent."""
    value = t.raw(key)
    if value is None:
        if required:
            raise t.error(key, f"is missing: give {what}")
        return None
    return _number_list(value, count, lambda problem: t.error(key, problem), what)


def _number_list(value, count: int, error, what: str):
    ok = isinstance(value, list) and len(value) == count
    ok = ok and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in value)
    if not ok:
        raise error(f"must be {what}, got {value!r}")
    if not all(math.isfinite(v) for v in value):
        raise error(f"must be finite numbers, got {value!r}")
    return tuple(float(v) for v in value)


def _name(t: Table, what: str) -> str:
    name = t.text("name", required=True)
    if not name.strip():
        raise t.error("name", "must not be empty")
    if what in ("body", "point") and "." in name:
        raise t.error("name", f"must not contain a dot: points are named \"{what}.point\"")
    return name


def _point_table(raw, error, where: str) -> tuple[tuple[str, tuple[float, float]], ...]:
    """A table of point name → [x, y] (mm)."""
    if not isinstance(raw, dict):
        raise error(f"must be a table of points, e.g. {{ A = [40.0, 0.0] }}, got {raw!r}")
    points = []
    for name, xy in raw.items():
        if not name.strip() or "." in name:
            raise error(f"point name {name!r} must be non-empty and without a dot")
        value = _number_list(xy, 2, lambda p, n=name: error(f"point {n!r} {p}"), "[x, y] in mm")
        points.append((name, value))
    return tuple(points)


class _LinkageReader:
    """Reads one `[[linkage]]` table; every error names file, table and key."""

    def __init__(self, raw, project: Project, file, number: int):
        guess = raw.get("name") if isinstance(raw, dict) else None
        self.label = linkage_label(guess if isinstance(guess, str) and guess.strip() else None, number)
        self.t = Table(raw, file, self.label)
        self.project = project
        self.file = file
        self.points: dict[str, dict[str, tuple[float, float]]] = {GROUND: {}}
        self.joints: dict[str, JointSpec] = {}

    def sub(self, raw, what: str, number: int) -> Table:
        guess = raw.get("name") if isinstance(raw, dict) else None
        name = f'{what} "{guess}"' if isinstance(guess, str) and guess.strip() else f"{what} {number}"
        return Table(raw, self.file, f"{self.label}, {name}")

    def read(self) -> LinkageSpec:
        t = self.t
        _refuse_unknown(t, {"name", "ground", "body", "joint", "driver", "output", "loads"})
        name = t.text("name", required=True)
        if not name.strip():
            raise t.error("name", "must not be empty")
        if "." in name:
            raise t.error("name", "must not contain a dot: outputs are named \"linkage.output\"")
        ground = ()
        if t.has("ground"):
            where = f"{self.label}, ground"
            ground = _point_table(t.raw("ground"), lambda p: ProjectError(self.file, where, None, p), where)
        self.points[GROUND] = dict(ground)
        raw_bodies = t.tables("body", required=True)
        if not raw_bodies:
            raise t.error("body", "a linkage needs at least one [[linkage.body]]")
        bodies = tuple(self.body(raw, i) for i, raw in enumerate(raw_bodies, start=1))
        joints = tuple(self.joint(raw, i) for i, raw in enumerate(t.tables("joint"), start=1))
        drivers: list[DriverSpec] = []
        for i, raw in enumerate(t.tables("driver"), start=1):
            drivers.append(self.driver(raw, i, drivers))
        outputs: list[OutputSpec] = []
        for i, raw in enumerate(t.tables("output"), start=1):
            outputs.append(self.output(raw, i, outputs, bodies))
        spec = LinkageSpec(name, ground, bodies, joints, tuple(drivers), tuple(outputs))
        loads = t.table("loads", f"{self.label}, loads")
        if loads is not None:
            if not LOADS:
                raise t.error("loads", "linkage loads are not read by this version: remove [linkage.loads]")
            spec = replace(spec, loads=LOADS[0].parse(loads, spec))
        t.done()
        return spec

    # -- bodies and references ---------------------------------------------------
    def body(self, raw, number: int) -> BodySpec:
        b = self.sub(raw, "body", number)
        _refuse_unknown(b, {"name", "place", "points"})
        name = _name(b, "body")
        if name == GROUND:
            raise b.error("name", "\"ground\" is the fixed frame: put its points in [linkage.ground]")
        if name in self.points:
            raise b.error("name", "is used by an earlier body: names must be unique")
        place = _numbers(b, "place", 3, "[x, y, angle]: roughly where the body is at master 0° (mm, mm, deg)",
                         required=True)
        if not b.has("points"):
            raise b.error("points", "is missing: name the body's points, e.g. { A = [0.0, 0.0], B = [80.0, 0.0] }")
        points = _point_table(b.raw("points"), lambda p: b.error("points", p), b.where)
        if not points:
            raise b.error("points", "must name at least one point")
        b.done()
        self.points[name] = dict(points)
        return BodySpec(name, place, points)

    def ref(self, t: Table, key: str, text) -> tuple[str, str]:
        """Check a "body.point" string against the bodies and points read so far."""
        if not isinstance(text, str) or "." not in text:
            raise t.error(key, f'{text!r} must name a point as "body.point", e.g. "crank.A"')
        body, point = split_ref(text)
        if body not in self.points:
            raise t.error(key, f"{text!r}: no body {body!r} (bodies: {', '.join(self.points)})")
        if point not in self.points[body]:
            known = ", ".join(self.points[body]) or "none"
            raise t.error(key, f"{text!r}: body {body!r} has no point {point!r} (points: {known})")
        return body, point

    def body_name(self, t: Table, key: str, text) -> str:
        if not isinstance(text, str) or text not in self.points:
            raise t.error(key, f"no body {text!r} (bodies: {', '.join(b for b in self.points if b != GROUND)})")
        if text == GROUND:
            raise t.error(key, "the ground does not move")
        return text

    # -- joints -------------------------------------------------------------------
    def joint(self, raw, number: int) -> JointSpec:
        j = self.sub(raw, "joint", number)
        _refuse_unknown(j, {"name", *JOINT_KINDS, "axis", "angle"})
        kinds = [k for k in JOINT_KINDS if j.has(k)]
        if len(kinds) != 1:
            bad = ", ".join(kinds) if kinds else "none"
            raise j.error(kinds[1] if len(kinds) > 1 else None,
                          f"give exactly one of pin, slider, weld (two points each), got {bad}")
        kind = kinds[0]
        for key, kinds_with in (("axis", ("slider",)), ("angle", ("slider", "weld"))):
            if j.has(key) and kind not in kinds_with:
                raise j.error(key, f"belongs to a {' or '.join(kinds_with)}, not a {kind}")
        name = _name(j, "joint")
        if name in self.joints:
            raise j.error("name", "is used by an earlier joint: names must be unique")
        ends = j.raw(kind)
        if not (isinstance(ends, list) and len(ends) == 2):
            raise j.error(kind, f'must be two points, e.g. ["crank.A", "rod.A"], got {ends!r}')
        first, second = (self.ref(j, kind, e) for e in ends)
        if first[0] == second[0]:
            raise j.error(kind, f"joins body {first[0]!r} to itself: a joint needs two bodies")
        axis = _numbers(j, "axis", 2, "[x, y]: the direction of travel") if kind == "slider" else None
        if axis is not None and math.hypot(*axis) == 0.0:
            raise j.error("axis", "must not be [0, 0]: it gives the direction of travel")
        angle = j.number("angle") if kind != "pin" else None
        j.done()
        spec = JointSpec(name, kind, ends[0], ends[1], axis, angle)
        self.joints[name] = spec
        return spec

    # -- drivers and outputs --------------------------------------------------------
    def target(self, t: Table, kinds: tuple[str, ...]) -> Target:
        given = [k for k in REPORTED if t.has(k)]
        if len(given) != 1:
            raise t.error(given[1] if len(given) > 1 else None,
                          f"give exactly one of {', '.join(kinds)}, got {', '.join(given) or 'none'}")
        kind = given[0]
        if kind not in kinds:
            raise t.error(kind, "a transmission angle can be reported, not driven")
        of = t.text(kind)
        if kind in ("joint", "transmission"):
            if of not in self.joints:
                raise t.error(kind, f"no joint {of!r} (joints: {', '.join(self.joints) or 'none'})")
            joint = self.joints[of]
            if kind == "joint" and joint.kind == "weld":
                raise t.error(kind, f"joint {of!r} is a weld: it has no coordinate")
            if kind == "transmission" and joint.kind != "pin":
                raise t.error(kind, f"joint {of!r} is a {joint.kind}: a transmission angle is taken at a pin")
        elif kind == "angle":
            self.body_name(t, kind, of)
        else:
            body, _ = self.ref(t, kind, of)
            if body == GROUND:
                raise t.error(kind, f"{of!r} is on the ground: it does not move")
        return Target(kind, of)

    def driver(self, raw, number: int, earlier: list[DriverSpec]) -> DriverSpec:
        d = self.sub(raw, "driver", number)
        _refuse_unknown(d, {"name", *REPORTED, "axis", "turns", "offset"})  # transmission: refused below, in words
        name = _name(d, "driver")
        if name in self.joints:
            raise d.error("name", "is the name of a joint: drivers and joints need different names")
        if any(e.name == name for e in earlier):
            raise d.error("name", "is used by an earlier driver: names must be unique")
        target = self.target(d, DRIVEN)
        spec = LinkageSpec("", (), (), tuple(self.joints.values()))
        unit = target_unit(spec, target)
        if d.has("axis") == d.has("turns"):
            raise d.error("axis", "give exactly one of axis (follow an axis) and turns (steady turning)")
        offset = d.number("offset")
        if d.has("turns"):
            turns = d.number("turns")
            if unit != "deg":
                raise d.error("turns", f"turns an angle, but {describe(target)} is in {unit}: follow an axis instead")
            if turns == 0.0 or abs(turns - round(turns)) > WHOLE:
                raise d.error("turns", f"must be a whole number of turns other than 0 (the linkage repeats every "
                                       f"cycle), got {turns!r}")
            d.done()
            return DriverSpec(name, target, turns=turns, offset=offset)
        axis = d.text("axis")
        fault = axis_fault(self.project, axis, unit, describe(target))
        if fault is not None:
            raise d.error("axis", fault)
        d.done()
        return DriverSpec(name, target, axis=axis, offset=offset)

    def output(self, raw, number: int, earlier: list[OutputSpec], bodies) -> OutputSpec:
        o = self.sub(raw, "output", number)
        _refuse_unknown(o, {"name", *REPORTED, "toward", "limits"})
        name = _name(o, "output")
        if any(e.name == name for e in earlier):
            raise o.error("name", "is used by an earlier output of this linkage: names must be unique")
        target = self.target(o, REPORTED)
        if o.has("toward"):
            if target.kind != "transmission":
                raise o.error("toward", "belongs to a transmission output only")
            toward = o.raw("toward")
            if not (isinstance(toward, list) and len(toward) == 2):
                raise o.error("toward", f'must be two points, e.g. ["coupler.A", "rocker.O4"], got {toward!r}')
            pin = self.joints[target.of]
            sides = [split_ref(pin.first), split_ref(pin.second)]
            for ref in toward:
                body, point = self.ref(o, "toward", ref)
                if body not in (sides[0][0], sides[1][0]):
                    raise o.error("toward", f"{ref!r} is not on a body of pin {pin.name!r} "
                                            f"({sides[0][0]}, {sides[1][0]})")
                pin_point = self.points[body][dict(sides)[body]]
                if self.points[body][point] == pin_point:
                    raise o.error("toward", f"{ref!r} sits on the pin: a line needs two points")
            if split_ref(toward[0])[0] == split_ref(toward[1])[0]:
                raise o.error("toward", "the two points must lie on the two different bodies of the pin")
            target = replace(target, toward=(toward[0], toward[1]))
        elif target.kind == "transmission":
            spec = LinkageSpec("", tuple(self.points[GROUND].items()), bodies, tuple(self.joints.values()))
            try:
                transmission_toward(spec, target.of)
            except ValueError as exc:
                raise o.error("toward", str(exc)) from None
        limits = Limits()
        lt = o.table("limits", f"{o.where}, limits")
        if lt is not None:
            limits = Limits(velocity=lt.number("velocity", positive=True),
                            acceleration=lt.number("acceleration", positive=True),
                            jerk=lt.number("jerk", positive=True))
            lt.done()
        o.done()
        return OutputSpec(name, target, limits)


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
    specs: list[LinkageSpec] = []
    for number, raw in enumerate(tables, start=1):
        spec = _LinkageReader(raw, project, file, number).read()
        if any(s.name == spec.name for s in specs):
            raise ProjectError(file, spec.label, "name", "is used by an earlier linkage: names must be unique")
        try:
            build_linkage(project, spec)
        except LinkageFault as exc:
            raise ProjectError(file, exc.where, exc.key, exc.problem) from None
        specs.append(spec)
    return specs


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


# Imported last: projectfile loads every part module (this one included) when it is first imported,
# and linkagemodel reads the specs above.
from .linkagemodel import LinkageFault, build_linkage  # noqa: E402
from .projectfile import Part, register_part  # noqa: E402

register_part(Part(PART_KEY, parse_linkages, dump_linkages))
