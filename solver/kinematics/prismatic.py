"""Prismatic joint (slider): body j slides along an axis fixed in body i, without turning.

Rows: (1) the offset from the guide point to the slider point has no
component normal to the axis — a length, `projection` with w' = perp(u');
(2) φ_j − φ_i = `angle` — an angle; its Φq is [0, 0, −1, 0, 0, 1] and its γ,
η are zero.  Its joint coordinate is the stroke along u' (`SliderStroke`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import projection
from .base import ANGLE, LENGTH, Binding, Constraint, distinct_bodies
from .coordinates import SliderStroke, unit_axis


@dataclass(frozen=True)
class Prismatic(Constraint):
    """A slider named `name`: point `slider` of body j on the line through point `guide` of body i.

    `axis` is the direction of the line in body i's local frame; `angle` (rad)
    is the fixed angle φ_j − φ_i of the slider relative to the guide.
    """

    name: str
    guide: tuple[str, str]
    slider: tuple[str, str]
    axis: tuple[float, float] = (1.0, 0.0)
    angle: float = 0.0

    ROWS = 2
    ROW_UNITS = (LENGTH, ANGLE)

    def bind(self, model) -> Binding:
        si = model.point(self.guide, self.name, "guide")
        sj = model.point(self.slider, self.name, "slider")
        distinct_bodies(self.name, self.guide[0], self.slider[0])
        u = unit_axis(self.axis, self.name)
        params = {"si": si, "sj": sj, "n": np.array([-u[1], u[0]]), "angle": np.array([float(self.angle)])}
        return Binding((self.guide[0], self.slider[0]), params)

    def coordinate(self):
        return SliderStroke(self.name, self.guide, self.slider, self.axis)

    @classmethod
    def residual(cls, par, pi, pj):
        return [
            projection.value(pi, pj, par["si"], par["sj"], par["n"]),
            pj.phi - pi.phi - par["angle"][0],
        ]

    @classmethod
    def jacobian(cls, par, pi, pj):
        return [
            projection.jacobian(pi, pj, par["si"], par["sj"], par["n"]),
            [0.0, 0.0, -1.0, 0.0, 0.0, 1.0],
        ]

    @classmethod
    def residual_jacobian(cls, par, pi, pj):
        g, partials = projection.value_jacobian(pi, pj, par["si"], par["sj"], par["n"])
        return [g, pj.phi - pi.phi - par["angle"][0]], [partials, [0.0, 0.0, -1.0, 0.0, 0.0, 1.0]]

    @classmethod
    def gamma(cls, par, poses, rates):
        return [projection.gamma(poses, rates, par["si"], par["sj"], par["n"]), 0.0]

    @classmethod
    def eta(cls, par, poses, rates, accels):
        return [projection.eta(poses, rates, accels, par["si"], par["sj"], par["n"]), 0.0]
