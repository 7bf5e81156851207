"""What a linkage carries: mass properties of its bodies, gravity, constant external loads.

SI throughout: kg, kg·m², m, N, N·m; gravity is a vector in m/s² in the
machine (ground) frame, e.g. (0, −9.81) when machine y points up.

* `BodyMass(mass, centre, inertia)` — a body's mass (kg), its centre of
  mass in the body's local frame (m, the frame its points are given in), and
  its moment of inertia about the centre of mass (kg·m²).  A body without
  one is massless.
* `PointForce(body, point, force)` — a constant force (N, fixed direction in
  the machine frame) at a named point of a body, or at body-local (x, y) m.
* `BodyTorque(body, torque)` — a constant torque (N·m, counter-clockwise
  positive) on a body.
* `LinkageLoading(masses, gravity, forces, torques)` gathers them.

`LinkageLoading.compile(mechanism, bodies)` checks everything against the
mechanism and raises `LoadsError(message, item, key)` naming the body or
load at fault and the argument that is wrong, as the kinematics' ModelError
does, so the caller can point at the line of a file.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping

import numpy as np

GROUND = "ground"  # the kinematics' fixed body: it carries no loads of its own


class LoadsError(ValueError):
    """A loading that does not fit the linkage, or a result it cannot be applied to.

    `item` names the body or load at fault (None for the loading as a
    whole); `key` the argument that is wrong (None if no single one).
    """

    def __init__(self, message: str, item: str | None = None, key: str | None = None):
        super().__init__(message)
        self.message = message
        self.item = item
        self.key = key


@dataclass(frozen=True)
class BodyMass:
    """Mass (kg), centre of mass (body-local x, y in m) and moment of inertia about it (kg·m²)."""

    mass: float
    centre: tuple[float, float] = (0.0, 0.0)
    inertia: float = 0.0


@dataclass(frozen=True)
class PointForce:
    """A constant force (Fx, Fy) in N, machine frame, at `point` of `body`.

    `point` is the name of one of the body's points or its body-local
    (x, y) in m.  `name` labels it in messages (default "body.point").
    """

    body: str
    point: str | tuple[float, float]
    force: tuple[float, float]
    name: str = ""


@dataclass(frozen=True)
class BodyTorque:
    """A constant torque (N·m, counter-clockwise positive) on `body`."""

    body: str
    torque: float
    name: str = ""


@dataclass(frozen=True)
class CompiledLoading:
    """A loading as arrays over the mechanism's moving bodies, in the kinematics' body order.

    mass (B,), centre (B, 2) local, inertia (B,); gravity (2,); point forces
    as body index (F,), local point (F, 2), force (F, 2); torques as body
    index (T,) and torque (T,).
    """

    mass: np.ndarray
    centre: np.ndarray
    inertia: np.ndarray
    gravity: np.ndarray
    force_body: np.ndarray
    force_point: np.ndarray
    force: np.ndarray
    torque_body: np.ndarray
    torque: np.ndarray


def _numbers(values, count: int, what: str, item, key) -> tuple[float, ...]:
    try:
        out = tuple(float(v) for v in np.atleast_1d(np.asarray(values, dtype=object)))
    except (TypeError, ValueError):
        raise LoadsError(f"{what} must be {count} number(s), got {values!r}", item, key) from None
    if len(out) != count or not all(math.isfinite(v) for v in out):
        raise LoadsError(f"{what} must be {count} finite number(s), got {values!r}", item, key)
    return out


@dataclass(frozen=True)
class LinkageLoading:
    """Masses of the bodies, gravity (m/s², machine frame) and constant external loads."""

    masses: Mapping[str, BodyMass] = field(default_factory=dict)
    gravity: tuple[float, float] = (0.0, 0.0)
    forces: tuple[PointForce, ...] = ()
    torques: tuple[BodyTorque, ...] = ()

    def compile(self, mechanism, bodies: list[str]) -> CompiledLoading:
        """Arrays for the moving `bodies` (the kinematics' order); raises LoadsError on a misfit."""
        index = {name: b for b, name in enumerate(bodies)}
        B = len(bodies)
        mass, inertia, centre = np.zeros(B), np.zeros(B), np.zeros((B, 2))
        for name, props in self.masses.items():
            b = self._body(index, name, name, "body")
            if not isinstance(props, BodyMass):
                raise LoadsError(f"body {name!r}: mass properties must be a BodyMass, got {props!r}", name, "mass")
            (m,) = _numbers(props.mass, 1, f"mass of body {name!r}", name, "mass")
            (J,) = _numbers(props.inertia, 1, f"moment of inertia of body {name!r}", name, "inertia")
            if m < 0.0:
                raise LoadsError(f"mass of body {name!r} must not be negative, got {m!r} kg", name, "mass")
            if J < 0.0:
                raise LoadsError(f"moment of inertia of body {name!r} must not be negative, got {J!r} kg·m²", name, "inertia")
            mass[b], inertia[b] = m, J
            centre[b] = _numbers(props.centre, 2, f"centre of mass of body {name!r}", name, "centre")
        gravity = np.array(_numbers(self.gravity, 2, "gravity", None, "gravity"))

        f_body, f_point, f_force = [], [], []
        for load in self.forces:
            label = load.name or f"{load.body}.{load.point if isinstance(load.point, str) else 'point'}"
            f_body.append(self._body(index, load.body, label, "body"))
            f_point.append(self._point(mechanism, load, label))
            f_force.append(_numbers(load.force, 2, f"force {label!r}", label, "force"))
        t_body, t_value = [], []
        for load in self.torques:
            label = load.name or f"{load.body}.torque"
            t_body.append(self._body(index, load.body, label, "body"))
            t_value.append(_numbers(load.torque, 1, f"torque {label!r}", label, "torque")[0])
        return CompiledLoading(
            mass, centre, inertia, gravity,
            np.array(f_body, dtype=int), np.array(f_point, dtype=float).reshape(-1, 2),
            np.array(f_force, dtype=float).reshape(-1, 2),
            np.array(t_body, dtype=int), np.array(t_value, dtype=float),
        )

    @staticmethod
    def _body(index, name, item, key) -> int:
        if name == GROUND:
            raise LoadsError("the ground does not move: it takes no masses or loads", item, key)
        if not isinstance(name, str) or name not in index:
            known = ", ".join(index) or "none"
            raise LoadsError(f"{key}: no moving body named {name!r} (bodies: {known})", item, key)
        return index[name]

    @staticmethod
    def _point(mechanism, load: PointForce, label: str) -> tuple[float, float]:
        """Body-local (x, y) in m of a force's point: a named point of its body, or given as numbers."""
        if not isinstance(load.point, str):
            return _numbers(load.point, 2, f"point of force {label!r}", label, "point")
        points = mechanism.bodies[load.body].points
        if load.point not in points:
            known = ", ".join(points) or "none"
            raise LoadsError(f"point: body {load.body!r} has no point {load.point!r} (points: {known})", label, "point")
        return points[load.point]
