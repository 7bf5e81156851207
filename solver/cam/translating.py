"""Translating followers: roller and flat-faced, moving along the machine +y direction.

Offset convention (both types): the follower's line of travel is parallel
to +y at x = σ·offset, where σ = +1 for a counter-clockwise cam and −1 for a
clockwise one.  A positive offset is thus always the one that lowers the
pressure angle on the rise, and the textbook form
φ = atan((s' − e)/(s + √(Rp² − e²))) holds for either turning direction.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from .errors import CamGeometryError
from .followers import FlatFollower, RollerFollower, check_length

UP = 1j  # direction of travel of every translating follower (machine frame)


@dataclass(frozen=True)
class TranslatingRoller(RollerFollower):
    """A roller follower moving in a straight line, offset `offset` from the cam centre.

    prime_radius: m, radius of the prime circle (roller centre at s = 0 is
    this far from the cam centre); roller_radius: m (0 for a knife edge);
    offset: m, see the module docstring.  Lift s in m.
    """

    prime_radius: float
    roller_radius: float
    offset: float = 0.0

    motion_kind = "linear"
    type_id = "translating-roller"

    def __post_init__(self):
        check_length(self.prime_radius, "prime_radius")
        check_length(self.roller_radius, "roller_radius", allow_zero=True)
        check_length(self.offset, "offset", positive=False)
        if self.roller_radius >= self.prime_radius:
            raise CamGeometryError(
                "roller_radius must be smaller than prime_radius (the base circle would vanish)",
                key="roller_radius",
            )
        if abs(self.offset) >= self.prime_radius:
            raise CamGeometryError(
                "the offset must be smaller than prime_radius in size", key="offset"
            )

    @classmethod
    def from_base_radius(cls, base_radius: float, roller_radius: float, offset: float = 0.0):
        """The follower on a cam whose base circle has radius `base_radius` (m)."""
        check_length(base_radius, "base_radius")
        check_length(roller_radius, "roller_radius", allow_zero=True)
        return cls(base_radius + roller_radius, roller_radius, offset)

    @property
    def rest_height(self) -> float:
        """Height of the roller centre above the cam centre at s = 0, m: √(Rp² − e²)."""
        return math.sqrt(self.prime_radius**2 - self.offset**2)

    def axis_x(self, sigma: int) -> float:
        """x of the line of travel in the machine frame, m."""
        return sigma * self.offset

    def with_prime_radius(self, prime_radius):
        """Same roller and offset on another prime circle."""
        return replace(self, prime_radius=float(prime_radius))

    def _centre(self, s, s1, s2, sigma):
        P = self.axis_x(sigma) + UP * (self.rest_height + s)
        return P, UP * s1, UP * s2

    def _travel(self, s, sigma):
        return np.full(np.shape(s), UP)


@dataclass(frozen=True)
class TranslatingFlat(FlatFollower):
    """A flat-faced follower moving in a straight line, its face square to the travel.

    base_radius: m; offset: m, the line of travel's offset (it does not change
    the cam, only where the contact falls on the face); face_width: m,
    optional, the face's width centred on the line of travel (checked when
    given).  Lift s in m.  Face position: the contact's distance from the
    line of travel along machine +x.
    """

    base_radius: float
    offset: float = 0.0
    face_width: float | None = None

    motion_kind = "linear"
    type_id = "translating-flat"

    def __post_init__(self):
        check_length(self.base_radius, "base_radius")
        check_length(self.offset, "offset", positive=False)
        if self.face_width is not None:
            check_length(self.face_width, "face_width")

    def axis_x(self, sigma: int) -> float:
        """x of the line of travel in the machine frame, m."""
        return sigma * self.offset

    def with_base_radius(self, base_radius):
        """Same offset and face on another base circle."""
        return replace(self, base_radius=float(base_radius))

    def _face(self, s, s1, s2, sigma):
        zero = np.zeros(np.shape(s))
        return zero + math.pi / 2, zero, zero, self.base_radius + s, s1, s2

    def _travel_at(self, X, s, sigma):
        return np.full(np.shape(X), UP)

    def _face_position(self, X, s, sigma):
        return np.real(X) - self.axis_x(sigma)
