"""Pressure angle of cam followers against the textbook form and independent geometry.

Textbook form for a translating roller follower with offset e on a prime
circle Rp (DESIGN §5; R. L. Norton, *Cam Design and Manufacturing
Handbook*; J. E. Shigley & J. J. Uicker, *Theory of Machines and
Mechanisms*):  φ = atan((s' − e)/(s + √(Rp² − e²))),  s' = ds/dθ per rad.
The library places a positive offset on the side that lowers the pressure
angle on the rise for either turning direction, so the same form must hold
for a clockwise and a counter-clockwise cam.
"""

import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from motionlaws import Axis, Segment, compile_axis
from solver.cam import (
    Cam,
    OscillatingRoller,
    TranslatingFlat,
    TranslatingRoller,
    Turning,
    analyse,
    motion_from_program,
)

MM = 1e-3
DEG = math.pi / 180


def lift_motion():
    """Scenario: a 20 mm rise and return with dwells (axis in mm)."""
    axis = Axis(
        "lift",
        (
            Segment("cycloidal", 90.0, to=20.0),
            Segment("dwell", 90.0),
            Segment("poly345", 120.0, to=0.0),
            Segment("dwell", 60.0),
        ),
    )
    return motion_from_program(compile_axis(axis), MM)


def swing_motion():
    """Scenario: a 20° swing out and back with dwells (axis in deg)."""
    axis = Axis(
        "swing",
        (
            Segment("poly4567", 100.0, to=20.0),
            Segment("dwell", 80.0),
            Segment("poly4567", 120.0, to=0.0),
            Segment("dwell", 60.0),
        ),
        unit="deg",
    )
    return motion_from_program(compile_axis(axis), DEG)


def textbook_phi(s, s1, prime, offset):
    # Norton / Shigley & Uicker, translating roller follower (DESIGN §5)
    return np.arctan((s1 - offset) / (s + math.sqrt(prime**2 - offset**2)))


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("offset_mm", [0.0, 6.0, -6.0])
def test_translating_roller_matches_textbook_form(turning, offset_mm):
    follower = TranslatingRoller(50 * MM, 12 * MM, offset_mm * MM)
    a = analyse(Cam(lift_motion(), follower, turning))
    want = textbook_phi(a.lift, a.lift_rate, follower.prime_radius, follower.offset)
    assert np.max(np.abs(a.pressure_angle - want)) < 1e-12
    # Positive on the rise (s' > e) in both turning directions: the textbook sign.
    rising = a.lift_rate > follower.offset + 1e-6
    assert np.all(a.pressure_angle[rising] > 0)


def test_clockwise_cam_is_the_mirror_image():
    # Geometry of the turning convention: a clockwise cam with the same
    # positive offset is the counter-clockwise cam mirrored in the y axis
    # (derived: e^{+iθ}(−e + iy) = −conj(e^{−iθ}(e + iy))).
    follower = TranslatingRoller(50 * MM, 12 * MM, 6 * MM)
    ccw = analyse(Cam(lift_motion(), follower, Turning.COUNTERCLOCKWISE))
    cw = analyse(Cam(lift_motion(), follower, Turning.CLOCKWISE))
    assert np.max(np.abs(cw.profile - ccw.profile * [-1.0, 1.0])) < 1e-15
    assert np.max(np.abs(cw.pressure_angle - ccw.pressure_angle)) < 1e-15


@pytest.mark.parametrize("offset_mm", [0.0, 6.0])
def test_max_pressure_angle_is_the_true_peak(offset_mm):
    # scipy.optimize.minimize_scalar on the textbook form, near the reported
    # angle, must find no larger value than the refined peak.
    motion = lift_motion()
    follower = TranslatingRoller(50 * MM, 12 * MM, offset_mm * MM)
    peak = analyse(Cam(motion, follower)).max_pressure_angle

    def neg_abs_phi(theta):
        s, s1, _ = motion(np.array([theta]))
        return -abs(float(textbook_phi(s, s1, follower.prime_radius, follower.offset)[0]))

    h = 2 * math.pi / 3600
    best = minimize_scalar(neg_abs_phi, bounds=(peak.at - h, peak.at + h), method="bounded",
                           options={"xatol": 1e-12})
    assert -best.fun == pytest.approx(peak.value, abs=1e-12)
    # A smooth peak pins its angle only to about the square root of the
    # value's precision: 1e-6 rad is 0.00006°.
    assert best.x == pytest.approx(peak.at, abs=1e-6)


def test_flat_faced_translating_follower_has_zero_pressure_angle():
    # Textbook: the face is square to the travel, so the contact normal is
    # always along the travel (Norton, flat-faced follower).
    a = analyse(Cam(lift_motion(), TranslatingFlat(40 * MM)))
    assert np.max(np.abs(a.pressure_angle)) < 1e-15


@pytest.mark.parametrize("turning", list(Turning))
def test_oscillating_roller_normal_from_finite_differences(turning):
    # Independent normal: central differences on the generated pitch points
    # (cam frame), outward = the side away from the cam centre; the roller
    # centre travels square to the arm.  Angle between them, signed by the
    # library's documented rule φ = atan2(σ·(w × n), w·n).
    follower = OscillatingRoller(120 * MM, 90 * MM, 50 * MM, 10 * MM)
    a = analyse(Cam(swing_motion(), follower, turning))
    P = a.pitch[:, 0] + 1j * a.pitch[:, 1]
    h = a.theta[1] - a.theta[0]
    T = (np.roll(P, -1) - np.roll(P, 1)) / (2 * h)
    n = 1j * T / np.abs(T)
    n = np.where(np.real(np.conj(n) * P) > 0, n, -n)
    sigma = int(turning)
    psi = follower.initial_arm_angle + a.lift
    w = 1j * np.exp(-1j * psi) * np.exp(-1j * sigma * a.theta)  # square to the arm, cam frame
    phi = np.arctan2(sigma * np.imag(np.conj(w) * n), np.real(np.conj(w) * n))
    assert np.max(np.abs(phi - a.pressure_angle)) < 1e-5
