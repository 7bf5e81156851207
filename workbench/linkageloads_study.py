"""A linkage's loads over one cycle at the machine speed, in the file's units.

`study_loads(project, spec)` solves the cycle (linkagesolve.py), hands the `[linkage.loads]` in SI to `solver.loads` and reads
back, per driver, the effort it supplies (N·m for an angle, N for a travel),
its peak and where, RMS, peak speed and power, and — with a servo — the
figures at the motor against the motor's limits; per joint, the peak force
it transmits (and couple, for a slider or weld).

A servo may work a joint other than the driven one (`at`): the linkage is
driven by its output in the file (the servo carriage's travel follows an
axis) while the motor turns pin `at`.  Kinetostatics needs only the
configuration, its derivatives and the constraint Jacobian Φq — not the way
the motion was prescribed — so the loads are taken on the solved motion
with the driving row moved to pin `at` (`motor_result`): the multipliers
then give the motor's torque there, and joint reactions with the load
passing through the linkage to the motor, as in the machine.  The drive
functions of that system are not the real motion, so those peaks are
refined from the samples (a parabola through the neighbours), not by a
dense re-solve.

Rigid-body estimates at constant machine speed: see `CAUTION`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from motionlaws.peaks import LimitCheck, Peak
from solver.kinematics import INSTANTS, SOLVED, CoordinateProbe, JointCoordinate, System, cycle_breaks
from solver.loads import (
    DriveLoad, JointReaction, LinkageLoads, LoadsError, ServoSizing, linkage_loads, refined_peak, servo_sizing,
    velocity_coefficients,
)

from . import linkageloads
from .linkagefile import DriverSpec, LinkageSpec, Target, describe, target_unit
from .linkagemodel import LinkageFault, build_linkage
from .linkagesolve import FULL_TURN, solve_linkage

CAUTION = (
    "Loads are rigid-body estimates at constant machine speed: shocks, elasticity, backlash, friction "
    "in the joints and safety factors are not in them — add them under the rules that apply locally, "
    "and size the motor with the drive maker's data and tools."
)
RPM = 60.0 / (2.0 * math.pi)  # rev/min per rad/s
DEG = 180.0 / math.pi  # deg per rad
MM = 1e3  # mm per m
STALL = 1e-9  # |∂φ_at/∂d| below this share of its largest counts as standing still


class LoadsFault(ValueError):
    """Loads that cannot be computed for a linkage as it stands: where (a table), key and problem."""

    def __init__(self, where: str, key: str | None, problem: str):
        super().__init__(problem)
        self.where, self.key, self.problem = where, key, problem


@dataclass(frozen=True)
class ServoStudy:
    """One servo: where it works, its figures at the motor (N·m, rpm; `sizing.load` holds those at the
    gearbox output), its limit checks (file units) and the SI sizing behind them."""

    spec: object  # linkageloads.ServoSpec
    at: str | None  # the joint it works, None: the driven coordinate
    of: str  # what the motor supplies there, in words: "torque at pin O"
    unit: str  # "deg" or "mm": the coordinate it works
    drive: DriveLoad  # the effort where the motor works, SI
    sizing: ServoSizing
    checks: tuple[LimitCheck, ...]  # file units: N·m, N·m, rpm

    @property
    def ok(self) -> bool:
        return all(c.ok for c in self.checks)

    @property
    def peak_torque(self) -> Peak:
        """At the motor, N·m."""
        return self.sizing.motor.peak_torque

    @property
    def rms_torque(self) -> float:
        return self.sizing.motor.rms_torque

    @property
    def peak_speed(self) -> Peak:
        """At the motor, rpm."""
        p = self.sizing.motor.peak_speed
        return Peak(p.value * RPM, p.at)


@dataclass(frozen=True)
class DriverLoads:
    """What one driver supplies, in file units: effort (N·m or N), its peak and RMS, peak rate
    (deg/s or mm/s) and peak power (W); `servo` when the file sizes its motor."""

    name: str
    of: str  # what it supplies, in words: "torque at pin O"
    unit: str  # "deg" or "mm"
    effort_unit: str  # "N·m" or "N"
    peak: Peak
    rms: float
    peak_rate: Peak
    peak_power: Peak
    drive: DriveLoad  # SI curves over the solved instants
    servo: ServoStudy | None

    @property
    def ok(self) -> bool:
        return self.servo is None or self.servo.ok


@dataclass(frozen=True)
class ReactionPeak:
    """The largest force a joint transmits (N) and where; for a slider or weld also its couple (N·m)."""

    joint: str
    kind: str
    bodies: tuple[str, str]
    peak: Peak
    couple: Peak | None
    reaction: JointReaction  # SI curves


@dataclass(frozen=True)
class LoadsStudy:
    """A linkage's loads at the machine speed.  `status` is the kinematics' (`solved`, `dead-point`, …);
    without solved instants `drivers` and `reactions` are empty; `complete` False: a partial cycle."""

    spec: LinkageSpec
    status: str
    message: str
    speed: float
    complete: bool
    loads: LinkageLoads | None
    drivers: tuple[DriverLoads, ...]
    reactions: tuple[ReactionPeak, ...]
    solution: object = None  # linkagesolve.LinkageSolution

    @property
    def ok(self) -> bool:
        return self.status == SOLVED and self.complete and all(d.ok for d in self.drivers)


def effort_words(spec: LinkageSpec, target: Target) -> str:
    """What a motor or driver supplies, in words: "torque at pin O", "force along slider rail",
    "torque on body rocker", "force along x at head.face"."""
    if target.kind == "joint":
        joint = spec.joint(target.of)
        return f"force along slider {target.of}" if joint.kind == "slider" else f"torque at pin {target.of}"
    if target.kind == "angle":
        return f"torque on body {target.of}"
    return f"force along {target.kind} at {target.of}"


def loads_where(spec: LinkageSpec, what: str | None = None) -> str:
    return f"{spec.label}, loads" + (f", {what}" if what else "")


def _scale(unit: str) -> float:
    """File unit per SI unit of a coordinate: deg per rad or mm per m."""
    return MM if unit == "mm" else DEG


def _peak_of(theta, values, periodic, breaks) -> Peak:
    value, at = refined_peak(theta, values, periodic, breaks=breaks)
    return Peak(value, math.degrees(at % (2 * math.pi) if periodic else at))


def motor_spec(spec: LinkageSpec) -> LinkageSpec:
    """`spec` with every driver whose servo works another joint (`at`) driving that joint instead
    (at a steady turn: only the Jacobian of this model is used, see the module docstring)."""
    drivers = []
    for d in spec.drivers:
        servo = spec.loads.servo(d.name) if spec.loads is not None else None
        if servo is not None and servo.at is not None:
            d = DriverSpec(d.name, Target("joint", servo.at), turns=1.0)
        drivers.append(d)
    return replace(spec, drivers=tuple(drivers))


def stall_at(result, driver: str, joint: str) -> float | None:
    """Master angle (deg) where `joint` stands still while `driver` moves the linkage, or None.

    There ∂φ_joint/∂d — from Φq u = e_d, u = ∂q/∂d, defined at dwells too —
    vanishes or changes sign: seen from the joint the linkage is at a dead
    point, and a motor there would need an unbounded torque.
    """
    system = result.system
    u = velocity_coefficients(system, result.q)[:, :, list(system.driver_names).index(driver)]
    zeros = np.zeros_like(u.T)
    coupling = CoordinateProbe(system, JointCoordinate(joint)).evaluate(result.q.T, u.T, zeros, zeros)[1]
    largest = float(np.max(np.abs(coupling)))
    sign = np.sign(np.where(np.abs(coupling) <= STALL * largest, 0.0, coupling))
    turns = sign != np.roll(sign, -1)  # on a whole cycle the last sample neighbours the first
    if not result.success:
        turns[-1] = False
    bad = np.flatnonzero((sign == 0.0) | turns)
    if largest == 0.0:
        return 0.0
    if bad.size == 0:
        return None
    i = int(bad[0])
    j = (i + 1) % coupling.size
    t0, t1 = result.theta[i], result.theta[j] + (2 * math.pi if j == 0 else 0.0)
    c0, c1 = coupling[i], coupling[j]
    share = c0 / (c0 - c1) if sign[i] != 0.0 and c0 != c1 else 0.0  # the zero between the samples, linearly
    return math.degrees(float(t0 + share * (t1 - t0))) % FULL_TURN


def motor_result(project, spec: LinkageSpec, result):
    """`result` (the solved motion) with the constraint system of `motor_spec(spec)`: the same q, q', q''
    with each `at` servo's joint holding the driving row.  Raises `LoadsFault` when that model cannot be
    built, or when a servo's joint stands still while its driver moves the linkage (`stall_at`)."""
    for servo in spec.loads.servos:
        if servo.at is None:
            continue
        at = stall_at(result, servo.driver, servo.at)
        if at is not None:
            raise LoadsFault(loads_where(spec, f'servo "{servo.driver}"'), "at",
                             f"{describe(Target('joint', servo.at), spec)} stands still at master {at:.4g}° while "
                             f"driver {servo.driver!r} moves the linkage (a dead point seen from {servo.at}): "
                             "a motor there would need an unbounded torque")
    swapped = motor_spec(spec)
    try:
        mechanism = build_linkage(project, swapped).mechanism
    except LinkageFault as exc:
        raise LoadsFault(loads_where(spec, "servo"), "at", exc.problem) from None
    return replace(result, system=System(mechanism))


def _sampled(item, breaks):
    """A DriveLoad or JointReaction without its dense re-solve (peaks from the samples), jumping
    where the solved motion's drivers change law (`breaks`, rad; the swapped system has none)."""
    return replace(item, local=None, breaks=breaks)


def motor_drive(result, drive: DriveLoad, joint: str) -> DriveLoad:
    """The effort at `joint` from a `motor_result` (its multipliers), with the joint's own position,
    rate and acceleration from the solved motion (the swapped system's drive is not the motion)."""
    curve = result.output(JointCoordinate(joint))
    return replace(drive, position=curve.value, rate=curve.velocity, acceleration=curve.acceleration, local=None,
                   breaks=cycle_breaks(result))


def _servo(spec: LinkageSpec, drive: DriveLoad, servo, target: Target) -> ServoStudy:
    where = loads_where(spec, f'servo "{servo.driver}"')
    unit, of = target_unit(spec, target), effort_words(spec, target)
    try:
        sizing = servo_sizing(drive, linkageloads.gearing_of(servo, unit), linkageloads.servo_limits_of(servo))
    except LoadsError as exc:
        raise LoadsFault(where, exc.key, exc.message) from None
    checks = []
    for c in sizing.checks:  # speed back to rpm, as the file gives it
        if c.quantity == "speed":
            checks.append(LimitCheck(c.quantity, servo.limits.speed, Peak(c.peak.value * RPM, c.peak.at), c.used))
        else:
            checks.append(c)
    return ServoStudy(servo, servo.at, of, unit, drive, sizing, tuple(checks))


def _driver(spec: LinkageSpec, drive: DriveLoad, target: Target) -> DriverLoads:
    """A driver's effort where its motor works (`target`: the driven coordinate, or a servo's `at`)."""
    unit = target_unit(spec, target)
    figures = servo_sizing(drive).load  # direct: the effort and rate where it is supplied
    rate = Peak(figures.peak_speed.value * _scale(unit), figures.peak_speed.at)
    servo = spec.loads.servo(drive.name)
    return DriverLoads(
        drive.name, effort_words(spec, target), unit, drive.effort_unit, drive.peak, drive.rms, rate,
        _peak_of(drive.theta, drive.power, drive.periodic, drive.breaks), drive,
        None if servo is None else _servo(spec, drive, servo, target),
    )


def motor_target(spec: LinkageSpec, driver) -> Target:
    """Where a driver's effort is supplied: its servo's joint (`at`), else the driven coordinate."""
    servo = spec.loads.servo(driver.name) if spec.loads is not None else None
    return Target("joint", servo.at) if servo is not None and servo.at is not None else driver.target


@dataclass(frozen=True)
class SolvedLoads:
    """Loads on a solved cycle where the motors work: `drives` per driver (at its servo's joint when the
    servo names one), `reactions` per joint, `targets` the coordinate each drive's effort belongs to."""

    loads: LinkageLoads
    drives: dict[str, DriveLoad]
    reactions: dict[str, JointReaction]
    targets: dict[str, Target]


def solved_loads(project, spec: LinkageSpec, result) -> SolvedLoads:
    """The loads of `spec` on `result` (a solved `CycleResult` with instants), motors where their servos
    work (module docstring).  Raises `LoadsFault` naming the table and key at fault."""
    moved = any(s.at is not None for s in spec.loads.servos)
    system_result = motor_result(project, spec, result) if moved else result
    try:
        loads = linkage_loads(system_result, linkageloads.loading_of(spec, spec.loads))
    except LoadsError as exc:  # a loaded file fits; an edit (a body or point renamed) may not
        what = f'body "{exc.item}"' if exc.item in [b.name for b in spec.bodies] else None
        raise LoadsFault(loads_where(spec, what), exc.key, exc.message) from None
    drives, targets = {}, {}
    for d in spec.drivers:
        drive, target = loads.drives[d.name], motor_target(spec, d)
        if target is not d.target:
            drive = motor_drive(result, drive, target.of)
        elif moved:
            drive = _sampled(drive, cycle_breaks(result))
        drives[d.name], targets[d.name] = drive, target
    reactions = {j: (_sampled(r, cycle_breaks(result)) if moved else r) for j, r in loads.reactions.items()}
    return SolvedLoads(loads, drives, reactions, targets)


def study_loads(project, spec: LinkageSpec, solution=None, instants: int = INSTANTS) -> LoadsStudy | None:
    """The loads of linkage `spec` at the machine speed, or None when it has no `[linkage.loads]`.

    `solution` (linkagesolve.LinkageSolution on the analysis grid) is solved when not given.
    Raises `LinkageFault` (an edit left the linkage unbuildable) or `LoadsFault`.
    """
    if spec.loads is None:
        return None
    if solution is None:
        solution = solve_linkage(project, spec, instants=instants)
    result = solution.result
    speed = project.speed
    if result.theta.size == 0 or result.system is None:
        return LoadsStudy(spec, result.status, result.message, speed, False, None, (), (), solution)
    solved = solved_loads(project, spec, result)
    drivers = tuple(_driver(spec, solved.drives[d.name], solved.targets[d.name]) for d in spec.drivers)
    reactions = []
    for joint in spec.joints:
        r = solved.reactions[joint.name]
        couple = r.peak_couple if r.kind != "pin" else None
        reactions.append(ReactionPeak(joint.name, r.kind, (r.body_i, r.body_j), r.peak, couple, r))
    return LoadsStudy(spec, result.status, result.message, speed, solved.loads.complete, solved.loads, drivers,
                      tuple(reactions), solution)


def at_deg(value: float) -> float:
    """A master angle in [0, 360) rounded to 1e-6 deg (peak searches resolve far finer)."""
    if value is None or not math.isfinite(value):
        return value
    return round(value % FULL_TURN, 6) % FULL_TURN + 0.0


__all__ = ["CAUTION", "DriverLoads", "LinkageFault", "LoadsFault", "LoadsStudy", "ReactionPeak", "ServoStudy",
           "SolvedLoads", "at_deg", "motor_drive", "motor_result", "motor_target", "solved_loads", "study_loads"]
