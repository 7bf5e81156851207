"""Verdicts against limits, undercut and cusp regions, and refusal of impossible layouts."""

import math

import numpy as np
import pytest

from motionlaws import Axis, Segment, compile_axis
from solver.cam import (
    CURVATURE_RATIO_RANGE,
    OSCILLATING_PRESSURE_ANGLE_RANGE,
    TRANSLATING_PRESSURE_ANGLE,
    Cam,
    CamGeometryError,
    OscillatingFlat,
    OscillatingRoller,
    TranslatingFlat,
    TranslatingRoller,
    Turning,
    analyse,
    cam_points,
    check_cam,
    common_practice_limits,
    motion_from_function,
    motion_from_program,
    smallest_prime_radius,
)

MM = 1e-3
DEG = math.pi / 180


def lift_program(start=0.0, lift=20.0, index=None, rise=90.0):
    """Scenario: rise, dwell, return, dwell (mm)."""
    axis = Axis(
        "lift",
        (
            Segment("modified-trapezoid", rise, to=start + lift),
            Segment("dwell", 180.0 - rise),
            Segment("cycloidal", 120.0, to=start + (index or 0.0)),
            Segment("dwell", 60.0),
        ),
        start=start,
        index=index,
    )
    return compile_axis(axis)


LIFT = motion_from_program(lift_program(), MM)
STEEP = motion_from_program(lift_program(lift=25.0, rise=50.0), MM)


def test_common_practice_defaults():
    # Rules of thumb (common practice, DESIGN §5): 30° translating, 35–45°
    # oscillating; convex pitch radius at least 2–3 × roller radius.
    assert TRANSLATING_PRESSURE_ANGLE == pytest.approx(math.radians(30.0))
    assert OSCILLATING_PRESSURE_ANGLE_RANGE == pytest.approx((math.radians(35.0), math.radians(45.0)))
    assert CURVATURE_RATIO_RANGE == (2.0, 3.0)
    translating = common_practice_limits(TranslatingRoller(50 * MM, 10 * MM))
    oscillating = common_practice_limits(OscillatingRoller(120 * MM, 90 * MM, 50 * MM, 10 * MM))
    assert translating.pressure_angle == TRANSLATING_PRESSURE_ANGLE
    assert OSCILLATING_PRESSURE_ANGLE_RANGE[0] <= oscillating.pressure_angle <= OSCILLATING_PRESSURE_ANGLE_RANGE[1]
    assert CURVATURE_RATIO_RANGE[0] <= translating.curvature_ratio <= CURVATURE_RATIO_RANGE[1]
    assert common_practice_limits(TranslatingFlat(40 * MM)).curvature_ratio is None


@pytest.mark.parametrize("turning", list(Turning))
def test_pressure_angle_verdict_flips_at_the_limit(turning):
    cam = Cam(LIFT, TranslatingRoller(60 * MM, 6 * MM, 3 * MM), turning)
    prime = smallest_prime_radius(cam).value  # default limit: common practice 30°
    over = check_cam(analyse(Cam(LIFT, TranslatingRoller(prime * 0.99, 6 * MM, 3 * MM), turning)))
    under = check_cam(analyse(Cam(LIFT, TranslatingRoller(prime * 1.01, 6 * MM, 3 * MM), turning)))
    assert not over.get("pressure_angle").ok and over.get("pressure_angle").headroom < 0
    assert under.get("pressure_angle").ok and 0 < under.get("pressure_angle").headroom < 0.05


def test_undercut_region_boundaries_sit_where_roller_equals_pitch_radius():
    follower = TranslatingRoller(30 * MM, 18 * MM)
    cam = Cam(STEEP, follower)
    a = analyse(cam)
    assert a.undercut
    verdict = check_cam(a)
    assert not verdict.ok and not verdict.get("undercut").ok
    for region in a.undercut:
        assert region.span > 0
        pts = cam_points(cam, [region.start, region.end])
        # r·κ = 1 at both ends: the profile radius ρ − r passes through zero.
        assert np.allclose(follower.roller_radius * pts.pitch_curvature, 1.0, rtol=0, atol=1e-9)
        inside = cam_points(cam, [region.start + region.span / 2])
        assert inside.profile_radius[0] < 0 < inside.pitch_curvature[0]
    # The worst point lies inside a region.
    worst = a.pitch_radii.convex.at
    assert any(r.start <= worst <= r.end for r in a.undercut)


def test_cusp_region_boundaries_sit_where_flat_face_radius_vanishes():
    follower = TranslatingFlat(10 * MM)
    cam = Cam(LIFT, follower)
    a = analyse(cam)
    assert a.cusp and not check_cam(a).get("cusp").ok
    for region in a.cusp:
        s, _, s2 = LIFT(np.array([region.start, region.end]))
        assert np.allclose(follower.base_radius + s + s2, 0.0, rtol=0, atol=1e-12)  # Rb + s + s'' = 0


def test_face_width_check():
    # Contact runs across the face by max s' − min s' (DESIGN §5); a face
    # centred on the line of travel needs twice the larger excursion.
    offset = 2 * MM
    a = analyse(Cam(LIFT, TranslatingFlat(60 * MM, offset)))
    theta = np.linspace(0, 2 * math.pi, 200_001)
    s1 = LIFT(theta)[1]
    assert a.face.width == pytest.approx(np.ptp(s1), rel=1e-8)
    need = 2 * np.max(np.abs(s1 - offset))
    narrow = check_cam(analyse(Cam(LIFT, TranslatingFlat(60 * MM, offset, face_width=need * 0.99))))
    wide = check_cam(analyse(Cam(LIFT, TranslatingFlat(60 * MM, offset, face_width=need * 1.01))))
    assert not narrow.get("face_width").ok and wide.get("face_width").ok


def test_datum_puts_the_lowest_position_on_the_base_circle():
    high = motion_from_program(lift_program(start=100.0), MM)
    theta = np.linspace(0, 2 * math.pi, 3601)
    assert np.allclose(high(theta)[0], LIFT(theta)[0], rtol=0, atol=1e-15)


def test_arm_angle_and_prime_radius_agree_by_the_law_of_cosines():
    follower = OscillatingRoller.from_arm_angle(120 * MM, 90 * MM, math.radians(25.0), 8 * MM)
    assert follower.initial_arm_angle == pytest.approx(math.radians(25.0), rel=1e-13)
    # Law of cosines: Rp² = d² + L² − 2dL·cos ψ0.
    want = math.sqrt(0.12**2 + 0.09**2 - 2 * 0.12 * 0.09 * math.cos(math.radians(25.0)))
    assert follower.prime_radius == pytest.approx(want, rel=1e-15)


@pytest.mark.parametrize(
    "make, key",
    [
        (lambda: TranslatingRoller(50 * MM, 60 * MM), "roller_radius"),
        (lambda: TranslatingRoller(50 * MM, 10 * MM, 55 * MM), "offset"),
        (lambda: TranslatingRoller(-50 * MM, 10 * MM), "prime_radius"),
        (lambda: TranslatingRoller(float("nan"), 10 * MM), "prime_radius"),
        (lambda: TranslatingRoller(True, 10 * MM), "prime_radius"),
        (lambda: TranslatingFlat(0.0), "base_radius"),
        (lambda: TranslatingFlat(40 * MM, face_width=-1.0), "face_width"),
        (lambda: OscillatingRoller(100 * MM, 20 * MM, 50 * MM, 10 * MM), "prime_radius"),
        (lambda: OscillatingRoller(100 * MM, 0.0, 50 * MM, 10 * MM), "arm_length"),
        (lambda: OscillatingRoller.from_arm_angle(100 * MM, 80 * MM, 4.0, 5 * MM), "initial_arm_angle"),
        (lambda: OscillatingFlat(100 * MM, 120 * MM), "base_radius"),
    ],
)
def test_impossible_followers_name_their_key(make, key):
    with pytest.raises(CamGeometryError) as err:
        make()
    assert err.value.key == key


def test_indexing_axis_cannot_be_a_cam():
    with pytest.raises(CamGeometryError) as err:
        motion_from_program(lift_program(index=5.0), MM)
    assert err.value.key == "axis"


def test_motion_that_does_not_close_is_refused():
    ramp = motion_from_function(lambda th: (1e-3 * th, np.full_like(th, 1e-3), np.zeros_like(th)))
    with pytest.raises(CamGeometryError) as err:
        analyse(Cam(ramp, TranslatingRoller(50 * MM, 10 * MM)))
    assert err.value.key == "axis"


def test_roller_centre_through_the_cam_centre_is_refused():
    dips = motion_from_program(lift_program(), MM, datum=40.0)  # s from −40 mm to −20 mm
    with pytest.raises(CamGeometryError) as err:
        analyse(Cam(dips, TranslatingRoller(30 * MM, 5 * MM)))
    assert err.value.key == "prime_radius"


def test_face_swinging_as_fast_as_the_cam_is_refused():
    fast = motion_from_function(lambda th: (0.3 * np.sin(4 * th), 1.2 * np.cos(4 * th), -4.8 * np.sin(4 * th)))
    with pytest.raises(CamGeometryError) as err:
        analyse(Cam(fast, OscillatingFlat(150 * MM, 60 * MM)))
    assert err.value.key == "base_radius"


def test_too_few_points_is_refused():
    with pytest.raises(CamGeometryError) as err:
        analyse(Cam(LIFT, TranslatingFlat(40 * MM)), points=10)
    assert err.value.key == "points"


def test_cam_geometry_loads_no_ui_and_no_workbench():
    # DESIGN §2: solver imports numpy, scipy and motionlaws only.
    import subprocess
    import sys

    code = (
        "import sys, solver.cam; "
        "bad = [m for m in sys.modules if m.split('.')[0] in ('textual', 'rich', 'workbench', 'ezdxf')]; "
        "print(','.join(bad))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""
