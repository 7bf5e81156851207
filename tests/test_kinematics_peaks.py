"""Output peaks are true maxima, and limits and max speed follow them.

Reference: the slider-crank's exact slider velocity, acceleration and jerk
(Norton's closed form; jerk by sympy, see test_kinematics_slider_crank),
maximised with scipy.optimize.minimize_scalar (bounded Brent) around the
best point of a dense evaluation of the closed form.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from motionlaws.program import Limits
from solver.kinematics import JointCoordinate
from solver.kinematics.cycle import solve_cycle
from solver.kinematics.peaks import check_limits, max_speed, output_peaks
from solver.kinematics.transmission import TransmissionAngle
from tests.test_kinematics_fourbar import norton_transmission
from tests.test_kinematics_slider_crank import A, B, C, OMEGA, SPEED, norton_slider, sympy_slider_jerk
from tests.test_kinematics_support import four_bar, slider_crank

START = 0.3


def exact(order):
    jerk = sympy_slider_jerk()

    def f(theta):
        t2 = START + np.asarray(theta, dtype=float)
        if order == 3:
            return jerk(t2, OMEGA, 0.0, 0.0)
        return norton_slider(t2, OMEGA, 0.0)[order]

    return f


def true_max(f, sign=None):
    """(max of |f| or sign·f, master angle) by a dense scan and bounded Brent refinement."""
    grid = np.linspace(0.0, 2 * math.pi, 200001)
    y = np.abs(f(grid)) if sign is None else sign * f(grid)
    i = int(np.argmax(y))
    g = (lambda t: -abs(float(f(t)))) if sign is None else (lambda t: -sign * float(f(t)))
    res = minimize_scalar(g, bounds=(grid[max(i - 1, 0)], grid[min(i + 1, grid.size - 1)]), method="bounded", options={"xatol": 1e-12})
    return -res.fun, res.x


@pytest.fixture(scope="module")
def peaks():
    result = solve_cycle(slider_crank(A, B, C, START), SPEED)
    assert result.success
    return output_peaks(result, JointCoordinate("slide"))


@pytest.mark.parametrize("order, quantity", [(1, "velocity"), (2, "acceleration"), (3, "jerk")])
def test_peaks_are_true_maxima(peaks, order, quantity):
    value, at = true_max(exact(order))
    peak = peaks.peaks[quantity]
    assert abs(peak.value - value) < 1e-9 * value
    # at a smooth maximum the location is known far less well than the value
    assert abs(math.radians(peak.at) - at) < 1e-4


def test_stroke_extremes_are_true_extremes(peaks):
    high, at_high = true_max(exact(0), 1.0)
    low, _ = true_max(exact(0), -1.0)
    assert abs(peaks.maximum.value - high) < 1e-12 and abs(peaks.minimum.value + low) < 1e-12
    assert abs(math.radians(peaks.maximum.at) - at_high) < 1e-4
    # stroke of an offset slider-crank: √((b+a)² − c²) − √((b−a)² − c²) (Norton ch. 2, from memory)
    stroke = math.sqrt((B + A) ** 2 - C**2) - math.sqrt((B - A) ** 2 - C**2)
    assert abs(peaks.maximum.value - peaks.minimum.value - stroke) < 1e-12


def test_limits_and_max_speed(peaks):
    v, a = peaks.peaks["velocity"].value, peaks.peaks["acceleration"].value
    limits = Limits(velocity=1.2 * v, acceleration=0.8 * a)
    checks = {c.quantity: c for c in check_limits(peaks, limits)}
    assert checks["velocity"].ok and not checks["acceleration"].ok
    assert abs(checks["acceleration"].used - 1 / 0.8) < 1e-12
    top = max_speed(peaks, limits)
    assert abs(top - SPEED * math.sqrt(0.8)) < 1e-9  # a ∝ N² binds (DESIGN §3)
    again = output_peaks(solve_cycle(slider_crank(A, B, C, START), top, instants=720), JointCoordinate("slide"))
    assert abs(again.peaks["acceleration"].value - limits.acceleration) < 1e-8 * limits.acceleration


def test_minimum_transmission_angle_of_a_four_bar():
    """Crank-rocker: μ is smallest at θ2 = 0 or π (Norton ch. 4, from memory); check against the formula's minimum."""
    a, b, c, d = 0.04, 0.12, 0.09, 0.10
    result = solve_cycle(four_bar(a, b, c, d, 0.0), 60.0, instants=720)
    p = output_peaks(result, TransmissionAngle("B", ("coupler", "A"), ("rocker", "O4")))
    want = min(norton_transmission(np.array([0.0, math.pi])))
    assert abs(p.minimum.value - want) < 1e-9
