"""Servo sizing figures for a driver: peak and RMS torque, peak speed, at the load and at the motor.

From a `DriveLoad` (linkage.py) — the effort a driver must supply with the
driven coordinate's rate and acceleration — and the gearing between motor
and load:

* ratio i: the motor turns i rad per unit of the driven coordinate (rad per
  rad through a gearbox, rad per m through a screw or belt); None for a
  direct drive (the motor moves with the load, in its units);
* efficiency η of the gearing, applied in the direction the power flows;
* rotor inertia J_m of the motor and whatever turns at motor speed.

Motor side (common practice for reflecting a load through a gearbox, e.g.
drive makers' sizing guides; the formula is the power balance of an ideal
gearbox with losses):

    ω_m = i·ḋ,   α_m = i·d̈
    T_m = T/(i·η) + J_m·α_m      where the motor drives the load (T·ḋ ≥ 0)
    T_m = T·η/i   + J_m·α_m      where the load drives the motor back

RMS over the cycle is time-weighted at constant machine speed, which is
uniform in master angle (linkage_peaks.cycle_rms).  Peaks are refined
beyond the samples (linkage_peaks.refined_peak) through the drive's dense
local re-solve where it has one.  Limits give `LimitCheck`s of motionlaws
with `used` = value/limit; the RMS check's `peak.at` is None (a figure of
the whole cycle, not of one angle).

Sizing from rigid-body loads is a first estimate: check it with the drive
maker's data and tools (thermal model, torque–speed curve, inertia ratio).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from motionlaws.peaks import LimitCheck, Peak

from .linkage import DriveLoad
from .linkage_model import LoadsError
from .linkage_peaks import cycle_rms, degrees_at, refined_peak

QUANTITIES = ("peak_torque", "rms_torque", "speed")  # names of the servo checks


@dataclass(frozen=True)
class Gearing:
    """Motor-to-load gearing: ratio i (motor rad per unit of the driven coordinate; None: direct drive),
    efficiency η (0 < η ≤ 1) and rotor inertia J_m (kg·m²; kg for a direct linear motor)."""

    ratio: float | None = None
    efficiency: float = 1.0
    rotor_inertia: float = 0.0


@dataclass(frozen=True)
class ServoLimits:
    """The motor's limits, each optional: peak and RMS torque (N·m; N for a direct linear motor)
    and speed (rad/s; m/s for a direct linear motor)."""

    peak_torque: float | None = None
    rms_torque: float | None = None
    speed: float | None = None


@dataclass(frozen=True)
class ServoFigures:
    """Peak |torque| and where, RMS torque, peak |speed| and where (Peak.at in master deg)."""

    peak_torque: Peak
    rms_torque: float
    peak_speed: Peak
    torque_unit: str
    speed_unit: str


@dataclass(eq=False)
class ServoSizing:
    """Sizing of one driver: figures at the load and at the motor, motor curves, limit checks.

    `torque`, `speed`, `acceleration` (N,) are the motor's T_m, ω_m, α_m
    over `theta` (rad); `complete` False when the curves do not cover one
    whole cycle (a dead point stopped it: the RMS covers the solved stretch).
    """

    name: str
    theta: np.ndarray
    torque: np.ndarray
    speed: np.ndarray
    acceleration: np.ndarray
    load: ServoFigures
    motor: ServoFigures
    checks: tuple[LimitCheck, ...]
    complete: bool

    @property
    def ok(self) -> bool:
        return all(c.ok for c in self.checks)


def _positive(value, what: str, key: str, allow_zero: bool = False) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise LoadsError(f"{what} must be a number, got {value!r}", None, key) from None
    if not math.isfinite(v) or v < 0.0 or (v == 0.0 and not allow_zero):
        raise LoadsError(f"{what} must be a finite {'non-negative' if allow_zero else 'positive'} number, got {value!r}", None, key)
    return v


def motor_curves(effort, rate, acceleration, gearing: Gearing):
    """(T_m, ω_m, α_m) from load effort, rate and acceleration arrays (module formulas)."""
    i = 1.0 if gearing.ratio is None else gearing.ratio
    eta = gearing.efficiency
    through = effort / i
    motoring = effort * rate >= 0.0
    gear = np.where(motoring, through / eta, through * eta)
    alpha = i * acceleration
    return gear + gearing.rotor_inertia * alpha, i * rate, alpha


def _check_gearing(gearing: Gearing) -> None:
    if gearing.ratio is not None:
        try:
            ratio = float(gearing.ratio)
        except (TypeError, ValueError):
            raise LoadsError(f"gear ratio must be a number, got {gearing.ratio!r}", None, "ratio") from None
        if not math.isfinite(ratio) or ratio == 0.0:
            raise LoadsError(f"gear ratio must be finite and not zero, got {gearing.ratio!r}", None, "ratio")
    eta = _positive(gearing.efficiency, "gear efficiency", "efficiency")
    if eta > 1.0:
        raise LoadsError(f"gear efficiency must be at most 1, got {gearing.efficiency!r}", None, "efficiency")
    _positive(gearing.rotor_inertia, "rotor inertia", "rotor_inertia", allow_zero=True)


def _figures(drive: DriveLoad, gearing: Gearing, torque, speed) -> ServoFigures:
    local_t = local_s = None
    if drive.local is not None:
        def local_t(lo, hi):
            t, e, r, a = drive.local(lo, hi)
            return t, motor_curves(e, r, a, gearing)[0]

        def local_s(lo, hi):
            t, e, r, a = drive.local(lo, hi)
            return t, motor_curves(e, r, a, gearing)[1]

    periodic = drive.periodic
    t_val, t_at = refined_peak(drive.theta, torque, periodic, local_t, drive.breaks)
    s_val, s_at = refined_peak(drive.theta, speed, periodic, local_s, drive.breaks)
    direct = gearing.ratio is None
    torque_unit = drive.effort_unit if direct else "N·m"
    speed_unit = ("rad/s" if drive.unit == "rad" else "m/s") if direct else "rad/s"
    return ServoFigures(Peak(t_val, degrees_at(t_at, periodic)), cycle_rms(drive.theta, torque, periodic),
                        Peak(s_val, degrees_at(s_at, periodic)), torque_unit, speed_unit)


def servo_sizing(drive: DriveLoad, gearing: Gearing = Gearing(), limits: ServoLimits = ServoLimits()) -> ServoSizing:
    """Peak and RMS torque and peak speed of `drive` at the load and at the motor, checked against `limits`."""
    _check_gearing(gearing)
    direct = Gearing()
    load = _figures(drive, direct, drive.effort, drive.rate)
    torque, speed, accel = motor_curves(drive.effort, drive.rate, drive.acceleration, gearing)
    motor = _figures(drive, gearing, torque, speed)
    checks = []
    for quantity, limit, peak in (
        ("peak_torque", limits.peak_torque, motor.peak_torque),
        ("rms_torque", limits.rms_torque, Peak(motor.rms_torque, None)),
        ("speed", limits.speed, motor.peak_speed),
    ):
        if limit is None:
            continue
        value = _positive(limit, f"{quantity.replace('_', ' ')} limit", quantity)
        checks.append(LimitCheck(quantity, value, peak, peak.value / value))
    return ServoSizing(drive.name, drive.theta, torque, speed, accel, load, motor, tuple(checks),
                       drive.periodic)
