"""Closure of the profile over a full turn, and the closed outline handed to export."""

import math

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
    cam_points,
    closed_outline,
    motion_from_function,
    motion_from_program,
)

MM = 1e-3
DEG = math.pi / 180


def program(unit, lift, scale, first="poly345"):
    """Scenario: rise, dwell, return, dwell; `first` is the law of the rise that starts at 0°."""
    axis = Axis(
        "cam",
        (
            Segment(first, 100.0, to=lift),
            Segment("dwell", 60.0),
            Segment("cycloidal", 120.0, to=0.0),
            Segment("dwell", 80.0),
        ),
        unit=unit,
    )
    return motion_from_program(compile_axis(axis), scale)


FOLLOWERS = {
    "translating-roller": ("mm", 16.0, MM, TranslatingRoller(55 * MM, 8 * MM, 4 * MM)),
    "translating-flat": ("mm", 6.0, MM, TranslatingFlat(60 * MM, 2 * MM)),
    "oscillating-roller": ("deg", 15.0, DEG, OscillatingRoller(130 * MM, 95 * MM, 55 * MM, 8 * MM)),
    "oscillating-flat": ("deg", 4.0, DEG, OscillatingFlat(130 * MM, 60 * MM, 4 * MM)),
}


@pytest.mark.parametrize("first", ["poly345", "harmonic"])
@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("name", sorted(FOLLOWERS))
def test_profile_closes_without_a_step(name, turning, first):
    # "harmonic" starts with a jump in acceleration at 0°: the curvature
    # jumps there, the position must still close.
    unit, lift, scale, follower = FOLLOWERS[name]
    cam = Cam(program(unit, lift, scale, first), follower, turning)
    ends = cam_points(cam, [0.0, 2 * math.pi])
    size = follower.size
    assert abs(ends.profile[1] - ends.profile[0]) < 1e-9 * size
    if ends.pitch is not None:
        assert abs(ends.pitch[1] - ends.pitch[0]) < 1e-9 * size
    a = analyse(cam)
    assert not a.corners
    outline = closed_outline(a)
    assert outline.shape == (len(a.theta) + 1, 2)
    assert np.array_equal(outline[0], outline[-1])
    # The closing step is an ordinary step, like its neighbours.
    steps = np.hypot(*np.diff(outline, axis=0).T)
    assert steps[-1] < 1.5 * steps[-2] and steps[-1] < 1.5 * steps[0]


def test_velocity_jump_is_a_corner_with_a_step():
    # Constant velocity from a dwell: ds/dθ jumps at 0° and where the
    # cycloidal rise takes over (it starts at rest), so the cam has corners.
    axis = Axis(
        "cam",
        (
            Segment("constant-velocity", 60.0, to=4.0),
            Segment("cycloidal", 80.0, to=16.0),
            Segment("dwell", 80.0),
            Segment("poly345", 140.0, to=0.0),
        ),
    )
    cam = Cam(motion_from_program(compile_axis(axis), MM), TranslatingRoller(55 * MM, 8 * MM))
    a = analyse(cam)
    assert a.corners == pytest.approx((0.0, math.radians(60.0)), abs=1e-15)
    steps = np.hypot(*np.diff(closed_outline(a), axis=0).T)
    assert steps.max() > 5 * np.median(steps)


@pytest.mark.parametrize("turning", list(Turning))
def test_outline_is_counterclockwise_and_holds_the_disk_area(turning):
    # Eccentric disk through a flat face (see test_cam_eccentric): the contact
    # normal turns uniformly, so the outline is a regular N-gon inscribed in
    # the circle of radius Rb + ε; its area is (N/2)·R²·sin(2π/N) (geometry).
    eps, base = 8 * MM, 32 * MM
    harmonic = motion_from_function(lambda th: (eps * (1 - np.cos(th)), eps * np.sin(th), eps * np.cos(th)))
    a = analyse(Cam(harmonic, TranslatingFlat(base), turning), points=720)
    for mirror in (False, True):
        x, y = closed_outline(a, mirror=mirror).T
        area = 0.5 * np.sum(x[:-1] * y[1:] - x[1:] * y[:-1])
        n, radius = 720, base + eps
        assert area == pytest.approx(0.5 * n * radius**2 * math.sin(2 * math.pi / n), rel=1e-12)


def test_pitch_outline_only_for_rollers():
    unit, lift, scale, follower = FOLLOWERS["translating-flat"]
    a = analyse(Cam(program(unit, lift, scale), follower))
    with pytest.raises(ValueError, match="pitch"):
        closed_outline(a, curve="pitch")
    unit, lift, scale, follower = FOLLOWERS["translating-roller"]
    a = analyse(Cam(program(unit, lift, scale), follower))
    pitch = closed_outline(a, curve="pitch")
    # Every pitch point is one roller radius from the profile point.
    profile = closed_outline(a)
    assert np.allclose(np.hypot(*(pitch - profile).T), follower.roller_radius, rtol=0, atol=1e-15)
