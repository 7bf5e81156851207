"""What a cycle solve returns: solved instants, or as many as could be solved and why not more.

Like scipy's OdeResult, a failure is a result: `success` is False, `status`
says what happened, `message` says it in words, and the arrays hold every
instant solved before the stop.  Derivatives are stored per master angle
(rad) — they do not depend on machine speed — and scaled to time on demand
with ω = 2π·N/60 rad/s (v = ω q', a = ω² q'', j = ω³ q''').
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .dof import DofReport

SOLVED = "solved"  # every requested instant solved
DEAD_POINT = "dead-point"  # stopped at a limit position, a toggle or a branch jump
NOT_ASSEMBLED = "not-assembled"  # no configuration near the rough one satisfies the constraints
NOT_DRIVEN = "not-driven"  # free degrees of freedom, or redundant equations

REASONS = {
    "limit": "the linkage cannot be assembled beyond this angle: a limit position"
    " (the driven coordinate asks for a position the linkage cannot reach)",
    "singular": "Φq is singular here: a dead point (toggle), where the motion is not determined",
    "crossed": "the linkage passes a dead point (toggle) here, where two assembly branches meet"
    " and it could continue on either",
    "jump": "the solution would jump to another assembly branch here",
}


@dataclass(frozen=True)
class DeadPoint:
    """Where and why a cycle stopped.

    `at` is the last solved master angle (rad), `before` the angle (rad) of
    the shortest step the solver refused after it.  The dead point lies at
    or just after `at`: between them, or (near a limit position, where the
    two branches close in and a step is refused before the limit itself)
    within a few march.MIN_STEP beyond.  `joints` are
    the joints the singular motion works (their two bodies move relative to
    each other), `bodies` the bodies it moves; `condition` is the 1-norm
    condition number of scaled Φq at `at`.
    """

    reason: str
    at: float
    before: float
    joints: tuple[str, ...]
    bodies: tuple[str, ...]
    condition: float

    @property
    def message(self) -> str:
        where = f"at master {math.degrees(self.at):.4f}°"
        joints = f"; joints involved: {', '.join(self.joints)}" if self.joints else ""
        return f"{REASONS.get(self.reason, self.reason)} — {where}{joints}"


@dataclass
class CycleResult:
    """Positions and their derivatives over the master angles that were solved.

    `theta` (N,) master angles in rad; `q`, `dq`, `ddq`, `dddq` (N, n): body
    coordinates (m, m, rad per body, in `coordinates` order) and their
    derivatives per rad, rad², rad³ of master angle.  `requested` is how
    many instants were asked for; `speed` the machine speed (cycles/min)
    used by the time-scaled views.
    """

    status: str
    message: str
    theta: np.ndarray
    q: np.ndarray
    dq: np.ndarray
    ddq: np.ndarray
    dddq: np.ndarray
    coordinates: tuple[str, ...]
    speed: float
    requested: int
    dof: DofReport | None = None
    dead_point: DeadPoint | None = None
    system: object = None

    @property
    def success(self) -> bool:
        return self.status == SOLVED

    @property
    def omega(self) -> float:
        """Master angular speed in rad/s at the result's machine speed."""
        return 2.0 * math.pi * self.speed / 60.0

    @property
    def velocities(self) -> np.ndarray:
        """dq/dt (N, n) in m/s and rad/s."""
        return self.dq * self.omega

    @property
    def accelerations(self) -> np.ndarray:
        """d²q/dt² (N, n) in m/s² and rad/s²."""
        return self.ddq * self.omega**2

    @property
    def jerks(self) -> np.ndarray:
        """d³q/dt³ (N, n) in m/s³ and rad/s³."""
        return self.dddq * self.omega**3

    def output(self, output):
        """An `OutputCurve` of a coordinate or output (see outputs.py) over the solved instants."""
        from .outputs import evaluate_output

        return evaluate_output(self, output)

    def point(self, body: str, point: str) -> np.ndarray:
        """Machine coordinates (N, 2) in m of a named point over the solved instants (for drawing)."""
        from .coordinates import PointX, PointY

        x = self.output(PointX((body, point))).value
        y = self.output(PointY((body, point))).value
        return np.column_stack([x, y])

    def body(self, name: str) -> np.ndarray:
        """(N, 3) x (m), y (m), φ (rad) of a moving body over the solved instants."""
        k = self.coordinates.index(f"{name}.x")
        return self.q[:, k : k + 3]
