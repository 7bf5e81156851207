"""A planar mechanism as the caller builds it: bodies, points, joints, drivers.

Units are SI: body-local point coordinates and rough positions in metres,
angles in radians.  The ground is the body named ``"ground"``; it is fixed
at the origin with φ = 0, so points on the ground are given in machine
(global) coordinates.  Every other body carries three coordinates
(x, y, φ): the position of its local origin and the angle of its local x
axis.  Its rough initial coordinates (`guess`) only need to pick the
assembly the designer drew; the solver assembles from them.

Points are addressed as ``(body, point)`` pairs of names.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .base import Constraint, Coordinate
from .errors import ModelError

GROUND = "ground"


@dataclass
class Body:
    """A rigid body: its named points (body-local, m) and rough initial coordinates (m, m, rad)."""

    name: str
    guess: tuple[float, float, float] = (0.0, 0.0, 0.0)
    points: dict[str, tuple[float, float]] = field(default_factory=dict)


@dataclass(frozen=True)
class Driver:
    """Holds `coordinate` equal to `motion` of the master angle (see `motion.Motion`)."""

    name: str
    coordinate: Constraint
    motion: object


def _finite(values, what: str, item: str, key: str, count: int) -> tuple[float, ...]:
    try:
        out = tuple(float(v) for v in values)
    except (TypeError, ValueError):
        raise ModelError(f"{what} must be {count} numbers, got {values!r}", item, key) from None
    if len(out) != count or not all(math.isfinite(v) for v in out):
        raise ModelError(f"{what} must be {count} finite numbers, got {values!r}", item, key)
    return out


class Mechanism:
    """Bodies, points, joints and drivers of one planar linkage.

    Build it with `add_body`, `add_point`, `add_joint` and `add_driver`; each
    checks its input and raises `ModelError` naming the item at fault.
    Names of bodies are unique; names of joints and drivers are unique
    together (they label the rows of a report).
    """

    def __init__(self, name: str = ""):
        self.name = name
        self.bodies: dict[str, Body] = {GROUND: Body(GROUND)}
        self.joints: dict[str, Constraint] = {}
        self.drivers: dict[str, Driver] = {}

    # -- building -----------------------------------------------------------
    def add_body(self, name: str, guess=(0.0, 0.0, 0.0), points=None) -> Body:
        """Add a moving body with rough initial (x m, y m, φ rad) and named local points (m)."""
        if not isinstance(name, str) or not name:
            raise ModelError(f"a body needs a non-empty name, got {name!r}", None, "name")
        if name in self.bodies:
            raise ModelError(f"body {name!r} is defined twice", name, "name")
        body = Body(name, _finite(guess, f"guess of body {name!r}", name, "guess", 3))
        self.bodies[name] = body
        for point, xy in (points or {}).items():
            self.add_point(name, point, xy)
        return body

    def add_point(self, body: str, name: str, xy) -> None:
        """Name a point of `body` at body-local (x, y) in m (ground: machine coordinates)."""
        owner = self._body(body, body, "body")
        if not isinstance(name, str) or not name:
            raise ModelError(f"a point of body {body!r} needs a non-empty name", body, "points")
        if name in owner.points:
            raise ModelError(f"point {name!r} of body {body!r} is defined twice", body, "points")
        owner.points[name] = _finite(xy, f"point {name!r} of body {body!r}", body, "points", 2)

    def add_joint(self, joint: Constraint) -> Constraint:
        """Add a joint (a `Revolute`, `Prismatic`, `Fixed` or any other kind)."""
        self._new_name(joint.name, "joint")
        joint.resolve(self).bind(self)  # check bodies and points now, with the joint's name
        self.joints[joint.name] = joint
        return joint

    def add_driver(self, name: str, coordinate: Constraint, motion) -> Driver:
        """Hold `coordinate` (a joint coordinate or an absolute one) equal to `motion`."""
        self._new_name(name, "driver")
        resolved = coordinate.resolve(self)
        if not isinstance(resolved, Coordinate):
            raise ModelError(f"driver {name!r} must drive a coordinate", name, "coordinate")
        resolved.bind(self)
        if not callable(motion):
            raise ModelError(f"driver {name!r} needs a motion: a function of master angle", name, "motion")
        driver = Driver(name, coordinate, motion)
        self.drivers[name] = driver
        return driver

    def remove(self, name: str) -> None:
        """Remove the joint or driver called `name`."""
        if name in self.joints:
            del self.joints[name]
        elif name in self.drivers:
            del self.drivers[name]
        else:
            raise ModelError(f"no joint or driver named {name!r}", name, "name")

    # -- look-ups used by constraint kinds ----------------------------------
    def point(self, ref, item: str, key: str) -> np.ndarray:
        """Local coordinates (m) of the point `ref` = (body, point); errors name `item` and `key`."""
        if not (isinstance(ref, (tuple, list)) and len(ref) == 2):
            raise ModelError(f"{key} must be a (body, point) pair, got {ref!r}", item, key)
        body = self._body(ref[0], item, key)
        if ref[1] not in body.points:
            known = ", ".join(body.points) or "none"
            raise ModelError(
                f"{key}: body {ref[0]!r} has no point {ref[1]!r} (points: {known})", item, key
            )
        return np.array(body.points[ref[1]], dtype=float)

    def body(self, name: str, item: str, key: str) -> Body:
        """The body called `name`; errors name `item` and `key`."""
        return self._body(name, item, key)

    def joint(self, name: str, item: str, key: str) -> Constraint:
        if name not in self.joints:
            known = ", ".join(self.joints) or "none"
            raise ModelError(f"{key}: no joint named {name!r} (joints: {known})", item, key)
        return self.joints[name]

    @property
    def moving(self) -> list[str]:
        """Names of the moving bodies, in the order of their coordinates."""
        return [b for b in self.bodies if b != GROUND]

    def length_scale(self) -> float:
        """A characteristic length (m): the largest extent of the points; 1 m if none."""
        coords = [np.array(p) for b in self.bodies.values() for p in b.points.values()]
        coords += [np.array(b.guess[:2]) for b in self.bodies.values() if b.name != GROUND]
        if not coords:
            return 1.0
        pts = np.array(coords)
        extent = float(np.max(np.ptp(pts, axis=0))) if len(pts) > 1 else 0.0
        extent = max(extent, float(np.max(np.abs(pts))))
        return extent if extent > 0.0 else 1.0

    # -- internals -----------------------------------------------------------
    def _body(self, name, item, key) -> Body:
        if not isinstance(name, str) or name not in self.bodies:
            known = ", ".join(self.bodies)
            raise ModelError(f"{key}: no body named {name!r} (bodies: {known})", item, key)
        return self.bodies[name]

    def _new_name(self, name, what: str) -> None:
        if not isinstance(name, str) or not name:
            raise ModelError(f"a {what} needs a non-empty name, got {name!r}", None, "name")
        if name in self.joints or name in self.drivers:
            raise ModelError(f"the name {name!r} is used twice (joints and drivers share names)", name, "name")
