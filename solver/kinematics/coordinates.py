"""Coordinates a driver can hold to a motion and an output can report.

Each is a one-row constraint kind (see base.py) measuring one number:

* `RelativeAngle` — φ_j − φ_i (rad), the joint coordinate of a pin.
* `SliderStroke` — position of a point of body j along an axis fixed in
  body i (m), the joint coordinate of a slider.
* `BodyAngle` — φ of a body (rad).
* `PointX`, `PointY` — machine x or y of a body's point (m).
* `JointCoordinate` — whichever of the first two the named joint has.

For a point P = r + a with a = A s' (ω = φ', α = φ''):
    x: Φq = [1, 0, −a_y], γ = a_x ω², η = 3 a_x ω α − a_y ω³
    y: Φq = [0, 1,  a_x], γ = a_y ω², η = 3 a_y ω α + a_x ω³
An angle is linear in q, so its γ and η are zero.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from . import projection
from .base import ANGLE, LENGTH, Binding, Constraint, Coordinate, distinct_bodies
from .errors import ModelError

AXIS_MIN_LENGTH = 1e-12  # m: a slider axis shorter than this has no direction


def unit_axis(axis, item: str, key: str = "axis") -> np.ndarray:
    """`axis` (2 numbers) scaled to unit length; refuse a zero or non-finite one."""
    try:
        u = np.array([float(v) for v in axis])
    except (TypeError, ValueError):
        raise ModelError(f"{key} must be two numbers, got {axis!r}", item, key) from None
    if u.shape != (2,) or not np.all(np.isfinite(u)) or np.hypot(*u) < AXIS_MIN_LENGTH:
        raise ModelError(f"{key} must be a non-zero direction (x, y), got {axis!r}", item, key)
    return u / np.hypot(*u)


@dataclass(frozen=True)
class RelativeAngle(Coordinate):
    """φ_j − φ_i in rad: the angle of body j relative to body i."""

    name: str
    body_i: str
    body_j: str

    UNIT = "rad"
    ROW_UNITS = (ANGLE,)

    def bind(self, model) -> Binding:
        model.body(self.body_i, self.name, "i")
        model.body(self.body_j, self.name, "j")
        distinct_bodies(self.name, self.body_i, self.body_j)
        return Binding((self.body_i, self.body_j), {})

    @classmethod
    def residual(cls, par, pi, pj):
        return [pj.phi - pi.phi]

    @classmethod
    def jacobian(cls, par, pi, pj):
        return [[0.0, 0.0, -1.0, 0.0, 0.0, 1.0]]

    @classmethod
    def gamma(cls, par, poses, rates):
        return [0.0]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        return [0.0]


@dataclass(frozen=True)
class SliderStroke(Coordinate):
    """Stroke (m) of point `slider` of body j along `axis` through point `guide` of body i."""

    name: str
    guide: tuple[str, str]
    slider: tuple[str, str]
    axis: tuple[float, float] = (1.0, 0.0)

    UNIT = "m"
    ROW_UNITS = (LENGTH,)

    def bind(self, model) -> Binding:
        si = model.point(self.guide, self.name, "guide")
        sj = model.point(self.slider, self.name, "slider")
        distinct_bodies(self.name, self.guide[0], self.slider[0])
        return Binding((self.guide[0], self.slider[0]), {"si": si, "sj": sj, "w": unit_axis(self.axis, self.name)})

    @classmethod
    def residual(cls, par, pi, pj):
        return [projection.value(pi, pj, par["si"], par["sj"], par["w"])]

    @classmethod
    def jacobian(cls, par, pi, pj):
        return [projection.jacobian(pi, pj, par["si"], par["sj"], par["w"])]

    @classmethod
    def gamma(cls, par, poses, rates):
        return [projection.gamma(poses, rates, par["si"], par["sj"], par["w"])]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        return [projection.eta(poses, rates, accels, par["si"], par["sj"], par["w"])]


@dataclass(frozen=True)
class BodyAngle(Coordinate):
    """φ of `body` in rad (angle of its local x axis from the machine x axis)."""

    body: str
    name: str = ""

    UNIT = "rad"
    ROW_UNITS = (ANGLE,)

    def __post_init__(self):
        if not self.name:
            object.__setattr__(self, "name", f"{self.body}.angle")

    def bind(self, model) -> Binding:
        model.body(self.body, self.name, "body")
        return Binding((self.body,), {})

    @classmethod
    def residual(cls, par, p):
        return [p.phi]

    @classmethod
    def jacobian(cls, par, p):
        return [[0.0, 0.0, 1.0]]

    @classmethod
    def gamma(cls, par, poses, rates):
        return [0.0]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        return [0.0]


@dataclass(frozen=True)
class PointCoordinate(Coordinate):
    """Machine x or y (m) of `point` = (body, point): the formulas of the module docstring, once.

    A subclass sets AXIS (0: x, 1: y).  With a = A s' the point's rotated
    offset, `along` is a's component on that axis and `across` the matching
    component of perp(a) (−a_y for x, a_x for y), so that
    Φq = [e, across], γ = along ω², η = 3 along ω α + across ω³.
    """

    point: tuple[str, str]
    name: str = ""

    UNIT = "m"
    ROW_UNITS = (LENGTH,)
    AXIS: ClassVar[int] = 0
    SUFFIX: ClassVar[tuple[str, str]] = (".x", ".y")
    UNIT_ROW: ClassVar[tuple[tuple[float, float], tuple[float, float]]] = ((1.0, 0.0), (0.0, 1.0))  # ∂/∂(x, y) of the body

    def __post_init__(self):
        if not self.name:
            object.__setattr__(self, "name", ".".join(map(str, self.point)) + self.SUFFIX[self.AXIS])

    def bind(self, model) -> Binding:
        s = model.point(self.point, self.name, "point")
        return Binding((self.point[0],), {"s": s})

    @classmethod
    def _parts(cls, p, local):
        """(origin, along, across) of body pose p for the local point `local`."""
        ax, ay = p.rotate(local)
        return (p.x, ax, -ay) if cls.AXIS == 0 else (p.y, ay, ax)

    @classmethod
    def residual(cls, par, p):
        origin, along, _ = cls._parts(p, par["s"])
        return [origin + along]

    @classmethod
    def jacobian(cls, par, p):
        _, _, across = cls._parts(p, par["s"])
        return [[*cls.UNIT_ROW[cls.AXIS], across]]

    @classmethod
    def gamma(cls, par, poses, rates):
        _, along, _ = cls._parts(poses[0], par["s"])
        return [along * rates[0].phi ** 2]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        _, along, across = cls._parts(poses[0], par["s"])
        w, al = rates[0].phi, accels[0].phi
        return [3.0 * along * w * al + across * w**3]


@dataclass(frozen=True)
class PointX(PointCoordinate):
    """Machine x (m) of `point` = (body, point)."""

    AXIS = 0


@dataclass(frozen=True)
class PointY(PointCoordinate):
    """Machine y (m) of `point` = (body, point)."""

    AXIS = 1


@dataclass(frozen=True)
class JointCoordinate(Constraint):
    """The coordinate of the joint called `joint`: a pin's relative angle, a slider's stroke."""

    joint: str

    @property
    def name(self) -> str:  # type: ignore[override]
        return self.joint

    def resolve(self, model) -> Coordinate:
        joint = model.joint(self.joint, self.joint, "joint")
        coordinate = joint.coordinate()
        if coordinate is None:
            raise ModelError(
                f"joint {self.joint!r} ({type(joint).__name__}) has no joint coordinate to drive or report",
                self.joint,
                "joint",
            )
        return coordinate

    def bind(self, model) -> Binding:
        return self.resolve(model).bind(model)
