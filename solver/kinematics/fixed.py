"""Fixed joint (weld): a point of body i coincides with a point of body j and
the relative angle φ_j − φ_i is held at `angle`.

Rows: the two length rows of a pin (revolute.py, same Φq, γ, η) and one angle
row with Φq = [0, 0, −1, 0, 0, 1] and γ = η = 0.  A weld has no joint
coordinate.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .base import ANGLE, LENGTH, Binding, Constraint
from .revolute import Revolute


@dataclass(frozen=True)
class Fixed(Constraint):
    """A weld named `name` joining point `i` of one body to point `j` of another at `angle` (rad)."""

    name: str
    i: tuple[str, str]
    j: tuple[str, str]
    angle: float = 0.0

    ROWS = 3
    ROW_UNITS = (LENGTH, LENGTH, ANGLE)

    def bind(self, model) -> Binding:
        pin = Revolute(self.name, self.i, self.j).bind(model)
        return Binding(pin.bodies, {**pin.params, "angle": np.array([float(self.angle)])})

    @classmethod
    def residual(cls, par, pi, pj):
        return Revolute.residual(par, pi, pj) + [pj.phi - pi.phi - par["angle"][0]]

    @classmethod
    def jacobian(cls, par, pi, pj):
        return Revolute.jacobian(par, pi, pj) + [[0.0, 0.0, -1.0, 0.0, 0.0, 1.0]]

    @classmethod
    def residual_jacobian(cls, par, pi, pj):
        residual, partials = Revolute.residual_jacobian(par, pi, pj)
        return residual + [pj.phi - pi.phi - par["angle"][0]], partials + [[0.0, 0.0, -1.0, 0.0, 0.0, 1.0]]

    @classmethod
    def gamma(cls, par, poses, rates):
        return Revolute.gamma(par, poses, rates) + [0.0]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        return Revolute.eta(par, poses, rates, accels) + [0.0]
