"""Force-closed follower: jump speed, preload, camshaft torque.

References: the follower's equation of motion N = m·a + k(x0 + s) + F
(Newton's second law along the follower line; any dynamics textbook, e.g.
R. L. Norton, Design of Machinery, force-closed cam-follower dynamics) and
the power balance T·ω = N·v for the camshaft torque.
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from motionlaws import Axis, Segment, compile_axis
from solver.loads import FollowerLoad, follower_forces, jump_speed, preload_for_margin, scaled_motion

H_MM, BETA_DEG = 30.0, 120.0


def cycloid_program():
    return compile_axis(
        Axis("f", (Segment("cycloidal", BETA_DEG, H_MM), Segment("dwell", 60), Segment("cycloidal", 120, 0.0), Segment("dwell", 60)))
    )


MOTION = scaled_motion(cycloid_program(), 1e-3)  # mm → m


def test_constant_force_closed_form():
    # k = 0: N = m·s''·ω² + F0 first reaches zero where s'' is most negative,
    # s''_min = −2πh/β² for a cycloidal rise (h in m, β in rad), so
    # ω_jump = β·√(F0 / (2π·m·h)).
    m, f0 = 1.5, 200.0
    load = FollowerLoad(mass=m, spring_rate=0.0, preload=f0)
    h, beta = H_MM * 1e-3, math.radians(BETA_DEG)
    want = beta * math.sqrt(f0 / (2 * math.pi * m * h)) * 60 / (2 * math.pi)
    assert jump_speed(MOTION, load) == pytest.approx(want, rel=1e-6)


def test_spring_jump_speed_against_hand_computation():
    # Hand computation: the speed at which min over x of
    # m·a(x) + k(x0 + s(x)) first touches zero, with the cycloid written out
    # (s = h(x − sin 2πx/2π), a = h·2π·sin(2πx)·ω²/β²) and solved by brentq.
    m, k, pre = 2.0, 8000.0, 60.0  # kg, N/m, N (x0 = pre/k)
    h, beta = H_MM * 1e-3, math.radians(BETA_DEG)
    x = np.linspace(0, 1, 400_001)

    def min_contact(w):
        a = h * 2 * math.pi * np.sin(2 * math.pi * x) * w * w / beta**2
        s = h * (x - np.sin(2 * math.pi * x) / (2 * math.pi))
        return np.min(m * a + k * s + pre)

    w_jump = brentq(min_contact, 1.0, 500.0, xtol=1e-12)
    want = w_jump * 60 / (2 * math.pi)
    got = jump_speed(MOTION, FollowerLoad(mass=m, spring_rate=k, preload=pre))
    assert got == pytest.approx(want, rel=1e-6)
    # just below the jump speed contact holds; just above it is lost
    assert not follower_forces(MOTION, FollowerLoad(m, k, pre), got * 0.999).jumps
    assert follower_forces(MOTION, FollowerLoad(m, k, pre), got * 1.001).jumps


def test_preload_for_margin_is_exact():
    load = FollowerLoad(mass=2.0, spring_rate=8000.0, preload=60.0)
    need = preload_for_margin(MOTION, load, 150.0, margin=25.0)
    again = follower_forces(MOTION, FollowerLoad(2.0, 8000.0, need), 150.0)
    assert again.min_contact == pytest.approx(25.0, abs=1e-6)


def test_torque_power_balance_over_a_cycle():
    # Conservative loads (mass, spring): the camshaft does no net work per
    # cycle, so the mean torque is zero; Coulomb friction F adds F·(2h) of
    # work per cycle (rise and return), i.e. a mean torque of F·2h/2π.
    conservative = follower_forces(MOTION, FollowerLoad(2.0, 8000.0, 60.0), 100.0, points=36000)
    assert np.mean(conservative.torque) == pytest.approx(0.0, abs=1e-6 * conservative.peak_torque)
    f = 15.0
    lossy = follower_forces(MOTION, FollowerLoad(2.0, 8000.0, 60.0, friction=f), 100.0, points=36000)
    assert np.mean(lossy.torque) == pytest.approx(f * 2 * H_MM * 1e-3 / (2 * math.pi), rel=1e-3)


def test_torque_is_force_times_velocity_ratio():
    forces = follower_forces(MOTION, FollowerLoad(2.0, 8000.0, 60.0), 100.0)
    _, d1, _, _ = MOTION(forces.theta)
    np.testing.assert_allclose(forces.torque, forces.contact * d1, rtol=1e-12)
    assert forces.peak_torque >= np.max(np.abs(forces.torque)) * (1 - 1e-12)


def test_contact_lost_at_rest_means_zero_jump_speed():
    # a load pulling the follower off the cam harder than the spring holds it
    load = FollowerLoad(mass=1.0, spring_rate=0.0, preload=10.0, external=-20.0)
    assert jump_speed(MOTION, load) == 0.0
