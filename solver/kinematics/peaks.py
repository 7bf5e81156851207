"""Peaks of linkage outputs, their limits, and the highest machine speed that keeps them.

A peak is a true maximum, not the largest sample.  Around the best sampled
instant (and around any other sampled local maximum within PEAK_CANDIDATE
of it) the mechanism is solved again on a dense local grid — a batched
Newton from the Hermite interpolation of the neighbouring solutions — and
a parabola through the best dense sample and its two neighbours gives the
peak.  On a cycle of 3,600 instants the local grid spacing is 0.1°/32 ≈
0.003°; for a smooth peak the parabola's error in the value is of order
(spacing)³ relative, far below the 0.1 % the product promises (the tests
check agreement with closed forms to 1e-9).  A peak at the end of an
unfinished cycle is taken as sampled.

No local grid reaches across a break of a driver (a segment boundary of
its program, where a derivative may jump): it stops JOIN_GAP short of a
break on the left and starts at the break on the right, so a parabola is
never fitted over a jump and the one-sided values at a jump are sampled
exactly.  Samples next to a break are candidates when their trend carried
to the break comes within PEAK_CANDIDATE of the best.  At most
MAX_CANDIDATES (the highest) are refined: on a plateau — an output at rest
or at constant rate — every sample ties, and each would cost a local solve.

The types are motionlaws' `Peak` and `LimitCheck`, so linkage outputs report
like axes: `Peak.at` in master degrees, values in SI per s^k.  Position,
velocity, acceleration and jerk of a linkage driven by cam-like motion
programs scale as N⁰, N¹, N², N³ with machine speed N, which gives the
highest speed within all limits in closed form, as for an axis.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from motionlaws.peaks import LimitCheck, Peak
from motionlaws.peaksearch import TIE
from motionlaws.program import Limits

from .hermite import interpolate
from .march import JOIN_GAP
from .motion import ON_BREAK, breaks_between
from .newton import derivatives, newton
from .outputs import OutputCurve, evaluate

PEAK_CANDIDATE = 0.99  # other sampled local maxima within this share of the best are refined too
LOCAL_POINTS = 65  # dense local grid over the two sample intervals around a candidate
MAX_CANDIDATES = 8  # sampled maxima refined per peak (on a plateau every sample ties with the best)
# Peaks within motionlaws' TIE of each other are equal; the first in the cycle is reported, as for an axis.
QUANTITIES = ("velocity", "acceleration", "jerk")


@dataclass(frozen=True)
class OutputPeaks:
    """Peaks of one output: extremes of its value and peak |velocity|, |acceleration|, |jerk|.

    `minimum`, `maximum`: Peak of the value (m or rad, signed); `peaks`: the
    three time-derivative peaks (absolute values, per s^k at `speed`).
    """

    name: str
    unit: str
    speed: float
    minimum: Peak
    maximum: Peak
    peaks: dict[str, Peak]


def _local(result, output, lo: float, hi: float) -> OutputCurve:
    """The output solved afresh on LOCAL_POINTS master angles in [lo, hi] (rad)."""
    return solve_output_at(result, output, np.linspace(lo, hi, LOCAL_POINTS))


def guess_near(result, theta: np.ndarray) -> np.ndarray:
    """q (n, N) at master angles θ (rad) from a solved result, to start Newton from: the quintic
    Hermite interpolation of its instants, a Taylor step beyond its ends."""
    t = result.theta
    q, dq, ddq = result.q.T, result.dq.T, result.ddq.T
    if t.size < 2:
        return np.repeat(q, theta.size, axis=1)
    guess = interpolate(t, q, dq, ddq, np.clip(theta, t[0], t[-1]))
    outside = (theta < t[0]) | (theta > t[-1])
    if np.any(outside):  # beyond the solved ends: Taylor from the nearest end
        end = np.where(theta < t[0], 0, t.size - 1)
        h = theta - t[end]
        taylor = q[:, end] + dq[:, end] * h + 0.5 * ddq[:, end] * h * h + result.dddq.T[:, end] * h**3 / 6
        guess[:, outside] = taylor[:, outside]
    return guess


def solve_output_at(result, output, theta: np.ndarray) -> OutputCurve:
    """The output solved afresh at master angles θ (rad, any order) near a solved result: a batched
    Newton from the Hermite interpolation of the result's instants (a Taylor step beyond its ends).
    Instants where Newton does not converge are left out."""
    system = result.system
    drive = system.drive(theta)
    solved = newton(system, guess_near(result, theta), drive, system.elimination_plan())
    d1, d2, d3 = derivatives(system, solved, drive)
    curve = evaluate(system, output, theta, solved.q, d1, d2, d3, result.speed)
    if not solved.converged.all():
        keep = solved.converged
        curve = OutputCurve(curve.name, curve.unit, theta[keep], curve.value[keep], curve.d1[keep], curve.d2[keep], curve.d3[keep], curve.speed)
    return curve


def parabola_vertex(x: np.ndarray, y: np.ndarray, k: int) -> tuple[float, float]:
    """(x, y) of the vertex of the parabola through samples k−1, k, k+1 (the sample itself at an end,
    or where the three make no cap: a kink or a flat top)."""
    if k == 0 or k == len(y) - 1:
        return float(x[k]), float(y[k])
    y0, y1, y2 = y[k - 1], y[k], y[k + 1]
    denom = y0 - 2.0 * y1 + y2
    if denom >= 0.0:
        return float(x[k]), float(y1)
    h = x[k + 1] - x[k]
    shift = 0.5 * (y0 - y2) / denom
    return float(x[k] + shift * h), float(y1 - 0.25 * (y0 - y2) * shift)


def refined_max(result, output, signal, order: int, sign: float = 1.0) -> tuple[float, float]:
    """(max of sign·f, master angle in rad) where f is the value (order 0) or |derivative| (order ≥ 1)."""
    theta = result.theta
    y = sign * signal if order == 0 else np.abs(signal)
    best = float(np.max(y))
    found = [(best, float(theta[int(np.argmax(y))]))]
    if theta.size < 2:
        return found[0]
    periodic = result.success and theta.size > 2
    step = theta[1] - theta[0]
    breaks = cycle_breaks(result)
    for i in _candidates(y, theta, best, periodic, breaks):
        lo, hi = theta[i] - step, theta[i] + step
        if not periodic:
            lo, hi = max(lo, theta[0]), min(hi, theta[-1])
        lo, hi = on_one_law(theta[i], lo, hi, breaks, periodic)
        if hi <= lo:
            continue
        local = _local(result, output, lo, hi)
        if local.theta.size < 3:
            continue
        values = local.derivative(order)
        ly = sign * values if order == 0 else np.abs(values)
        k = int(np.argmax(ly))
        at, value = parabola_vertex(local.theta, ly, k)
        found.append((value, at))
    return first_of_equal(found, theta[0], periodic)


def first_of_equal(found: list[tuple[float, float]], start: float, periodic: bool) -> tuple[float, float]:
    """The largest of (value, master rad) pairs; of those within TIE of it, the first in the cycle from
    `start` (or the earliest, when not periodic)."""
    best = max(value for value, _ in found)
    ties = [(value, at) for value, at in found if value >= best - TIE * abs(best)]
    return min(ties, key=lambda f: (f[1] - start) % (2.0 * math.pi) if periodic else f[1])


def cycle_breaks(result) -> np.ndarray:
    """Master angles (rad, increasing) where a driver of the result may jump: over one cycle from its
    first instant when it solved a whole cycle, else within its solved instants."""
    theta = result.theta
    if result.system is None or theta.size == 0:
        return np.empty(0)
    end = theta[0] + 2.0 * math.pi if result.success else theta[-1]
    return breaks_between(result.system.motions, theta[0] - JOIN_GAP, end - JOIN_GAP)


def on_one_law(center: float, lo: float, hi: float, breaks: np.ndarray, periodic: bool) -> tuple[float, float]:
    """[lo, hi] (rad) narrowed to the law `center` lies on: from a break at or before it, to JOIN_GAP
    short of the next (`breaks` of one cycle, repeated a cycle either side when periodic)."""
    if periodic and breaks.size:
        breaks = np.concatenate([breaks - 2.0 * math.pi, breaks, breaks + 2.0 * math.pi])
    for b in breaks[(breaks > lo) & (breaks <= hi)]:
        if b <= center + ON_BREAK:  # center on or after the break: on its right-hand law
            lo = b
        else:
            hi = min(hi, b - JOIN_GAP)
    return lo, hi


def break_reach(y: np.ndarray, theta: np.ndarray, periodic: bool, breaks: np.ndarray) -> np.ndarray:
    """(n,) for the samples next to a break: the line through each and its neighbour on the same
    side, carried to the break (its one-sided value, to first order); −inf elsewhere."""
    n, turn = y.size, 2.0 * math.pi
    reach = np.full(n, -np.inf)
    if n < 3:
        return reach
    for b in breaks:
        j = int(np.searchsorted(theta, b - ON_BREAK, side="left"))  # the first sample on its right (n: wrapped)
        for i, inner in ((j - 1, j - 2), (j, j + 1)):  # the last sample before it, the first after
            if not periodic and not (0 <= min(i, inner) and max(i, inner) < n):
                continue
            i, inner = i % n, inner % n
            to_break = (b - theta[i] + math.pi) % turn - math.pi  # signed, wrapped
            apart = (theta[i] - theta[inner] + math.pi) % turn - math.pi
            value = y[i] + (y[i] - y[inner]) * to_break / apart if apart else y[i]
            reach[i] = max(reach[i], value)
    return reach


def _candidates(y: np.ndarray, theta: np.ndarray, best: float, periodic: bool, breaks: np.ndarray) -> np.ndarray:
    """Indices of samples worth refining, the highest first, at most MAX_CANDIDATES: sampled local
    maxima within PEAK_CANDIDATE of the best, and samples next to a break whose `break_reach` is."""
    left, right = np.roll(y, 1), np.roll(y, -1)
    if not periodic:
        left[0], right[-1] = -np.inf, -np.inf
    score = np.maximum(np.where((y >= left) & (y >= right), y, -np.inf), break_reach(y, theta, periodic, breaks))
    candidates = np.flatnonzero(score >= best * PEAK_CANDIDATE - 1e-300)
    if candidates.size == 0:
        return np.array([int(np.argmax(y))])
    return candidates[np.argsort(score[candidates])[::-1][:MAX_CANDIDATES]]


def output_peaks(result, output) -> OutputPeaks:
    """Extremes of an output's value and its velocity, acceleration and jerk peaks over a result."""
    try:
        return _output_peaks(result, output)
    finally:
        if result.system is not None:  # its scratch memory serves the next solve (workspace.py)
            result.system.release_workspace()


def _output_peaks(result, output) -> OutputPeaks:
    curve = result.output(output)
    span = 2.0 * math.pi

    def deg(theta: float) -> float:
        return math.degrees(theta % span if result.success else theta)

    high, at_high = refined_max(result, output, curve.value, 0, 1.0)
    low, at_low = refined_max(result, output, curve.value, 0, -1.0)
    peaks = {}
    for k, q in enumerate(QUANTITIES, start=1):
        value, at = refined_max(result, output, curve.derivative(k), k)
        peaks[q] = Peak(value, deg(at))
    return OutputPeaks(curve.name, curve.unit, result.speed, Peak(-low, deg(at_low)), Peak(high, deg(at_high)), peaks)


def check_limits(peaks: OutputPeaks, limits: Limits) -> tuple[LimitCheck, ...]:
    """Each set limit (SI per s^k) against its peak; `used` is peak/limit."""
    out = []
    for q, limit in limits.items():
        if limit is None:
            continue
        peak = peaks.peaks[q]
        out.append(LimitCheck(q, float(limit), peak, peak.value / float(limit)))
    return tuple(out)


def max_speed(peaks: OutputPeaks, limits: Limits) -> float | None:
    """Highest machine speed (cycles/min) within every set limit; None without limits or motion."""
    bounds = []
    for k, (q, limit) in enumerate(limits.items(), start=1):
        value = peaks.peaks[q].value
        if limit is None or not value:
            continue
        bounds.append(peaks.speed * (float(limit) / value) ** (1.0 / k))
    return min(bounds) if bounds else None
