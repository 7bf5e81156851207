"""One cam analysed around a full turn: arrays on a uniform grid plus refined summaries."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import CamGeometryError
from .extremes import TWO_PI, Extreme, Interval, refine_maxima, regions_where
from .followers import RollerFollower
from .geometry import Cam, CamPoints, cam_points
from .oscillating import OscillatingFlat, OscillatingRoller

DEFAULT_POINTS = 3600  # 0.1° of cam angle: fine enough to draw and export
MIN_POINTS = 36  # fewer than this cannot describe a turn
CLOSURE_TOLERANCE = 1e-9  # relative to the layout size: s(2π) must equal s(0)
CENTRE_CLEARANCE = 1e-9  # relative: the follower must stay this far on its side of the cam centre
JUMP_PROBE = 1e-9  # rad either side of a breakpoint where ds/dθ is compared
JUMP_TOLERANCE = 1e-6  # a ds/dθ jump below this share of the largest |ds/dθ| counts as none


@dataclass(frozen=True)
class CurveRadii:
    """Smallest radii of curvature of a closed curve, m, with the cam angle of each.

    convex: smallest radius where the curve bulges outward (for a roller
    profile ρ_pitch − r, which is ≤ 0 where the profile is undercut; for a
    flat-faced profile ≤ 0 at a cusp).  concave: smallest radius magnitude
    where the curve is hollow (None if it is nowhere hollow).
    """

    convex: Extreme
    concave: Extreme | None


@dataclass(frozen=True)
class FaceUse:
    """Where contact falls on a flat face (m, the follower's face position)."""

    low: Extreme
    high: Extreme

    @property
    def width(self) -> float:
        """Face width the contact sweeps, m (a face must be at least this wide)."""
        return self.high.value - self.low.value


@dataclass(frozen=True)
class CamAnalysis:
    """A cam over one turn.  Lengths m, angles rad; points are (N, 2) arrays of x, y.

    Arrays on the grid ``theta`` = 2πk/N, k = 0 … N−1:
    lift s (m or rad), lift_rate ds/dθ, lift_accel d²s/dθ²; profile (cam
    frame); pitch (cam frame, roller followers, else None); contact (point
    of contact in the machine frame); pressure_angle (signed);
    pitch_radius and profile_radius (signed, + convex, − concave, ±inf at an
    inflection; pitch_radius None for flat faces); face_position (flat faces).

    Summaries are true extremes, refined beyond the grid:
    max_pressure_angle (|φ|), pitch_radii / profile_radii, face (flat faces),
    undercut (roller: where r ≥ convex pitch radius) and cusp (flat face:
    where Rb + s + s'' ≤ 0, or its oscillating equivalent) as intervals;
    corners: cam angles (rad) where ds/dθ jumps — the follower meets a
    corner of the cam there (infinite acceleration), and the outline has a
    step that no smooth profile closes.

    The cam's extent: outline_radius (grid array, m) is the distance of each
    profile point from the cam centre — the outline the follower touches
    (for a roller the profile, not the pitch curve); largest_radius its
    true maximum over the turn, at the cam angle where the follower touches
    it; pivot_clearance (oscillating followers, else None) is
    pivot_distance − largest_radius, at the same cam angle: ≤ 0 puts the
    pivot on or inside the disc the turning cam sweeps.
    """

    cam: Cam
    theta: np.ndarray
    lift: np.ndarray
    lift_rate: np.ndarray
    lift_accel: np.ndarray
    profile: np.ndarray
    contact: np.ndarray
    pressure_angle: np.ndarray
    profile_radius: np.ndarray
    pitch: np.ndarray | None
    pitch_radius: np.ndarray | None
    face_position: np.ndarray | None
    max_pressure_angle: Extreme
    profile_radii: CurveRadii
    pitch_radii: CurveRadii | None
    face: FaceUse | None
    undercut: tuple[Interval, ...]
    cusp: tuple[Interval, ...]
    corners: tuple[float, ...] = ()
    outline_radius: np.ndarray | None = None
    largest_radius: Extreme | None = None
    pivot_clearance: Extreme | None = None

    @property
    def follower(self):
        return self.cam.follower

    @property
    def size(self) -> float:
        """Scale of the layout, m (prime radius of a roller follower, else base radius)."""
        return self.cam.follower.size


def _xy(z: np.ndarray) -> np.ndarray:
    return np.column_stack((z.real, z.imag))


def _outline_radius(p: CamPoints) -> np.ndarray:
    """Distance of each profile point from the cam centre, m."""
    return np.abs(p.profile)


def pivot_clearance(follower, largest: Extreme) -> Extreme | None:
    """pivot_distance − the outline's largest radius (m, at its cam angle); None without a pivot."""
    if not isinstance(follower, (OscillatingRoller, OscillatingFlat)):
        return None
    return Extreme(follower.pivot_distance - largest.value, largest.at)


def _check_layout(cam: Cam, pts: CamPoints, closing: CamPoints) -> None:
    size = cam.follower.size
    if abs(closing.s[0] - pts.s[0]) > CLOSURE_TOLERANCE * size:
        raise CamGeometryError("the follower motion does not return to its start over one turn", key="axis")
    if not np.all(np.isfinite(pts.s)):
        raise CamGeometryError("the follower motion is not finite everywhere", key="axis")
    if pts.pitch is not None:
        height = np.imag(pts.pitch * np.exp(1j * cam.sigma * pts.theta))
        if height.min() <= CENTRE_CLEARANCE * size:
            raise CamGeometryError(
                "the roller centre drops to the cam centre: the prime circle is too small "
                "for the lowest follower position",
                key="prime_radius",
            )
    else:
        if pts.face_distance.min() <= CENTRE_CLEARANCE * size or np.any(cam.sigma * pts.face_turn_rate >= 0):
            raise CamGeometryError(
                "the face stops turning against the cam (it swings as fast as the cam turns) "
                "or reaches the cam centre: no cam can drive it",
                key="base_radius",
            )


def _velocity_jumps(cam: Cam, breakpoints, scale: float) -> tuple[float, ...]:
    if not breakpoints:
        return ()
    b = np.asarray(breakpoints, dtype=float)
    left, right = cam.motion(np.concatenate((b - JUMP_PROBE, b + JUMP_PROBE)))[1].reshape(2, -1)
    return tuple(float(x) for x in b[np.abs(right - left) > JUMP_TOLERANCE * max(scale, 1e-300)])


def analyse(cam: Cam, points: int = DEFAULT_POINTS) -> CamAnalysis:
    """Analyse `cam` on `points` equally spaced cam angles over one turn.

    Raises `CamGeometryError` where no cam can be laid out (the motion does
    not close, the roller centre reaches the cam centre, a face cannot be
    enveloped); undercut and cusps are results, not errors.
    """
    if int(points) != points or points < MIN_POINTS:
        raise CamGeometryError(f"points must be a whole number of at least {MIN_POINTS}", key="points")
    theta = TWO_PI * np.arange(int(points)) / points
    both = cam_points(cam, np.append(theta, TWO_PI))
    pts = both.take(slice(0, -1))
    _check_layout(cam, pts, both.take(slice(-1, None)))
    bps = cam.motion.breakpoints
    corners = _velocity_jumps(cam, bps, float(np.max(np.abs(pts.s1))))

    def evaluate(th):
        return cam_points(cam, th)

    undercut: tuple[Interval, ...] = ()
    cusp: tuple[Interval, ...] = ()
    face = None
    pitch_radii = None
    pitch_radius = None
    phi = np.abs(pts.pressure_angle)
    reach = _outline_radius(pts)
    if isinstance(cam.follower, RollerFollower):
        r = cam.follower.roller_radius
        kappa = pts.pitch_curvature
        hollow_anywhere = kappa.min() < 0
        getters = [lambda p: np.abs(p.pressure_angle), _outline_radius, lambda p: p.pitch_curvature]
        values = [phi, reach, kappa]
        if hollow_anywhere:
            getters.append(lambda p: -p.pitch_curvature)
            values.append(-kappa)
        found = refine_maxima(evaluate, getters, theta, values, bps)
        max_phi, largest, convex = found[0], found[1], found[2]
        concave = Extreme(1.0 / found[3].value, found[3].at) if hollow_anywhere else None
        pitch_radii = CurveRadii(Extreme(1.0 / convex.value, convex.at), concave)
        profile_radii = CurveRadii(
            Extreme(1.0 / convex.value - r, convex.at),
            None if concave is None else Extreme(concave.value + r, concave.at),
        )
        if r > 0:
            undercut = regions_where(evaluate, lambda p: r * p.pitch_curvature - 1.0, theta, r * kappa - 1.0)
            if not undercut and r * convex.value >= 1.0:  # a sliver between two samples
                undercut = (Interval(convex.at, convex.at),)
        with np.errstate(divide="ignore"):
            pitch_radius = 1.0 / kappa
    else:
        rho, where = pts.profile_radius, pts.face_position
        getters = [
            lambda p: np.abs(p.pressure_angle),
            _outline_radius,
            lambda p: -p.profile_radius,
            lambda p: -p.face_position,
            lambda p: p.face_position,
        ]
        values = [phi, reach, -rho, -where, where]
        max_phi, largest, low, face_lo, face_hi = refine_maxima(evaluate, getters, theta, values, bps)
        profile_radii = CurveRadii(Extreme(-low.value, low.at), None)
        cusp = regions_where(evaluate, lambda p: -p.profile_radius, theta, -rho)
        if not cusp and low.value >= 0.0:
            cusp = (Interval(low.at, low.at),)
        face = FaceUse(Extreme(-face_lo.value, face_lo.at), face_hi)

    return CamAnalysis(
        cam=cam,
        theta=theta,
        lift=pts.s,
        lift_rate=pts.s1,
        lift_accel=pts.s2,
        profile=_xy(pts.profile),
        contact=_xy(pts.contact),
        pressure_angle=pts.pressure_angle,
        profile_radius=pts.profile_radius,
        pitch=None if pts.pitch is None else _xy(pts.pitch),
        pitch_radius=pitch_radius,
        face_position=pts.face_position,
        max_pressure_angle=max_phi,
        profile_radii=profile_radii,
        pitch_radii=pitch_radii,
        face=face,
        undercut=undercut,
        cusp=cusp,
        corners=corners,
        outline_radius=reach,
        largest_radius=largest,
        pivot_clearance=pivot_clearance(cam.follower, largest),
    )
