"""True extremes and sign regions of a quantity around the cam, beyond the sampling grid.

The analysis samples a uniform grid of cam angles.  An extreme is then
refined inside the two grid cells beside the best sample by repeated
zooming (each round shrinks the bracket `ZOOM_POINTS / 2`-fold), with cells
split at the motion's breakpoints so that no bracket straddles a jump of
d²s/dθ².  The boundaries of a region where a quantity is ≥ 0 are pinned the
same way inside the cell where its sign changes, then interpolated.  All
brackets share one evaluation per round: the cost is a few evaluations of
the cam, not one per bracket.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

TWO_PI = 2.0 * math.pi
ZOOM_POINTS = 65  # a zoom round shrinks an extreme's bracket 32-fold, a boundary's 64-fold
ZOOM_ROUNDS = 4  # 0.1° cells end up known to ~1e-7° of cam angle
TIE = 1e-9  # relative: values this close count as equal; the first cam angle wins
BOUNDARY_ROUNDS = 5  # a 0.1° cell shrinks 64-fold per round: to ~2e-12 rad, then interpolated


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


def refine_maxima(evaluate, getters, theta: np.ndarray, grid_values, breakpoints=()) -> list[Extreme]:
    """True maxima of several quantities near the best of their samples on a uniform periodic grid.

    `evaluate(angles)` computes everything at an array of cam angles once;
    `getters[i](result)` picks quantity i from it; `grid_values[i]` are its
    samples on `theta`.  All brackets of all quantities share one
    `evaluate` call per zoom round.
    """
    h = TWO_PI / len(theta)
    best, at, brackets = [], [], []  # brackets: (quantity, a, b)
    for i, values in enumerate(grid_values):
        k = first_max(values)
        best.append(float(values[k]))
        at.append(float(theta[k]))
        brackets += [(i, a, b) for a, b in _pieces(at[i] - h, at[i] + h, breakpoints)]
    for _ in range(ZOOM_ROUNDS):
        xs = np.concatenate([np.linspace(a, b, ZOOM_POINTS) for _, a, b in brackets])
        result = evaluate(xs)
        columns = [getter(result) for getter in getters]
        nxt = []
        for n, (i, a, b) in enumerate(brackets):
            part = slice(n * ZOOM_POINTS, (n + 1) * ZOOM_POINTS)
            ys, x = columns[i][part], xs[part]
            j = int(np.argmax(ys))  # exact here: a tie rule would bias the angle on a flat top
            if ys[j] > best[i]:
                best[i], at[i] = float(ys[j]), float(x[j])
            step = x[1] - x[0]
            nxt.append((i, max(a, x[j] - step), min(b, x[j] + step)))
        brackets = nxt
    return [Extreme(v, t % TWO_PI) for v, t in zip(best, at)]


def refine_max(
    f: Callable[[np.ndarray], np.ndarray], theta: np.ndarray, values: np.ndarray, breakpoints=()
) -> Extreme:
    """The true maximum of f near the best of `values` = f(theta) on a uniform periodic grid."""
    return refine_maxima(f, [lambda v: v], theta, [values], breakpoints)[0]


def regions_where(evaluate, getter, theta: np.ndarray, values: np.ndarray) -> tuple[Interval, ...]:
    """Intervals of cam angle where a quantity is ≥ 0, given its samples `values` on `theta`.

    Each boundary is pinned by zooming into the grid cell where the sign
    changes (all boundaries share one `evaluate` call per round) and a
    final linear interpolation.
    """
    inside = values >= 0
    if inside.all():
        return (Interval(0.0, TWO_PI),)
    if not inside.any():
        return ()
    h = TWO_PI / len(theta)
    changes = np.flatnonzero(inside != np.roll(inside, -1))  # inside[i] != inside[i + 1]
    lo = theta[changes].astype(float)
    hi = lo + h
    rising = ~inside[changes]  # outside → inside: a region starts here
    for _ in range(BOUNDARY_ROUNDS):
        xs = lo[:, None] + (hi - lo)[:, None] * np.linspace(0.0, 1.0, ZOOM_POINTS)
        ys = getter(evaluate(xs.ravel())).reshape(xs.shape)
        signs = (ys >= 0) == rising[:, None]  # True once past the boundary
        signs[:, -1] = True
        j = np.maximum(np.argmax(signs, axis=1), 1)
        rows = np.arange(len(lo))
        lo, hi = xs[rows, j - 1], xs[rows, j]
        y_lo, y_hi = ys[rows, j - 1], ys[rows, j]
    with np.errstate(invalid="ignore", divide="ignore"):
        t = np.where(y_hi != y_lo, y_lo / (y_lo - y_hi), 0.5)
    where = (lo + np.clip(t, 0.0, 1.0) * (hi - lo)) % TWO_PI
    starts = [(i, x) for i, x, r in zip(changes, where, rising) if r]
    ends = [(i, x) for i, x, r in zip(changes, where, rising) if not r]
    out = []
    for i, start in starts:  # each start pairs with the next end around the circle
        end = next((e for j, e in ends if j > i), ends[0][1])
        out.append(Interval(float(start), float(end)))
    return tuple(sorted(out, key=lambda iv: iv.start))
