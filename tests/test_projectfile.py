"""The project file (DESIGN §6): round trip, atomic saves, and one clear
message naming file, table and key for each kind of bad input."""

import os
import subprocess
import sys
from pathlib import Path

import pytest

from workbench.cli import main
from workbench.presets import preset_names, preset_path
from workbench.projectfile import ProjectError, dumps, load_project, loads_project, save_project

GOOD = """\
version = 1

[machine]
name = "Test rig"
speed = 120

[[axis]]
name = "lid-lift"
unit = "mm"
start = 0.0

[axis.limits]
velocity = 900.0
acceleration = 25000.0
jerk = 7.0e5

[[axis.segment]]
law = "cycloidal"
span = 90.0
to = 40.0

[[axis.segment]]
law = "dwell"
span = 150.0

[[axis.segment]]
law = "modified-sine"
span = 120.0
to = 0.0
"""


@pytest.mark.parametrize("name", preset_names())
def test_presets_round_trip(tmp_path, name):
    first = load_project(preset_path(name))
    out = tmp_path / "copy.toml"
    save_project(first, out)
    second = load_project(out)
    assert second.machine == first.machine
    assert second.axes == first.axes
    assert dumps(second) == dumps(first)


def test_round_trip_keeps_cycle_time_and_polynomial_conditions(tmp_path):
    text = GOOD.replace("speed = 120", "cycle_time = 0.5").replace(
        'law = "cycloidal"\nspan = 90.0\nto = 40.0',
        'law = "polynomial"\nspan = 90.0\nto = 40.0\nstart = { velocity = 0.0 }\nend = { velocity = 0.0, acceleration = 0.0 }',
    )
    p = loads_project(text, "x.toml")
    again = loads_project(dumps(p), "y.toml")
    assert again.machine.cycle_time == 0.5 and again.machine.speed is None
    assert again.axes == p.axes
    assert again.axes[0].segments[0].end.acceleration == 0.0


def test_save_is_atomic_and_leaves_no_temp_files(tmp_path):
    target = tmp_path / "p.toml"
    target.write_text(GOOD)
    project = load_project(target)
    save_project(project)
    assert sorted(os.listdir(tmp_path)) == ["p.toml"]
    assert load_project(target).axes == project.axes


def test_failed_save_keeps_the_old_file(tmp_path, monkeypatch):
    target = tmp_path / "p.toml"
    target.write_text(GOOD)
    project = load_project(target)

    def broken(*args, **kwargs):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", broken)
    with pytest.raises(OSError):
        save_project(project)
    assert target.read_text() == GOOD
    assert sorted(os.listdir(tmp_path)) == ["p.toml"]


BAD = [
    # (edit of GOOD, words that must appear in the message)
    (lambda t: t.replace("span = 90.0", "span = -90.0"), ['axis "lid-lift", segment 1', 'key "span"', "positive"]),
    (lambda t: t.replace("span = 90.0", "span = 0"), ['segment 1', 'key "span"', "positive"]),
    (lambda t: t.replace("span = 150.0", "span = 140.0"), ['axis "lid-lift"', 'key "span"', "350"]),
    (lambda t: t.replace("span = 150.0", 'span = "150"'), ['segment 2', 'key "span"', "number"]),
    (lambda t: t.replace('"cycloidal"', '"cycloid"'), ['segment 1', 'key "law"', "unknown law 'cycloid'"]),
    (lambda t: t.replace("to = 0.0", "to = 1.0"), ['segment 3', 'key "to"', "not at its start"]),
    (lambda t: t.replace("jerk = 7.0e5", "jerk = 7.0e5\nsnap = 1.0"), ['axis "lid-lift", limits', 'key "snap"', "not a known key"]),
    (lambda t: t.replace("velocity = 900.0", "velocity = -900.0"), ['limits', 'key "velocity"', "positive"]),
    (lambda t: t.replace("speed = 120", ""), ["machine", 'key "speed"', "exactly one"]),
    (lambda t: t.replace("speed = 120", "speed = 120\ncycle_time = 0.5"), ["machine", "exactly one"]),
    (lambda t: t.replace("speed = 120", "speed = 0"), ["machine", 'key "speed"', "positive"]),
    (lambda t: t + t[t.index("[[axis]]"):], ['axis "lid-lift"', 'key "name"', "unique"]),
    (lambda t: t.replace("version = 1", "version = 2"), ['key "version"', "must be 1"]),
    (lambda t: t.replace('unit = "mm"', 'unit = "inch"'), ['axis "lid-lift"', 'key "unit"', "'mm'"]),
    (lambda t: t.replace("[machine]", "colour = 3\n[machine]"), ['key "colour"', "not a known key"]),
    (lambda t: t.replace("span = 90.0\nto = 40.0", "span = 90.0"), ["segment 1", 'key "to"', "needs an end position"]),
    (lambda t: t.replace("span = 90.0", "span = 90.0\nspan = 91.0"), ["not valid TOML"]),
    (lambda t: t.replace("start = 0.0", "start = nan"), ['axis "lid-lift"', 'key "start"', "finite"]),
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
    # The command line says the same in one line on stderr, exit code 2.
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "Traceback" not in err and str(path) in err


def test_missing_file_exit_2_without_traceback(tmp_path):
    result = subprocess.run(
        [sys.executable, "-m", "workbench", "check", str(tmp_path / "nope.toml")],
        capture_output=True, text=True,
    )
    assert result.returncode == 2
    assert "no such file" in result.stderr and "Traceback" not in result.stderr


@pytest.mark.parametrize("path", sorted(Path(__file__).parent.joinpath("data", "bad").glob("*.toml")))
def test_broken_files_folder(path):
    # Each file's first line says which words its message must contain: "# expect: a | b".
    first = path.read_text().splitlines()[0]
    words = [w.strip() for w in first.split(":", 1)[1].split("|")]
    with pytest.raises(ProjectError) as info:
        load_project(path)
    for w in words:
        assert w in info.value.message, info.value.message


@pytest.mark.parametrize("name", preset_names())
def test_saved_layout_is_the_hand_written_one(name):
    # DESIGN §6 layout: [[axis]] blocks with [axis.limits] and [[axis.segment]]
    # headers, never inline arrays of tables; floats read back exactly.
    import tomllib

    from workbench.projectfile import project_data

    project = load_project(preset_path(name))
    text = dumps(project)
    assert "[[axis.segment]]" in text and "segment = [" not in text
    data = project_data(project)
    for entry, saved in zip(data["axis"], tomllib.loads(text)["axis"]):
        if "start" not in saved:  # the default, left unwritten as in the preset
            assert entry.pop("start") == 0.0
    assert tomllib.loads(text) == data


def test_float_text_is_short_and_exact():
    from hypothesis import given, strategies as st

    from workbench.tomlwrite import _float

    assert _float(7.0e5) == "7.0e5" and _float(120.0) == "120.0"

    @given(st.floats(allow_nan=False, allow_infinity=False))
    def exact(v):
        assert float(_float(v)) == v

    exact()


def test_saving_an_edited_file_keeps_its_comments_and_changes_only_what_changed(tmp_path):
    from dataclasses import replace

    from motionlaws import Segment

    source = preset_path("tray-lidder").read_text()
    target = tmp_path / "lidder.toml"
    target.write_text(source)
    project = load_project(target)
    lid = project.axes[0]
    segs = list(lid.segments)
    segs[0] = replace(segs[0], span=100.0)
    segs[1] = replace(segs[1], span=140.0)
    project.axes[0] = replace(lid, segments=tuple(segs))
    pusher = project.axes[1]
    project.axes[1] = replace(pusher, segments=pusher.segments[:2] + (Segment("dwell", 30.0), Segment("dwell", 30.0)) + pusher.segments[3:])
    save_project(project)
    text = target.read_text()
    # every comment line of the original survives
    for line in source.splitlines():
        if line.lstrip().startswith("#"):
            assert line in text
    assert "jerk = 7.0e5" in text  # untouched values keep their own spelling
    again = load_project(target)
    assert again.axes == project.axes and again.machine == project.machine
    # and the changed lines are the only ones that differ for the first axis
    import difflib

    changed = [l for l in difflib.ndiff(source.splitlines(), text.splitlines()) if l[:1] in "+-"]
    assert "- span = 90.0" in changed and "+ span = 100.0" in changed


@pytest.mark.parametrize("name", preset_names())
def test_a_speed_change_saves_as_one_changed_line(tmp_path, name):
    from workbench import editing

    target = tmp_path / f"{name}.toml"
    source = preset_path(name).read_text()
    target.write_text(source)
    project = load_project(target)
    save_project(editing.set_speed(project, project.speed + 5.0))
    before, after = source.splitlines(), target.read_text().splitlines()
    changed = [(a, b) for a, b in zip(before, after) if a != b]
    assert len(before) == len(after) and len(changed) == 1  # no line added (an axis start of 0)
    (old, new), = changed
    key = "speed" if old.startswith("speed") else "cycle_time"
    assert new.startswith(key)
    if key == "speed" and "#" in old:  # a whole number stays one, and the comment keeps its column
        assert "." not in new.split("#")[0] or "." in old.split("#")[0]
        assert new.index("#") == old.index("#")
    assert load_project(target).speed == pytest.approx(project.speed + 5.0, rel=1e-12)


def test_an_axis_start_of_0_is_saved_as_the_file_had_it():
    assert "start = 0.0" in GOOD and "start = 0.0" in dumps(loads_project(GOOD, "x.toml"))
    unwritten = GOOD.replace("start = 0.0\n", "")
    assert "start" not in dumps(loads_project(unwritten, "x.toml"))


def test_comments_stay_with_their_segment_when_segments_are_added_or_removed(tmp_path):
    from workbench import editing

    target = tmp_path / "arm.toml"
    target.write_text(preset_path("label-arm").read_text())  # tamp-pad: dwell, polynomial ×2, cycloidal
    project = load_project(target)
    save_project(editing.delete_segment(project, "tamp-pad", 1))  # the first polynomial ("down fast")
    text = target.read_text()
    assert "down fast" not in text  # its comment went with it …
    assert 'law = "polynomial"          # press: the last 3 mm, easing to rest' in text  # … the others stay
    target.write_text(preset_path("tray-lidder").read_text())  # seal-head: dwell, poly4567, dwell, poly4567
    project = load_project(target)
    edited = editing.insert_segment(project, "seal-head", 0, "cycloidal", 20.0, None, 0)
    save_project(editing.delete_segment(edited, "seal-head", 3))  # the 50° dwell ("sealing")
    text = target.read_text()
    assert "# sealing" not in text and "to = -12.0                  # down onto the lid" in text
    assert load_project(target).axis("seal-head").segments == editing.delete_segment(edited, "seal-head", 3).axis(
        "seal-head").segments


def test_merge_falls_back_to_canonical_layout_when_it_cannot_be_exact(monkeypatch):
    import workbench.projectfile as pf

    project = loads_project(GOOD, "x.toml")
    monkeypatch.setattr(pf, "merge_text", lambda original, data: None)
    text = pf.dumps(project)
    assert "[[axis.segment]]" in text and loads_project(text, "y.toml").axes == project.axes
