"""Outputs: any coordinate, with its derivatives, over the solved instants.

An output is a `Coordinate` (coordinates.py: a point's x or y, a body angle,
a joint coordinate) or a `TransmissionAngle` (transmission.py).  For a
coordinate g(q) along the solution q(θ) the chain rule gives

    g' = Φg q',   g'' = Φg q'' − γ_g,   g''' = Φg q''' − η_g

with Φg, γ_g, η_g the coordinate's own row, so no output needs formulas of
its own.  `OutputCurve` holds the values per master angle and scales them
to time at the result's machine speed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .base import Coordinate
from .errors import ModelError
from .frames import Pose, Rates


@dataclass(frozen=True)
class OutputCurve:
    """An output over master angle `theta` (rad): value and derivatives per rad^k of master angle.

    `unit` is "m" or "rad"; `velocity`, `acceleration`, `jerk` are per s,
    s², s³ at `speed` cycles/min.
    """

    name: str
    unit: str
    theta: np.ndarray
    value: np.ndarray
    d1: np.ndarray
    d2: np.ndarray
    d3: np.ndarray
    speed: float

    @property
    def omega(self) -> float:
        return 2.0 * math.pi * self.speed / 60.0

    @property
    def velocity(self) -> np.ndarray:
        return self.d1 * self.omega

    @property
    def acceleration(self) -> np.ndarray:
        return self.d2 * self.omega**2

    @property
    def jerk(self) -> np.ndarray:
        return self.d3 * self.omega**3

    def derivative(self, order: int) -> np.ndarray:
        """The value (order 0) or its order-th time derivative."""
        return (self.value, self.velocity, self.acceleration, self.jerk)[order]


class CoordinateProbe:
    """Evaluates one coordinate kind on body coordinates q, q', q'', q''' (n, N)."""

    def __init__(self, system, coordinate):
        mechanism = system.mechanism
        resolved = coordinate.resolve(mechanism)
        if not isinstance(resolved, Coordinate):
            raise ModelError(f"{coordinate!r} is not a coordinate that can be reported", getattr(coordinate, "name", None), "output")
        self.coordinate = resolved
        self.name = resolved.name
        self.unit = resolved.UNIT
        binding = resolved.bind(mechanism)
        index = {b: i for i, b in enumerate(system.bodies)}
        self.slots = [index.get(b, -1) for b in binding.bodies]  # -1: ground
        self.par = system.stack_params([binding])
        self.system = system

    def _poses(self, q):
        out = []
        N = q.shape[1]
        for b in self.slots:
            if b < 0:
                z = np.zeros((1, N))
                out.append(Pose(z, z, z, z + 1.0, z))
            else:
                x, y, phi = q[3 * b : 3 * b + 1], q[3 * b + 1 : 3 * b + 2], q[3 * b + 2 : 3 * b + 3]
                out.append(Pose(x, y, phi, np.cos(phi), np.sin(phi)))
        return out

    def _rates(self, dq):
        out = []
        N = dq.shape[1]
        for b in self.slots:
            if b < 0:
                z = np.zeros((1, N))
                out.append(Rates(z, z, z))
            else:
                out.append(Rates(dq[3 * b : 3 * b + 1], dq[3 * b + 1 : 3 * b + 2], dq[3 * b + 2 : 3 * b + 3]))
        return out

    def _gradient_dot(self, partials, v):
        total = 0.0
        for slot, b in enumerate(self.slots):
            if b < 0:
                continue
            for c in range(3):
                total = total + partials[3 * slot + c] * v[3 * b + c]
        return np.broadcast_to(total, (v.shape[1],)) if np.ndim(total) == 0 else np.asarray(total).reshape(-1)

    def evaluate(self, q, dq, ddq, dddq):
        """(g, g', g'', g''') each (N,) per rad^k of master angle."""
        kind = type(self.coordinate)
        poses = self._poses(q)
        rates, accels = self._rates(dq), self._rates(ddq)
        value = np.asarray(kind.residual(self.par, *poses)[0]).reshape(-1)
        partials = kind.jacobian(self.par, *poses)[0]
        gamma = kind.gamma(self.par, poses, rates)[0]
        eta = kind.eta(self.par, poses, rates, accels)[0]
        d1 = self._gradient_dot(partials, dq)
        d2 = self._gradient_dot(partials, ddq) - gamma
        d3 = self._gradient_dot(partials, dddq) - eta
        N = q.shape[1]
        return tuple(np.broadcast_to(np.asarray(v, dtype=float).reshape(-1), (N,)).copy() for v in (value, d1, d2, d3))


def evaluate(system, output, theta, q, dq, ddq, dddq, speed: float) -> OutputCurve:
    """The `OutputCurve` of `output` from body coordinates and derivatives, each (n, N)."""
    if hasattr(output, "evaluate_on"):
        name, unit, values = output.evaluate_on(system, q, dq, ddq, dddq)
    else:
        probe = CoordinateProbe(system, output)
        name, unit, values = probe.name, probe.unit, probe.evaluate(q, dq, ddq, dddq)
    return OutputCurve(name, unit, theta, *values, speed)


def evaluate_output(result, output) -> OutputCurve:
    """The `OutputCurve` of `output` over a `CycleResult`."""
    q, dq, ddq, dddq = (a.T for a in (result.q, result.dq, result.ddq, result.dddq))
    return evaluate(result.system, output, result.theta, q, dq, ddq, dddq, result.speed)
