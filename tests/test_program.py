"""Axis programs: peaks against hand computation, joins, blends, polynomial
segments, indexing axes, and the exact max-speed formula.

Hand computation (DESIGN §3, the standard cam-design handbooks): a segment of
lift h over β master degrees at N cycles/min lasts T = (β/360)(60/N) s and
peaks at v = h·Cv/T, a = h·Ca/T², j = h·Cj/T³.
"""

import math

import numpy as np
import pytest

from motionlaws import (
    Axis,
    EndConditions,
    LAWS,
    Limits,
    ProgramError,
    Segment,
    analyse,
    compile_axis,
)

# Exact coefficients (closed forms, DESIGN §3).
CYC = (2.0, 2 * math.pi, 4 * math.pi**2)
MS = (4 * math.pi / (4 + math.pi), 4 * math.pi**2 / (4 + math.pi), 16 * math.pi**3 / (4 + math.pi))


def hand(h, beta, n, coeffs):
    t = beta / 360.0 * 60.0 / n
    return abs(h) * coeffs[0] / t, abs(h) * coeffs[1] / t**2, abs(h) * coeffs[2] / t**3


def lid_lift(limits=Limits(900.0, 25000.0, 7.0e5)):
    return Axis(
        "lid-lift",
        (Segment("cycloidal", 90.0, 40.0), Segment("dwell", 150.0), Segment("modified-sine", 120.0, 0.0)),
        limits=limits,
    )


def test_design_example_peaks_and_max_speed():
    # DESIGN §7 example: 640 mm/s at 45°, 16085 mm/s² at 22.5°, 808518 mm/s³ at 0°, max 114.4 cycles/min.
    r = analyse(compile_axis(lid_lift()), 120.0)
    v, a, j = hand(40.0, 90.0, 120.0, CYC)
    assert r.peaks["velocity"].value == pytest.approx(v, rel=1e-9) and v == pytest.approx(640.0)
    assert r.peaks["velocity"].at == pytest.approx(45.0, abs=1e-6)
    assert r.peaks["acceleration"].value == pytest.approx(a, rel=1e-9)
    assert r.peaks["acceleration"].at == pytest.approx(22.5, abs=1e-6)
    assert r.peaks["jerk"].value == pytest.approx(j, rel=1e-9)
    assert r.peaks["jerk"].at == pytest.approx(0.0, abs=1e-6)
    assert r.max_speed == pytest.approx(120 * min(900 / v, math.sqrt(25000 / a), (7e5 / j) ** (1 / 3)), rel=1e-12)
    assert round(r.max_speed, 1) == 114.4
    assert not r.ok and [c.ok for c in r.checks] == [True, True, False]


def test_segment_peaks_hand_computation():
    r = analyse(compile_axis(lid_lift()), 120.0)
    ms = r.segments[2]
    for q, want in zip(("velocity", "acceleration", "jerk"), hand(40.0, 120.0, 120.0, MS)):
        assert ms.peaks[q].value == pytest.approx(want, rel=1e-9)
    assert ms.duration == pytest.approx(120 / 360 * 60 / 120)
    assert ms.coefficients == pytest.approx(MS, rel=1e-9)


def test_kinematics_match_law_scaled_by_time():
    p = compile_axis(lid_lift())
    theta = np.linspace(0, 90, 37)[:-1]  # 90° itself belongs to the dwell
    s, v, a, j = p.kinematics(theta, 120.0)
    y = LAWS["cycloidal"].evaluate(theta / 90)
    t = 0.125
    np.testing.assert_allclose(s, 40 * y[0], atol=1e-12)
    np.testing.assert_allclose(v, 40 * y[1] / t, atol=1e-9)
    np.testing.assert_allclose(a, 40 * y[2] / t**2, atol=1e-7)
    np.testing.assert_allclose(j, 40 * y[3] / t**3, atol=1e-5)


def test_master_derivatives_by_finite_differences():
    p = compile_axis(lid_lift())
    theta = np.arange(2.5, 360, 5.0)  # off the joins, where jerk may step
    h = 1e-3  # degrees
    s = p.master(theta)
    for k in range(3):
        up, dn = p.master(theta + h)[k], p.master(theta - h)[k]
        fd = (up - dn) / (2 * math.radians(h))
        np.testing.assert_allclose(s[k + 1], fd, rtol=1e-5, atol=1e-6 * np.abs(s[k + 1]).max())


def test_unsorted_input_matches_sorted():
    p = compile_axis(lid_lift())
    theta = np.random.default_rng(1).uniform(0, 720, 500)
    got = p.master(theta)
    order = np.argsort(theta)
    sorted_vals = p.master(theta[order])
    for g, w in zip(got, sorted_vals):
        np.testing.assert_array_equal(g[order], w)


def test_harmonic_next_to_dwell_has_infinite_jerk_and_zero_max_speed_with_jerk_limit():
    # DESIGN §3: simple harmonic jerk is infinite at a join with a dwell; the
    # acceleration jump there is h·(π²/2)/T².
    axis = Axis(
        "flap",
        (Segment("harmonic", 90, 10.0), Segment("dwell", 90), Segment("harmonic", 90, 0.0), Segment("dwell", 90)),
        limits=Limits(jerk=1e9),
    )
    r = analyse(compile_axis(axis), 60.0)
    assert r.peaks["jerk"].infinite and r.peaks["jerk"].value is None
    t = 0.25
    jumps = {j.at: j.acceleration_jump for j in r.joins}
    assert jumps[0.0] == pytest.approx(10 * math.pi**2 / 2 / t**2, rel=1e-12)
    assert jumps[90.0] == pytest.approx(10 * math.pi**2 / 2 / t**2, rel=1e-12)
    assert all(j.velocity_jump == 0.0 for j in r.joins)
    assert r.max_speed == 0.0 and not r.ok


def test_constant_velocity_next_to_dwell_jumps_in_velocity():
    axis = Axis("c", (Segment("constant-velocity", 180, 36.0), Segment("constant-velocity", 180, 0.0)))
    r = analyse(compile_axis(axis), 60.0)
    # v = 36 mm per 0.5 s = 72 mm/s each way: jump of ±144 mm/s at both joins
    assert sorted(j.velocity_jump for j in r.joins) == pytest.approx([-144.0, 144.0])
    assert r.peaks["acceleration"].infinite and r.peaks["jerk"].infinite


def test_blend_is_continuous_with_neighbours():
    axis = Axis(
        "glue",
        (
            Segment("dwell", 110),
            Segment("blend", 40, 10.0),
            Segment("constant-velocity", 100, 60.0),
            Segment("blend", 40, 70.0),
            Segment("poly345", 70, 0.0),
        ),
    )
    r = analyse(compile_axis(axis), 75.0)
    for j in r.joins:
        assert j.velocity_jump == 0.0 and j.acceleration_jump == 0.0
    assert not r.peaks["jerk"].infinite


def test_polynomial_meets_end_conditions_in_master_units():
    axis = Axis(
        "tamp",
        (
            Segment("dwell", 170),
            Segment("polynomial", 50, 15.0, EndConditions(0.0, 0.0), EndConditions(0.05, 0.0)),
            Segment("polynomial", 40, 18.0, EndConditions(0.05, 0.0), EndConditions(0.0, 0.0)),
            Segment("cycloidal", 100, 0.0),
        ),
    )
    p = compile_axis(axis)
    s, d1, d2, _ = p.master(np.array([220.0 - 1e-9, 220.0]))
    per_deg = d1 * math.pi / 180
    np.testing.assert_allclose(s, 15.0, atol=1e-8)
    np.testing.assert_allclose(per_deg, 0.05, rtol=1e-6)
    np.testing.assert_allclose(d2, 0.0, atol=1e-6)
    # a quintic in x: 6 conditions give degree 5 exactly (lowest order)
    assert p.shapes[1].polys[0].degree() == 5


def test_polynomial_lowest_order_without_derivatives_is_a_straight_line():
    axis = Axis("lin", (Segment("polynomial", 180, 10.0), Segment("polynomial", 180, 0.0)))
    p = compile_axis(axis)
    assert p.shapes[0].polys[0].degree() <= 1
    s, d1, d2, d3 = p.master(np.array([45.0]))
    assert s[0] == pytest.approx(2.5) and d2[0] == pytest.approx(0.0, abs=1e-12)


def test_indexing_axis_wraps_with_index():
    axis = Axis("turret", (Segment("modified-sine", 150, 45.0), Segment("dwell", 210)), unit="deg", index=45.0)
    p = compile_axis(axis)
    s0 = p.master(np.array([10.0, 370.0, 730.0]))[0]
    np.testing.assert_allclose(np.diff(s0), [45.0, 45.0])
    r = analyse(p, 75.0)
    assert all(j.velocity_jump == 0.0 for j in r.joins)


@pytest.mark.parametrize(
    "segments, key, segment, words",
    [
        ((Segment("cycloidal", 90, 40.0), Segment("dwell", 200)), "span", None, "sum to 290"),
        ((Segment("cycloidal", -90, 40.0), Segment("dwell", 450)), "span", 1, "positive"),
        ((Segment("cycloidial", 180, 40.0), Segment("dwell", 180)), "law", 1, "unknown law"),
        ((Segment("cycloidal", 180, 40.0), Segment("dwell", 180)), "to", 2, "not at its start"),
        ((Segment("cycloidal", 180), Segment("dwell", 180)), "to", 1, "needs an end position"),
        ((Segment("blend", 180, 5.0), Segment("blend", 180, 0.0)), "law", 1, "neighbours"),
        ((Segment("dwell", 180, 3.0), Segment("cycloidal", 180, 0.0)), "to", 1, "holds its position"),
        (
            (Segment("polynomial", 180, 5.0, EndConditions(acceleration=1.0)), Segment("cycloidal", 180, 0.0)),
            "start",
            1,
            "only with velocity",
        ),
    ],
)
def test_compile_errors_name_segment_and_key(segments, key, segment, words):
    with pytest.raises(ProgramError) as info:
        compile_axis(Axis("x", segments))
    assert info.value.key == key
    assert info.value.segment == segment
    assert words in info.value.message


def test_no_limits_gives_no_max_speed():
    r = analyse(compile_axis(lid_lift(Limits())), 120.0)
    assert r.max_speed is None and r.ok and r.checks == ()


def test_table_rows_exclude_360():
    p = compile_axis(lid_lift())
    theta, *_ = p.table(120.0, 0.5)
    assert theta[0] == 0.0 and theta[-1] == 359.5 and len(theta) == 720


def test_angle_a_hair_below_a_boundary_belongs_to_the_next_segment():
    # 30° back from radians is 29.999999999999996°: it must read the segment
    # that starts at 30°, not the end of the one before (derivatives jump there).
    axis = Axis("b", (Segment("cycloidal", 30, 5.0), Segment("poly345", 150, 20.0), Segment("poly345", 180, 0.0)))
    p = compile_axis(axis)
    hair = float(np.degrees(np.radians(30.0)))
    assert hair < 30.0
    for got, want in zip(p.master(np.array([hair])), p.master(np.array([30.0]))):
        assert got[0] == pytest.approx(want[0], rel=1e-9, abs=1e-9)
