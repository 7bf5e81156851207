"""Transmission angle at a pin: the acute angle between the lines of the two bodies it joins.

At pin P joining bodies i and j, body i's line runs from P to a reference
point R_i of body i and body j's line from P to a point R_j of body j.  With
ψ ∈ [0, π] the angle between the vectors R_i − P and R_j − P, the
transmission angle is μ = ψ for ψ ≤ π/2 and π − ψ otherwise: the acute angle
between the two lines, as R. L. Norton (Design of Machinery, ch. 2 and 4)
takes it.  Since both lines are fixed in their bodies, ψ changes as the
pin's relative angle φ_j − φ_i does, so its derivatives follow from the
bodies' angular rates with a sign that flips where ψ crosses π/2 (μ has a
corner there; ψ itself is reported too).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import ModelError
from .revolute import Revolute


@dataclass(frozen=True)
class TransmissionAngle:
    """μ (rad) at pin `joint` between the lines toward `toward_i` and `toward_j` ((body, point) pairs).

    Set `acute=False` for ψ ∈ [0, π] instead of μ ∈ [0, π/2].
    """

    joint: str
    toward_i: tuple[str, str]
    toward_j: tuple[str, str]
    acute: bool = True
    name: str = ""

    UNIT = "rad"

    def _geometry(self, system):
        mechanism = system.mechanism
        label = self.name or f"{self.joint}.transmission"
        pin = mechanism.joint(self.joint, label, "joint")
        if not isinstance(pin, Revolute):
            raise ModelError(f"transmission angle needs a pin; joint {self.joint!r} is a {type(pin).__name__}", label, "joint")
        ends = {}
        for key, ref in (("toward_i", self.toward_i), ("toward_j", self.toward_j)):
            local = mechanism.point(ref, label, key)
            for side in (pin.i, pin.j):
                if side[0] == ref[0]:
                    offset = local - mechanism.point(side, label, key)
                    if np.hypot(*offset) == 0.0:
                        raise ModelError(f"{key}: point {ref[1]!r} sits on the pin; a line needs two points", label, key)
                    ends[key] = (side[0], math.atan2(offset[1], offset[0]))
                    break
            else:
                raise ModelError(f"{key}: body {ref[0]!r} is not joined by pin {self.joint!r}", label, key)
        if ends["toward_i"][0] == ends["toward_j"][0]:
            raise ModelError("toward_i and toward_j must lie on the two different bodies of the pin", label, "toward_j")
        return label, ends["toward_i"], ends["toward_j"]

    def evaluate_on(self, system, q, dq, ddq, dddq):
        """(name, unit, (value, d1, d2, d3)) over body coordinates (n, N) and their derivatives."""
        label, (body_i, alpha_i), (body_j, alpha_j) = self._geometry(system)
        index = {b: k for k, b in enumerate(system.bodies)}

        def angle_rows(arr, body):
            return arr[3 * index[body] + 2] if body in index else np.zeros(arr.shape[1])

        delta = angle_rows(q, body_j) + alpha_j - angle_rows(q, body_i) - alpha_i
        wrapped = np.angle(np.exp(1j * delta))
        psi = np.abs(wrapped)
        sign = np.where(wrapped >= 0.0, 1.0, -1.0)
        rates = [sign * (angle_rows(a, body_j) - angle_rows(a, body_i)) for a in (dq, ddq, dddq)]
        if self.acute:
            fold = psi > 0.5 * math.pi
            psi = np.where(fold, math.pi - psi, psi)
            rates = [np.where(fold, -r, r) for r in rates]
        return label, "rad", (psi, *rates)
