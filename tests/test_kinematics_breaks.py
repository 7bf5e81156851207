"""Drivers whose derivatives jump: dwells, harmonic and constant-velocity segments.

A crank that follows a program with dwells (the linkage at rest), harmonic
rises (acceleration jumps at their ends) and constant-velocity stretches
(velocity jumps) is solved over the whole cycle in one call and checked at
every instant against the offset slider-crank closed form (Norton, *Design
of Machinery*, from memory; written out in test_kinematics_slider_crank)
fed with the program's own crank angle and rates.  Peaks are checked against
the closed form maximised on each segment separately, ends included as
one-sided limits (dense scan plus scipy.optimize.minimize_scalar).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

from motionlaws import Axis, Segment, compile_axis
from solver.kinematics import DEG, MM, BodyAngle, JointCoordinate, PointY, ProgramMotion, solve_cycle
from solver.kinematics import peaks as peaks_module
from solver.kinematics.joins import output_joins
from solver.kinematics.march import JOIN_GAP
from solver.kinematics.motion import breaks_between
from solver.kinematics.peaks import MAX_CANDIDATES, output_peaks
from tests.test_kinematics_slider_crank import (
    A, B, C, OMEGA, SPEED, assert_close, inverse_crank, norton_slider, sympy_slider_jerk,
)
from tests.test_kinematics_support import slider_crank


def dwell_harmonic_crank():
    """Rest, a harmonic quarter turn (acceleration jumps at both ends, from and to rest), rest, a cycloidal rest of the turn."""
    axis = Axis(
        "crank",
        (Segment("dwell", 60.0), Segment("harmonic", 90.0, 120.0), Segment("dwell", 30.0),
         Segment("cycloidal", 180.0, 360.0)),
        unit="deg", start=0.0, index=360.0,
    )
    return compile_axis(axis)


def constant_velocity_crank():
    """A constant-velocity half turn straight out of rest and into a cycloidal rise: velocity jumps at 0° and 120°."""
    axis = Axis(
        "crank",
        (Segment("constant-velocity", 120.0, 180.0), Segment("cycloidal", 120.0, 360.0), Segment("dwell", 120.0)),
        unit="deg", start=0.0, index=360.0,
    )
    return compile_axis(axis)


def late_constant_velocity_crank():
    """Rest, then a constant-velocity half turn from 100°: radians(100°) is one rounding step above the
    1000th instant of a 3,600-instant cycle, which the program reads on the new segment."""
    axis = Axis(
        "crank",
        (Segment("dwell", 100.0), Segment("constant-velocity", 120.0, 180.0), Segment("cycloidal", 140.0, 360.0)),
        unit="deg", start=0.0, index=360.0,
    )
    return compile_axis(axis)


def crank_rates(program, theta):
    """Crank angle (rad) and its time derivatives (rad/s^k) from the program at master angles θ (rad)."""
    s, d1, d2, d3 = program.master(np.degrees(theta))
    return np.radians(s), np.radians(d1) * OMEGA, np.radians(d2) * OMEGA**2, np.radians(d3) * OMEGA**3


def solve(program):
    return solve_cycle(slider_crank(A, B, C, 0.0, motion=ProgramMotion(program, scale=DEG)), SPEED)


@pytest.mark.parametrize("make", [dwell_harmonic_crank, constant_velocity_crank, late_constant_velocity_crank])
def test_one_solve_follows_every_jump_of_the_driver(make):
    """No stretch of rest and no derivative jump is taken for a branch jump; every instant is the closed form."""
    program = make()
    result = solve(program)
    assert result.success, result.message
    t2, w2, al2, j2 = crank_rates(program, result.theta)
    stroke = result.output(JointCoordinate("slide"))
    x, v, acc = norton_slider(t2, w2, al2)
    assert_close(stroke.value, x, 1e-12, "position")
    assert_close(stroke.velocity, v, 1e-10, "velocity")
    assert_close(stroke.acceleration, acc, 1e-10, "acceleration")
    assert_close(stroke.jerk, sympy_slider_jerk()(t2, w2, al2, j2), 1e-9, "jerk (sympy)")
    rest = w2 == 0.0
    assert rest.any() and np.all(stroke.velocity[rest] == 0.0)  # at rest the solver reports no motion at all


def segment_max(program, f, k):
    """max over segment k of f(θ) (θ in rad) with its ends as one-sided limits: dense scan, then bounded Brent."""
    lo, hi = np.radians(program.bounds[k]), np.radians(program.bounds[k + 1]) - JOIN_GAP
    grid = np.linspace(lo, hi, 20001)
    y = f(grid)
    i = int(np.argmax(y))
    res = minimize_scalar(lambda t: -float(f(np.array([t]))[0]), bounds=(grid[max(i - 1, 0)], grid[min(i + 1, grid.size - 1)]),
                          method="bounded", options={"xatol": 1e-13})
    return max(-res.fun, y[i])


@pytest.mark.parametrize("order, quantity", [(1, "velocity"), (2, "acceleration"), (3, "jerk")])
def test_peaks_take_each_side_of_a_jump_and_never_fit_across_it(order, quantity):
    program = dwell_harmonic_crank()
    result = solve(program)
    got = output_peaks(result, JointCoordinate("slide")).peaks[quantity].value
    jerk = sympy_slider_jerk()

    def f(theta):
        t2, w2, al2, j2 = crank_rates(program, theta)
        return np.abs(jerk(t2, w2, al2, j2) if order == 3 else norton_slider(t2, w2, al2)[order])

    want = max(segment_max(program, f, k) for k in range(len(program.shapes)))
    assert got == pytest.approx(want, rel=1e-7)


def test_a_peak_at_a_jump_is_its_one_sided_limit():
    """The crank's own acceleration on a harmonic rise of h over β is h·π²/(2β²)·cos(πx)·ω² (harmonic law,
    Ca = π²/2, any cam handbook): largest at both ends, right at the jumps from and to rest.  The cycloidal
    return (Ca = 2π) stays below it here, so the cycle's peak is that one-sided value, at 60° or 120°."""
    axis = Axis("crank", (Segment("dwell", 60.0), Segment("harmonic", 60.0, 60.0), Segment("dwell", 60.0),
                          Segment("cycloidal", 180.0, 360.0)), unit="deg", start=0.0, index=360.0)
    h, beta = math.radians(60.0), math.radians(60.0)
    want = h * math.pi**2 / (2 * beta**2) * OMEGA**2
    assert 2 * math.pi * math.radians(300.0) / math.radians(180.0) ** 2 * OMEGA**2 < want  # the premise
    peak = output_peaks(solve(compile_axis(axis)), JointCoordinate("O")).peaks["acceleration"]
    assert peak.value == pytest.approx(want, rel=1e-12)
    assert min(abs(peak.at - 60.0), abs(peak.at - 120.0)) < 1e-6


@pytest.mark.parametrize("output", [BodyAngle("slider"), PointY(("slider", "B"))])
def test_an_output_that_never_moves_refines_few_candidates(monkeypatch, output):
    """The slider's angle and height are constant: every sample ties, yet each search refines at most MAX_CANDIDATES."""
    result = solve(dwell_harmonic_crank())
    calls = []
    local = peaks_module._local
    monkeypatch.setattr(peaks_module, "_local", lambda *a: calls.append(a) or local(*a))
    found = output_peaks(result, output)
    searches = 2 + 3  # highest and lowest value, then velocity, acceleration, jerk
    assert len(calls) <= searches * MAX_CANDIDATES
    assert found.maximum.value - found.minimum.value < 1e-12
    assert all(p.value < 1e-9 for p in found.peaks.values())


def test_breaks_repeat_every_cycle_and_merge_across_motions():
    program = dwell_harmonic_crank()
    one, two = ProgramMotion(program, scale=DEG), ProgramMotion(program, scale=DEG, offset=1.0)
    got = breaks_between([one, two], -0.5, 2 * math.pi + 0.5)
    want = np.radians([-0.5 * 0 + 180.0, 0.0, 60.0, 150.0, 180.0, 360.0])
    want = np.unique(np.concatenate([np.radians([180.0]) - 2 * math.pi, np.radians([0.0, 60.0, 150.0, 180.0, 360.0])]))
    np.testing.assert_allclose(got, want[(want > -0.5) & (want <= 2 * math.pi + 0.5)], atol=1e-15)


def test_joins_give_each_side_of_every_jump():
    """At 0° the crank leaves rest at the constant-velocity rate 180°/120° = 1.5 rad/rad, at 120° it stops
    dead into the cycloidal rise (zero rate at its start, cycloidal law); the slider's one-sided rates
    there are Norton's closed form with those crank rates (per rad of master angle: ω = 1)."""
    program = constant_velocity_crank()
    result = solve(program)
    crank = {round(math.degrees(j.at), 9): j for j in output_joins(result, JointCoordinate("O"))}
    assert sorted(crank) == [0.0, 120.0, 240.0]
    np.testing.assert_allclose(crank[0.0].left[1:], [0.0, 0.0, 0.0], atol=1e-12)
    np.testing.assert_allclose(crank[0.0].right[1:3], [1.5, 0.0], atol=1e-12)
    np.testing.assert_allclose(crank[120.0].left[1:3], [1.5, 0.0], atol=1e-12)
    np.testing.assert_allclose(crank[120.0].right[1], 0.0, atol=1e-12)
    assert crank[240.0].jump[1] == pytest.approx(0.0, abs=1e-12)
    for join in output_joins(result, JointCoordinate("slide")):
        theta2 = crank[round(math.degrees(join.at), 9)].right[0]
        for side, c in ((join.left, crank[round(math.degrees(join.at), 9)].left),
                        (join.right, crank[round(math.degrees(join.at), 9)].right)):
            x, v, acc = norton_slider(np.array([theta2]), c[1], c[2])
            np.testing.assert_allclose(side[:3], [x[0], v[0], acc[0]], rtol=1e-8, atol=1e-12)


LAWS_WITH_JUMPS = ("dwell", "constant-velocity", "harmonic", "cycloidal", "modified-trapezoid")


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    laws=st.lists(st.sampled_from(LAWS_WITH_JUMPS), min_size=2, max_size=5),
    cuts=st.lists(st.floats(min_value=0.05, max_value=0.95), min_size=4, max_size=4, unique=True),
    rises=st.lists(st.floats(min_value=10.0, max_value=120.0), min_size=5, max_size=5),
)
def test_any_program_of_laws_drives_the_crank_as_the_closed_form_says(laws, cuts, rises):
    """Whatever laws follow each other, at whatever (unround) boundaries, one solve gives Norton's closed form."""
    spans = np.diff(np.concatenate([[0.0], np.sort(cuts)[: len(laws) - 1] * 360.0, [360.0]]))
    assume(np.all(spans > 5.0))
    to, segments = 0.0, []
    for law, span, rise in zip(laws, spans, rises):
        if law != "dwell":
            to += rise
        segments.append(Segment(law, float(span), None if law == "dwell" else to))
    segments[-1] = Segment(segments[-1].law if segments[-1].law != "dwell" else "cycloidal", float(spans[-1]), 360.0)
    program = compile_axis(Axis("crank", tuple(segments), unit="deg", start=0.0, index=360.0))
    result = solve(program)
    assert result.success, result.message
    t2, w2, al2, _ = crank_rates(program, result.theta)
    stroke = result.output(JointCoordinate("slide"))
    x, v, acc = norton_slider(t2, w2, al2)
    # positions converge to 1e-10 of the linkage's size (newton.POSITION_TOLERANCE); rates inherit that level
    assert_close(stroke.value, x, 1e-12, "position")
    assert_close(stroke.velocity, v, 1e-9, "velocity")
    assert_close(stroke.acceleration, acc, 1e-9, "acceleration")


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    laws=st.lists(st.sampled_from(LAWS_WITH_JUMPS), min_size=2, max_size=5),
    cuts=st.lists(st.floats(min_value=0.05, max_value=0.95), min_size=4, max_size=4, unique=True),
    places=st.lists(st.floats(min_value=90.0, max_value=120.0), min_size=5, max_size=5),
)
def test_any_program_on_the_slider_gives_the_crank_of_the_inverse_closed_form(laws, cuts, places):
    """Output driving through any sequence of laws: the free crank follows the inverse of Norton's closed
    form (the slider stays inside its stroke, clear of the dead points), its rate by the chain rule."""
    spans = np.diff(np.concatenate([[0.0], np.sort(cuts)[: len(laws) - 1] * 360.0, [360.0]]))
    assume(np.all(spans > 5.0))
    segments = [Segment(law, float(span), None if law == "dwell" else place)
                for law, span, place in zip(laws, spans, places)]
    segments[-1] = Segment(segments[-1].law if segments[-1].law != "dwell" else "cycloidal", float(spans[-1]), 90.0)
    program = compile_axis(Axis("slider", tuple(segments), unit="mm", start=90.0))
    assume(np.ptp(program.master(np.linspace(0.0, 360.0, 721))[0]) > 1.0)  # the slider moves (mm)
    model = slider_crank(A, B, C, float(inverse_crank(0.090)), driver="slider", motion=ProgramMotion(program, scale=MM))
    result = solve_cycle(model, SPEED)
    assert result.success, result.message
    s, d1, _, _ = program.master(np.degrees(result.theta))
    theta2 = inverse_crank(s * MM)
    crank = result.output(JointCoordinate("O"))
    assert_close(crank.value, theta2, 1e-12, "crank angle")
    # dx/dθ2 from Norton's x_B(θ2) (test_kinematics_slider_crank), so θ2' = x'/(dx/dθ2)
    s3 = (C - A * np.sin(theta2)) / B
    dx = -A * np.sin(theta2) + A * np.cos(theta2) * s3 / np.sqrt(1 - s3 * s3)
    assert_close(crank.d1, d1 * MM / dx, 1e-9, "crank rate")
