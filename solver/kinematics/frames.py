"""Body poses and their rates at many instants, as the constraint kinds see them.

Every array here is shaped (k, N): k instances of one constraint kind (one
row per instance) by N instants.  Lengths are in metres, angles in radians,
and derivatives are taken with respect to the master angle θ in radians
(per rad, per rad², per rad³), never with respect to time.

A point with body-local coordinates s' sits at r + A(φ) s'.  The helpers
below give the rotated offset a = A s' and its perpendicular
perp(a) = B s' = dA/dφ s', which is all the derivative algebra needs:

    (r + a)'   = r'   + perp(a) φ'
    (r + a)''  = r''  + perp(a) φ''  − a φ'²
    (r + a)''' = r''' + perp(a) φ''' − 3 a φ' φ'' − perp(a) φ'³
"""

from __future__ import annotations

import numpy as np


class Pose:
    """Poses of k bodies at N instants: x, y (m), φ (rad), and cos φ, sin φ.

    `rotate` remembers what it computed, so a kind that rotates the same
    local vector in its residual and its Jacobian pays once per evaluation.
    """

    __slots__ = ("x", "y", "phi", "c", "s", "_rotated")

    def __init__(self, x, y, phi, c, s):
        self.x, self.y, self.phi, self.c, self.s = x, y, phi, c, s
        self._rotated = {}

    def forget(self) -> None:
        """Drop remembered rotations (the arrays it views now hold other poses)."""
        self._rotated.clear()

    def rotate(self, local: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """a = A(φ) s' for body-local vectors `local` shaped (2, k, 1) (m): components (a_x, a_y)."""
        key = id(local)
        hit = self._rotated.get(key)
        if hit is not None and hit[0] is local:
            return hit[1]
        lx, ly = local
        out = (self.c * lx - self.s * ly, self.s * lx + self.c * ly)
        self._rotated[key] = (local, out)
        return out


class Rates:
    """A derivative of the poses w.r.t. master angle: x, y (m/rad^k), φ (rad/rad^k)."""

    __slots__ = ("x", "y", "phi")

    def __init__(self, x, y, phi):
        self.x, self.y, self.phi = x, y, phi


def perp(ax: np.ndarray, ay: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The vector turned a quarter turn counter-clockwise: perp(a) = B s' when a = A s'."""
    return -ay, ax


def dot(ax, ay, bx, by) -> np.ndarray:
    """Scalar product of two planar vectors given by components."""
    return ax * bx + ay * by


def third_free(ax, ay, w, al):
    """The part of (A s')''' free of φ''': −3 a φ' φ'' − perp(a) φ'³."""
    w3 = w * w * w
    k = 3.0 * w * al
    return -ax * k + ay * w3, -ay * k - ax * w3


def second_full(ax, ay, w, al):
    """(A s')'' = perp(a) φ'' − a φ'²."""
    w2 = w * w
    return -ay * al - ax * w2, ax * al - ay * w2
