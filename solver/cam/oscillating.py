"""Oscillating followers: an arm swinging about a fixed pivot, with a roller or a flat face.

Layout (machine frame): the pivot A sits on the +x axis at `pivot_distance`
from the cam centre O; the arm reaches from A back over the cam on the +y
side.  The arm angle ψ is the angle at A between the line A→O and the arm,
ψ = ψ0 + s with the follower position s in rad: a rise swings the arm away
from the cam (clockwise about A).  ψ0, the initial arm angle, follows from
the base circle.  A counter-clockwise cam therefore drags its surface away
from the pivot under the follower, a clockwise cam toward it; mirror the
outline for the mirrored machine.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from .errors import CamGeometryError
from .followers import FlatFollower, RollerFollower, check_length


@dataclass(frozen=True)
class OscillatingRoller(RollerFollower):
    """A roller on an arm of length `arm_length` swinging about a pivot `pivot_distance` from O.

    All lengths in m.  The roller centre lies on the prime circle at s = 0,
    which fixes the initial arm angle by the law of cosines:
    cos ψ0 = (d² + L² − Rp²)/(2dL).  Position s in rad.
    """

    pivot_distance: float
    arm_length: float
    prime_radius: float
    roller_radius: float

    motion_kind = "angular"
    type_id = "oscillating-roller"

    def __post_init__(self):
        d = check_length(self.pivot_distance, "pivot_distance")
        L = check_length(self.arm_length, "arm_length")
        rp = check_length(self.prime_radius, "prime_radius")
        check_length(self.roller_radius, "roller_radius", allow_zero=True)
        if self.roller_radius >= rp:
            raise CamGeometryError(
                "roller_radius must be smaller than prime_radius (the base circle would vanish)",
                key="roller_radius",
            )
        if not abs(d - L) < rp < d + L:
            raise CamGeometryError(
                "the arm cannot reach the prime circle: prime_radius must lie between "
                "|pivot_distance − arm_length| and pivot_distance + arm_length",
                key="prime_radius",
            )

    @classmethod
    def from_arm_angle(cls, pivot_distance, arm_length, initial_arm_angle, roller_radius):
        """The follower whose arm starts at `initial_arm_angle` (rad, in (0, π)) from the line A→O."""
        d = check_length(pivot_distance, "pivot_distance")
        L = check_length(arm_length, "arm_length")
        psi = check_length(initial_arm_angle, "initial_arm_angle")
        if not 0.0 < psi < math.pi:
            raise CamGeometryError("initial_arm_angle must lie between 0 and 180°", key="initial_arm_angle")
        return cls(d, L, math.sqrt(d * d + L * L - 2 * d * L * math.cos(psi)), roller_radius)

    @property
    def initial_arm_angle(self) -> float:
        """ψ0, rad: angle at the pivot between the line to the cam centre and the arm at s = 0."""
        d, L, rp = self.pivot_distance, self.arm_length, self.prime_radius
        return math.acos(min(1.0, max(-1.0, (d * d + L * L - rp * rp) / (2 * d * L))))

    @property
    def pivot(self) -> complex:
        """The pivot in the machine frame, m."""
        return complex(self.pivot_distance, 0.0)

    def with_prime_radius(self, prime_radius):
        """Same pivot, arm and roller on another prime circle (the initial arm angle follows)."""
        return replace(self, prime_radius=float(prime_radius))

    def _centre(self, s, s1, s2, sigma):
        E = np.exp(-1j * (self.initial_arm_angle + s))
        L = self.arm_length
        return self.pivot_distance - L * E, 1j * L * E * s1, L * E * (1j * s2 + s1 * s1)

    def _travel(self, s, sigma):
        return 1j * np.exp(-1j * (self.initial_arm_angle + s))


@dataclass(frozen=True)
class OscillatingFlat(FlatFollower):
    """A flat face on an arm swinging about a pivot `pivot_distance` from O.

    The face is parallel to the arm's line through the pivot, `face_offset`
    closer to the cam (0: the face line passes through the pivot).  At s = 0
    it touches the base circle, so sin ψ0 = (Rb + face_offset)/d.  Lengths in
    m, position s in rad.  Face position: the contact's distance from the
    pivot measured along the arm toward the cam.
    """

    pivot_distance: float
    base_radius: float
    face_offset: float = 0.0

    motion_kind = "angular"
    type_id = "oscillating-flat"

    def __post_init__(self):
        d = check_length(self.pivot_distance, "pivot_distance")
        rb = check_length(self.base_radius, "base_radius")
        f = check_length(self.face_offset, "face_offset", positive=False)
        if not 0.0 < rb + f < d:
            raise CamGeometryError(
                "the face cannot touch the base circle: base_radius + face_offset must lie "
                "between 0 and pivot_distance",
                key="base_radius",
            )

    @property
    def initial_arm_angle(self) -> float:
        """ψ0, rad: angle at the pivot between the line to the cam centre and the face at s = 0."""
        return math.asin((self.base_radius + self.face_offset) / self.pivot_distance)

    @property
    def pivot(self) -> complex:
        """The pivot in the machine frame, m."""
        return complex(self.pivot_distance, 0.0)

    def with_base_radius(self, base_radius):
        """Same pivot and face offset on another base circle (the initial arm angle follows)."""
        return replace(self, base_radius=float(base_radius))

    def _face(self, s, s1, s2, sigma):
        psi = self.initial_arm_angle + s
        d = self.pivot_distance
        sin, cos = np.sin(psi), np.cos(psi)
        p = d * sin - self.face_offset
        return math.pi / 2 - psi, -s1, -s2, p, d * cos * s1, d * (cos * s2 - sin * s1 * s1)

    def _travel_at(self, X, s, sigma):
        arm = X - self.pivot
        return -1j * arm / np.abs(arm)

    def _face_position(self, X, s, sigma):
        along = -np.exp(-1j * (self.initial_arm_angle + s))  # unit vector pivot → cam along the arm
        return np.real(np.conj(along) * (X - self.pivot))
