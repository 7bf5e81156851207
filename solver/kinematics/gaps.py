"""Where a linkage that cannot be assembled stays open.

`open_gaps` assembles the linkage as nearly as it can at one master angle
and reports,
for every joint and driver, how far its equations stay from zero there:
the size the solver judges by (scaled: lengths in units of the linkage's
size, angles in rad) and, for a joint whose equations are lengths, the gap
in m.  A chain too short to close lies straight, its gaps adding up to the
missing length.

The nearest configuration is the least-squares one with the drivers held:
Gauss–Newton from the
model's placing (`newton.assemble`, as the cycle starts), then, when that
does not close the linkage, scipy's trust-region least squares on the
scaled equations from there.  Gauss–Newton alone aims every step at a zero
that does not exist and can stop with the whole gap in one joint and a link
askew.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize import least_squares

from .base import LENGTH
from .newton import assemble
from .system import System

DRIVER_WEIGHT = 1e6  # a driver's equation against a joint's in the least squares: a driver holds (to ~1e-12 rad)


@dataclass(frozen=True)
class Gap:
    """A joint or driver in the nearest configuration: `size` scaled (as the solver judges),
    `length` in m (None where its equations are angles)."""

    name: str
    size: float
    length: float | None


def open_gaps(mechanism, theta: float = 0.0) -> tuple[np.ndarray, tuple[Gap, ...]]:
    """The nearest configuration q at master angle θ (rad), and every joint and driver's gap
    there, widest first."""
    system = System(mechanism)
    q, closed = assemble(system, system.initial_guess(), theta)
    drive = system.drive(np.array([theta]))
    if not closed:
        q = _least_squares(system, q, drive, set(mechanism.drivers))
    res = system.residual(q[:, None], drive)[:, 0]
    scaled = res * system.row_scale
    sums: dict[str, list] = {}
    for name, unit, r, sr in zip(system.row_names, system.row_units, res, scaled):
        entry = sums.setdefault(name, [0.0, 0.0, True])
        entry[0] += sr * sr
        entry[1] += r * r if unit == LENGTH else 0.0
        entry[2] = entry[2] and unit == LENGTH
    gaps = [Gap(name, math.sqrt(s), math.sqrt(length) if lengths else None)
            for name, (s, length, lengths) in sums.items()]
    return q, tuple(sorted(gaps, key=lambda g: -g.size))


def _least_squares(system: System, q: np.ndarray, drive: np.ndarray, drivers: set[str]) -> np.ndarray:
    """The local minimum of the sum of squared scaled equations, from `q`, the drivers' equations
    weighted `DRIVER_WEIGHT` times: the linkage is shown where its drivers put it."""
    weight = system.row_scale * np.where([n in drivers for n in system.row_names], DRIVER_WEIGHT, 1.0)

    def scaled(x):
        return system.residual(x[:, None], drive)[:, 0] * weight

    def jacobian(x):
        _, jac = system.residual_jacobian(x[:, None], drive)
        return jac.dense()[:, :, 0] * weight[:, None]

    found = least_squares(scaled, q, jac=jacobian, method="trf", x_scale=system.col_scale,
                          xtol=1e-14, ftol=1e-14, gtol=1e-14)
    return found.x
