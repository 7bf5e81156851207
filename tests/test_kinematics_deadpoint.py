"""Dead points: the solver stops with the angle and the joints involved, and never jumps branch.

Limit position of a non-Grashof four-bar driven at its crank: coupler and
rocker fall in line, |A − O4| = b + c, so by the law of cosines in triangle
O2-A-O4 the crank stops at cos θ2 = (a² + d² − (b + c)²)/(2ad) (Norton,
Design of Machinery, ch. 4, toggle positions; derived here).
"""

from __future__ import annotations

import math

import numpy as np

from motionlaws import Axis, Segment, compile_axis
from solver.kinematics import MM, ProgramMotion
from solver.kinematics.cycle import solve_cycle
from solver.kinematics.march import MIN_STEP
from solver.kinematics.result import DEAD_POINT
from tests.test_kinematics_support import four_bar, fourbar_closed_form, slider_crank

A, B, C, D = 0.09, 0.05, 0.07, 0.06  # m: non-Grashof (s + l = 0.14 > p + q = 0.13)


def test_non_grashof_stops_at_its_limit_position_without_jumping_branch():
    limit = math.acos((A * A + D * D - (B + C) ** 2) / (2 * A * D))
    result = solve_cycle(four_bar(A, B, C, D, 0.0), 60.0)
    assert result.status == DEAD_POINT and not result.success
    dead = result.dead_point
    assert dead.reason == "limit"
    assert dead.at <= limit and dead.at < dead.before <= dead.at + 2 * MIN_STEP
    assert limit - dead.at < 1e-5  # located to far better than one 0.1° instant
    assert {"A", "B", "O4"} <= set(dead.joints) and "O2" not in dead.joints
    assert set(dead.bodies) == {"coupler", "rocker"}
    assert "limit position" in result.message and "B" in result.message
    # what was solved reaches the last whole instant before the limit, on the starting branch
    assert result.theta[-1] <= dead.at and limit - result.theta[-1] < 2 * math.pi / 3600
    assert result.q.shape == (result.theta.size, 9)
    t3, t4 = fourbar_closed_form(A, B, C, D, result.theta, open_branch=True)
    wrap = lambda x: np.angle(np.exp(1j * x))  # noqa: E731
    assert np.max(np.abs(wrap(result.q[:, 8] - t4))) < 1e-9
    assert np.max(np.abs(wrap(result.q[:, 5] - t3))) < 1e-9


def test_slider_driven_into_dead_centre_stops_there():
    """A servo drives the slider of an in-line slider-crank to full stroke a + b (crank and rod in line)
    and back: Φq is singular there and the crank could turn either way — the solver must stop."""
    a, b = 0.03, 0.10
    axis = Axis("slider", (Segment("cycloidal", 180.0, (a + b) * 1e3), Segment("cycloidal", 180.0, 110.0)), unit="mm", start=110.0)
    motion = ProgramMotion(compile_axis(axis), scale=MM)
    k = ((0.110) ** 2 + a * a - b * b) / (2 * a * 0.110)
    model = slider_crank(a, b, 0.0, math.acos(k), driver="slider", motion=motion)
    result = solve_cycle(model, 60.0)
    assert result.status == DEAD_POINT
    dead = result.dead_point
    assert abs(dead.at - math.pi) < 1e-3 or abs(dead.before - math.pi) < 1e-3
    assert dead.reason in ("singular", "crossed", "limit")
    assert {"O", "A"} <= set(dead.joints)
    assert result.theta[-1] <= math.pi
