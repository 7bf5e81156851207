"""Sizing helpers: the size found must sit exactly on the limit it is named after.

Each check analyses the cam at the found size (the limit is just kept) and
slightly beyond it on the wrong side (the limit is broken).  One case has a
closed form derived by hand: a radial roller follower on the full-turn
harmonic motion s = ε(1 − cos θ) keeps |φ| ≤ φ_lim exactly when
Rp ≥ max(ε·|sin θ|/tan φ_lim − ε(1 − cos θ)) = ε(1/sin φ_lim − 1)
(maximum of a·sin θ + cos θ is √(a² + 1), with a = 1/tan φ_lim).
"""

import math
from dataclasses import replace

import numpy as np
import pytest

from motionlaws import Axis, Segment, compile_axis
from solver.cam import (
    Cam,
    OscillatingFlat,
    OscillatingRoller,
    TranslatingFlat,
    TranslatingRoller,
    Turning,
    analyse,
    check_cam,
    CamLimits,
    largest_roller,
    motion_from_function,
    motion_from_program,
    smallest_base_radius,
    smallest_prime_radius,
)

MM = 1e-3
DEG = math.pi / 180
STEP = 1e-3  # relative step to the wrong side of a found size
ANGLE_TOL = 1e-9  # rad: the found size meets the limit to this


def program(unit, lift, scale, law="cycloidal"):
    """Scenario: rise, dwell, return, dwell."""
    axis = Axis(
        "cam",
        (
            Segment(law, 100.0, to=lift),
            Segment("dwell", 80.0),
            Segment("modified-sine", 120.0, to=0.0),
            Segment("dwell", 60.0),
        ),
        unit=unit,
    )
    return motion_from_program(compile_axis(axis), scale)


LIFT = program("mm", 20.0, MM)
SWING = program("deg", 18.0, DEG)
SMALL_SWING = program("deg", 8.0, DEG)


def with_follower(cam, follower):
    return replace(cam, follower=follower)


@pytest.mark.parametrize("limit_deg", [25.0, 30.0, 40.0])
def test_harmonic_radial_roller_closed_form(limit_deg):
    eps = 10 * MM
    harmonic = motion_from_function(lambda th: (eps * (1 - np.cos(th)), eps * np.sin(th), eps * np.cos(th)))
    limit = math.radians(limit_deg)
    found = smallest_prime_radius(Cam(harmonic, TranslatingRoller(40 * MM, 2 * MM)), limit)
    assert found.governed_by == "pressure_angle"
    assert found.value == pytest.approx(eps * (1 / math.sin(limit) - 1), rel=1e-12)  # derived above
    # At the limit the peak sits where tan θ = 1/tan φ_lim, i.e. θ = 90° − φ_lim.
    assert found.at == pytest.approx(math.pi / 2 - limit, abs=1e-6)


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("offset_mm", [0.0, 6.0])
def test_smallest_prime_radius_translating(turning, offset_mm):
    cam = Cam(LIFT, TranslatingRoller(60 * MM, 10 * MM, offset_mm * MM), turning)
    limit = math.radians(30.0)
    found = smallest_prime_radius(cam, limit)
    assert found.governed_by == "pressure_angle"
    at = analyse(with_follower(cam, cam.follower.with_prime_radius(found.value)))
    assert at.max_pressure_angle.value == pytest.approx(limit, abs=ANGLE_TOL)
    smaller = analyse(with_follower(cam, cam.follower.with_prime_radius(found.value * (1 - STEP))))
    assert smaller.max_pressure_angle.value > limit


@pytest.mark.parametrize("turning", list(Turning))
def test_smallest_prime_radius_oscillating(turning):
    cam = Cam(SWING, OscillatingRoller(120 * MM, 90 * MM, 60 * MM, 10 * MM), turning)
    limit = math.radians(35.0)
    found = smallest_prime_radius(cam, limit)
    assert found.governed_by == "pressure_angle"
    at = analyse(with_follower(cam, cam.follower.with_prime_radius(found.value)))
    assert at.max_pressure_angle.value == pytest.approx(limit, abs=ANGLE_TOL)
    smaller = analyse(with_follower(cam, cam.follower.with_prime_radius(found.value * (1 - STEP))))
    assert smaller.max_pressure_angle.value > limit


def test_oscillating_search_reports_when_no_prime_circle_works():
    # A 10° limit cannot be kept by this pivot and arm at any prime circle:
    # a result without a value, not an error.
    cam = Cam(SWING, OscillatingRoller(120 * MM, 90 * MM, 60 * MM, 10 * MM))
    found = smallest_prime_radius(cam, math.radians(10.0))
    assert found.value is None and found.message


@pytest.mark.parametrize(
    "cam",
    [
        Cam(LIFT, TranslatingRoller(40 * MM, 5 * MM, 4 * MM)),
        Cam(LIFT, TranslatingRoller(40 * MM, 5 * MM), Turning.CLOCKWISE),
        Cam(SWING, OscillatingRoller(120 * MM, 90 * MM, 45 * MM, 5 * MM)),
    ],
    ids=["translating-offset", "translating-cw", "oscillating"],
)
def test_largest_roller_is_the_undercut_threshold(cam):
    found = largest_roller(cam)
    assert found.governed_by == "undercut"
    below = analyse(with_follower(cam, replace(cam.follower, roller_radius=found.value * (1 - 1e-6))))
    assert not below.undercut and check_cam(below).get("undercut").ok
    above = analyse(with_follower(cam, replace(cam.follower, roller_radius=found.value * (1 + STEP))))
    assert above.undercut and not check_cam(above).get("undercut").ok
    assert above.profile_radii.convex.value < 0  # the offset curve loops
    # With the common-practice ratio 2 the roller halves and just meets the ratio check.
    half = largest_roller(cam, curvature_ratio=2.0)
    assert half.value == pytest.approx(found.value / 2, rel=1e-15)
    ok = check_cam(analyse(with_follower(cam, replace(cam.follower, roller_radius=half.value * (1 - 1e-9)))))
    assert ok.get("curvature_ratio").ok


@pytest.mark.parametrize("turning", list(Turning))
def test_smallest_base_radius_translating_flat(turning):
    cam = Cam(LIFT, TranslatingFlat(50 * MM), turning)
    found = smallest_base_radius(cam)
    assert found.governed_by == "cusp"
    # Closed form Rb + s + s'' > 0 (DESIGN §5) on a dense grid: the found
    # radius is at least the grid's need, and within refinement of it.
    th = np.linspace(0, 2 * math.pi, 360_001)
    s, _, s2 = LIFT(th)
    assert found.value >= -np.min(s + s2)
    assert found.value == pytest.approx(-np.min(s + s2), rel=1e-6)
    above = analyse(with_follower(cam, TranslatingFlat(found.value * (1 + 1e-6))))
    assert not above.cusp and check_cam(above).get("cusp").ok
    below = analyse(with_follower(cam, TranslatingFlat(found.value * (1 - STEP))))
    assert below.cusp and not check_cam(below).ok


@pytest.mark.parametrize("turning", list(Turning))
def test_smallest_base_radius_oscillating_flat(turning):
    cam = Cam(SMALL_SWING, OscillatingFlat(120 * MM, 50 * MM, 6 * MM), turning)
    found = smallest_base_radius(cam)
    assert found.governed_by == "cusp"
    at = analyse(with_follower(cam, cam.follower.with_base_radius(found.value)))
    assert abs(at.profile_radii.convex.value) < 1e-9 * found.value
    above = analyse(with_follower(cam, cam.follower.with_base_radius(found.value * (1 + STEP))))
    assert not above.cusp
    below = analyse(with_follower(cam, cam.follower.with_base_radius(found.value * (1 - STEP))))
    assert below.cusp


def test_smallest_base_radius_with_a_minimum_radius():
    cam = Cam(LIFT, TranslatingFlat(50 * MM))
    plain = smallest_base_radius(cam).value
    margin = 8 * MM
    found = smallest_base_radius(cam, min_radius=margin)
    assert found.governed_by == "min_radius"
    assert found.value == pytest.approx(plain + margin, rel=1e-12)  # Rb enters ρ linearly
    a = analyse(with_follower(cam, TranslatingFlat(found.value)))
    assert a.profile_radii.convex.value == pytest.approx(margin, rel=1e-9)
    assert check_cam(a, CamLimits(min_radius=margin * (1 - 1e-9))).ok
