"""Offset slider-crank against its textbook closed form.

Geometry (tests/test_kinematics_support.slider_crank): crank a turning about
the origin, rod b, slider pin B on the line y = c.  With φ3 the rod angle
(A to B), R. L. Norton, Design of Machinery (offset slider-crank position,
velocity and acceleration analysis, chs. 4, 6 and 7; written here for this sign
convention, from memory) gives

    sin φ3 = (c − a sin θ2)/b,          x_B = a cos θ2 + b cos φ3
    ω3 = −a ω2 cos θ2 /(b cos φ3),      v_B = −a ω2 sin θ2 − b ω3 sin φ3
    α3 = (a ω2² sin θ2 − a α2 cos θ2 + b ω3² sin φ3)/(b cos φ3)
    a_B = −a α2 sin θ2 − a ω2² cos θ2 − b α3 sin φ3 − b ω3² cos φ3

The jerk has no handbook form; sympy differentiates the exact acceleration
a_B(θ2(t)) once more in time instead.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy as sp

from motionlaws import Axis, Segment, compile_axis
from solver.kinematics import DEG, MM, JointCoordinate, ProgramMotion
from solver.kinematics.cycle import solve_cycle
from tests.test_kinematics_support import slider_crank

A, B, C = 0.03, 0.10, 0.012  # m: crank, rod, offset (test geometry)
SPEED = 120.0  # cycles/min
OMEGA = 2 * math.pi * SPEED / 60


def norton_slider(theta2, w2, al2):
    """x_B, v_B, a_B of the offset slider-crank (Norton, see module docstring)."""
    s3 = (C - A * np.sin(theta2)) / B
    c3 = np.sqrt(1 - s3 * s3)
    x = A * np.cos(theta2) + B * c3
    w3 = -A * w2 * np.cos(theta2) / (B * c3)
    v = -A * w2 * np.sin(theta2) - B * w3 * s3
    al3 = (A * w2**2 * np.sin(theta2) - A * al2 * np.cos(theta2) + B * w3**2 * s3) / (B * c3)
    acc = -A * al2 * np.sin(theta2) - A * w2**2 * np.cos(theta2) - B * al3 * s3 - B * w3**2 * c3
    return x, v, acc


def sympy_slider_jerk():
    """d a_B/dt: sympy differentiates Norton's exact acceleration (module docstring) once more in time.

    The crank angle is a function θ2(t), so ω2 = θ2' and α2 = θ2''; the jerk
    comes out in θ2 and its first three time derivatives.
    """
    t = sp.symbols("t")
    th = sp.Function("theta")(t)
    w2, al2 = sp.diff(th, t), sp.diff(th, t, 2)
    s3 = (C - A * sp.sin(th)) / B
    c3 = sp.sqrt(1 - s3**2)
    w3 = -A * w2 * sp.cos(th) / (B * c3)
    al3 = (A * w2**2 * sp.sin(th) - A * al2 * sp.cos(th) + B * w3**2 * s3) / (B * c3)
    acc = -A * al2 * sp.sin(th) - A * w2**2 * sp.cos(th) - B * al3 * s3 - B * w3**2 * c3
    jerk = sp.diff(acc, t)
    d1, d2, d3, th0 = sp.symbols("d1 d2 d3 th0")
    jerk = jerk.subs(sp.Derivative(th, (t, 3)), d3).subs(sp.Derivative(th, (t, 2)), d2)
    jerk = jerk.subs(sp.Derivative(th, t), d1).subs(th, th0)
    return sp.lambdify((th0, d1, d2, d3), jerk, "numpy")


def crank_program():
    """The crank indexes one turn per cycle with two cycloidal half-turns (non-constant speed)."""
    axis = Axis(
        "crank",
        (Segment("cycloidal", 180.0, 180.0), Segment("cycloidal", 180.0, 360.0)),
        unit="deg",
        start=0.0,
        index=360.0,
    )
    return compile_axis(axis)


def assert_close(got, want, rel, what):
    scale = np.max(np.abs(want))
    err = np.max(np.abs(got - want)) / scale
    assert err < rel, f"{what}: relative error {err:.2e} (limit {rel:.0e})"


def test_constant_crank_speed_matches_norton():
    start = 0.3
    result = solve_cycle(slider_crank(A, B, C, start), SPEED)
    assert result.success, result.message
    stroke = result.output(JointCoordinate("slide"))
    theta2 = start + result.theta
    x, v, acc = norton_slider(theta2, OMEGA, 0.0)
    assert_close(stroke.value, x, 1e-12, "position")
    assert_close(stroke.velocity, v, 1e-10, "velocity")
    assert_close(stroke.acceleration, acc, 1e-10, "acceleration")
    jerk = sympy_slider_jerk()(theta2, OMEGA, 0.0, 0.0)
    assert_close(stroke.jerk, jerk, 1e-9, "jerk (sympy)")


def test_crank_driven_by_a_motion_law_matches_norton():
    program = crank_program()
    result = solve_cycle(slider_crank(A, B, C, 0.0, motion=ProgramMotion(program, scale=DEG)), SPEED)
    assert result.success, result.message
    s, d1, d2, d3 = program.master(np.degrees(result.theta))
    theta2, w2, al2, j2 = np.radians(s), np.radians(d1) * OMEGA, np.radians(d2) * OMEGA**2, np.radians(d3) * OMEGA**3
    assert np.ptp(w2) > 1.0  # the crank speed really varies (rad/s)
    stroke = result.output(JointCoordinate("slide"))
    x, v, acc = norton_slider(theta2, w2, al2)
    assert_close(stroke.value, x, 1e-12, "position")
    assert_close(stroke.velocity, v, 1e-10, "velocity")
    assert_close(stroke.acceleration, acc, 1e-10, "acceleration")
    assert_close(stroke.jerk, sympy_slider_jerk()(theta2, w2, al2, j2), 1e-9, "jerk (sympy)")
    crank = result.output(JointCoordinate("O"))
    assert_close(crank.value, theta2, 1e-13, "crank angle follows its motion law")


def inverse_crank(x, branch=1.0):
    """Crank angle for slider position x: 2a(x cos θ + c sin θ) = x² + a² + c² − b² (from the closed form above)."""
    k = (x * x + A * A + C * C - B * B) / (2 * A * np.hypot(x, C))
    return np.arctan2(C, x) + branch * np.arccos(k)


def test_output_driving_returns_the_motor_profile():
    """The slider follows a cycloidal rise and return; the free crank's angle and rates come out (DESIGN §4)."""
    axis = Axis("slider", (Segment("cycloidal", 180.0, 120.0), Segment("cycloidal", 180.0, 90.0)), unit="mm", start=90.0)
    program = compile_axis(axis)
    start = float(inverse_crank(0.090))
    model = slider_crank(A, B, C, start, driver="slider", motion=ProgramMotion(program, scale=MM))
    result = solve_cycle(model, SPEED)
    assert result.success, result.message
    crank = result.output(JointCoordinate("O"))
    s, d1, d2, d3 = program.master(np.degrees(result.theta))
    x, xd, xdd, xddd = s * MM, d1 * MM * OMEGA, d2 * MM * OMEGA**2, d3 * MM * OMEGA**3
    theta2 = inverse_crank(x)
    assert_close(crank.value, theta2, 1e-12, "crank angle vs inverse closed form")
    # x = f(θ2) with f from the closed form; time derivatives by the chain rule, f's derivatives by sympy.
    th = sp.symbols("th")
    f = A * sp.cos(th) + sp.sqrt(B**2 - (C - A * sp.sin(th)) ** 2)
    f1, f2, f3 = (sp.lambdify(th, sp.diff(f, th, k), "numpy")(theta2) for k in (1, 2, 3))
    w = xd / f1
    al = (xdd - f2 * w**2) / f1
    jerk = (xddd - f3 * w**3 - 3 * f2 * w * al) / f1
    assert_close(crank.velocity, w, 1e-9, "motor speed")
    assert_close(crank.acceleration, al, 1e-9, "motor acceleration")
    assert_close(crank.jerk, jerk, 1e-8, "motor jerk")


@pytest.mark.parametrize("speed", [30.0, 600.0])
def test_time_derivatives_scale_with_machine_speed(speed):
    """v ∝ N, a ∝ N², j ∝ N³ at fixed master-angle motion (DESIGN §3)."""
    base = solve_cycle(slider_crank(A, B, C), 60.0, instants=360).output(JointCoordinate("slide"))
    other = solve_cycle(slider_crank(A, B, C), speed, instants=360).output(JointCoordinate("slide"))
    r = speed / 60.0
    np.testing.assert_allclose(other.velocity, base.velocity * r, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(other.acceleration, base.acceleration * r**2, rtol=1e-12, atol=1e-15)
    np.testing.assert_allclose(other.jerk, base.jerk * r**3, rtol=1e-12, atol=1e-15)
