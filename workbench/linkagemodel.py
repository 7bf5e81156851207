"""A `[[linkage]]` as the solver's model: a `Mechanism` in SI, and what to ask for each output.

The file's mm and degrees are converted here, once (`MM`, `DEG` of
solver.kinematics).  `build_linkage` can be called after every edit: it
raises `LinkageFault` (where, key, problem) for a linkage that cannot be
built as it stands, e.g. when an edit has removed the axis a driver follows.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from solver.kinematics import (
    DEG,
    GROUND,
    MM,
    BodyAngle,
    ConstantSpeed,
    Fixed,
    JointCoordinate,
    Mechanism,
    ModelError,
    PointX,
    PointY,
    Prismatic,
    ProgramMotion,
    Revolute,
    TransmissionAngle,
)

from .linkagefile import DriverSpec, LinkageSpec, Target, axis_fault, describe, split_ref, target_unit, transmission_toward

if TYPE_CHECKING:
    from .projectfile import Project


class LinkageFault(ValueError):
    """A linkage the solver cannot build as it stands (after an edit, say): where, key and problem."""

    def __init__(self, where: str, key: str | None, problem: str):
        super().__init__(problem)
        self.where, self.key, self.problem = where, key, problem


@dataclass(frozen=True)
class BuiltLinkage:
    """The solver's `Mechanism` of a linkage and, per output name, what to ask its results for."""

    spec: LinkageSpec
    mechanism: Mechanism
    outputs: dict[str, object]
    units: dict[str, str]  # output name → "mm" or "deg"


MODEL_KEYS = {"i": None, "j": None, "guide": "slider", "slider": "slider", "axis": "axis", "guess": "place",
              "points": "points", "motion": "axis", "name": "name"}  # solver argument → file key


def _coordinate(target: Target, spec: LinkageSpec):
    if target.kind == "joint":
        return JointCoordinate(target.of)
    if target.kind == "angle":
        return BodyAngle(target.of)
    if target.kind == "x":
        return PointX(split_ref(target.of))
    if target.kind == "y":
        return PointY(split_ref(target.of))
    toward = target.toward or transmission_toward(spec, target.of)
    return TransmissionAngle(target.of, split_ref(toward[0]), split_ref(toward[1]))


SNAP = 1e-11  # deg: a master angle this close to a 9-decimal value is that value (rad → deg rounding)


class AxisMotion(ProgramMotion):
    """An axis program as a driver motion, d(θ) = offset + scale·s(θ): solver.kinematics'
    `ProgramMotion` (its segment boundaries are its breaks), with θ (rad) turned back into
    the degrees the user meant: radians of 30° come back as 29.999999999999996°."""

    def __call__(self, theta):
        deg = np.degrees(theta)
        exact = np.round(deg, 9)
        deg = np.where(np.abs(deg - exact) < SNAP, exact, deg)
        s, d1, d2, d3 = self.program.master(deg)
        k = self.scale
        return self.offset + k * s, k * d1, k * d2, k * d3


def _motion(project: Project, spec: LinkageSpec, driver: DriverSpec):
    scale = MM if target_unit(spec, driver.target) == "mm" else DEG
    offset = (driver.offset or 0.0) * scale
    if driver.turns is not None:
        return ConstantSpeed(cycles=driver.turns, start=offset)
    return AxisMotion(project.programs[driver.axis], scale=scale, offset=offset)


def build_linkage(project: Project, spec: LinkageSpec, guesses: dict | None = None) -> BuiltLinkage:
    """The linkage in SI.  `guesses` (body → (x m, y m, φ rad)) replace the rough placements.

    Raises `LinkageFault` where the model cannot be built (an axis an edit
    has removed or switched in unit, a fault the solver finds).
    """
    for driver in spec.drivers:
        if driver.axis is not None:
            fault = axis_fault(project, driver.axis, target_unit(spec, driver.target), f"the {describe(driver.target, spec)}")
            if fault is not None:
                raise LinkageFault(f'{spec.label}, driver "{driver.name}"', "axis", fault)
    m = Mechanism(spec.name)
    where, kind = spec.label, None  # the table being built and, for a joint, its kind (the key of its points)
    try:
        for point, (x, y) in spec.ground:
            where = f"{spec.label}, ground"
            m.add_point(GROUND, point, (x * MM, y * MM))
        for body in spec.bodies:
            where = f'{spec.label}, body "{body.name}"'
            x, y, angle = body.place
            guess = guesses[body.name] if guesses else (x * MM, y * MM, angle * DEG)
            m.add_body(body.name, guess=guess, points={p: (u * MM, v * MM) for p, (u, v) in body.points})
        for j in spec.joints:
            where, kind = f'{spec.label}, joint "{j.name}"', j.kind
            first, second = split_ref(j.first), split_ref(j.second)
            if j.kind == "pin":
                m.add_joint(Revolute(j.name, first, second))
            elif j.kind == "slider":
                m.add_joint(Prismatic(j.name, first, second, axis=j.axis or (1.0, 0.0), angle=(j.angle or 0.0) * DEG))
            else:
                m.add_joint(Fixed(j.name, first, second, angle=(j.angle or 0.0) * DEG))
        kind = None
        for d in spec.drivers:
            where = f'{spec.label}, driver "{d.name}"'
            m.add_driver(d.name, _coordinate(d.target, spec), _motion(project, spec, d))
    except ModelError as exc:
        key = MODEL_KEYS.get(exc.key, exc.key) or kind
        raise LinkageFault(where, key, exc.message) from None
    outputs = {o.name: _coordinate(o.target, spec) for o in spec.outputs}
    units = {o.name: target_unit(spec, o.target) for o in spec.outputs}
    return BuiltLinkage(spec, m, outputs, units)
