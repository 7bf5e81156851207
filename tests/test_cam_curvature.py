"""Radius of curvature of pitch curves and profiles against closed forms and finite differences.

* Radial roller follower: the pitch curve is the polar curve r = Rp + s(θ),
  whose radius of curvature is the calculus closed form
  ρ = (r² + r'²)^{3/2} / (r² + 2r'² − r·r'')  with r' = s', r'' = s''
  (DESIGN §5; the polar form of ρ = (x'² + y'²)^{3/2}/(x'y'' − y'x''),
  e.g. R. L. Norton, *Cam Design and Manufacturing Handbook*).
* Translating flat-faced follower: ρ = Rb + s + s'' (DESIGN §5; Norton).
* Every follower: the curvature of the generated points by periodic
  central differences, κ = (x'y'' − y'x'')/(x'² + y'²)^{3/2}, signed for the
  curve's direction of travel (counter-clockwise positive).

The motions use 4-5-6-7 polynomials between dwells, whose jerk is zero at
both ends: the points are smooth enough for second differences to be
accurate to O(h²) everywhere.
"""

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
    motion_from_program,
)

MM = 1e-3
DEG = math.pi / 180
FD_RTOL = 1e-4  # central differences on 0.1° steps: error ~ h²·(higher derivatives) ≈ 1e-5


def motion(unit, lift, scale):
    """Scenario: rise, dwell, return, dwell with 4-5-6-7 polynomials."""
    axis = Axis(
        "cam",
        (
            Segment("poly4567", 110.0, to=lift),
            Segment("dwell", 70.0),
            Segment("poly4567", 130.0, to=0.0),
            Segment("dwell", 50.0),
        ),
        unit=unit,
    )
    return motion_from_program(compile_axis(axis), scale)


LINEAR = motion("mm", 18.0, MM)
ANGULAR = motion("deg", 22.0, DEG)
SMALL_SWING = motion("deg", 8.0, DEG)  # a flat face on an arm needs a gentle swing


def fd_curvature(points, turning):
    """Curvature of a closed point list by periodic central differences, convex positive."""
    z = points[:, 0] + 1j * points[:, 1]
    h = 2 * math.pi / len(z)
    d1 = (np.roll(z, -1) - np.roll(z, 1)) / (2 * h)
    d2 = (np.roll(z, -1) - 2 * z + np.roll(z, 1)) / h**2
    orientation = -int(turning)  # the curve runs round the cam against its turning
    return orientation * np.imag(np.conj(d1) * d2) / np.abs(d1) ** 3


@pytest.mark.parametrize("turning", list(Turning))
def test_radial_roller_pitch_radius_matches_polar_closed_form(turning):
    follower = TranslatingRoller(45 * MM, 10 * MM)
    a = analyse(Cam(LINEAR, follower, turning))
    r = follower.prime_radius + a.lift
    r1, r2 = a.lift_rate, a.lift_accel
    rho = (r**2 + r1**2) ** 1.5 / (r**2 + 2 * r1**2 - r * r2)  # polar closed form
    assert np.max(np.abs(a.pitch_radius - rho) / np.abs(rho)) < 1e-12
    assert np.max(np.abs(a.profile_radius - (rho - follower.roller_radius)) / np.abs(rho)) < 1e-12
    # The summary is the smallest convex value, refined beyond the grid.
    convex = rho[rho > 0].min()
    assert a.pitch_radii.convex.value <= convex
    assert a.pitch_radii.convex.value == pytest.approx(convex, rel=1e-5)


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize(
    "follower, moves",
    [
        (TranslatingRoller(45 * MM, 10 * MM, 8 * MM), LINEAR),
        (OscillatingRoller(110 * MM, 85 * MM, 45 * MM, 9 * MM), ANGULAR),
    ],
    ids=["translating", "oscillating"],
)
def test_roller_curvature_agrees_with_finite_differences(turning, follower, moves):
    a = analyse(Cam(moves, follower, turning))
    assert not a.undercut
    for points, radius in ((a.pitch, a.pitch_radius), (a.profile, a.profile_radius)):
        kappa = 1.0 / radius
        scale = np.max(np.abs(kappa))
        assert np.max(np.abs(fd_curvature(points, turning) - kappa)) < FD_RTOL * scale


@pytest.mark.parametrize("turning", list(Turning))
def test_flat_face_radius_is_base_plus_lift_plus_acceleration(turning):
    follower = TranslatingFlat(35 * MM, offset=5 * MM)
    a = analyse(Cam(LINEAR, follower, turning))
    rho = follower.base_radius + a.lift + a.lift_accel  # DESIGN §5
    assert np.max(np.abs(a.profile_radius - rho)) < 1e-15
    kappa = 1.0 / rho
    assert np.max(np.abs(fd_curvature(a.profile, turning) - kappa)) < FD_RTOL * np.max(np.abs(kappa))


@pytest.mark.parametrize("turning", list(Turning))
def test_oscillating_flat_face_radius_agrees_with_finite_differences(turning):
    follower = OscillatingFlat(120 * MM, 40 * MM, face_offset=6 * MM)
    a = analyse(Cam(SMALL_SWING, follower, turning))
    assert not a.cusp
    kappa = 1.0 / a.profile_radius
    assert np.max(np.abs(fd_curvature(a.profile, turning) - kappa)) < FD_RTOL * np.max(np.abs(kappa))


def test_concave_flank_reported_separately():
    # A small prime circle with a steep return makes the pitch curve hollow
    # somewhere; the smallest hollow radius is that of the grid's most
    # negative curvature, and a roller adds its radius to it on the profile.
    follower = TranslatingRoller(25 * MM, 5 * MM)
    a = analyse(Cam(LINEAR, follower))
    kappa = 1.0 / a.pitch_radius
    assert kappa.min() < 0
    hollow = a.pitch_radii.concave
    assert hollow.value == pytest.approx(1.0 / -kappa.min(), rel=1e-5)
    assert hollow.value <= 1.0 / -kappa.min()
    assert a.profile_radii.concave.value == pytest.approx(hollow.value + follower.roller_radius, rel=1e-15)
