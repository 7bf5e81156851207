"""True extremes and sign regions of a quantity around the cam, beyond the sampling grid.

The analysis samples a uniform grid of cam angles.  An extreme is then
refined inside the two grid cells beside the best sample by repeated
zooming (each round shrinks the bracket `ZOOM_POINTS / 2`-fold), with cells
split at the motion's breakpoints so that no bracket straddles a jump of
d²s/dθ².  The boundaries of a region where a quantity is ≥ 0 are found by
`scipy.optimize.brentq` between the two samples that bracket them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.optimize import brentq

TWO_PI = 2.0 * math.pi
ZOOM_POINTS = 65  # each zoom round shrinks the bracket 32-fold
ZOOM_ROUNDS = 4  # 0.1° cells end up known to ~1e-7° of cam angle
TIE = 1e-9  # relative: values this close count as equal; the first cam angle wins
BOUNDARY_XTOL = 1e-13  # rad: cam angle of a region boundary


@dataclass(frozen=True)
class Extreme:
    """A value (SI) and the cam angle `at` (rad, in [0, 2π)) where it first occurs."""

    value: float
    at: float


@dataclass(frozen=True)
class Interval:
    """Cam angles from `start` to `end` (rad, in [0, 2π]); `end < start` wraps through 0."""

    start: float
    end: float

    @property
    def span(self) -> float:
        """Length of the interval, rad."""
        return self.end - self.start if self.end >= self.start else self.end - self.start + TWO_PI


def first_max(values: np.ndarray) -> int:
    """Index of the first element within `TIE` of the maximum of `values`."""
    top = float(np.max(values))
    return int(np.argmax(values >= top - TIE * abs(top)))


def _pieces(a: float, b: float, breakpoints) -> list[tuple[float, float]]:
    cuts = [a, b]
    for bp in breakpoints:
        for shift in (-TWO_PI, 0.0, TWO_PI):
            if a < bp + shift < b:
                cuts.append(bp + shift)
    cuts.sort()
    return list(zip(cuts[:-1], cuts[1:]))


def refine_max(
    f: Callable[[np.ndarray], np.ndarray], theta: np.ndarray, values: np.ndarray, breakpoints=()
) -> Extreme:
    """The true maximum of f near the best of `values` = f(theta) on a uniform periodic grid."""
    k = first_max(values)
    h = TWO_PI / len(theta)
    best, at = float(values[k]), float(theta[k])
    for a, b in _pieces(at - h, at + h, breakpoints):
        for _ in range(ZOOM_ROUNDS):
            xs = np.linspace(a, b, ZOOM_POINTS)
            ys = f(xs)
            j = int(np.argmax(ys))  # exact here: a tie rule would bias the angle on a flat top
            if ys[j] > best:
                best, at = float(ys[j]), float(xs[j])
            step = xs[1] - xs[0]
            a, b = max(a, xs[j] - step), min(b, xs[j] + step)
    return Extreme(best, at % TWO_PI)


def regions_where(
    f: Callable[[np.ndarray], np.ndarray], theta: np.ndarray, values: np.ndarray
) -> tuple[Interval, ...]:
    """Intervals of cam angle where f ≥ 0, given `values` = f(theta) on a uniform periodic grid."""
    inside = values >= 0
    if inside.all():
        return (Interval(0.0, TWO_PI),)
    if not inside.any():
        return ()
    h = TWO_PI / len(theta)

    def scalar(x):
        return float(f(np.array([x]))[0])

    def boundary(i):  # f changes sign between theta[i] and theta[i] + h
        a = float(theta[i])
        try:
            return brentq(scalar, a, a + h, xtol=BOUNDARY_XTOL) % TWO_PI
        except ValueError:  # the re-evaluated ends do not bracket (a jump met exactly)
            return (a + 0.5 * h) % TWO_PI

    changes = np.flatnonzero(inside != np.roll(inside, -1))  # inside[i] != inside[i + 1]
    starts = [(i, boundary(i)) for i in changes if not inside[i]]
    ends = [(i, boundary(i)) for i in changes if inside[i]]
    out = []
    for i, start in starts:  # each start pairs with the next end around the circle
        end = next((e for j, e in ends if j > i), ends[0][1])
        out.append(Interval(start, end))
    return tuple(sorted(out, key=lambda iv: iv.start))
