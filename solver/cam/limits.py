"""Verdicts of a cam analysis against limits, with the common-practice defaults.

The defaults are rules of thumb (common practice, no single source):
pressure angle ≤ 30° for translating roller followers and ≤ 35–45° for
oscillating ones; the smallest convex radius of curvature of the pitch curve
at least 2–3 × the roller radius.  Undercut (roller radius ≥ convex pitch
radius), cusps (flat-face profile radius ≤ 0) and corners (a jump in
ds/dθ) fail always: no smooth cam can be cut there.  An oscillating
follower's pivot must lie outside the disc its turning cam sweeps (pivot
distance > the outline's largest radius): a geometric impossibility
otherwise, not a rule of thumb, so it fails always too.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .analysis import CamAnalysis
from .followers import Follower, RollerFollower
from .translating import TranslatingFlat

TRANSLATING_PRESSURE_ANGLE = math.radians(30.0)  # common practice for translating followers
OSCILLATING_PRESSURE_ANGLE_RANGE = (math.radians(35.0), math.radians(45.0))  # common practice
OSCILLATING_PRESSURE_ANGLE = OSCILLATING_PRESSURE_ANGLE_RANGE[0]  # the cautious end of the range
CURVATURE_RATIO_RANGE = (2.0, 3.0)  # common practice: convex pitch radius / roller radius
CURVATURE_RATIO = CURVATURE_RATIO_RANGE[0]  # the least margin common practice accepts
PIVOT_CLEARANCE = 0.0  # m: at or below this the turning cam reaches the pivot (geometry, not a rule)
PIVOT_TOUCH = 1e-9  # relative to the layout size: a clearance within rounding of zero is a pivot on the outline


@dataclass(frozen=True)
class CamLimits:
    """Limits a cam must keep; None leaves a check out.

    pressure_angle: rad, on max |φ|.  curvature_ratio: smallest convex pitch
    radius over roller radius (roller followers with a roller).
    min_radius: m, smallest convex profile radius (any follower).
    """

    pressure_angle: float | None = None
    curvature_ratio: float | None = None
    min_radius: float | None = None


def common_practice_limits(follower: Follower) -> CamLimits:
    """The common-practice limits for `follower` (see the module docstring)."""
    angle = OSCILLATING_PRESSURE_ANGLE if follower.motion_kind == "angular" else TRANSLATING_PRESSURE_ANGLE
    ratio = CURVATURE_RATIO if isinstance(follower, RollerFollower) and follower.roller_radius > 0 else None
    return CamLimits(pressure_angle=angle, curvature_ratio=ratio)


@dataclass(frozen=True)
class CamCheck:
    """One check of a cam.

    quantity: "pressure_angle" (rad), "curvature_ratio" (–), "min_radius" (m),
    "undercut" (value: smallest convex pitch radius, limit: roller radius, m),
    "cusp" (value: smallest profile radius, limit 0, m), "pivot_clearance"
    (oscillating followers; value: pivot distance − largest outline radius,
    limit 0, m; at: where the follower touches that radius), "face_width"
    (value: width the contact needs about the line of travel, m) or
    "corner" (value: number of cam angles where ds/dθ jumps, limit 0; at:
    the first of them).
    used: share of the limit taken (None for cusp, corner and pivot_clearance);
    ok: within the limit.
    at: cam angle (rad) where the value occurs.
    """

    quantity: str
    value: float
    limit: float
    at: float
    used: float | None
    ok: bool

    @property
    def headroom(self) -> float | None:
        """Share of the limit still free (negative when over), None where not a ratio."""
        return None if self.used is None else 1.0 - self.used


@dataclass(frozen=True)
class CamVerdict:
    """All checks of one cam; ok when every check passes."""

    checks: tuple[CamCheck, ...]

    @property
    def ok(self) -> bool:
        return all(c.ok for c in self.checks)

    def get(self, quantity: str) -> CamCheck | None:
        return next((c for c in self.checks if c.quantity == quantity), None)


def _ratio(value: float, limit: float) -> float:
    return math.inf if limit == 0 and value > 0 else (value / limit if limit else 0.0)


def check_cam(analysis: CamAnalysis, limits: CamLimits | None = None) -> CamVerdict:
    """Check `analysis` against `limits` (default: `common_practice_limits`)."""
    follower = analysis.follower
    limits = common_practice_limits(follower) if limits is None else limits
    checks = []
    clearance = analysis.pivot_clearance
    if clearance is not None:
        ok = clearance.value > PIVOT_CLEARANCE + PIVOT_TOUCH * analysis.size
        checks.append(CamCheck("pivot_clearance", clearance.value, PIVOT_CLEARANCE, clearance.at, None, ok))
    if limits.pressure_angle is not None:
        peak = analysis.max_pressure_angle
        used = _ratio(peak.value, limits.pressure_angle)
        checks.append(CamCheck("pressure_angle", peak.value, limits.pressure_angle, peak.at, used, used <= 1.0))
    convex = analysis.profile_radii.convex
    if isinstance(follower, RollerFollower):
        r = follower.roller_radius
        pitch = analysis.pitch_radii.convex
        if r > 0:
            used = r / pitch.value
            checks.append(CamCheck("undercut", pitch.value, r, pitch.at, used, used < 1.0))
            if limits.curvature_ratio is not None:
                ratio = pitch.value / r
                used = limits.curvature_ratio / ratio
                checks.append(
                    CamCheck("curvature_ratio", ratio, limits.curvature_ratio, pitch.at, used, used <= 1.0)
                )
    else:
        checks.append(CamCheck("cusp", convex.value, 0.0, convex.at, None, convex.value > 0.0))
        if isinstance(follower, TranslatingFlat) and follower.face_width is not None:
            face = analysis.face
            side = face.high if abs(face.high.value) >= abs(face.low.value) else face.low
            need = 2.0 * abs(side.value)
            used = need / follower.face_width
            checks.append(CamCheck("face_width", need, follower.face_width, side.at, used, used <= 1.0))
    if analysis.corners:
        checks.append(CamCheck("corner", float(len(analysis.corners)), 0.0, analysis.corners[0], None, False))
    if limits.min_radius is not None:
        used = _ratio(limits.min_radius, convex.value) if convex.value > 0 else math.inf
        checks.append(CamCheck("min_radius", convex.value, limits.min_radius, convex.at, used, used <= 1.0))
    return CamVerdict(tuple(checks))
