"""The [[cam]] tables of the project file: round trip, and one clear message
naming file, table and key for each kind of bad input (exit code 2)."""

import pytest

from workbench.camfile import CamLoadsSpec, cam_specs, follower_load, study_cam
from workbench.cli import main
from workbench.presets import preset_path
from workbench.projectfile import ProjectError, dumps, load_project, loads_project, save_project

GOOD = """\
version = 1

[machine]
name = "Cam rig"
speed = 100

[[axis]]
name = "lift"
unit = "mm"

[[axis.segment]]
law = "cycloidal"
span = 120.0
to = 20.0

[[axis.segment]]
law = "dwell"
span = 60.0

[[axis.segment]]
law = "cycloidal"
span = 120.0
to = 0.0

[[axis.segment]]
law = "dwell"
span = 60.0

[[axis]]
name = "swing"
unit = "deg"

[[axis.segment]]
law = "poly345"
span = 150.0
to = 20.0

[[axis.segment]]
law = "poly345"
span = 150.0
to = 0.0

[[axis.segment]]
law = "dwell"
span = 60.0

[[axis]]
name = "dial"
unit = "deg"
index = 90.0

[[axis.segment]]
law = "cycloidal"
span = 180.0
to = 90.0

[[axis.segment]]
law = "dwell"
span = 180.0

[[cam]]
name = "lift-cam"
axis = "lift"
turning = "ccw"

[cam.follower]
type = "translating-roller"
prime_radius = 60.0
roller_radius = 10.0
offset = 3.0

[cam.limits]
pressure_angle = 32.0
curvature_ratio = 2.5

[cam.loads]
follower_mass = 1.5
spring_mass = 0.3
spring_rate = 5.0
preload = 80.0
friction = 5.0
margin = 20.0

[[cam]]
name = "swing-cam"
axis = "swing"
turning = "cw"

[cam.follower]
type = "oscillating-roller"
pivot_distance = 110.0
arm_length = 80.0
prime_radius = 55.0
roller_radius = 10.0

[cam.loads]
follower_mass = 0.5
spring_rate = 1.5
preload = 30.0
radius = 60.0

[[cam]]
name = "flat-cam"
axis = "lift"
turning = "cw"

[cam.follower]
type = "translating-flat"
base_radius = 70.0
face_width = 60.0
"""


def test_good_file_loads_with_its_cams():
    project = loads_project(GOOD, "rig.toml")
    specs = cam_specs(project)
    assert [c.name for c in specs] == ["lift-cam", "swing-cam", "flat-cam"]
    lift = specs[0]
    assert lift.follower == "translating-roller" and lift.turning == "ccw"
    assert dict(lift.sizes) == {"prime_radius": 60.0, "roller_radius": 10.0, "offset": 3.0}
    assert lift.limits.pressure_angle == 32.0 and lift.limits.min_radius is None
    # a third of the spring's mass moves with the follower (common practice)
    assert lift.loads.mass == pytest.approx(1.5 + 0.3 / 3)
    assert specs[2].loads is None and specs[2].size("offset") is None


def test_round_trip_is_identical(tmp_path):
    first = loads_project(GOOD, tmp_path / "a.toml")
    out = tmp_path / "b.toml"
    save_project(first, out)
    second = load_project(out)
    assert cam_specs(second) == cam_specs(first)
    assert dumps(second) == dumps(first)
    # keys the file left out stay out (no defaults written back)
    assert "offset" not in dumps(second).split('name = "flat-cam"')[1]


def test_preset_round_trip(tmp_path):
    first = load_project(preset_path("cam-press"))
    save_project(first, tmp_path / "copy.toml")
    second = load_project(tmp_path / "copy.toml")
    assert cam_specs(second) == cam_specs(first) and len(cam_specs(first)) == 3
    assert dumps(second) == dumps(first)


def test_units_convert_once_to_si():
    project = loads_project(GOOD, "rig.toml")
    lift, swing, _ = cam_specs(project)
    cam = study_cam(project, lift).cam
    assert cam.follower.prime_radius == pytest.approx(0.060) and cam.follower.offset == pytest.approx(0.003)
    load = follower_load(lift)
    assert load.spring_rate == pytest.approx(5000.0)  # N/mm → N/m
    assert load.preload == 80.0 and load.friction == 5.0
    # oscillating: referred to 60 mm on the arm — moment = force × r, inertia = m r², rate = k r²
    r = 0.060
    osc = follower_load(swing)
    assert osc.mass == pytest.approx(0.5 * r * r)
    assert osc.spring_rate == pytest.approx(1500.0 * r * r)
    assert osc.preload == pytest.approx(30.0 * r)


def test_oscillating_load_radius_defaults_to_the_arm():
    project = loads_project(GOOD.replace("\nradius = 60.0\n", "\n"), "rig.toml")
    swing = cam_specs(project)[1]
    assert swing.loads.radius is None
    assert follower_load(swing).preload == pytest.approx(30.0 * 0.080)


def _swap(old, new, count=1):
    def edit(text):
        assert old in text, old
        return text.replace(old, new, count)
    return edit


LIFT = 'cam "lift-cam"'
SWING = 'cam "swing-cam"'
FLAT = 'cam "flat-cam"'
BAD = [
    # (edit of GOOD, words the message must contain)
    (_swap('type = "translating-roller"', 'type = "roller"'), [f"{LIFT}, follower", 'key "type"', "must be one of"]),
    (_swap('axis = "lift"\nturning = "ccw"', 'axis = "swing"\nturning = "ccw"'),
     [f"{LIFT}, follower", 'key "type"', "needs an axis in mm", "'swing' is in deg"]),
    (_swap('axis = "swing"', 'axis = "lift"'), [f"{SWING}, follower", 'key "type"', "needs an axis in deg"]),
    (_swap('axis = "lift"\nturning = "ccw"', 'axis = "lifter"\nturning = "ccw"'), [LIFT, 'key "axis"', "no axis 'lifter'"]),
    (_swap('axis = "swing"', 'axis = "dial"'), [SWING, 'key "axis"', "every cycle"]),
    (_swap('turning = "ccw"', 'turning = "left"'), [LIFT, 'key "turning"', "'cw', 'ccw'"]),
    (_swap('turning = "ccw"\n', ""), [LIFT, 'key "turning"', "is missing"]),
    (_swap("prime_radius = 60.0\n", ""), [f"{LIFT}, follower", 'key "prime_radius"', "is missing"]),
    (_swap("roller_radius = 10.0\noffset", "roller_radius = -1.0\noffset"),
     [f"{LIFT}, follower", 'key "roller_radius"', "zero or positive"]),
    (_swap("roller_radius = 10.0\noffset", "roller_radius = 60.0\noffset"),
     [f"{LIFT}, follower", 'key "roller_radius"', "smaller than prime_radius"]),
    (_swap("offset = 3.0", "offset = 61.0"), [f"{LIFT}, follower", 'key "offset"', "smaller than prime_radius"]),
    (_swap("offset = 3.0", 'offset = "3"'), [f"{LIFT}, follower", 'key "offset"', "must be a number"]),
    (_swap("offset = 3.0", "offset = 3.0\nbase_radius = 50.0"), [f"{LIFT}, follower", 'key "base_radius"', "not a known key"]),
    (_swap("arm_length = 80.0", "arm_length = 20.0"), [f"{SWING}, follower", 'key "prime_radius"', "cannot reach"]),
    (_swap('[cam.follower]\ntype = "translating-roller"\nprime_radius = 60.0\nroller_radius = 10.0\noffset = 3.0\n', ""),
     [LIFT, 'key "follower"', "is missing"]),
    (_swap('turning = "ccw"', 'turning = "ccw"\ncolour = "red"'), [LIFT, 'key "colour"', "not a known key"]),
    (_swap("pressure_angle = 32.0", "pressure_angle = 95.0"), [f"{LIFT}, limits", 'key "pressure_angle"', "below 90"]),
    (_swap("pressure_angle = 32.0", "pressure_angle = -5.0"), [f"{LIFT}, limits", 'key "pressure_angle"', "positive"]),
    (_swap("curvature_ratio = 2.5", "curvature_ratio = 0"), [f"{LIFT}, limits", 'key "curvature_ratio"', "positive"]),
    (_swap("face_width = 60.0", "face_width = 60.0\n\n[cam.limits]\ncurvature_ratio = 2.0"),
     [f"{FLAT}, limits", 'key "curvature_ratio"', "roller followers only"]),
    (_swap("roller_radius = 10.0\noffset", "roller_radius = 0.0\noffset"),
     [f"{LIFT}, limits", 'key "curvature_ratio"', "knife edge"]),
    (_swap("curvature_ratio = 2.5", "curvature_ratio = 2.5\nmin_radius = nan"), [f"{LIFT}, limits", 'key "min_radius"', "finite"]),
    (_swap("follower_mass = 1.5\n", ""), [f"{LIFT}, loads", 'key "follower_mass"', "is missing"]),
    (_swap("follower_mass = 1.5", 'follower_mass = "heavy"'), [f"{LIFT}, loads", 'key "follower_mass"', "must be a number"]),
    (_swap("follower_mass = 1.5", "follower_mass = 0.0"), [f"{LIFT}, loads", 'key "follower_mass"', "positive"]),
    (_swap("spring_rate = 5.0", "spring_rate = -5.0"), [f"{LIFT}, loads", 'key "spring_rate"', "zero or more"]),
    (_swap("preload = 80.0", "preload = -1.0"), [f"{LIFT}, loads", 'key "preload"', "zero or more"]),
    (_swap("margin = 20.0", "margin = -20.0"), [f"{LIFT}, loads", 'key "margin"', "zero or more"]),
    (_swap("margin = 20.0", "margin = 20.0\nradius = 50.0"), [f"{LIFT}, loads", 'key "radius"', "oscillating followers only"]),
    (_swap("margin = 20.0", "margin = 20.0\nspring = 3"), [f"{LIFT}, loads", 'key "spring"', "not a known key"]),
    (_swap("\nradius = 60.0", "\nradius = 0.0"), [f"{SWING}, loads", 'key "radius"', "positive"]),
    # a misspelt key is named as such, not reported as the key it should have been
    (_swap("arm_length = 80.0", "arm_lenght = 80.0"), [f"{SWING}, follower", 'key "arm_lenght"', "not a known key"]),
    (_swap("follower_mass = 1.5", "follower_mas = 1.5"), [f"{LIFT}, loads", 'key "follower_mas"', "not a known key"]),
    # a follower type changed without its axis: the motion mismatch comes first
    (_swap('type = "oscillating-roller"', 'type = "translating-roller"'),
     [f"{SWING}, follower", 'key "type"', "needs an axis in mm"]),
    (_swap('name = "flat-cam"', 'name = "lift-cam"'), [LIFT, 'key "name"', "unique"]),
    (_swap('name = "flat-cam"', 'name = " "'), ['cam 3', 'key "name"', "must not be empty"]),
    (_swap('name = "flat-cam"\n', ""), ["cam 3", 'key "name"', "is missing"]),
]


@pytest.mark.parametrize("edit, words", BAD)
def test_bad_cam_input_gives_one_clear_message(tmp_path, capsys, edit, words):
    path = tmp_path / "bad.toml"
    path.write_text(edit(GOOD))
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    assert message.startswith(str(path))
    for w in words:
        assert w in message, message
    # the command line says the same on one line of stderr, exit code 2
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err and str(path) in err and words[1] in err


def test_oscillating_flat_loads_need_a_radius(tmp_path):
    text = GOOD.replace(
        'type = "oscillating-roller"\npivot_distance = 110.0\narm_length = 80.0\nprime_radius = 55.0\nroller_radius = 10.0',
        'type = "oscillating-flat"\npivot_distance = 120.0\nbase_radius = 45.0\nface_offset = 5.0',
    ).replace("\nradius = 60.0\n", "\n")
    with pytest.raises(ProjectError) as info:
        loads_project(text, "rig.toml")
    assert f"{SWING}, loads" in info.value.message and 'key "radius"' in info.value.message
    # with a radius it loads, and the loads act there
    fixed = text.replace("preload = 30.0\n", "preload = 30.0\nradius = 70.0\n")
    project = loads_project(fixed, "rig.toml")
    swing = cam_specs(project)[1]
    assert swing.follower == "oscillating-flat" and follower_load(swing).preload == pytest.approx(30.0 * 0.070)


def test_loads_spec_reduced_mass_is_a_third_of_the_spring():
    # common practice: a helical spring with one end fixed moves a third of its mass with the follower
    assert CamLoadsSpec(follower_mass=2.0, spring_rate=1.0, preload=0.0, spring_mass=0.9).mass == pytest.approx(2.3)
    assert CamLoadsSpec(follower_mass=2.0, spring_rate=1.0, preload=0.0).mass == 2.0
