"""Edits that reach into the parts (workbench.editing_parts, re-exported by workbench.editing):
a cam's follower sizes, and an axis renamed together with the cams and linkage drivers that follow it.

References: the base circle of a roller follower is the prime circle less the
roller radius, and the translating roller's pressure angle is
φ = atan((s' − e)/(s + √(Rp² − e²))) (DESIGN §5; the standard form in
machine-design texts, e.g. Norton, *Design of Machinery*, cam chapter),
evaluated here by hand from the axis program's cam function.
"""

from __future__ import annotations

import math
import tomllib

import numpy as np
import pytest

from workbench import editing
from workbench.camfile import find_cam, study_cam
from workbench.editing import EditError
from workbench.linkagefile import linkage_specs
from workbench.linkagestudy import study_linkage
from workbench.presets import preset_path
from workbench.projectfile import dumps, load_project, loads_project
from workbench.tui.history import History


@pytest.fixture
def press():
    return load_project(preset_path("cam-press"))


def textbook_pressure_angle(project, axis: str, offset_mm: float, prime_mm: float, theta_deg: float) -> float:
    """φ (deg) of a translating roller follower at one cam angle, by the textbook form."""
    s, s1, _, _ = project.programs[axis].master(np.array([theta_deg]))  # mm, mm per master rad
    s, s1 = float(s[0]), float(s1[0])
    return math.degrees(math.atan((s1 - offset_mm) / (s + math.sqrt(prime_mm**2 - offset_mm**2))))


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
    assert 'axis = "sled"\noffset = 160.0' in text and 'name = "sled"           # the motion program' in text
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
