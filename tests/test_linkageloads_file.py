"""The [linkage.loads] table of the project file: reading into file units, SI at the edge, round trip,
and one clear message naming file, table and key for every kind of bad value (exit code 2)."""

from __future__ import annotations

import json
import math
from dataclasses import replace

import pytest

import workbench.projectfile as projectfile
from workbench.cli import main
from workbench.linkagefile import linkage_specs
from workbench.linkageloads import (
    BodyLoadSpec,
    ForceSpec,
    LoadsSpec,
    ServoLimitsSpec,
    ServoSpec,
    gearing_of,
    loading_of,
    servo_limits_of,
)
from workbench.presets import preset_path
from workbench.projectfile import ProjectError, dumps, load_project, loads_project, save_project

LOADED_PRESETS = ("slider-crank", "servo-carriage", "crank-rocker")
PUSHER = preset_path("slider-crank").read_text()
CARRIAGE = preset_path("servo-carriage").read_text()


def pusher_loads() -> LoadsSpec:
    return linkage_specs(load_project(preset_path("slider-crank")))[0].loads


def test_the_pusher_s_loads_read_in_file_units():
    loads = pusher_loads()
    assert loads.gravity == (0.0, -9.81)
    assert loads.bodies == (BodyLoadSpec("crank", 0.6, (20.0, 0.0), 600.0), BodyLoadSpec("rod", 0.9, (105.0, 0.0), 3300.0),
                            BodyLoadSpec("head", 2.5, (20.0, 0.0), None))
    assert loads.forces == (ForceSpec("head.face", (-60.0, 0.0), "gas spring"),)
    assert loads.torques == ()
    assert loads.servos == (ServoSpec("motor", None, 20.0, None, 0.9, 4.0, ServoLimitsSpec(0.48, 0.16, 3000.0)),)


def test_si_at_the_edge():
    spec = linkage_specs(load_project(preset_path("servo-carriage")))[0]
    loading = loading_of(spec, spec.loads)
    assert loading.masses["crank"].centre == pytest.approx((0.020, 0.0))  # mm → m
    assert loading.masses["rod"].inertia == pytest.approx(2000e-6)  # kg·mm² → kg·m²
    assert loading.masses["carriage"].centre == (0.0, 0.0)  # centre = "B", at the body's origin
    servo = spec.loads.servo("stroke")
    assert servo.at == "O"
    gearing = gearing_of(servo, "deg")
    assert (gearing.ratio, gearing.efficiency, gearing.rotor_inertia) == pytest.approx((10.0, 0.92, 3e-6))
    limits = servo_limits_of(servo)
    assert limits.speed == pytest.approx(3000.0 * 2 * math.pi / 60)  # rpm → rad/s
    # a travel: a ball screw of 10 mm lead turns the motor 2π rad per 10 mm, i.e. 200π rad/m
    assert gearing_of(ServoSpec("s", lead=10.0), "mm").ratio == pytest.approx(2 * math.pi / 0.010)
    assert gearing_of(ServoSpec("s", ratio=0.1), "mm").ratio == pytest.approx(0.1 * 2 * math.pi * 1e3)


@pytest.mark.parametrize("name", LOADED_PRESETS)
def test_presets_round_trip(tmp_path, name):
    first = load_project(preset_path(name))
    assert linkage_specs(first)[0].loads is not None
    out = tmp_path / "copy.toml"
    save_project(first, out)
    second = load_project(out)
    assert linkage_specs(second) == linkage_specs(first)
    assert dumps(second) == dumps(first)
    text = out.read_text()
    assert "# keeps the pins' play taken up" in text or "# carriage, gripper and label" in text or "# rocker and flap" in text


@pytest.mark.parametrize("name", LOADED_PRESETS)
def test_canonical_layout_reads_back_identical(monkeypatch, name):
    first = load_project(preset_path(name))
    monkeypatch.setattr(projectfile, "merge_text", lambda original, data: None)
    text = projectfile.dumps(first)
    assert "[linkage.loads]" in text and "[[linkage.loads.body]]" in text
    assert linkage_specs(loads_project(text, "again.toml")) == linkage_specs(first)


def test_an_edited_loads_value_is_saved_with_the_comments_kept(tmp_path):
    project = load_project(preset_path("slider-crank"))
    spec = linkage_specs(project)[0]
    bodies = tuple(replace(b, mass=3.0) if b.name == "head" else b for b in spec.loads.bodies)
    servo = replace(spec.loads.servos[0], limits=replace(spec.loads.servos[0].limits, speed=4500.0))
    project.parts["linkage"] = [replace(spec, loads=replace(spec.loads, bodies=bodies, servos=(servo,)))]
    out = tmp_path / "heavier.toml"
    save_project(project, out)
    text = out.read_text()
    assert "mass = 3.0" in text and "speed = 4500.0" in text
    assert "# keeps the pins' play taken up" in text and "# the motor's, from its data sheet" in text
    again = linkage_specs(load_project(out))[0].loads
    assert again.body("head").mass == 3.0 and again.servo("motor").limits.speed == 4500.0
    assert again.body("rod") == spec.loads.body("rod")


def test_a_file_without_loads_keeps_working():
    text = PUSHER[: PUSHER.index("[linkage.loads]")]
    spec = linkage_specs(loads_project(text, "plain.toml"))[0]
    assert spec.loads is None
    assert "[linkage.loads]" not in dumps(loads_project(text, "plain.toml"))


def pusher_with(old: str, new: str) -> str:
    assert old in PUSHER, old
    return PUSHER.replace(old, new, 1)


def carriage_with(old: str, new: str) -> str:
    assert old in CARRIAGE, old
    return CARRIAGE.replace(old, new, 1)


SERVO = '[[linkage.loads.servo]]\ndriver = "motor"'
BAD = [
    # [linkage.loads] itself
    (pusher_with("gravity = [0.0, -9.81] ", "weight = 2.0\ngravity = [0.0, -9.81] "),
     ['linkage "pusher", loads', 'key "weight"', "not a known key"]),
    (pusher_with("gravity = [0.0, -9.81] ", 'gravity = "down" '),
     ['linkage "pusher", loads', 'key "gravity"', "[x, y] in m/s²"]),
    (pusher_with("gravity = [0.0, -9.81] ", "gravity = [0.0, -9.81, 0.0] "),
     ['linkage "pusher", loads', 'key "gravity"', "must be [x, y]"]),
    (pusher_with("gravity = [0.0, -9.81] ", "gravity = [0.0, nan] "),
     ['linkage "pusher", loads', 'key "gravity"', "finite"]),
    # bodies
    (pusher_with('name = "crank"\nmass = 0.6', 'name = "crnk"\nmass = 0.6'),
     ['linkage "pusher", loads, body "crnk"', 'key "name"', "no body 'crnk'", "crank, rod, head"]),
    (pusher_with('name = "crank"\nmass = 0.6', 'name = "ground"\nmass = 0.6'),
     ['loads, body "ground"', 'key "name"', "does not move"]),
    (pusher_with('name = "rod"\nmass = 0.9', 'name = "crank"\nmass = 0.9'),
     ['loads, body "crank"', 'key "name"', "earlier mass"]),
    (pusher_with("mass = 0.6 ", "mass = -0.6 "),
     ['loads, body "crank"', 'key "mass"', "zero or more (kg)"]),
    (pusher_with("mass = 0.6 ", "weight = 0.6 "),
     ['loads, body "crank"', 'key "weight"', "not a known key"]),
    (pusher_with("mass = 0.6                         # kg\n", ""),
     ['loads, body "crank"', 'key "mass"', "is missing"]),
    (pusher_with("mass = 0.6 ", 'mass = "heavy" '),
     ['loads, body "crank"', 'key "mass"', "must be a number"]),
    (pusher_with("centre = [20.0, 0.0]               # mm, in the crank's frame", 'centre = "Q"'),
     ['loads, body "crank"', 'key "centre"', "no point 'Q'", "O, A"]),
    (pusher_with("centre = [20.0, 0.0]               # mm, in the crank's frame", "centre = [20.0, 0.0, 1.0]"),
     ['loads, body "crank"', 'key "centre"', "[x, y] in mm"]),
    (pusher_with("inertia = 600.0 ", "inertia = -1.0 "),
     ['loads, body "crank"', 'key "inertia"', "zero or more (kg·mm²"]),
    # forces and torques
    (pusher_with('at = "head.face"', 'at = "head"'),
     ['loads, force "gas spring"', 'key "at"', '"body.point"']),
    (pusher_with('at = "head.face"', 'at = "head.nose"'),
     ['loads, force "gas spring"', 'key "at"', "no point 'nose'", "B, face"]),
    (pusher_with('at = "head.face"', 'at = "ground.O"'),
     ['loads, force "gas spring"', 'key "at"', "ground does not move"]),
    (pusher_with('at = "head.face"', 'at = "slide.B"'),
     ['loads, force "gas spring"', 'key "at"', "no body 'slide'"]),
    (pusher_with("force = [-60.0, 0.0] ", "force = -60.0 "),
     ['loads, force "gas spring"', 'key "force"', "[Fx, Fy] in N"]),
    (pusher_with("force = [-60.0, 0.0] ", "push = [-60.0, 0.0] "),
     ['loads, force "gas spring"', 'key "push"', "not a known key"]),
    (pusher_with('name = "gas spring"', 'name = ""'),
     ['loads, force 1', 'key "name"', "must not be empty"]),
    (PUSHER + '\n[[linkage.loads.torque]]\ntorque = 0.5\n',
     ['loads, torque 1', 'key "body"', "is missing"]),
    (PUSHER + '\n[[linkage.loads.torque]]\nbody = "rod"\ntorque = "ccw"\n',
     ['loads, torque 1', 'key "torque"', "must be a number"]),
    (PUSHER + '\n[[linkage.loads.torque]]\nbody = "wheel"\ntorque = 0.5\n',
     ['loads, torque 1', 'key "body"', "no body 'wheel'"]),
    # servos
    (pusher_with(SERVO, '[[linkage.loads.servo]]\ndriver = "motr"'),
     ['loads, servo "motr"', 'key "driver"', "no driver 'motr'", "drivers: motor"]),
    (pusher_with(SERVO, '[[linkage.loads.servo]]\nname = "motor"'),
     ['loads, servo 1', 'key "name"', "not a known key"]),
    (PUSHER + '\n[[linkage.loads.servo]]\ndriver = "motor"\n',
     ['loads, servo "motor"', 'key "driver"', "earlier servo"]),
    (pusher_with("ratio = 20.0 ", "ratio = 20.0\nlead = 5.0 "),
     ['loads, servo "motor"', 'key "lead"', "ratio or lead, not both"]),
    (pusher_with("ratio = 20.0 ", "lead = 5.0 "),
     ['loads, servo "motor"', 'key "lead"', "moves an angle"]),
    (pusher_with("ratio = 20.0 ", "ratio = 0.0 "),
     ['loads, servo "motor"', 'key "ratio"', "must be positive"]),
    (pusher_with("efficiency = 0.9 ", "efficiency = 1.2 "),
     ['loads, servo "motor"', 'key "efficiency"', "at most 1"]),
    (pusher_with("efficiency = 0.9 ", "efficiency = 0.0 "),
     ['loads, servo "motor"', 'key "efficiency"', "must be positive"]),
    (pusher_with("rotor_inertia = 4.0 ", "rotor_inertia = -4.0 "),
     ['loads, servo "motor"', 'key "rotor_inertia"', "zero or more (kg·mm²)"]),
    (pusher_with("speed = 3000.0 ", "speed = -3000.0 "),
     ['loads, servo "motor", limits', 'key "speed"', "must be positive"]),
    (pusher_with("speed = 3000.0 ", "rpm = 3000.0 "),
     ['loads, servo "motor", limits', 'key "rpm"', "not a known key"]),
    (pusher_with(SERVO, SERVO + '\nat = "O"'),
     ['loads, servo "motor"', 'key "at"', "driver 'motor' moves already"]),
    (pusher_with(SERVO, SERVO + '\nat = "Z"'),
     ['loads, servo "motor"', 'key "at"', "no joint 'Z'", "O, A, B, slide"]),
    (carriage_with('at = "O" ', 'at = "rail" '),
     ['linkage "drive", loads, servo "stroke"', 'key "at"', "driver 'stroke' moves already"]),
    (carriage_with('at = "O" ', "").replace("ratio = 10.0 ", "# no ratio "),
     ['linkage "drive", loads, servo "stroke"', 'key "lead"', "moves a travel", "linear motor"]),
    (carriage_with('centre = "B" ', 'centre = "A" '),
     ['linkage "drive", loads, body "carriage"', 'key "centre"', "no point 'A'", "points: B"]),
]


@pytest.mark.parametrize("text, words", BAD, ids=[f"{i}-{w[1]}" for i, (_, w) in enumerate(BAD)])
def test_bad_input_gives_one_clear_message(tmp_path, capsys, text, words):
    path = tmp_path / "bad.toml"
    path.write_text(text)
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    assert message.startswith(str(path))
    for w in words:
        assert w in message, message
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err and str(path) in err and words[-1] in err.replace("\n", " ")


def test_a_lead_screw_sizes_a_motor_on_a_travel(capsys, tmp_path):
    """The carriage driven straight by a belt or screw (no motor at the crank): lead in mm per motor turn."""
    path = tmp_path / "screw.toml"
    path.write_text(carriage_with('at = "O" ', "").replace("ratio = 10.0 ", "lead = 20.0 "))
    assert main(["check", str(path), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    d = doc["linkage_loads"][0]["drivers"][0]
    assert d["of"] == "force along slider rail" and d["effort_unit"] == "N"
    assert d["servo"]["lead"] == 20.0 and d["servo"]["ratio"] is None
    # 20 mm of travel per motor turn: n [rpm] = v [mm/s] / 20 mm × 60 s/min
    peak_mm_s = d["peak_speed"]["value"]
    assert peak_mm_s == pytest.approx(80.0 * 1.760 / (150.0 / 360.0), rel=1e-3)  # modified sine: Cv·h/T (DESIGN §3)
    assert d["servo"]["motor"]["peak_speed"]["value"] == pytest.approx(peak_mm_s / 20.0 * 60.0, rel=1e-9)


def test_the_readme_example_reads_and_matches_the_presets():
    from pathlib import Path

    readme = (Path(__file__).resolve().parent.parent / "README.md").read_text()
    section = readme[readme.index("### Linkage loads"):]
    start = section.index("```toml") + len("```toml")
    example = section[start: section.index("```", start)]
    torque = example[example.index("[[linkage.loads.torque]]"): example.index("[[linkage.loads.servo]]")]
    pusher = PUSHER[: PUSHER.index("[linkage.loads]")] + example.replace(torque, "")
    loads = linkage_specs(loads_project(pusher, "README.md"))[0].loads
    preset = pusher_loads()
    assert loads.gravity == preset.gravity and loads.body("rod") == preset.body("rod")
    assert loads.forces == preset.forces and loads.servos == preset.servos
    flap_text = preset_path("crank-rocker").read_text()
    flap = flap_text[: flap_text.index("[linkage.loads]")] + "[linkage.loads]\n" + torque
    flap_torque = linkage_specs(load_project(preset_path("crank-rocker")))[0].loads.torques[0]
    assert linkage_specs(loads_project(flap, "README.md"))[0].loads.torques[0] == replace(flap_torque, name=None)
