"""Normalized motion laws: a rise y(x) from 0 to 1 over x in [0, 1].

Every law gives y and its first three derivatives with respect to x, exactly
and vectorized over any array of x.  Physical units enter later
(`motionlaws.program`): a segment of lift h scales y by h.

Contract of a law (subclass `MotionLaw`):

1. ``id`` — the name used in project files, e.g. ``"cycloidal"``.
2. ``_evaluate(x)`` — return ``(y, y1, y2, y3)``, each an array shaped like
   ``x`` (x already a float array inside [0, 1]).
3. ``breakpoints`` — interior x where a derivative formula changes (the joins
   of a piecewise law); peak searches sample both sides of each exactly.
4. ``rest_to_rest`` — True when y'(0) = y'(1) = 0 (the law starts and ends
   at rest in velocity).

Register a new law with `register_law`; `LAWS` maps ids to instances.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from .peaksearch import refined_max_abs


class MotionLaw:
    """Base class of a normalized law; see the module docstring for the contract."""

    id: str = ""
    breakpoints: tuple[float, ...] = ()
    rest_to_rest: bool = True
    moves: bool = True  # False only for the dwell

    def evaluate(self, x) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """y, y', y'', y''' at x (array-like, each in [0, 1])."""
        x = np.asarray(x, dtype=float)
        return self._evaluate(x)

    def _evaluate(self, x: np.ndarray):  # pragma: no cover - contract
        raise NotImplementedError

    @cached_property
    def peaks(self) -> tuple[tuple[float, float], ...]:
        """((Cv, x), (Ca, x), (Cj, x)): max |y'|, |y''|, |y'''| and the first x where each occurs."""
        out = []
        for order in (1, 2, 3):
            value, where = refined_max_abs(
                lambda x, k=order: self._evaluate(x)[k], self.breakpoints
            )
            out.append((value, where))
        return tuple(out)

    @property
    def coefficients(self) -> tuple[float, float, float]:
        """Peak coefficients (Cv, Ca, Cj) of the law (dimensionless)."""
        return tuple(p[0] for p in self.peaks)  # type: ignore[return-value]

    def __repr__(self) -> str:
        return f"<law {self.id}>"


class Dwell(MotionLaw):
    """No motion: y = 0 (a segment with this law holds its position)."""

    id = "dwell"
    moves = False

    def _evaluate(self, x):
        z = np.zeros_like(x)
        return z, z, z, z.copy()


class ConstantVelocity(MotionLaw):
    """y = x: constant velocity; it jumps in velocity at any join with a rest."""

    id = "constant-velocity"
    rest_to_rest = False

    def _evaluate(self, x):
        z = np.zeros_like(x)
        return x.copy(), np.ones_like(x), z, z.copy()


class Harmonic(MotionLaw):
    """Simple harmonic: y = (1 - cos πx)/2.  Acceleration is π²/2 at the ends."""

    id = "harmonic"

    def _evaluate(self, x):
        c = np.cos(np.pi * x)
        s = np.sin(np.pi * x)
        return (
            0.5 * (1.0 - c),
            0.5 * np.pi * s,
            0.5 * np.pi**2 * c,
            -0.5 * np.pi**3 * s,
        )


class Cycloidal(MotionLaw):
    """Cycloidal: y = x - sin(2πx)/(2π)."""

    id = "cycloidal"

    def _evaluate(self, x):
        w = 2.0 * np.pi
        s = np.sin(w * x)
        c = np.cos(w * x)
        return x - s / w, 1.0 - c, w * s, w * w * c


class PolynomialLaw(MotionLaw):
    """A law that is one polynomial in x, given by its coefficients (ascending powers)."""

    def __init__(self, law_id: str, coefficients):
        self.id = law_id
        c0 = np.polynomial.Polynomial(np.asarray(coefficients, dtype=float))
        self._polys = (c0, c0.deriv(1), c0.deriv(2), c0.deriv(3))

    def _evaluate(self, x):
        return tuple(p(x) for p in self._polys)


@dataclass(frozen=True)
class SinePiece:
    """On [x0, x1]: acceleration = p + q·sin(ω(x − x0) + φ) (before scaling)."""

    x0: float
    x1: float
    p: float = 0.0
    q: float = 0.0
    w: float = 1.0
    phi: float = 0.0


class PiecewiseSineLaw(MotionLaw):
    """A law built from pieces of constant-plus-sine acceleration.

    Velocity and position are integrated in closed form piece by piece from
    rest at x = 0, then the whole law is scaled so that y(1) = 1.  The
    modified trapezoid and the modified sine are two tables of pieces over
    this one evaluator.
    """

    def __init__(self, law_id: str, pieces: list[SinePiece]):
        self.id = law_id
        self.breakpoints = tuple(pc.x0 for pc in pieces[1:])
        n = len(pieces)
        self._x0 = np.array([pc.x0 for pc in pieces])
        self._p = np.array([pc.p for pc in pieces])
        self._q = np.array([pc.q for pc in pieces])
        self._w = np.array([pc.w for pc in pieces])
        self._phi = np.array([pc.phi for pc in pieces])
        self._sin_phi, self._cos_phi = np.sin(self._phi), np.cos(self._phi)
        self._y0 = np.zeros(n)
        self._v0 = np.zeros(n)
        self._scale = 1.0
        for i, pc in enumerate(pieces):  # chain the start values of each piece
            if i + 1 < n:
                y, v, _, _ = self._piece(i, np.array([pc.x1]))
                self._y0[i + 1], self._v0[i + 1] = y[0], v[0]
        y_end = self._piece(n - 1, np.array([pieces[-1].x1]))[0][0]
        self._scale = 1.0 / y_end

    def _piece(self, i, x):
        """Scaled y and its three derivatives on piece i (i: a scalar, or one index per element)."""
        u = x - self._x0[i]
        p, q, w, phi = self._p[i], self._q[i], self._w[i], self._phi[i]
        sp, cp = self._sin_phi[i], self._cos_phi[i]
        k = self._scale
        arg = w * u + phi
        s, c = np.sin(arg), np.cos(arg)
        kq = k * q
        acc = k * p + kq * s
        jerk = (kq * w) * c
        vel = k * self._v0[i] + (k * p) * u - (kq / w) * (c - cp)
        pos = k * self._y0[i] + u * (k * self._v0[i] + (0.5 * k * p) * u + (kq / w) * cp) - (kq / (w * w)) * (s - sp)
        return pos, vel, acc, jerk

    def _evaluate(self, x):
        if x.ndim == 1 and x.size > 1 and np.all(x[1:] >= x[:-1]):
            # sorted (the usual case): one contiguous slice per piece, scalar coefficients
            cuts = np.searchsorted(x, self._x0[1:], side="left")
            edges = [0, *cuts.tolist(), x.size]
            out = np.empty((4, x.size))
            for i, (a, b) in enumerate(zip(edges[:-1], edges[1:])):
                if b > a:
                    out[:, a:b] = self._piece(i, x[a:b])
            return out[0], out[1], out[2], out[3]
        idx = np.searchsorted(self._x0, x, side="right") - 1
        idx = np.clip(idx, 0, len(self._x0) - 1)
        return self._piece(idx, x)


LAWS: dict[str, MotionLaw] = {}


def register_law(law: MotionLaw) -> MotionLaw:
    """Add a law to the registry under its id (replacing any law of that id)."""
    if not law.id:
        raise ValueError("a law needs a non-empty id")
    LAWS[law.id] = law
    return law


_Q = math.pi / 2
for _law in (
    Dwell(),
    ConstantVelocity(),
    Harmonic(),
    Cycloidal(),
    PolynomialLaw("poly345", [0, 0, 0, 10, -15, 6]),
    PolynomialLaw("poly4567", [0, 0, 0, 0, 35, -84, 70, -20]),
    # Modified trapezoid: quarter-sine jerk ramps on 1/8 of the span, constant
    # acceleration on 1/4, a half sine across the middle quarter.
    PiecewiseSineLaw(
        "modified-trapezoid",
        [
            SinePiece(0.0, 0.125, q=1.0, w=4 * math.pi),
            SinePiece(0.125, 0.375, p=1.0),
            SinePiece(0.375, 0.625, q=1.0, w=4 * math.pi, phi=_Q),
            SinePiece(0.625, 0.875, p=-1.0),
            SinePiece(0.875, 1.0, q=1.0, w=4 * math.pi, phi=-_Q),
        ],
    ),
    # Modified sine: short quarter sine (1/8), long half cosine (3/4), short
    # quarter sine (1/8) of acceleration.
    PiecewiseSineLaw(
        "modified-sine",
        [
            SinePiece(0.0, 0.125, q=1.0, w=4 * math.pi),
            SinePiece(0.125, 0.875, q=1.0, w=4 * math.pi / 3, phi=_Q),
            SinePiece(0.875, 1.0, q=1.0, w=4 * math.pi, phi=-_Q),
        ],
    ),
):
    register_law(_law)

# Laws whose shape is set per segment from boundary conditions
# (motionlaws.program builds them); listed so files can name them.
BOUNDARY_LAWS = ("polynomial", "blend")


def law_ids() -> list[str]:
    """Every id a segment may name, registry laws first."""
    return list(LAWS) + list(BOUNDARY_LAWS)
