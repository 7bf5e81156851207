"""Six-bar with a slider output against independent solutions.

Positions: scipy.optimize.root solving the linkage's two vector loops per
instant (tests/test_kinematics_support.six_bar_closed_loop) — a different
formulation (loop closure in four unknowns) from the solver's Cartesian
constraints.  Velocity, acceleration and jerk: central finite differences
of those independent positions (8th-order stencils, Fornberg 1988).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver.kinematics import BodyAngle, JointCoordinate, PointX, PointY
from solver.kinematics.cycle import solve_cycle
from tests.test_kinematics_support import SIX, derivative, six_bar, six_bar_closed_loop

SPEED = 100.0
OMEGA = 2 * math.pi * SPEED / 60


@pytest.fixture(scope="module")
def solved():
    result = solve_cycle(six_bar(), SPEED)
    assert result.success, result.message
    return result


def loop_solution(theta2, result, k):
    """The four loop unknowns at crank angles theta2, started from the solver's answer at instant k."""
    q = result.q[k]
    return six_bar_closed_loop(np.atleast_1d(theta2), [q[5], q[8], q[11], q[12]])


def test_positions_match_scipy_root_per_instant(solved):
    every = slice(None, None, 10)
    t2 = solved.theta[every]
    z = six_bar_closed_loop(t2, [solved.q[0, 5], solved.q[0, 8], solved.q[0, 11], solved.q[0, 12]])
    wrap = lambda x: np.angle(np.exp(1j * x))  # noqa: E731
    assert np.max(np.abs(wrap(solved.q[every, 5] - z[:, 0]))) < 1e-12
    assert np.max(np.abs(wrap(solved.q[every, 8] - z[:, 1]))) < 1e-12
    assert np.max(np.abs(wrap(solved.q[every, 11] - z[:, 2]))) < 1e-12
    assert np.max(np.abs(solved.output(JointCoordinate("guide")).value[every] - z[:, 3])) < 1e-13
    # the slider output really strokes (m)
    assert np.ptp(z[:, 3]) > 0.1


@pytest.mark.parametrize("k", [0, 450, 1111, 1800, 2345, 3333])
def test_rates_match_finite_differences_of_scipy_positions(solved, k):
    t2 = float(solved.theta[k])
    h = 1e-2  # rad of crank angle; 8th-order stencils keep truncation below 1e-12

    def unknowns(t):
        return loop_solution(t, solved, k)[0]

    stroke = solved.output(JointCoordinate("guide"))
    for order in (1, 2, 3):
        fd = derivative(unknowns, t2, order, h) * OMEGA**order  # per s^order (crank at constant speed)
        got_rocker = (solved.velocities, solved.accelerations, solved.jerks)[order - 1][k, 8]
        got_slider = stroke.derivative(order)[k]
        scale_rocker = OMEGA**order
        scale_slider = SIX["rod"] * OMEGA**order
        assert abs(got_rocker - fd[1]) < 1e-7 * scale_rocker, (order, got_rocker, fd[1])
        assert abs(got_slider - fd[3]) < 1e-7 * scale_slider, (order, got_slider, fd[3])


def test_point_and_angle_outputs_agree_with_body_coordinates(solved):
    """Point x/y and body-angle outputs are the body coordinates and their rates (definition)."""
    x = solved.output(PointX(("slider", "D")))
    y = solved.output(PointY(("slider", "D")))
    phi = solved.output(BodyAngle("rocker"))
    np.testing.assert_allclose(x.value, solved.q[:, 12], atol=1e-15)
    np.testing.assert_allclose(y.value, SIX["guide_y"], atol=1e-13)
    np.testing.assert_allclose(y.velocity, 0.0, atol=1e-10)
    np.testing.assert_allclose(phi.acceleration, solved.accelerations[:, 8], rtol=1e-12, atol=1e-12)
    np.testing.assert_allclose(x.jerk, solved.jerks[:, 12], rtol=1e-12, atol=1e-9)
