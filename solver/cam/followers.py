"""The follower contracts: what a follower type must give the cam geometry.

The machine frame: the cam turns about the origin O; at cam angle θ = 0 the
cam frame coincides with the machine frame.  Every follower sits on the +y
side of the cam (a translating follower moves along +y; an oscillating
follower's pivot is on the +x axis and its roller or face reaches over the
cam from there).  Points are complex numbers x + iy internally, in m.

A follower is a frozen dataclass that checks its dimensions on creation
(raising `CamGeometryError` with the parameter's name) and provides:

Roller followers (`RollerFollower`):

1. ``roller_radius`` and ``prime_radius`` (m); the base circle of the cam is
   their difference.
2. ``_centre(s, s1, s2, sigma)`` — the roller centre P and dP/dθ, d²P/dθ²
   in the machine frame for follower positions s (with s1 = ds/dθ,
   s2 = d²s/dθ²) and turning sign sigma.
3. ``_travel(s, sigma)`` — unit vector of the roller centre's direction of
   travel as s increases (machine frame).
4. ``with_prime_radius(r)`` — the same follower on a different prime circle
   (used by the sizing searches, which document what else is held).

Flat-faced followers (`FlatFollower`):

1. ``base_radius`` (m).
2. ``_face(s, s1, s2, sigma)`` — the face as a line {X : n·X = p} with unit
   normal n = e^{iα} pointing away from the cam: (α, dα/dθ, d²α/dθ², p,
   dp/dθ, d²p/dθ²) in the machine frame.
3. ``_travel_at(X, s, sigma)`` — unit vector of the velocity of the
   follower's material point at X as s increases (machine frame).
4. ``_face_position(X, s, sigma)`` — where X lies on the face (m, measured
   as the follower type documents).
5. ``with_base_radius(r)`` — the same follower on a different base circle.

Each also names ``motion_kind``: "linear" (s in m) or "angular" (s in rad).
"""

from __future__ import annotations

import math

from .errors import CamGeometryError


def check_length(value, key: str, *, positive: bool = True, allow_zero: bool = False) -> float:
    """`value` as a float, or `CamGeometryError` naming `key` if it is not a usable length (m)."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise CamGeometryError(f"{key} must be a finite number", key=key)
    value = float(value)
    if positive and (value < 0 or (value == 0 and not allow_zero)):
        raise CamGeometryError(f"{key} must be {'zero or ' if allow_zero else ''}positive", key=key)
    return value


class Follower:
    """Base of all followers; see the module docstring for the contract."""

    motion_kind: str = "linear"
    type_id: str = ""

    @property
    def size(self) -> float:
        """A length (m) that sets the scale of the layout; tolerances are relative to it."""
        raise NotImplementedError


class RollerFollower(Follower):
    """A follower that touches the cam with a roller; see the module docstring."""

    roller_radius: float
    prime_radius: float

    @property
    def base_radius(self) -> float:
        """Radius of the cam's base circle, m (prime radius − roller radius)."""
        return self.prime_radius - self.roller_radius

    @property
    def size(self) -> float:
        return self.prime_radius

    def _centre(self, s, s1, s2, sigma):  # pragma: no cover - contract
        raise NotImplementedError

    def _travel(self, s, sigma):  # pragma: no cover - contract
        raise NotImplementedError

    def with_prime_radius(self, prime_radius: float) -> "RollerFollower":  # pragma: no cover
        raise NotImplementedError


class FlatFollower(Follower):
    """A follower that touches the cam with a flat face; see the module docstring."""

    base_radius: float

    @property
    def size(self) -> float:
        return self.base_radius

    def _face(self, s, s1, s2, sigma):  # pragma: no cover - contract
        raise NotImplementedError

    def _travel_at(self, X, s, sigma):  # pragma: no cover - contract
        raise NotImplementedError

    def _face_position(self, X, s, sigma):  # pragma: no cover - contract
        raise NotImplementedError

    def with_base_radius(self, base_radius: float) -> "FlatFollower":  # pragma: no cover
        raise NotImplementedError
