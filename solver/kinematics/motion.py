"""Motions a driver follows: a coordinate as a function of master angle.

A motion is any callable ``motion(theta)`` that takes master angles θ in rad
(an array) and returns ``(d, d', d'', d''')``: the driven coordinate (m or
rad) and its derivatives per rad, per rad², per rad³ of master angle, each
shaped like θ.  Time derivatives at a machine speed of N cycles/min follow
as d'·ω, d''·ω², d'''·ω³ with ω = 2π·N/60 rad/s.

* `ProgramMotion` adapts an axis program of motionlaws (master angle in
  degrees, position in the axis unit) with a unit scale and an offset.
* `ConstantSpeed` turns the driven coordinate at a steady rate: k cycles of
  it (2π·k rad) per machine cycle.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

MM = 1e-3  # m per mm: the scale for an axis in mm
DEG = math.pi / 180.0  # rad per degree: the scale for an axis in degrees


@dataclass(frozen=True)
class ProgramMotion:
    """An axis program (motionlaws `Program`) as a driver motion.

    d(θ) = offset + scale·s(θ), where s is the program's position in its own
    unit; `scale` converts that unit to SI (`MM` for mm, `DEG` for degrees)
    and `offset` (m or rad) places the program's zero on the coordinate.
    """

    program: object
    scale: float = 1.0
    offset: float = 0.0

    def __call__(self, theta):
        s, d1, d2, d3 = self.program.master(np.degrees(theta))
        k = self.scale
        return self.offset + k * s, k * d1, k * d2, k * d3


@dataclass(frozen=True)
class ConstantSpeed:
    """d(θ) = start + cycles·θ: `cycles` turns of the coordinate per machine cycle (rad)."""

    cycles: float = 1.0
    start: float = 0.0

    def __call__(self, theta):
        theta = np.asarray(theta, dtype=float)
        zero = np.zeros_like(theta)
        return self.start + self.cycles * theta, zero + self.cycles, zero, zero


def evaluate_motion(motion, theta: np.ndarray) -> np.ndarray:
    """(4, N) array of d, d', d'', d''' of `motion` at master angles θ (rad)."""
    out = np.empty((4, theta.size))
    values = motion(theta)
    for k in range(4):
        out[k] = values[k]
    return out
