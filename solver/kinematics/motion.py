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

A motion whose derivatives may jump at some master angles (a program's
segment boundaries) says where with ``motion.breaks()``: those angles in
rad within one cycle [0, 2π), repeating every cycle.  The solver never
steps or fits across them (`breaks_between`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

MM = 1e-3  # m per mm: the scale for an axis in mm
DEG = math.pi / 180.0  # rad per degree: the scale for an axis in degrees
TURN = 2.0 * math.pi  # rad of master angle per machine cycle
BREAK_MERGE = 1e-12  # rad: breaks of different motions this close are one (the same boundary in degrees)
ON_BREAK = 1e-10  # rad: an angle this close to a break is on it — programs put angles a hair below a segment
#                   start onto it (30° back from radians is 29.999999999999996°)


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

    def breaks(self) -> np.ndarray:
        """Segment starts (rad in [0, 2π)): where a derivative of the program may jump."""
        return np.radians(self.program.bounds[:-1]) % TURN


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


def breaks_between(motions, lo: float, hi: float) -> np.ndarray:
    """Sorted master angles b (rad) with lo < b ≤ hi where any of `motions` may jump (all cycles)."""
    starts = [np.asarray(m.breaks(), dtype=float) for m in motions if hasattr(m, "breaks")]
    starts = [b for b in starts if b.size]
    if not starts or not hi > lo:
        return np.empty(0)
    base = np.unique(np.concatenate(starts) % TURN)
    cycles = np.arange(math.floor(lo / TURN) - 1, math.floor(hi / TURN) + 2)
    every = (base[None, :] + TURN * cycles[:, None]).ravel()
    every = np.sort(every[(every > lo) & (every <= hi)])
    if every.size > 1:
        every = every[np.append(True, np.diff(every) > BREAK_MERGE)]
    return every
