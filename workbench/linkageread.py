"""Reading `[[linkage]]` tables (schema: linkagefile.py) into `LinkageSpec`s.

Every bad value is one `ProjectError` naming file, table (e.g. ``linkage
"pusher", joint "B"``) and key; unknown bodies, points, joints and axes are
named with the ones that exist.  A misspelt key is named before the
"is missing" it would otherwise cause.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING

from motionlaws import Limits
from solver.kinematics import GROUND

from . import linkagefile
from .linkagefile import (
    DRIVEN,
    JOINT_KINDS,
    REPORTED,
    WHOLE,
    BodySpec,
    DriverSpec,
    JointSpec,
    LinkageSpec,
    OutputSpec,
    Target,
    axis_fault,
    describe,
    linkage_label,
    split_ref,
    target_unit,
    transmission_toward,
)
from .linkagemodel import LinkageFault, build_linkage
from .tomlcheck import ProjectError, Table

if TYPE_CHECKING:
    from .projectfile import Project


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


def _point_table(raw, error, key: str | None) -> tuple[tuple[str, tuple[float, float]], ...]:
    """A table of point name → [x, y] (mm); `error(key, problem)` names `key`, or the point when None."""
    if not isinstance(raw, dict):
        raise error(key, f"must be a table of points, e.g. {{ A = [40.0, 0.0] }}, got {raw!r}")
    points = []
    for name, xy in raw.items():
        if not name.strip() or "." in name:
            raise error(key or name, f"point name {name!r} must be non-empty and without a dot")
        value = _number_list(xy, 2, lambda p, n=name: error(key or n, f"point {n!r} {p}"), "[x, y] in mm")
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
            ground = _point_table(t.raw("ground"), lambda k, p: ProjectError(self.file, where, k, p), None)
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
            if not linkagefile.LOADS:
                raise t.error("loads", "linkage loads are not read by this version: remove [linkage.loads]")
            spec = replace(spec, loads=linkagefile.LOADS[0].parse(loads, spec))
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
        points = _point_table(b.raw("points"), b.error, "points")
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
        unit, what = target_unit(spec, target), describe(target, spec)
        if d.has("axis") == d.has("turns"):
            raise d.error("axis", "give exactly one of axis (follow an axis) and turns (steady turning)")
        offset = d.number("offset")
        if d.has("turns"):
            turns = d.number("turns")
            if unit != "deg":
                raise d.error("turns", f"turns an angle, but the {what} is in {unit}: follow an axis instead")
            if turns == 0.0 or abs(turns - round(turns)) > WHOLE:
                raise d.error("turns", f"must be a whole number of turns other than 0 (the linkage repeats every "
                                       f"cycle), got {turns!r}")
            d.done()
            return DriverSpec(name, target, turns=turns, offset=offset)
        axis = d.text("axis")
        fault = axis_fault(self.project, axis, unit, f"the {what}")
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


def read_linkages(tables: list, project: Project, file) -> list[LinkageSpec]:
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
