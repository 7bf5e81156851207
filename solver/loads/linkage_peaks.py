"""True peaks of load curves: a dense local re-solve around each sampled maximum, then a parabola.

A load peak is the largest magnitude of a curve over the master angle, not
the largest sample.  Around the best sampled instant (and the other sampled
local maxima within PEAK_CANDIDATE of it, the highest MAX_CANDIDATES of
them; a flat stretch counts as its own peak) the linkage is solved again on
LOCAL_POINTS master angles spanning the two neighbouring sample intervals
(batched Newton from the quintic Hermite interpolation of the cycle's
solutions, as the kinematics' own output peaks do), the loads are
evaluated there, and a parabola through the best dense sample and its two
neighbours gives the peak.

Accuracy: on a 3,600-instant cycle the dense spacing is 0.1°/32, and for a
smooth peak the parabola's value error is of order (spacing)³·|f'''|/|f|,
below 1e-9 relative (the tests check 1e-9 against closed forms).  Where a
load may jump (`breaks`: a driver's segment boundaries, where a motion law's
acceleration may jump) no local grid and no parabola reaches across: the
grid stops JOIN_GAP short of the break on its left and starts at it on its
right, so the peak at a jump is the larger one-sided value, sampled there;
samples next to a break are candidates when their trend carried to it
comes within PEAK_CANDIDATE of the best (solver.kinematics.peaks).  Curves that
come without a re-solve (`local` None) take the parabola through the
sampled neighbours instead: value error of order h³·|f'''| with h the
sample spacing (about 1e-7 relative for a curve with a few harmonics at
3,600 instants).
"""

from __future__ import annotations

import math

import numpy as np

from solver.kinematics.newton import derivatives, newton
from solver.kinematics.peaks import break_reach, first_of_equal, guess_near, on_one_law, parabola_vertex

PEAK_CANDIDATE = 0.99  # other sampled local maxima within this share of the best are refined too
MAX_CANDIDATES = 8  # at most this many of the highest candidates are refined (ripple on a plateau)
# Peaks within motionlaws' TIE of each other are equal; the first in the cycle is reported (first_of_equal).
LOCAL_POINTS = 65  # dense local grid over the two sample intervals around a candidate
FULL_TURN = 2.0 * math.pi  # rad of master angle per machine cycle
PERIODIC_GAP = 1.5  # a closing gap up to this many sample spacings still counts as a whole cycle


def local_kinematics(result, lo: float, hi: float, points: int = LOCAL_POINTS):
    """(θ, q, q', q'') solved afresh at `points` master angles in [lo, hi] rad; arrays (N,) and (N, n).

    Instants where Newton does not converge are left out.
    """
    system = result.system
    theta = np.linspace(lo, hi, points)
    drive = system.drive(theta)
    solved = newton(system, guess_near(result, theta), drive, system.elimination_plan())
    d1, d2 = derivatives(system, solved, drive, orders=2)
    keep = solved.converged
    return theta[keep], solved.q[:, keep].T, d1[:, keep].T, d2[:, keep].T


def refined_peak(theta: np.ndarray, values: np.ndarray, periodic: bool, local=None,
                 breaks: np.ndarray | None = None) -> tuple[float, float]:
    """(max |values|, master angle in rad) refined beyond the samples.

    `periodic`: the samples cover one cycle (the last neighbours the first).
    `local(lo, hi)` -> (θ dense, values dense) re-evaluates the curve on a
    dense grid; without it a parabola through the sampled neighbours is used.
    `breaks`: master angles (rad, over the samples' cycle) where the curve may
    jump (solver.kinematics.peaks.cycle_breaks of the result); nothing is fitted across one.
    """
    y = np.abs(np.asarray(values, dtype=float))
    n = y.size
    if n == 0:
        return 0.0, math.nan
    best = int(np.argmax(y))
    top = (float(y[best]), float(theta[best]))
    if n < 3:
        return top
    found = [top]
    breaks = np.empty(0) if breaks is None else np.asarray(breaks, dtype=float)
    left, right = np.roll(y, 1), np.roll(y, -1)
    if not periodic:
        left[0], right[-1] = -np.inf, -np.inf
    # local maxima near the best; a plateau (equal neighbours on both sides) is its own peak
    cap = (y >= left) & (y >= right) & ((y > left) | (y > right))
    score = np.maximum(np.where(cap, y, -np.inf), break_reach(y, theta, periodic, breaks))
    candidates = np.flatnonzero(score >= top[0] * PEAK_CANDIDATE)
    candidates = candidates[np.argsort(-score[candidates], kind="stable")][:MAX_CANDIDATES]
    for i in candidates:
        lo_i, hi_i = i - 1, i + 1
        if periodic:
            lo = theta[lo_i] - (FULL_TURN if lo_i < 0 else 0.0)
            hi = theta[hi_i % n] + (FULL_TURN if hi_i >= n else 0.0)
        else:
            lo, hi = theta[max(lo_i, 0)], theta[min(hi_i, n - 1)]
        narrow = on_one_law(theta[i], lo, hi, breaks, periodic)
        if local is not None:
            if narrow[1] <= narrow[0]:
                continue
            lt, lv = local(*narrow)
            if lt.size < 3:
                continue
            ly = np.abs(lv)
            at, value = parabola_vertex(lt, ly, int(np.argmax(ly)))
        elif narrow != (lo, hi):  # a jump among the neighbours: the sample stands
            at, value = float(theta[i]), float(y[i])
        else:
            at, value = _sampled_vertex(theta, y, i, lo, hi, periodic)
        found.append((value, at))
    return first_of_equal(found, theta[0], periodic)


def _sampled_vertex(theta, y, i, lo, hi, periodic) -> tuple[float, float]:
    """Parabola through sample i and its neighbours (at lo, hi); the sample itself at an open end or uneven spacing."""
    n = y.size
    even = abs((hi - theta[i]) - (theta[i] - lo)) <= 1e-9 * (hi - lo)
    if not even or not (periodic or 0 < i < n - 1):
        return float(theta[i]), float(y[i])
    return parabola_vertex(np.array([lo, theta[i], hi]), y[[i - 1, i, (i + 1) % n]], 1)


def cycle_weights(theta: np.ndarray, periodic: bool) -> np.ndarray:
    """Trapezoid weights (rad) for averaging over master angle: uniform in θ is uniform in time.

    Periodic: each sample stands for half of each neighbouring interval, the
    last neighbouring the first a cycle later (equal weights 2π/N on the
    uniform grid: the rectangle rule, exact for trigonometric polynomials of
    degree below N).  Otherwise the ordinary trapezoid over the solved span.
    """
    n = theta.size
    if n < 2:
        return np.ones(n)
    if periodic:
        ext = np.concatenate([[theta[-1] - FULL_TURN], theta, [theta[0] + FULL_TURN]])
        return 0.5 * (ext[2:] - ext[:-2])
    w = np.zeros(n)
    d = np.diff(theta)
    w[:-1] += 0.5 * d
    w[1:] += 0.5 * d
    return w


def cycle_rms(theta: np.ndarray, values: np.ndarray, periodic: bool) -> float:
    """Root mean square over master angle (= over time at constant machine speed)."""
    if values.size == 0:
        return 0.0
    w = cycle_weights(theta, periodic)
    return float(np.sqrt(np.sum(w * values * values) / np.sum(w)))


def is_periodic(theta: np.ndarray, complete: bool) -> bool:
    """Whether solved instants cover one whole cycle: complete, and the closing gap no wider than the others."""
    if not complete or theta.size < 3:
        return False
    gap = theta[0] + FULL_TURN - theta[-1]
    return bool(0.0 < gap <= PERIODIC_GAP * float(np.max(np.diff(theta))))


def degrees_at(theta: float, periodic: bool) -> float:
    """Master angle in degrees for a Peak: within [0, 360) on a full cycle."""
    if math.isnan(theta):
        return theta
    return math.degrees(theta % FULL_TURN if periodic else theta)
