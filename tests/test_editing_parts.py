"""Edits that reach into the parts (workbench.editing_parts, re-exported by workbench.editing):
a cam's follower sizes, turning and limits, and an axis renamed together with the cams and linkage
drivers that follow it.

References: the base circle of a roller follower is the prime circle less the
roller radius, and the translating roller's pressure angle is
φ = atan((s' − e)/(s + √(Rp² − e²))) (DESIGN §5; the standard form in
machine-design texts, e.g. Norton, *Design of Machinery*, cam chapter),
evaluated here by hand from the axis program's cam function.  With the
follower kept where it stands and the cam turned the other way, the offset
enters with the other sign: tan φ = (s' ∓ e)/(√(Rp² − e²) + s) (the same
texts, from memory).  An oscillating roller follower's pressure angle is laid
out by hand with the instant centre of cam and arm on the line of centres
(Kennedy's theorem of three centres; Norton, *Design of Machinery*, cam
chapter, from memory): the common normal runs from the roller centre through
that centre, and φ is its angle to the roller centre's velocity.
"""

from __future__ import annotations

import math
import tomllib

import numpy as np
import pytest

from workbench import editing
from workbench.camfile import CamLimitsSpec, find_cam, study_cam
from workbench.editing import EditError
from workbench.linkagefile import linkage_specs
from workbench.linkagestudy import study_linkage
from workbench.presets import preset_path
from workbench.projectfile import dumps, load_project, loads_project
from workbench.tui.history import History


@pytest.fixture
def press():
    return load_project(preset_path("cam-press"))


def textbook_pressure_angle(project, axis: str, offset_mm: float, prime_mm: float, theta_deg):
    """φ (deg) of a translating roller follower at one cam angle (a float) or at an array of them
    (an array), by the textbook form."""
    s, s1, _, _ = project.programs[axis].master(np.atleast_1d(np.asarray(theta_deg, dtype=float)))
    phi = np.degrees(np.arctan((s1 - offset_mm) / (s + math.sqrt(prime_mm**2 - offset_mm**2))))
    return float(phi[0]) if np.ndim(theta_deg) == 0 else phi


# --- cam sizes ------------------------------------------------------------------------------


def test_cam_sizes_lists_every_size_of_the_follower_type(press):
    stamp, stripper = find_cam(press, "stamp-cam"), find_cam(press, "stripper-cam")
    assert editing.cam_sizes(stamp) == [("prime_radius", 60.0, True), ("roller_radius", 12.0, True),
                                        ("offset", 6.0, False)]
    # the flat face leaves offset out (default 0); face_width is optional
    assert editing.cam_sizes(stripper) == [("base_radius", 45.0, True), ("offset", None, False),
                                           ("face_width", 40.0, False)]


def test_a_roller_radius_edit_reaches_the_geometry(press):
    edited = editing.set_cam_size(press, "stamp-cam", "roller_radius", 15.0)
    assert find_cam(press, "stamp-cam").size("roller_radius") == 12.0  # the old project is unchanged
    spec = find_cam(edited, "stamp-cam")
    assert spec.sizes == (("prime_radius", 60.0), ("roller_radius", 15.0), ("offset", 6.0))
    study = study_cam(edited, spec)
    # base circle = prime circle − roller radius (definition)
    assert study.cam.follower.base_radius == pytest.approx((60.0 - 15.0) * 1e-3)
    others = [find_cam(edited, n) for n in ("feed-cam", "stripper-cam")]
    assert others == [find_cam(press, n) for n in ("feed-cam", "stripper-cam")]


@pytest.mark.parametrize("key, value", [("offset", -4.0), ("prime_radius", 75.0)])
def test_an_offset_or_prime_circle_edit_moves_the_pressure_angle_as_the_textbook_says(press, key, value):
    edited = editing.set_cam_size(press, "stamp-cam", key, value)
    sizes = dict(find_cam(edited, "stamp-cam").sizes)
    analysis = study_cam(edited, find_cam(edited, "stamp-cam"), points=3600).analysis
    theta = np.degrees(analysis.theta)
    for at in (160.0, 270.0):  # inside the down stroke (poly345) and the return (cycloidal)
        k = int(np.argmin(np.abs(theta - at)))
        shown = math.degrees(analysis.pressure_angle[k])
        expected = textbook_pressure_angle(edited, "stamp", sizes["offset"], sizes["prime_radius"], theta[k])
        # the sign convention follows the turning; the size agrees to rounding
        assert abs(shown) == pytest.approx(abs(expected), abs=1e-6)


def test_an_optional_size_can_be_left_out_and_given(press):
    edited = editing.set_cam_size(press, "stripper-cam", "face_width", None)
    assert find_cam(edited, "stripper-cam").size("face_width") is None
    edited = editing.set_cam_size(edited, "stripper-cam", "offset", 3.0)
    assert find_cam(edited, "stripper-cam").sizes == (("base_radius", 45.0), ("offset", 3.0))
    assert editing.set_cam_size(press, "stamp-cam", "offset", 6.0) is press  # no change: the same project


@pytest.mark.parametrize("cam, key, value, reason", [
    ("stamp-cam", "roller_radius", 60.0, "roller_radius = 60 mm: roller_radius must be smaller than prime_radius"),
    ("stamp-cam", "offset", -70.0, "offset = -70 mm: the offset must be smaller than prime_radius in size "
                                   "— with prime_radius 60 mm, roller_radius 12 mm"),
    ("stamp-cam", "prime_radius", 0.0, "prime_radius = 0 mm: prime_radius must be positive"),
    ("stamp-cam", "prime_radius", None, "prime_radius: a translating roller follower needs it"),
    ("stamp-cam", "prime_radius", math.inf, "prime_radius: must be finite"),
    ("feed-cam", "arm_length", 10.0, "arm_length = 10 mm: the arm cannot reach the prime circle"),
    ("stamp-cam", "face_width", 30.0, "a translating roller follower has no size 'face_width' "
                                      "(its sizes: prime_radius, roller_radius, offset)"),
    ("no-cam", "offset", 1.0, "no cam named 'no-cam'"),
])
def test_a_size_the_model_cannot_take_is_refused_with_the_reason(press, cam, key, value, reason):
    before = dumps(press)
    with pytest.raises(EditError) as refused:
        editing.set_cam_size(press, cam, key, value)
    assert refused.value.message.startswith(reason)
    assert dumps(press) == before


def test_a_knife_edge_under_a_curvature_ratio_is_refused(press):
    text = preset_path("cam-press").read_text().replace(
        "pressure_angle = 30.0       # deg", "pressure_angle = 30.0\ncurvature_ratio = 2.0")
    project = loads_project(text)
    with pytest.raises(EditError, match="knife edge, which has no curvature ratio"):
        editing.set_cam_size(project, "stamp-cam", "roller_radius", 0.0)
    knife = editing.set_cam_size(press, "stamp-cam", "roller_radius", 0.0)  # without the ratio it is fine
    assert find_cam(knife, "stamp-cam").size("roller_radius") == 0.0


def test_a_cam_size_saves_in_place_with_the_comments_kept(press, tmp_path):
    edited = editing.set_cam_size(press, "stamp-cam", "roller_radius", 10.0)
    text = dumps(edited)
    assert "roller_radius = 10.0        # mm\n" in text
    old, new = press.source_text.splitlines(), text.splitlines()
    assert len(old) == len(new) and sum(a != b for a, b in zip(old, new)) == 1  # one line changed
    assert tomllib.loads(text)["cam"][0]["follower"]["roller_radius"] == 10.0
    assert find_cam(loads_project(text), "stamp-cam") == find_cam(edited, "stamp-cam")


# --- cam turning -------------------------------------------------------------------------

GRID = np.linspace(0.0, 360.0, 36_001)  # deg: 0.01° steps, where the textbook peaks are sought
PEAK_TOLERANCE = 1e-3  # deg: a peak sought on GRID is within a millionth of a degree of the true one


def test_turning_is_reversed_and_read_back(press):
    edited = editing.set_cam_turning(press, "feed-cam", "ccw")
    assert find_cam(edited, "feed-cam").turning == "ccw" and find_cam(press, "feed-cam").turning == "cw"
    assert [find_cam(edited, n) for n in ("stamp-cam", "stripper-cam")] == \
        [find_cam(press, n) for n in ("stamp-cam", "stripper-cam")]
    assert editing.set_cam_turning(press, "feed-cam", "cw") is press  # no change: the same project
    assert editing.reversed_turning("cw") == "ccw" and editing.reversed_turning("ccw") == "cw"
    text = dumps(edited)
    assert 'turning = "ccw"' in text and "# mm, cam centre to lever pivot" in text
    assert find_cam(loads_project(text), "feed-cam") == find_cam(edited, "feed-cam")


@pytest.mark.parametrize("cam, turning, reason", [
    ("feed-cam", "clockwise", "turning: must be 'cw' or 'ccw', got 'clockwise'"),
    ("no-cam", "ccw", "no cam named 'no-cam'"),
])
def test_a_turning_that_is_not_cw_or_ccw_is_refused(press, cam, turning, reason):
    with pytest.raises(EditError) as refused:
        editing.set_cam_turning(press, cam, turning)
    assert refused.value.message == reason


def test_reversing_a_translating_cam_mirrors_it_and_keeps_its_pressure_angles(press):
    # The file's offset is measured to the side that eases the rise (solver/cam/README.md), so the
    # reversed cam is the mirror image: x → −x, the same pressure angles (textbook form, minus e).
    before = study_cam(press, find_cam(press, "stamp-cam"))
    edited = editing.set_cam_turning(press, "stamp-cam", "ccw")
    after = study_cam(edited, find_cam(edited, "stamp-cam"))
    assert np.allclose(after.analysis.profile[:, 0], -before.analysis.profile[:, 0], atol=1e-12)
    assert np.allclose(after.analysis.profile[:, 1], before.analysis.profile[:, 1], atol=1e-12)
    peak = np.max(np.abs(textbook_pressure_angle(edited, "stamp", 6.0, 60.0, GRID)))
    assert math.degrees(after.analysis.max_pressure_angle.value) == pytest.approx(peak, abs=PEAK_TOLERANCE)


def peak_limit_flips_the_verdict(project, cam: str, peak_deg: float) -> None:
    """A pressure-angle limit just under the peak fails the cam on it, just over it passes that check."""
    step = 0.01  # deg, well above the peak's tolerance
    under = editing.set_cam_limits(project, cam, CamLimitsSpec(pressure_angle=peak_deg - step))
    over = editing.set_cam_limits(project, cam, CamLimitsSpec(pressure_angle=peak_deg + step))
    check = {c.quantity: c for c in study_cam(under, find_cam(under, cam)).verdict.checks}["pressure_angle"]
    assert not check.ok and check.limit == pytest.approx(math.radians(peak_deg - step))
    check = {c.quantity: c for c in study_cam(over, find_cam(over, cam)).verdict.checks}["pressure_angle"]
    assert check.ok


def test_the_follower_kept_in_place_under_a_reversed_cam_takes_the_other_textbook_sign(press):
    # Stamp cam: e = 6 mm, Rp = 60 mm.  Turning cw, the textbook form with s' − e; turned ccw with the
    # follower where it stood (its offset now −6 mm in the file's convention), the form with s' + e.
    rising = np.max(np.abs(textbook_pressure_angle(press, "stamp", 6.0, 60.0, GRID)))
    other = np.max(np.abs(textbook_pressure_angle(press, "stamp", -6.0, 60.0, GRID)))
    assert abs(rising - other) > 0.5  # the two signs give different peaks: the check below can fail
    shown = math.degrees(study_cam(press, find_cam(press, "stamp-cam")).analysis.max_pressure_angle.value)
    assert shown == pytest.approx(rising, abs=PEAK_TOLERANCE)
    reversed_ = editing.set_cam_turning(press, "stamp-cam", "ccw")
    reversed_ = editing.set_cam_size(reversed_, "stamp-cam", "offset", -6.0)
    moved = math.degrees(study_cam(reversed_, find_cam(reversed_, "stamp-cam")).analysis.max_pressure_angle.value)
    assert moved == pytest.approx(other, abs=PEAK_TOLERANCE)
    peak_limit_flips_the_verdict(press, "stamp-cam", rising)
    peak_limit_flips_the_verdict(reversed_, "stamp-cam", other)


def instant_centre_pressure_angles(project, turning: str, theta_deg) -> np.ndarray:
    """|φ| (deg) of the feed cam's oscillating roller (presets/cam-press.toml: pivot 100 mm, arm 70 mm,
    prime circle 50 mm) by the instant-centre construction.  Cam centre O at 0, pivot A at d on +x, the
    arm at ψ = ψ0 + s from A→O (cos ψ0 = (d² + L² − Rp²)/(2dL), law of cosines), swinging clockwise
    about A as s grows: roller centre C = A − L·e^{−iψ}.  Per unit cam rate the cam turns at
    ω2 = σ (σ = −1 clockwise), the arm at ω3 = −ds/dθ; their instant centre I on the x axis has the
    same velocity in both: ω2·x = ω3·(x − d)."""
    d, L, rp = 100.0, 70.0, 50.0
    sigma = -1.0 if turning == "cw" else 1.0
    s_deg, s1_deg, _, _ = project.programs["feed-lever"].master(np.asarray(theta_deg, dtype=float))
    s, s1 = np.radians(s_deg - s_deg.min()), np.radians(s1_deg)  # rad, rad per rad of cam angle
    psi = math.acos((d * d + L * L - rp * rp) / (2 * d * L)) + s
    c = d - L * np.exp(-1j * psi)
    w3 = -s1
    x = -w3 * d / (sigma - w3)
    normal = c - x
    velocity = 1j * (c - d) * np.where(w3 == 0, 1.0, w3)  # at rest: the direction the arm would swing
    cos_phi = np.abs(np.real(np.conj(normal) * velocity)) / (np.abs(normal) * np.abs(velocity))
    return np.degrees(np.arccos(np.clip(cos_phi, 0.0, 1.0)))


def test_reversing_an_oscillating_cam_moves_its_peak_pressure_angle_as_the_instant_centre_says(press):
    peaks = {t: float(np.max(instant_centre_pressure_angles(press, t, GRID))) for t in ("cw", "ccw")}
    where = {t: float(GRID[np.argmax(instant_centre_pressure_angles(press, t, GRID))]) for t in ("cw", "ccw")}
    assert abs(where["cw"] - where["ccw"]) > 90.0  # the worst spot moves to another stroke
    shown = study_cam(press, find_cam(press, "feed-cam")).analysis.max_pressure_angle
    assert math.degrees(shown.value) == pytest.approx(peaks["cw"], abs=PEAK_TOLERANCE)
    assert math.degrees(shown.at) == pytest.approx(where["cw"], abs=0.02)
    reversed_ = editing.set_cam_turning(press, "feed-cam", "ccw")
    moved = study_cam(reversed_, find_cam(reversed_, "feed-cam")).analysis.max_pressure_angle
    assert math.degrees(moved.value) == pytest.approx(peaks["ccw"], abs=PEAK_TOLERANCE)
    assert math.degrees(moved.at) == pytest.approx(where["ccw"], abs=0.02)
    peak_limit_flips_the_verdict(reversed_, "feed-cam", peaks["ccw"])


# --- cam limits --------------------------------------------------------------------------


def test_limits_are_set_read_back_and_saved_with_the_comments_kept(press):
    limits = CamLimitsSpec(pressure_angle=25.0, curvature_ratio=2.5, min_radius=10.0)
    edited = editing.set_cam_limits(press, "stamp-cam", limits)
    assert find_cam(edited, "stamp-cam").limits == limits
    assert find_cam(press, "stamp-cam").limits == CamLimitsSpec(pressure_angle=30.0)  # unchanged
    study = study_cam(edited, find_cam(edited, "stamp-cam"))
    assert study.limit_source == {"pressure_angle": "file", "curvature_ratio": "file", "min_radius": "file"}
    assert study.limits.min_radius == pytest.approx(0.010)
    text = dumps(edited)
    assert "pressure_angle = 25.0       # deg\ncurvature_ratio = 2.5\nmin_radius = 10.0\n" in text
    assert "# mm, to the side that eases the down stroke" in text and "# cycles per minute" in text
    assert find_cam(loads_project(text), "stamp-cam") == find_cam(edited, "stamp-cam")
    assert editing.set_cam_limits(edited, "stamp-cam", limits) is edited  # no change: the same project


def test_limits_left_blank_fall_back_to_common_practice_and_leave_the_file(press):
    edited = editing.set_cam_limits(press, "stamp-cam", CamLimitsSpec())
    study = study_cam(edited, find_cam(edited, "stamp-cam"))
    # common practice (rule of thumb): 30° for a translating follower, pitch radius ≥ 2 × roller
    assert study.limit_source == {"pressure_angle": "common practice", "curvature_ratio": "common practice"}
    assert study.limits.pressure_angle == pytest.approx(math.radians(30.0)) and study.limits.min_radius is None
    data = tomllib.loads(dumps(edited))
    assert "limits" not in data["cam"][0] and data["cam"][2]["limits"] == {"min_radius": 8.0}


@pytest.mark.parametrize("cam, limits, reason", [
    ("stamp-cam", CamLimitsSpec(pressure_angle=90.0), "pressure_angle: must be below 90 deg, got 90 deg"),
    ("stamp-cam", CamLimitsSpec(pressure_angle=0.0), "pressure_angle: must be above 0, got 0 deg"),
    ("stamp-cam", CamLimitsSpec(pressure_angle=math.nan), "pressure_angle: must be finite"),
    ("stamp-cam", CamLimitsSpec(curvature_ratio=-2.0), "curvature_ratio: must be above 0, got -2"),
    ("stamp-cam", CamLimitsSpec(min_radius=0.0), "min_radius: must be above 0, got 0 mm"),
    ("stripper-cam", CamLimitsSpec(curvature_ratio=2.0),
     "curvature_ratio: applies to roller followers only, not a translating flat follower"),
    ("no-cam", CamLimitsSpec(), "no cam named 'no-cam'"),
])
def test_a_limit_the_cam_cannot_take_is_refused_with_the_reason(press, cam, limits, reason):
    before = dumps(press)
    with pytest.raises(EditError) as refused:
        editing.set_cam_limits(press, cam, limits)
    assert refused.value.message.startswith(reason)
    assert dumps(press) == before


def test_a_curvature_ratio_on_a_knife_edge_is_refused(press):
    knife = editing.set_cam_size(press, "stamp-cam", "roller_radius", 0.0)
    with pytest.raises(EditError, match="a knife edge .* has no curvature ratio"):
        editing.set_cam_limits(knife, "stamp-cam", CamLimitsSpec(pressure_angle=30.0, curvature_ratio=2.0))
    assert editing.set_cam_limits(knife, "stamp-cam", CamLimitsSpec(pressure_angle=28.0)) is not knife


# --- renaming an axis -----------------------------------------------------------------------


def test_renaming_an_axis_carries_its_cam_along(press):
    edited = editing.rename_axis(press, "stamp", "punch")
    assert [a.name for a in edited.axes] == ["punch", "feed-lever", "stripper"]
    assert [a.name for a in press.axes] == ["stamp", "feed-lever", "stripper"]  # unchanged
    assert list(edited.programs) == ["punch", "feed-lever", "stripper"]
    assert edited.programs["punch"].axis.name == "punch"
    grid = np.linspace(0.0, 360.0, 721)
    for old, new in zip(press.programs["stamp"].master(grid), edited.programs["punch"].master(grid)):
        assert np.array_equal(old, new)  # the same motion under a new name
    assert find_cam(edited, "stamp-cam").axis == "punch"
    assert find_cam(edited, "feed-cam").axis == "feed-lever"
    assert editing.axis_users(edited, "punch") == ['cam "stamp-cam"']
    assert study_cam(edited, find_cam(edited, "stamp-cam")).ok == study_cam(press, find_cam(press, "stamp-cam")).ok


def test_renaming_an_axis_carries_the_linkage_driver_along():
    project = load_project(preset_path("servo-carriage"))
    edited = editing.rename_axis(project, "carriage", "sled")
    spec = linkage_specs(edited)[0]
    assert [d.axis for d in spec.drivers] == ["sled"]
    assert [b.name for b in spec.bodies] == ["crank", "rod", "carriage"]  # a body of that name stays
    assert editing.axis_users(edited, "sled") == ['linkage "drive" driver "stroke"']
    before = study_linkage(project, linkage_specs(project)[0])
    after = study_linkage(edited, spec)
    assert after.status == before.status
    assert [o.peaks for o in after.outputs] == [o.peaks for o in before.outputs]
    text = dumps(edited)
    assert 'axis = "sled"\noffset = 160.0' in text and 'name = "sled"               # the motion program' in text  # the comment keeps its column
    assert linkage_specs(loads_project(text))[0] == spec


def test_the_same_name_is_no_edit(press):
    assert editing.rename_axis(press, "stamp", " stamp ") is press


def test_rename_is_one_undoable_step(press):
    history = History(press)
    history.push(editing.rename_axis(press, "stamp", "punch"), "renamed axis stamp to punch")
    assert find_cam(history.current, "stamp-cam").axis == "punch"
    assert history.undo() == "renamed axis stamp to punch"
    assert history.current is press and find_cam(history.current, "stamp-cam").axis == "stamp"


@pytest.mark.parametrize("new, reason", [
    ("feed-lever", "name: another axis is called 'feed-lever'; axis names must be unique"),
    ("  ", "name: must not be empty"),
    ("stamp-cam.contact", "name: 'stamp-cam.contact' is already the name of a table of this project"),
])
def test_a_rename_that_collides_is_refused_with_the_reason(press, new, reason):
    before = dumps(press)
    with pytest.raises(EditError) as refused:
        editing.rename_axis(press, "stamp", new)
    assert refused.value.message.startswith(reason)
    assert dumps(press) == before


def test_a_renamed_name_is_trimmed_and_saved_as_clean_toml(press):
    edited = editing.rename_axis(press, "stamp", '  punch "A" ')
    text = dumps(edited)
    data = tomllib.loads(text)
    assert data["axis"][0]["name"] == 'punch "A"' and data["cam"][0]["axis"] == 'punch "A"'
    assert "# cycles per minute" in text  # comments elsewhere kept
    reloaded = loads_project(text)
    assert find_cam(reloaded, "stamp-cam").axis == 'punch "A"'
