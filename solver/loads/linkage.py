"""Rigid-body loads on a linkage drive: kinetostatics at every instant of a solved cycle.

`linkage_loads(result, loading, speed=None)` takes a `CycleResult` of
solver.kinematics and a `LinkageLoading` (linkage_model.py) and returns
`LinkageLoads`: for every driver the effort it must supply (torque for an
angle, force for a stroke) and for every joint the force and couple it
transmits, at each solved instant — inverse dynamics, no time integration
(the motion is prescribed by the drivers).  The method and its signs are in
linkage_dynamics.py; joint reactions in linkage_reactions.py; true peaks in
linkage_peaks.py; the check by virtual power in linkage_power.py.

Loads assume constant machine speed (θ̇ = ω): at `speed` cycles/min every
load is L(θ) = L_static(θ) + ω²·L_inertial(θ), both parts computed once,
so `LinkageLoads.at_speed(N)` rescales exactly without solving again.

Rigid-body loads do not prove a machine safe: they leave out friction,
elasticity, clearances and the drive's own dynamics.  Verify with the
drive maker's data, fatigue, guarding and a risk assessment under the
machinery-safety rules that apply, and licensed engineering judgement.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property
from typing import Callable

import numpy as np

from motionlaws.peaks import Peak
from solver.kinematics.peaks import cycle_breaks

from .linkage_dynamics import body_motion, dense_jacobian, generalized_forces, multipliers
from .linkage_model import LinkageLoading, LoadsError
from .linkage_peaks import cycle_rms, degrees_at, is_periodic, local_kinematics, refined_peak
from .linkage_reactions import joint_infos, joint_points, joint_rows, reactions

EFFORT_UNITS = {"rad": "N·m", "m": "N"}  # drive effort per unit of the driven coordinate


def omega_of(speed: float) -> float:
    """Master angular speed (rad/s) at `speed` machine cycles/min."""
    return 2.0 * math.pi * speed / 60.0


@dataclass(eq=False)
class DriveLoad:
    """What one driver must supply over the cycle at machine speed `speed` (cycles/min).

    `effort` (N·m for an angle, N for a stroke: `effort_unit`) is the
    generalized force conjugate to the driven coordinate — the torque the
    motor applies to body j of a driven pin, relative to body i; the force
    along a driven slider — so that `power` = effort·rate is what the drive
    delivers (W; negative where the linkage drives it back).  `position`,
    `rate`, `acceleration` are the driven coordinate d, ḋ, d̈ (unit, /s, /s²),
    `theta` the master angles (rad).  `local(lo, hi)` re-solves a stretch
    densely for true peaks: (θ, effort, rate, acceleration).
    """

    name: str
    unit: str
    effort_unit: str
    theta: np.ndarray
    effort: np.ndarray
    position: np.ndarray
    rate: np.ndarray
    acceleration: np.ndarray
    speed: float
    periodic: bool
    local: Callable | None = field(default=None, repr=False)
    breaks: np.ndarray = field(default_factory=lambda: np.empty(0), repr=False)  # rad: where it may jump

    @property
    def power(self) -> np.ndarray:
        """Power the drive delivers (W) at each instant."""
        return self.effort * self.rate

    @cached_property
    def peak(self) -> Peak:
        """Largest |effort| (refined beyond the samples) and where (master deg)."""
        local = None if self.local is None else (lambda lo, hi: self.local(lo, hi)[:2])
        value, at = refined_peak(self.theta, self.effort, self.periodic, local, self.breaks)
        return Peak(value, degrees_at(at, self.periodic))

    @property
    def rms(self) -> float:
        """Root mean square of the effort over the cycle (uniform in time at constant machine speed)."""
        return cycle_rms(self.theta, self.effort, self.periodic)


@dataclass(eq=False)
class JointReaction:
    """Force and couple a joint transmits over the cycle (see linkage_reactions.py).

    `force` (N, 2) in N and `couple` (N,) in N·m act on `body_j` from
    `body_i`, about `point` (N, 2, machine frame, m); `body_i` receives the
    opposite.  `kind` is "pin", "slider" or "weld".
    """

    name: str
    kind: str
    body_i: str
    body_j: str
    theta: np.ndarray
    force: np.ndarray
    couple: np.ndarray
    point: np.ndarray
    speed: float
    periodic: bool
    local: Callable | None = field(default=None, repr=False)
    breaks: np.ndarray = field(default_factory=lambda: np.empty(0), repr=False)  # rad: where it may jump

    @property
    def magnitude(self) -> np.ndarray:
        """|force| in N."""
        return np.hypot(self.force[:, 0], self.force[:, 1])

    @property
    def direction(self) -> np.ndarray:
        """Direction of the force on body j, rad from the machine x axis (−π, π]."""
        return np.arctan2(self.force[:, 1], self.force[:, 0])

    def on(self, body: str) -> tuple[np.ndarray, np.ndarray]:
        """(force (N, 2), couple (N,)) on `body`, one of the joint's two bodies."""
        if body == self.body_j:
            return self.force, self.couple
        if body == self.body_i:
            return -self.force, -self.couple
        raise LoadsError(f"joint {self.name!r} joins {self.body_i!r} and {self.body_j!r}, not {body!r}", self.name, "body")

    @cached_property
    def peak(self) -> Peak:
        """Largest |force| (refined) and where (master deg)."""
        local = None if self.local is None else (lambda lo, hi: self._local(lo, hi, "force"))
        value, at = refined_peak(self.theta, self.magnitude, self.periodic, local, self.breaks)
        return Peak(value, degrees_at(at, self.periodic))

    @cached_property
    def peak_couple(self) -> Peak:
        """Largest |couple| (refined) and where (master deg); zero for a pin."""
        local = None if self.local is None else (lambda lo, hi: self._local(lo, hi, "couple"))
        value, at = refined_peak(self.theta, self.couple, self.periodic, local, self.breaks)
        return Peak(value, degrees_at(at, self.periodic))

    def _local(self, lo, hi, what):
        theta, force, couple = self.local(lo, hi)
        return theta, (np.hypot(force[:, 0], force[:, 1]) if what == "force" else couple)


@dataclass(frozen=True)
class LoadParts:
    """Loads at N instants split as static + ω²·inertial (index 0 and 1 of the leading axis).

    lam (2, m, N) multipliers; effort (2, K, N) per driver; motion (3, K, N)
    driver d, d', d'' per rad^k; force (2, J, N, 2), couple (2, J, N) per
    joint; point (J, N, 2).
    """

    theta: np.ndarray
    lam: np.ndarray
    effort: np.ndarray
    motion: np.ndarray
    force: np.ndarray
    couple: np.ndarray
    point: np.ndarray


class Kinetostatics:
    """Loads of one solved cycle under one loading, at any machine speed."""

    def __init__(self, result, loading: LinkageLoading):
        system = result.system
        if system is None or result.theta.size == 0:
            raise LoadsError(f"no solved instants to compute loads at ({result.message})", None, None)
        if system.m != system.n:
            raise LoadsError(
                "loads need a kinematically driven linkage: as many independent equations as body coordinates",
                None, "driver",
            )
        self.result, self.system = result, system
        mechanism = system.mechanism
        self.loading = loading.compile(mechanism, system.bodies)
        self.joints = joint_infos(mechanism)
        self.rows = joint_rows(system)
        self.drivers = list(system.driver_names)
        self.units = [mechanism.drivers[d].coordinate.resolve(mechanism).UNIT for d in self.drivers]
        self.periodic = is_periodic(result.theta, result.success)
        self.breaks = cycle_breaks(result)  # where a driver's law changes: loads may jump there
        self.parts = self.evaluate(result.theta, result.q, result.dq, result.ddq)
        self._local: dict[tuple[float, float], LoadParts] = {}

    def evaluate(self, theta, q, dq, ddq) -> LoadParts:
        """Static and inertial parts of every load at master angles θ (N,) from q, q', q'' (N, n)."""
        sys_ = self.system
        motion = body_motion(self.loading, q, dq, ddq)
        static, inertial = generalized_forces(self.loading, motion)
        jac = dense_jacobian(sys_, q)  # (m, n, N)
        lam = multipliers(jac, np.stack([static, inertial], axis=2)).transpose(2, 1, 0)  # (2, m, N)
        effort = -lam[:, sys_.first_driver_row :, :]  # e = −λ_d, (2, K, N)
        drive = sys_.drive(theta)[:3]
        point = joint_points(self.joints, sys_.bodies, q)
        force, couple = reactions(self.joints, self.rows, sys_.bodies, jac, lam, q, point)
        return LoadParts(theta, lam, effort, drive, force, couple, point)

    def local(self, lo: float, hi: float) -> LoadParts:
        """Parts on a dense grid over [lo, hi] rad, solved afresh (kept: several peaks share them)."""
        key = (float(lo), float(hi))
        if key not in self._local:
            self._local[key] = self.evaluate(*local_kinematics(self.result, lo, hi))
        return self._local[key]

    def loads(self, speed: float) -> "LinkageLoads":
        """Every load at `speed` machine cycles/min."""
        w2 = omega_of(speed) ** 2
        p = self.parts

        def mix(part):
            return part[0] + w2 * part[1]

        drives = {}
        for k, name in enumerate(self.drivers):
            def local_drive(lo, hi, k=k):
                lp = self.local(lo, hi)
                return lp.theta, mix(lp.effort[:, k]), lp.motion[1, k] * math.sqrt(w2), lp.motion[2, k] * w2

            drives[name] = DriveLoad(
                name, self.units[k], EFFORT_UNITS[self.units[k]], p.theta, mix(p.effort[:, k]),
                p.motion[0, k].copy(), p.motion[1, k] * math.sqrt(w2), p.motion[2, k] * w2,
                float(speed), self.periodic, local_drive, self.breaks,
            )
        reactions_ = {}
        for k, info in enumerate(self.joints):
            def local_joint(lo, hi, k=k):
                lp = self.local(lo, hi)
                return lp.theta, mix(lp.force[:, k]), mix(lp.couple[:, k])

            reactions_[info.name] = JointReaction(
                info.name, info.kind, info.body_i, info.body_j, p.theta, mix(p.force[:, k]),
                mix(p.couple[:, k]), p.point[k], float(speed), self.periodic, local_joint, self.breaks,
            )
        return LinkageLoads(p.theta, float(speed), self.result.success, drives, reactions_,
                            mix(p.lam).T, tuple(self.system.row_names), self)


@dataclass(eq=False)
class LinkageLoads:
    """Drive efforts and joint reactions over the solved instants at one machine speed.

    `theta` (N,) rad; `speed` cycles/min; `complete` False when the cycle
    stopped at a dead point (loads then cover the solved stretch only);
    `drives` by driver name; `reactions` by joint name; `multipliers`
    (N, m) the Lagrange multipliers λ with `row_names` naming their rows.
    """

    theta: np.ndarray
    speed: float
    complete: bool
    drives: dict[str, DriveLoad]
    reactions: dict[str, JointReaction]
    multipliers: np.ndarray
    row_names: tuple[str, ...]
    engine: Kinetostatics = field(repr=False)

    def at_speed(self, speed: float) -> "LinkageLoads":
        """The same loads at another machine speed (exact: static + ω²·inertial)."""
        return self.engine.loads(speed)


def linkage_loads(result, loading: LinkageLoading, speed: float | None = None) -> LinkageLoads:
    """Drive efforts and joint reactions of a solved cycle at `speed` cycles/min (default: the result's).

    Raises LoadsError when the loading does not fit the mechanism or the
    result has no solved instants.
    """
    return Kinetostatics(result, loading).loads(result.speed if speed is None else speed)
