"""Servo sizing figures: RMS and peaks against closed forms and numpy, gear reflection against the hand formula.

References, named beside each check:
* RMS of a trigonometric polynomial by Parseval's theorem:
  mean of (T0 + T1 sin θ + T2 cos 3θ)² = T0² + T1²/2 + T2²/2;
* reflecting a load through a gearbox of ratio i (motor turns i times the
  load) and efficiency η, with the motor's rotor inertia J_m:
  T_m = T/(i·η) + J_m·i·α_load while the motor drives, T·η/i + J_m·i·α_load
  while the load drives back (power balance across the gearbox; common
  practice in drive makers' sizing guides);
* a ball screw of lead p is a ratio i = 2π/p rad per m (common practice).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from motionlaws import Axis, Segment, compile_axis
from solver.kinematics import MM, ProgramMotion, solve_cycle
from solver.loads import (
    BodyMass, DriveLoad, Gearing, LinkageLoading, LoadsError, ServoLimits, linkage_loads, servo_sizing,
)
from tests.test_kinematics_support import slider_crank
from tests.test_loads_linkage import Fluctuating

SPEED = 120.0  # cycles/min
OMEGA = 2 * math.pi * SPEED / 60
T0, T1, T2 = 1.5, 4.0, 2.2  # N·m: test torque curve
EPS = 0.3  # speed fluctuation of the test drive


def known_curve(n=3600, local=False):
    """A drive with τ = T0 + T1 sin θ + T2 cos 3θ, ḋ = ω(1 + ε cos θ), d̈ = −ε ω² sin θ; exact local re-evaluation optional."""
    theta = 2 * np.pi * np.arange(n) / n

    def curves(t):
        return T0 + T1 * np.sin(t) + T2 * np.cos(3 * t), OMEGA * (1 + EPS * np.cos(t)), -EPS * OMEGA**2 * np.sin(t)

    def dense(lo, hi):
        t = np.linspace(lo, hi, 65)
        return (t, *curves(t))

    tau, rate, acc = curves(theta)
    return DriveLoad("axis", "rad", "N·m", theta, tau, theta.copy(), rate, acc, SPEED, True, dense if local else None), curves


def true_peak(f):
    """max |f| on [0, 2π): dense numpy grid, then scipy's bounded scalar minimizer around the best sample."""
    grid = np.linspace(0, 2 * np.pi, 1_000_001)
    k = int(np.argmax(np.abs(f(grid))))
    best = minimize_scalar(lambda t: -abs(f(t)), bounds=(grid[k - 1], grid[k + 1]), method="bounded",
                           options={"xatol": 1e-13})
    return -best.fun, math.degrees(best.x % (2 * np.pi))


@pytest.mark.parametrize("local", [False, True])
def test_rms_and_peak_of_a_known_torque_curve(local):
    drive, curves = known_curve(local=local)
    sizing = servo_sizing(drive)
    rms = math.sqrt(T0**2 + T1**2 / 2 + T2**2 / 2)  # Parseval
    assert sizing.load.rms_torque == pytest.approx(rms, rel=1e-13)
    assert sizing.load.rms_torque == pytest.approx(float(np.sqrt(np.mean(drive.effort**2))), rel=1e-13)  # numpy
    value, at = true_peak(lambda t: curves(t)[0])
    tol = 1e-11 if local else 1e-6  # dense re-evaluation vs parabola through the sampled neighbours
    assert sizing.load.peak_torque.value == pytest.approx(value, rel=tol)
    assert abs(sizing.load.peak_torque.at - at) < (1e-5 if local else 1e-2)  # deg
    assert sizing.load.peak_torque.value >= np.max(np.abs(drive.effort))
    # peak speed ω(1 + ε) at θ = 0 (closed form)
    assert sizing.load.peak_speed.value == pytest.approx(OMEGA * (1 + EPS), rel=1e-12)
    assert sizing.load.peak_speed.at == pytest.approx(0.0, abs=1e-6)
    assert (sizing.load.torque_unit, sizing.load.speed_unit) == ("N·m", "rad/s")


@pytest.fixture(scope="module")
def crank_drive():
    """Slider-crank with a heavy crank and slider, crank speed fluctuating: power flows both ways."""
    a, b, c, theta0 = 0.03, 0.10, 0.012, 0.3
    result = solve_cycle(slider_crank(a, b, c, theta0, motion=Fluctuating(theta0, EPS)), SPEED)
    assert result.success, result.message
    loading = LinkageLoading({"crank": BodyMass(1.8, (a / 2, 0.0), 1.8 * a * a / 12), "slider": BodyMass(2.5)},
                             gravity=(0.0, -9.81))
    return linkage_loads(result, loading).drives["motor"]


def test_gear_ratio_efficiency_and_rotor_inertia_against_hand_formula(crank_drive):
    i, eta, jm = 5.0, 0.9, 3.0e-4  # test gearing: ratio, efficiency, kg·m²
    sizing = servo_sizing(crank_drive, Gearing(i, eta, jm))
    T, w, al = crank_drive.effort, crank_drive.rate, crank_drive.acceleration
    motoring = T * w >= 0
    assert motoring.any() and (~motoring).any()  # both directions of power flow occur
    want = np.where(motoring, T / (i * eta), T * eta / i) + jm * i * al
    np.testing.assert_allclose(sizing.torque, want, rtol=1e-14, atol=1e-15)
    np.testing.assert_allclose(sizing.speed, i * w, rtol=1e-15)
    # lossless gearing: one formula, and the motor's power is the load's plus its rotor's d(½ J_m ω_m²)/dt
    ideal = servo_sizing(crank_drive, Gearing(i, 1.0, jm))
    np.testing.assert_allclose(ideal.torque, T / i + jm * i * al, rtol=1e-14, atol=1e-15)
    np.testing.assert_allclose(ideal.torque * ideal.speed, T * w + jm * (i * w) * (i * al), rtol=1e-12, atol=1e-12)
    # motor figures against numpy on the same curve; the peak refined (dense re-solve) never below the samples
    assert sizing.motor.rms_torque == pytest.approx(float(np.sqrt(np.mean(want**2))), rel=1e-13)
    sampled = float(np.max(np.abs(want)))
    assert sampled <= sizing.motor.peak_torque.value <= sampled * (1 + 1e-5)
    # peak motor speed: i ω (1 + ε) at master 0° (closed form of the fluctuating crank)
    assert sizing.motor.peak_speed.value == pytest.approx(i * OMEGA * (1 + EPS), rel=1e-12)
    # load-side figures are the drive's own
    assert sizing.load.rms_torque == pytest.approx(crank_drive.rms, rel=1e-15)
    assert sizing.load.peak_torque == crank_drive.peak


def test_limits_report_used_share_and_verdict(crank_drive):
    i = 5.0
    sizing = servo_sizing(crank_drive, Gearing(i), ServoLimits(peak_torque=0.1, rms_torque=0.1, speed=100.0))
    checks = {c.quantity: c for c in sizing.checks}
    assert checks["peak_torque"].used == pytest.approx(sizing.motor.peak_torque.value / 0.1, rel=1e-15)
    assert checks["rms_torque"].used == pytest.approx(sizing.motor.rms_torque / 0.1, rel=1e-15)
    assert checks["rms_torque"].peak.at is None  # a cycle figure, not an angle
    assert checks["speed"].used == pytest.approx(i * OMEGA * (1 + EPS) / 100.0, rel=1e-12)
    # the test values straddle the limits: the peak torque is over, the others within
    assert sizing.motor.peak_torque.value > 0.1 and not checks["peak_torque"].ok
    assert checks["rms_torque"].ok and checks["speed"].ok and not sizing.ok
    assert servo_sizing(crank_drive, Gearing(i), ServoLimits(peak_torque=1e3)).ok


def test_slider_drive_through_a_ball_screw_and_direct():
    """A servo pushing the slider: through a ball screw of lead p (i = 2π/p) the motor needs F·p/(2π·η) + J_m·(2π/p)·a;
    a direct linear motor needs F + m_forcer·a (Newton's second law)."""
    axis = Axis("slider", (Segment("cycloidal", 180.0, 120.0), Segment("cycloidal", 180.0, 90.0)), unit="mm", start=90.0)
    program = compile_axis(axis)
    result = solve_cycle(slider_crank(0.03, 0.10, 0.012, 1.2, driver="slider", motion=ProgramMotion(program, scale=MM)), SPEED)
    drive = linkage_loads(result, LinkageLoading({"slider": BodyMass(1.7)})).drives["servo"]
    lead, jm = 0.010, 2.0e-5  # m per turn, kg·m² (test values)
    screw = servo_sizing(drive, Gearing(2 * math.pi / lead, 1.0, jm))
    want = drive.effort * lead / (2 * math.pi) + jm * (2 * math.pi / lead) * drive.acceleration
    np.testing.assert_allclose(screw.torque, want, rtol=1e-13, atol=1e-15)
    assert (screw.motor.torque_unit, screw.motor.speed_unit) == ("N·m", "rad/s")
    linear = servo_sizing(drive, Gearing(None, 1.0, 0.4))
    np.testing.assert_allclose(linear.torque, drive.effort + 0.4 * drive.acceleration, rtol=1e-13, atol=1e-12)
    assert (linear.motor.torque_unit, linear.motor.speed_unit) == ("N", "m/s")


@pytest.mark.parametrize("gearing, key", [
    (Gearing(0.0), "ratio"), (Gearing(5.0, 1.2), "efficiency"), (Gearing(5.0, 0.0), "efficiency"),
    (Gearing(5.0, 0.9, -1.0), "rotor_inertia"), (Gearing(math.inf), "ratio"),
])
def test_bad_gearing_names_the_key(crank_drive, gearing, key):
    with pytest.raises(LoadsError) as err:
        servo_sizing(crank_drive, gearing)
    assert err.value.key == key


def test_bad_limit_names_the_key(crank_drive):
    with pytest.raises(LoadsError) as err:
        servo_sizing(crank_drive, Gearing(2.0), ServoLimits(speed=-1.0))
    assert err.value.key == "speed"
