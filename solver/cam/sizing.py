"""Sizing: the smallest cam and the largest roller that keep a limit.

* `smallest_prime_radius` — roller followers, pressure-angle limit.
  Translating: closed form.  With t = tan φ_lim the textbook form
  tan φ = (s' − e)/(s + d), d = √(Rp² − e²), keeps |φ| ≤ φ_lim exactly when
  d ≥ |s' − e|/t − s at every cam angle, so d = max(|s' − e|/t − s) (a true
  maximum, refined) and Rp = √(d² + e²).  Oscillating: the pivot, arm and
  roller stay as laid out and the prime circle (hence the initial arm angle)
  varies; max |φ| is not monotone in it (the arm lies along the line of
  centres at both ends of the feasible range), so a scan finds the first
  prime radius that keeps the limit and `brentq` pins the crossing.
* `largest_roller` — the pitch curve is fixed by the prime circle, so the
  roller that just avoids undercut equals the smallest convex pitch radius
  (closed form; divided by a common-practice ratio if one is asked for).
* `smallest_base_radius` — flat-faced followers, no cusp.  Translating:
  closed form from Rb + s + s'' > 0, Rb = min_radius − min(s + s'').
  Oscillating: scan and `brentq` as above, pivot and face offset held.

Every result is a `SizeResult`; when no size meets the target the value is
None and the message says why.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, replace
from typing import Callable

import numpy as np
from scipy.optimize import brentq

from .analysis import DEFAULT_POINTS, analyse
from .errors import CamGeometryError
from .extremes import TWO_PI, refine_max
from .followers import FlatFollower, RollerFollower
from .geometry import Cam, cam_points
from .limits import common_practice_limits
from .oscillating import OscillatingFlat, OscillatingRoller
from .translating import TranslatingFlat, TranslatingRoller

SCAN_STEPS = 200  # sizes tried across the feasible range to bracket the first that keeps the limit
SCAN_POINTS = 720  # cam-angle grid of the scan (0.5°); the bracket is then checked at full accuracy
EDGE = 1e-6  # relative: stay this far inside an open range of feasible sizes
SIZE_XTOL = 1e-12  # relative tolerance on a found size


@dataclass(frozen=True)
class SizeResult:
    """A size found by a sizing helper.

    value: m (None when no size meets the target); governed_by: what sets
    it ("pressure_angle", "undercut", "curvature_ratio", "cusp",
    "min_radius" or "geometry"); at: cam angle (rad) where the governing
    limit is met, None for "geometry"; message: plain words when value is
    None or the geometry, not the limit, sets the size.
    """

    value: float | None
    governed_by: str
    at: float | None = None
    message: str = ""


def _grid(points: int) -> np.ndarray:
    return TWO_PI * np.arange(points) / points


def _refined_grid_max(f: Callable[[np.ndarray], np.ndarray], cam: Cam, points: int):
    theta = _grid(points)
    return refine_max(f, theta, f(theta), cam.motion.breakpoints)


def _first_crossing(g, lo: float, hi: float) -> tuple[float, bool] | None:
    """Smallest x in [lo, hi] with g(x) ≤ 0, by a scan and `brentq`: (x, limit_binds) or None.

    `g(x, coarse)` is the margin (≤ 0 meets the target), +inf where the
    layout is impossible.  limit_binds is False when the target already
    holds where the scan starts or where the layout first becomes possible.
    """
    xs = lo + (hi - lo) * np.linspace(0.0, 1.0, SCAN_STEPS + 1)
    ok = np.flatnonzero([g(x, True) <= 0 for x in xs])
    if ok.size == 0:
        return None
    fine = functools.lru_cache(maxsize=None)(lambda x: g(float(x), False))
    k = int(ok[0])
    # The coarse grid may misplace the crossing by a step or so: settle it at full accuracy.
    while k > 0 and fine(xs[k - 1]) <= 0:
        k -= 1
    while k <= SCAN_STEPS and fine(xs[k]) > 0:
        k += 1
    if k > SCAN_STEPS:
        return None
    if k == 0:
        return float(xs[0]), False
    a, b = float(xs[k - 1]), float(xs[k])
    while not math.isfinite(fine(a)) and b - a > SIZE_XTOL * b:  # brentq needs finite ends
        mid = 0.5 * (a + b)
        a, b = (a, mid) if fine(mid) <= 0 else (mid, b)
    if not math.isfinite(fine(a)):
        return b, False
    return brentq(fine, a, b, xtol=SIZE_XTOL * b), True


def _margin(make_cam, measure, points: int):
    """g(x, coarse): measure(make_cam(x), grid points, coarse), ≤ 0 where the target is met, +inf where impossible."""

    def g(x, coarse):
        try:
            return measure(make_cam(x), SCAN_POINTS if coarse else points, coarse)
        except CamGeometryError:
            return math.inf

    return g


def _max_abs_pressure_angle(cam: Cam, points: int, coarse: bool) -> float:
    f = lambda th: np.abs(cam_points(cam, th).pressure_angle)  # noqa: E731
    return float(f(_grid(points)).max()) if coarse else _refined_grid_max(f, cam, points).value


def smallest_prime_radius(cam: Cam, pressure_angle: float | None = None, points: int = DEFAULT_POINTS) -> SizeResult:
    """Smallest prime radius (m) that keeps max |φ| ≤ `pressure_angle` (rad; default common practice).

    Roller followers only; see the module docstring for what is held.
    """
    follower = cam.follower
    if not isinstance(follower, RollerFollower):
        raise CamGeometryError("a prime circle belongs to a roller follower", key="follower")
    limit = common_practice_limits(follower).pressure_angle if pressure_angle is None else pressure_angle
    if not 0.0 < limit < math.pi / 2:
        raise CamGeometryError("the pressure-angle limit must lie between 0 and 90°", key="pressure_angle")
    r = follower.roller_radius
    if isinstance(follower, TranslatingRoller):
        e, t = follower.offset, math.tan(limit)

        def need(th):
            s, s1, _ = cam.motion(th)
            return np.abs(s1 - e) / t - s

        d = _refined_grid_max(need, cam, points)
        s_min = float(cam.motion(_grid(points))[0].min())
        floor = max(-s_min, math.sqrt(max(r * r - e * e, 0.0)), 0.0)  # centre above O, base circle > 0
        if d.value > floor:
            return SizeResult(math.hypot(d.value, e), "pressure_angle", d.at)
        return SizeResult(
            max(math.hypot(floor, e), r), "geometry", None,
            "the pressure angle stays within the limit on any prime circle the geometry allows; "
            "the value is the bound the roller and offset set, and the prime radius must exceed it",
        )
    if isinstance(follower, OscillatingRoller):
        d, L = follower.pivot_distance, follower.arm_length
        lo = max(abs(d - L), r) * (1 + EDGE)
        hi = (d + L) * (1 - EDGE)
        g = _margin(
            lambda rp: replace(cam, follower=follower.with_prime_radius(rp)),
            lambda c, n, coarse: _max_abs_pressure_angle(c, n, coarse) - limit,
            points,
        )
        found = _first_crossing(g, lo, hi)
        if found is None:
            return SizeResult(
                None, "pressure_angle", None,
                "no prime circle keeps the pressure angle within the limit with this pivot and arm; "
                "move the pivot or lengthen the arm",
            )
        value, crossed = found
        at = analyse(replace(cam, follower=follower.with_prime_radius(value)), points).max_pressure_angle.at
        if not crossed:
            return SizeResult(
                value, "geometry", None,
                "the smallest prime circle this pivot and arm allow already keeps the limit",
            )
        return SizeResult(value, "pressure_angle", at)
    raise CamGeometryError("no sizing rule for this follower type", key="follower")


def largest_roller(cam: Cam, curvature_ratio: float = 1.0, points: int = DEFAULT_POINTS) -> SizeResult:
    """Largest roller radius (m) on the given prime circle with convex pitch radius ≥ ratio × roller.

    curvature_ratio 1 gives the undercut threshold itself; common practice
    asks for 2–3 (`limits.CURVATURE_RATIO_RANGE`).
    """
    follower = cam.follower
    if not isinstance(follower, RollerFollower):
        raise CamGeometryError("a roller size belongs to a roller follower", key="follower")
    if not curvature_ratio >= 1.0:
        raise CamGeometryError("the curvature ratio must be at least 1", key="curvature_ratio")
    follower = replace(follower, roller_radius=0.0)  # the pitch curve does not depend on the roller
    pitch = analyse(replace(cam, follower=follower), points).pitch_radii.convex
    value = pitch.value / curvature_ratio
    governed = "undercut" if curvature_ratio == 1.0 else "curvature_ratio"
    if value >= follower.prime_radius:
        return SizeResult(
            follower.prime_radius, "geometry", None,
            "the base circle, not the curvature, limits the roller: it must stay smaller than the prime radius",
        )
    return SizeResult(value, governed, pitch.at)


def _min_profile_radius(cam: Cam, points: int, coarse: bool) -> float:
    f = lambda th: -cam_points(cam, th).profile_radius  # noqa: E731
    return -(float(f(_grid(points)).max()) if coarse else _refined_grid_max(f, cam, points).value)


def smallest_base_radius(cam: Cam, min_radius: float = 0.0, points: int = DEFAULT_POINTS) -> SizeResult:
    """Smallest base radius (m) of a flat-faced follower's cam with profile radius ≥ `min_radius` (m).

    With min_radius 0 this is the cusp threshold: any larger base circle
    has no cusp.  See the module docstring for what is held.
    """
    follower = cam.follower
    if not isinstance(follower, FlatFollower):
        raise CamGeometryError("this sizing rule is for flat-faced followers", key="follower")
    if not (math.isfinite(min_radius) and min_radius >= 0.0):
        raise CamGeometryError("min_radius must be zero or positive", key="min_radius")
    governed = "cusp" if min_radius == 0.0 else "min_radius"
    if isinstance(follower, TranslatingFlat):

        def need(th):
            s, _, s2 = cam.motion(th)
            return min_radius - (s + s2)

        rb = _refined_grid_max(need, cam, points)
        s_min = float(cam.motion(_grid(points))[0].min())
        floor = max(-s_min, 0.0)  # the face stays clear of the cam centre
        if rb.value > floor:
            return SizeResult(rb.value, governed, rb.at)
        return SizeResult(
            floor, "geometry", None,
            "any base circle the geometry allows has no cusp; the value is the bound that keeps "
            "the face clear of the cam centre, and the base radius must exceed it",
        )
    if isinstance(follower, OscillatingFlat):
        d, f = follower.pivot_distance, follower.face_offset
        lo = max(-f, 0.0) + d * EDGE
        hi = (d - f) * (1 - EDGE)
        g = _margin(
            lambda rb: replace(cam, follower=follower.with_base_radius(rb)),
            lambda c, n, coarse: min_radius - _min_profile_radius(c, n, coarse),
            points,
        )
        found = _first_crossing(g, lo, hi)
        if found is None:
            return SizeResult(None, governed, None, "no base circle avoids a cusp with this pivot and face offset")
        value, crossed = found
        at = analyse(replace(cam, follower=follower.with_base_radius(value)), points).profile_radii.convex.at
        if not crossed:
            return SizeResult(value, "geometry", None, "the smallest base circle the face allows has no cusp")
        return SizeResult(value, governed, at)
    raise CamGeometryError("no sizing rule for this follower type", key="follower")
