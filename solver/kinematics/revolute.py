"""Revolute joint (pin): a point of body i coincides with a point of body j.

Two rows, both lengths (m):  Φ = (r_i + A_i s'_P) − (r_j + A_j s'_Q).
With a_i = A_i s'_P, a_j = A_j s'_Q and ω = φ', α = φ'':

    Φq  = [ I  perp(a_i)  −I  −perp(a_j) ]
    γ   = a_i ω_i² − a_j ω_j²
    η   = (3 a_i ω_i α_i + perp(a_i) ω_i³) − (same for j)

Its joint coordinate is the relative angle φ_j − φ_i (`RelativeAngle`).
"""

from __future__ import annotations

from dataclasses import dataclass

from .base import LENGTH, Binding, Constraint, distinct_bodies
from .coordinates import RelativeAngle


@dataclass(frozen=True)
class Revolute(Constraint):
    """A pin named `name` joining point `i` = (body, point) to point `j` = (body, point)."""

    name: str
    i: tuple[str, str]
    j: tuple[str, str]

    ROWS = 2
    ROW_UNITS = (LENGTH, LENGTH)

    def bind(self, model) -> Binding:
        si = model.point(self.i, self.name, "i")
        sj = model.point(self.j, self.name, "j")
        distinct_bodies(self.name, self.i[0], self.j[0])
        return Binding((self.i[0], self.j[0]), {"si": si, "sj": sj})

    def coordinate(self):
        return RelativeAngle(self.name, self.i[0], self.j[0])

    @classmethod
    def residual(cls, par, pi, pj):
        aix, aiy = pi.rotate(par["si"])
        ajx, ajy = pj.rotate(par["sj"])
        return [pi.x + aix - pj.x - ajx, pi.y + aiy - pj.y - ajy]

    @classmethod
    def jacobian(cls, par, pi, pj):
        aix, aiy = pi.rotate(par["si"])
        ajx, ajy = pj.rotate(par["sj"])
        return [
            [1.0, 0.0, -aiy, -1.0, 0.0, ajy],
            [0.0, 1.0, aix, 0.0, -1.0, -ajx],
        ]

    @classmethod
    def residual_jacobian(cls, par, pi, pj):
        aix, aiy = pi.rotate(par["si"])
        ajx, ajy = pj.rotate(par["sj"])
        return (
            [pi.x + aix - pj.x - ajx, pi.y + aiy - pj.y - ajy],
            [[1.0, 0.0, -aiy, -1.0, 0.0, ajy], [0.0, 1.0, aix, 0.0, -1.0, -ajx]],
        )

    @classmethod
    def gamma(cls, par, poses, rates):
        pi, pj = poses
        aix, aiy = pi.rotate(par["si"])
        ajx, ajy = pj.rotate(par["sj"])
        wi2 = rates[0].phi ** 2
        wj2 = rates[1].phi ** 2
        return [aix * wi2 - ajx * wj2, aiy * wi2 - ajy * wj2]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        pi, pj = poses
        aix, aiy = pi.rotate(par["si"])
        ajx, ajy = pj.rotate(par["sj"])
        wi, wj = rates[0].phi, rates[1].phi
        ki, kj = 3.0 * wi * accels[0].phi, 3.0 * wj * accels[1].phi  # 3 ω α
        ci, cj = wi * wi * wi, wj * wj * wj  # ω³
        # a 3ωα + perp(a) ω³ with perp(a) = (−a_y, a_x), body i minus body j
        return [aix * ki - aiy * ci - (ajx * kj - ajy * cj), aiy * ki + aix * ci - (ajy * kj + ajx * cj)]

