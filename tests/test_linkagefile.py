"""The [[linkage]] tables of the project file: round trip, and one clear message
naming file, table and key for each kind of bad input (exit code 2)."""

from __future__ import annotations

import pytest

from workbench.cli import main
from workbench.linkagefile import (
    LinkageLoads,
    Target,
    linkage_specs,
    register_linkage_loads,
    transmission_toward,
)
from workbench.linkagemodel import build_linkage
from workbench.presets import preset_path
from workbench.projectfile import ProjectError, dumps, load_project, loads_project, save_project

LINKAGE_PRESETS = ("slider-crank", "crank-rocker", "six-bar-press", "servo-carriage")

GOOD = """\
version = 1

[machine]
name = "Rig"
speed = 60

[[axis]]
name = "swing"
unit = "deg"

[[axis.segment]]
law = "cycloidal"
span = 180.0
to = 40.0

[[axis.segment]]
law = "cycloidal"
span = 180.0
to = 0.0

[[axis]]
name = "push"
unit = "mm"

[[axis.segment]]
law = "poly345"
span = 180.0
to = 50.0

[[axis.segment]]
law = "poly345"
span = 180.0
to = 0.0

[[linkage]]
name = "L"

[linkage.ground]
O = [0.0, 0.0]
G = [0.0, 10.0]

[[linkage.body]]
name = "crank"
place = [0.0, 0.0, 30.0]
points = { O = [0.0, 0.0], A = [40.0, 0.0] }

[[linkage.body]]
name = "rod"
place = [35.0, 20.0, -5.0]
points = { A = [0.0, 0.0], B = [150.0, 0.0] }

[[linkage.body]]
name = "slider"
place = [180.0, 10.0, 0.0]
points = { B = [0.0, 0.0], N = [20.0, 0.0] }

[[linkage.joint]]
name = "O"
pin = ["ground.O", "crank.O"]

[[linkage.joint]]
name = "A"
pin = ["crank.A", "rod.A"]

[[linkage.joint]]
name = "B"
pin = ["rod.B", "slider.B"]

[[linkage.joint]]
name = "slide"
slider = ["ground.G", "slider.B"]
axis = [1.0, 0.0]

[[linkage.driver]]
name = "motor"
joint = "O"
turns = 1.0
offset = 30.0

[[linkage.output]]
name = "stroke"
joint = "slide"

[linkage.output.limits]
velocity = 900.0
acceleration = 20000.0

[[linkage.output]]
name = "rod-angle"
angle = "rod"

[[linkage.output]]
name = "nose-y"
y = "slider.N"

[[linkage.output]]
name = "mu"
transmission = "B"
toward = ["rod.A", "slider.N"]
"""


def rig(text=GOOD):
    return loads_project(text, "rig.toml")


def test_good_file_reads_into_specs_in_file_units():
    spec = linkage_specs(rig())[0]
    assert spec.name == "L"
    assert dict(spec.ground) == {"O": (0.0, 0.0), "G": (0.0, 10.0)}
    assert [b.name for b in spec.bodies] == ["crank", "rod", "slider"]
    assert spec.bodies[0].place == (0.0, 0.0, 30.0)
    assert spec.joint("slide").kind == "slider" and spec.joint("slide").axis == (1.0, 0.0)
    assert spec.drivers[0].turns == 1.0 and spec.drivers[0].offset == 30.0
    assert spec.output("stroke").limits.velocity == 900.0
    assert spec.output("mu").target == Target("transmission", "B", ("rod.A", "slider.N"))


def test_model_is_built_in_si():
    project = rig()
    built = build_linkage(project, linkage_specs(project)[0])
    m = built.mechanism
    assert m.bodies["crank"].points["A"] == pytest.approx((0.040, 0.0))
    assert m.bodies["rod"].guess == pytest.approx((0.035, 0.020, -5.0 * 3.141592653589793 / 180))
    assert built.units == {"stroke": "mm", "rod-angle": "deg", "nose-y": "mm", "mu": "deg"}


def test_transmission_lines_default_to_each_body_s_other_joint_point():
    spec = linkage_specs(rig())[0]
    assert transmission_toward(spec, "A") == ("crank.O", "rod.B")


@pytest.mark.parametrize("name", LINKAGE_PRESETS)
def test_presets_round_trip(tmp_path, name):
    first = load_project(preset_path(name))
    out = tmp_path / "copy.toml"
    save_project(first, out)
    second = load_project(out)
    assert linkage_specs(second) == linkage_specs(first)
    assert dumps(second) == dumps(first)


@pytest.mark.parametrize("name", LINKAGE_PRESETS)
def test_canonical_layout_reads_back_identical(monkeypatch, name):
    import workbench.projectfile as pf

    first = load_project(preset_path(name))
    monkeypatch.setattr(pf, "merge_text", lambda original, data: None)
    text = pf.dumps(first)
    assert "[[linkage.body]]" in text and "[[linkage.joint]]" in text
    assert linkage_specs(loads_project(text, "again.toml")) == linkage_specs(first)


def test_saving_an_edited_linkage_keeps_the_comments(tmp_path):
    from dataclasses import replace

    source = preset_path("slider-crank").read_text()
    target = tmp_path / "pusher.toml"
    target.write_text(source)
    project = load_project(target)
    spec = linkage_specs(project)[0]
    crank = replace(spec.bodies[0], points=(("O", (0.0, 0.0)), ("A", (50.0, 0.0))))
    project.parts["linkage"] = [replace(spec, bodies=(crank,) + spec.bodies[1:])]
    save_project(project)
    text = target.read_text()
    for line in source.splitlines():
        if line.lstrip().startswith("#"):
            assert line in text
    assert "A = [50.0, 0.0]" in text
    assert linkage_specs(load_project(target)) == project.parts["linkage"]


def _drop(text: str, block: str) -> str:
    assert block in text
    return text.replace(block, "")


BAD = [
    # (edit, words the one message must contain)
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crnk.A", "rod.A"]'),
     ['linkage "L", joint "A"', 'key "pin"', "no body 'crnk'", "(bodies: ground, crank, rod, slider)"]),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crank.Z", "rod.A"]'),
     ['joint "A"', 'key "pin"', "body 'crank' has no point 'Z' (points: O, A)"]),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crankA", "rod.A"]'),
     ['joint "A"', 'key "pin"', '"body.point"']),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crank.A"]'),
     ['joint "A"', 'key "pin"', "two points"]),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crank.A", "crank.O"]'),
     ['joint "A"', 'key "pin"', "to itself"]),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crank.A", "rod.A"]\nslider = ["crank.A", "rod.A"]'),
     ['joint "A"', "exactly one of pin, slider, weld"]),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pin = ["crank.A", "rod.A"]\nangle = 3.0'),
     ['joint "A"', 'key "angle"', "slider or weld"]),
    (lambda t: t.replace('pin = ["crank.A", "rod.A"]', 'pn = ["crank.A", "rod.A"]'),
     ['joint "A"', 'key "pn"', "not a known key"]),
    (lambda t: t.replace("axis = [1.0, 0.0]", "axis = [0.0, 0.0]"),
     ['joint "slide"', 'key "axis"', "[0, 0]"]),
    (lambda t: t.replace("axis = [1.0, 0.0]", "axis = [1.0]"),
     ['joint "slide"', 'key "axis"', "[x, y]"]),
    (lambda t: t.replace('name = "rod"\nplace', 'name = "crank"\nplace'),
     ['body "crank"', 'key "name"', "earlier body"]),
    (lambda t: t.replace('name = "rod"\nplace', 'name = "ground"\nplace'),
     ['key "name"', "[linkage.ground]"]),
    (lambda t: t.replace('name = "rod"\nplace', 'name = "r.od"\nplace'),
     ['key "name"', "dot"]),
    (lambda t: t.replace("place = [35.0, 20.0, -5.0]", "place = [35.0, 20.0]"),
     ['body "rod"', 'key "place"', "[x, y, angle]"]),
    (lambda t: t.replace("place = [35.0, 20.0, -5.0]", "palce = [35.0, 20.0, -5.0]"),
     ['body "rod"', 'key "palce"', "not a known key"]),
    (lambda t: t.replace("place = [35.0, 20.0, -5.0]\n", ""),
     ['body "rod"', 'key "place"', "missing"]),
    (lambda t: t.replace("B = [150.0, 0.0]", 'B = [150.0, "x"]'),
     ['body "rod"', 'key "points"', "point 'B'", "[x, y] in mm"]),
    (lambda t: t.replace("B = [150.0, 0.0]", "B = [150.0, nan]"),
     ['body "rod"', 'key "points"', "finite"]),
    (lambda t: t.replace("G = [0.0, 10.0]", "G = 10.0"),
     ['linkage "L", ground', 'key "G"', "point 'G' must be [x, y] in mm"]),
    (lambda t: t.replace('axis = [1.0, 0.0]\n\n[[linkage.driver]]\nname = "motor"\njoint = "O"\nturns = 1.0',
                         'axis = [1.0, 0.0]\n\n[[linkage.driver]]\nname = "motor"\njoint = "O"\naxis = "nope"'),
     ['driver "motor"', 'key "axis"', "no axis 'nope' in this file (axes: swing, push)"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "O"\naxis = "push"'),
     ['driver "motor"', 'key "axis"', "axis 'push' is in mm, but the angle at pin O is in deg"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "slide"\naxis = "swing"'),
     ['driver "motor"', 'key "axis"', "axis 'swing' is in deg, but the travel on slider slide is in mm"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "O"\nturns = 0.5'),
     ['driver "motor"', 'key "turns"', "whole number"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "slide"\nturns = 1.0'),
     ['driver "motor"', 'key "turns"', "turns an angle"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "O"\nturns = 1.0\naxis = "swing"'),
     ['driver "motor"', 'key "axis"', "exactly one of axis"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "O"'),
     ['driver "motor"', 'key "axis"', "exactly one of axis"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'joint = "Q"\nturns = 1.0'),
     ['driver "motor"', 'key "joint"', "no joint 'Q' (joints: O, A, B, slide)"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'angle = "crnk"\nturns = 1.0'),
     ['driver "motor"', 'key "angle"', "no body 'crnk' (bodies: crank, rod, slider)"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'x = "ground.G"\naxis = "push"'),
     ['driver "motor"', 'key "x"', "on the ground"]),
    (lambda t: t.replace('joint = "O"\nturns = 1.0', 'transmission = "B"\nturns = 1.0'),
     ['driver "motor"', 'key "transmission"', "reported, not driven"]),
    (lambda t: t.replace('name = "motor"', 'name = "slide"'),
     ['driver "slide"', 'key "name"', "name of a joint"]),
    (lambda t: t.replace('name = "stroke"\njoint = "slide"', 'name = "stroke"\njoint = "slide"\nx = "slider.B"'),
     ['output "stroke"', 'key "x"', "exactly one of joint, angle, x, y, transmission"]),
    (lambda t: t.replace('name = "rod-angle"', 'name = "stroke"'),
     ['output "stroke"', 'key "name"', "earlier output"]),
    (lambda t: t.replace("velocity = 900.0", "velocity = -900.0"),
     ['output "stroke", limits', 'key "velocity"', "positive"]),
    (lambda t: t.replace("acceleration = 20000.0", "acceleration = 20000.0\nsnap = 1.0"),
     ['output "stroke", limits', 'key "snap"', "not a known key"]),
    (lambda t: t.replace('transmission = "B"', 'transmission = "slide"'),
     ['output "mu"', 'key "transmission"', "is a slider: a transmission angle is taken at a pin"]),
    (lambda t: t.replace('toward = ["rod.A", "slider.N"]', 'toward = ["crank.A", "slider.N"]'),
     ['output "mu"', 'key "toward"', "not on a body of pin 'B' (rod, slider)"]),
    (lambda t: t.replace('toward = ["rod.A", "slider.N"]', 'toward = ["rod.B", "slider.N"]'),
     ['output "mu"', 'key "toward"', "sits on the pin"]),
    (lambda t: t.replace('toward = ["rod.A", "slider.N"]\n', ""),
     ['output "mu"', 'key "toward"', "body 'slider' has 0 other joint points"]),
    (lambda t: t.replace('y = "slider.N"', 'y = "slider.N"\ntoward = ["rod.A", "slider.N"]'),
     ['output "nose-y"', 'key "toward"', "transmission output only"]),
    (lambda t: t + "\n[linkage.loads]\ncrank = 1.0\n",
     ['linkage "L", loads', 'key "crank"', "not a known key"]),
    (lambda t: t.replace('[[linkage]]\nname = "L"', '[[linkage]]\nname = "L"\ncolour = "red"'),
     ['linkage "L"', 'key "colour"', "not a known key"]),
    (lambda t: t.replace('[[linkage]]\nname = "L"', '[[linkage]]\nname = "L.1"'),
     ['key "name"', "dot"]),
    (lambda t: t + t[t.index("[[linkage]]"):],
     ['linkage "L"', 'key "name"', "earlier linkage"]),
    (lambda t: t[: t.index("[[linkage.body]]")],
     ['linkage "L"', 'key "body"', "is missing"]),
]


@pytest.mark.parametrize("edit, words", BAD)
def test_bad_input_gives_one_clear_message(tmp_path, capsys, edit, words):
    path = tmp_path / "bad.toml"
    path.write_text(edit(GOOD))
    with pytest.raises(ProjectError) as info:
        load_project(path)
    message = info.value.message
    assert message.startswith(str(path))
    for w in words:
        assert w in message, message
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err and str(path) in err and words[-1] in err.replace("\n", " ")


def test_an_indexing_axis_drives_only_whole_turns():
    base = GOOD.replace('joint = "O"\nturns = 1.0', 'joint = "O"\naxis = "swing"')
    index_quarter = base.replace('unit = "deg"\n', 'unit = "deg"\nindex = 90.0\n').replace(
        "span = 180.0\nto = 0.0", "span = 180.0\nto = 90.0", 1)
    with pytest.raises(ProjectError) as info:
        loads_project(index_quarter, "rig.toml")
    assert 'key "axis"' in info.value.message and "advances 90 deg" in info.value.message
    whole_turn = base.replace('unit = "deg"\n', 'unit = "deg"\nindex = 360.0\n').replace(
        "span = 180.0\nto = 0.0", "span = 180.0\nto = 360.0", 1)
    assert linkage_specs(loads_project(whole_turn, "rig.toml"))[0].drivers[0].axis == "swing"


def test_loads_table_goes_to_a_registered_reader_and_round_trips(monkeypatch):
    """The place kept for linkage loads: a reader registered for [linkage.loads] gets the
    table and the linkage read so far; what it returns is kept and dumped back."""
    monkeypatch.setattr("workbench.linkagefile.LOADS", [])

    def parse(table, spec):
        masses = {}
        for body in [b.name for b in spec.bodies]:
            value = table.number(body)
            if value is not None:
                masses[body] = value
        table.done()
        return tuple(sorted(masses.items()))

    register_linkage_loads(LinkageLoads(parse, lambda loads: dict(loads)))
    text = GOOD + "\n[linkage.loads]\ncrank = 0.8\nrod = 1.2\n"
    project = loads_project(text, "rig.toml")
    assert linkage_specs(project)[0].loads == (("crank", 0.8), ("rod", 1.2))
    again = loads_project(dumps(project), "again.toml")
    assert linkage_specs(again) == linkage_specs(project)
    with pytest.raises(ProjectError) as info:
        loads_project(GOOD + "\n[linkage.loads]\ncrnk = 0.8\n", "rig.toml")
    assert 'linkage "L", loads' in info.value.message and 'key "crnk"' in info.value.message


def test_the_readme_example_reads_and_matches_the_preset():
    from pathlib import Path

    readme = (Path(__file__).resolve().parent.parent / "README.md").read_text()
    section = readme[readme.index("## Linkages"):]
    example = section[section.index("```toml") + len("```toml"): section.index("```", section.index("```toml") + 7)]
    text = '''version = 1\n\n[machine]\nspeed = 80\n''' + example
    spec = linkage_specs(loads_project(text, "README.md"))[0]
    preset = linkage_specs(load_project(preset_path("slider-crank")))[0]
    assert spec.bodies == preset.bodies and spec.joints == preset.joints and spec.drivers == preset.drivers
    assert spec.outputs == preset.outputs[:1]
