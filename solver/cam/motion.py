"""Follower motion against cam angle, and the cam's turning direction.

The cam geometry works in SI units and radians: cam angle θ in rad, the
follower position s in m (translating follower) or rad (oscillating
follower), and its derivatives per radian of cam angle.  Conversion from the
axis units of a project file (mm, deg) happens once, at the edge, through
the `scale` argument of `motion_from_program`.

Position s = 0 puts the follower on the base (prime) circle; s > 0 lifts it
away from the cam centre.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

from .errors import CamGeometryError

TWO_PI = 2.0 * math.pi
DATUM_SAMPLES = 36_000  # 0.01° grid on which the lowest axis position is sought


class Turning(enum.IntEnum):
    """Direction in which the cam turns, seen with the machine frame's z axis toward the viewer.

    The value is the sign σ of the cam's angular velocity about +z.
    """

    COUNTERCLOCKWISE = 1
    CLOCKWISE = -1


MotionFunction = Callable[[np.ndarray], tuple]


@dataclass(frozen=True)
class CamMotion:
    """The follower motion a cam must produce over one turn.

    `evaluate(theta)` takes cam angles in rad (any array, any value: the
    motion repeats every 2π) and returns ``(s, ds/dθ, d²s/dθ²)`` as arrays
    shaped like `theta` (extra returned items are ignored).  `breakpoints`
    are cam angles in rad where d²s/dθ² may jump (segment joins); extreme
    searches never interpolate across them.
    """

    evaluate: MotionFunction
    breakpoints: tuple[float, ...] = ()

    def __call__(self, theta) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        out = self.evaluate(np.asarray(theta, dtype=float))
        return tuple(np.asarray(v, dtype=float) for v in out[:3])  # type: ignore[return-value]


def motion_from_function(function: MotionFunction, breakpoints=()) -> CamMotion:
    """A `CamMotion` from any periodic function θ (rad) → (s, s', s'') in SI units."""
    return CamMotion(function, tuple(float(b) % TWO_PI for b in breakpoints))


def motion_from_program(program, scale: float, datum: float | None = None) -> CamMotion:
    """The motion of a compiled axis (`motionlaws.Program`) as a cam motion in SI units.

    `scale` converts the axis unit to SI: 1e-3 for an axis in mm driving a
    translating follower, π/180 for an axis in deg driving an oscillating
    one.  `datum` (axis units) is the position that sits on the base circle;
    by default the lowest position of the axis over the cycle.  An indexing
    axis (one that advances every cycle) cannot be cut on a cam.
    """
    if program.index:
        raise CamGeometryError(
            "an indexing axis advances every cycle and cannot be produced by a cam", key="axis"
        )
    if not (isinstance(scale, (int, float)) and math.isfinite(scale) and scale > 0):
        raise CamGeometryError("the unit scale must be a positive number", key="scale")
    if datum is None:
        grid = np.union1d(np.linspace(0.0, 360.0, DATUM_SAMPLES + 1), program.bounds)
        datum = float(np.min(program.master(grid)[0]))
    datum = float(datum)

    def evaluate(theta):
        s, s1, s2, _ = program.master(np.degrees(theta))
        return (s - datum) * scale, s1 * scale, s2 * scale

    return CamMotion(evaluate, tuple(math.radians(b) for b in program.bounds[:-1]))
