"""Cam geometry at any array of cam angles: pitch curve, profile, pressure angle, curvature.

The follower's path is built in the machine frame and turned into the cam
frame by e^{−iσθ} (σ = +1 counter-clockwise cam, −1 clockwise), so with
P(θ) the roller centre in the machine frame the pitch curve is
Pc = e^{−iσθ}P and, differentiating,
Pc' = e^{−iσθ}(P' − iσP),  Pc'' = e^{−iσθ}(P'' − 2iσP' − P).
The pitch curve winds once around O against the cam's turning, so its
outward normal is n = iσ·Pc'/|Pc'| and its curvature, positive where it
bulges outward (convex), κ = −σ·Im(conj(Pc')·Pc'')/|Pc'|³  (DESIGN §5:
ρ = (x'² + y'²)^{3/2}/(x'y'' − y'x''), signed for the direction of travel).
The roller profile is Pc − r·n with radius ρ − r.

A flat face is the line {X : n·X = p} with n = e^{iα}; in the cam frame its
normal angle is αc = α − σθ and the profile is the envelope of the lines,
X = p·n + (dp/dαc)·i·n, with radius of curvature ρ = p + d²p/dαc²
(the support-function form; for a translating face ρ = Rb + s + s'').

Pressure angle: the angle between the contact normal n and the direction w
in which the follower's point of contact travels, φ = atan2(σ·(w × n), w·n):
positive where the normal leans toward the way the cam surface moves, which
for a translating roller follower is the textbook sign,
φ = atan((s' − e)/(s + √(Rp² − e²))).
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np

from .errors import CamGeometryError
from .followers import FlatFollower, Follower, RollerFollower
from .motion import CamMotion, Turning


@dataclass(frozen=True)
class Cam:
    """A cam to analyse: the follower motion, the follower, and the turning direction."""

    motion: CamMotion
    follower: Follower
    turning: Turning = Turning.COUNTERCLOCKWISE

    @property
    def sigma(self) -> int:
        return int(self.turning)


@dataclass(frozen=True)
class CamPoints:
    """A cam at an array of cam angles θ (rad).  Points are complex x + iy in m.

    profile: cam profile (cam frame); contact: point of contact (machine
    frame); pressure_angle: rad, signed as in the module docstring;
    profile_radius: m, positive convex, negative concave (for a roller,
    ρ_pitch − r: negative on a convex part means undercut); pitch and
    pitch_curvature (1/m, positive convex): roller followers only;
    face_position: m along the face, flat-faced followers only.
    """

    theta: np.ndarray
    s: np.ndarray
    s1: np.ndarray
    s2: np.ndarray
    profile: np.ndarray
    contact: np.ndarray
    pressure_angle: np.ndarray
    profile_radius: np.ndarray
    pitch: np.ndarray | None = None
    pitch_curvature: np.ndarray | None = None
    face_position: np.ndarray | None = None
    face_distance: np.ndarray | None = None  # m, cam centre to the face line (flat faces)
    face_turn_rate: np.ndarray | None = None  # dαc/dθ of a flat face (never zero on a valid cam)

    def take(self, index) -> "CamPoints":
        """The same quantities at `theta[index]` (a slice or index array)."""
        return CamPoints(**{f.name: None if (v := getattr(self, f.name)) is None else v[index] for f in fields(self)})


def _pressure_angle(w, n, sigma):
    cross = np.imag(np.conj(w) * n)
    dot = np.real(np.conj(w) * n)
    return np.arctan2(sigma * cross, dot)


def _roller_points(cam: Cam, theta, s, s1, s2) -> CamPoints:
    follower: RollerFollower = cam.follower  # type: ignore[assignment]
    sigma = cam.sigma
    P, P1, P2 = follower._centre(s, s1, s2, sigma)
    turn = np.exp(-1j * sigma * theta)
    pitch = turn * P
    d1 = turn * (P1 - 1j * sigma * P)
    d2 = turn * (P2 - 2j * sigma * P1 - P)
    speed = np.abs(d1)
    kappa = -sigma * np.imag(np.conj(d1) * d2) / speed**3
    normal = 1j * sigma * d1 / speed
    r = follower.roller_radius
    profile = pitch - r * normal
    with np.errstate(divide="ignore"):
        radius = 1.0 / kappa - r
    w = follower._travel(s, sigma) * turn
    return CamPoints(
        theta, s, s1, s2,
        profile=profile,
        contact=profile / turn,
        pressure_angle=_pressure_angle(w, normal, sigma),
        profile_radius=radius,
        pitch=pitch,
        pitch_curvature=kappa,
    )


def _flat_points(cam: Cam, theta, s, s1, s2) -> CamPoints:
    follower: FlatFollower = cam.follower  # type: ignore[assignment]
    sigma = cam.sigma
    alpha, a1, a2, p, p1, p2 = follower._face(s, s1, s2, sigma)
    ac1 = a1 - sigma  # dαc/dθ; dαc²/dθ² = a2
    p_a = p1 / ac1
    p_aa = (p2 * ac1 - p1 * a2) / ac1**3
    normal = np.exp(1j * (alpha - sigma * theta))
    profile = p * normal + p_a * 1j * normal
    contact = profile * np.exp(1j * sigma * theta)
    w = follower._travel_at(contact, s, sigma)
    return CamPoints(
        theta, s, s1, s2,
        profile=profile,
        contact=contact,
        pressure_angle=_pressure_angle(w, np.exp(1j * alpha), sigma),
        profile_radius=p + p_aa,
        face_position=follower._face_position(contact, s, sigma),
        face_distance=p,
        face_turn_rate=ac1,
    )


def cam_points(cam: Cam, theta) -> CamPoints:
    """Evaluate `cam` at cam angles `theta` (rad, 1-D array-like)."""
    theta = np.atleast_1d(np.asarray(theta, dtype=float))
    s, s1, s2 = cam.motion(theta)
    if isinstance(cam.follower, RollerFollower):
        return _roller_points(cam, theta, s, s1, s2)
    if isinstance(cam.follower, FlatFollower):
        return _flat_points(cam, theta, s, s1, s2)
    raise CamGeometryError("unknown follower type", key="follower")
