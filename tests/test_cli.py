"""`camwright check` and `camwright table` as DESIGN §7 pins them."""

import csv
import io
import json
import math

import pytest

from workbench.cli import main
from workbench.presets import preset_names, preset_path

LIDDER = str(preset_path("tray-lidder"))


def run(capsys, *argv):
    code = main(list(argv))
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_check_json_shape_and_exit_code(capsys):
    code, out, _ = run(capsys, "check", LIDDER, "--json")
    doc = json.loads(out)
    assert code == 1 and doc["ok"] is False and doc["speed"] == 120.0
    lid = doc["axes"][0]
    assert lid["name"] == "lid-lift" and lid["unit"] == "mm" and lid["ok"] is False
    assert set(lid["peaks"]) == {"velocity", "acceleration", "jerk"}
    assert lid["peaks"]["velocity"] == {"value": pytest.approx(640.0), "at": 45.0}
    assert lid["peaks"]["acceleration"]["at"] == 22.5
    assert lid["peaks"]["jerk"] == {"value": pytest.approx(808517.99, rel=1e-6), "at": 0.0, "infinite": False}
    assert lid["limits"] == {"velocity": 900.0, "acceleration": 25000.0, "jerk": 7.0e5}
    assert round(lid["max_speed"], 1) == 114.4
    assert {"at": 90.0, "velocity_jump": 0.0, "acceleration_jump": 0.0} in lid["joins"]
    assert "caution" in doc


def test_check_exit_0_when_within(capsys):
    code, out, _ = run(capsys, "check", str(preset_path("label-arm")), "--json")
    assert code == 0 and json.loads(out)["ok"] is True


def test_infinite_jerk_is_null_in_json(capsys):
    code, out, _ = run(capsys, "check", str(preset_path("carton-indexer")), "--json")
    folder = next(a for a in json.loads(out)["axes"] if a["name"] == "flap-folder")
    assert folder["peaks"]["jerk"]["value"] is None and folder["peaks"]["jerk"]["infinite"] is True
    assert folder["peaks"]["jerk"]["at"] in (0.0, 90.0, 150.0, 240.0)


def test_check_human_output_names_verdicts_in_words(capsys):
    code, out, _ = run(capsys, "check", LIDDER)
    assert code == 1
    assert "OVER" in out and "within" in out and "max speed within limits" in out
    assert "machinery-safety" in out
    # units survive rendering (square brackets are not taken for markup)
    assert "velocity [mm/s]" in out and "at [deg]" in out


def test_table_csv(capsys):
    code, out, _ = run(capsys, "table", LIDDER, "--axis", "lid-lift", "--step", "0.5")
    rows = list(csv.reader(io.StringIO(out)))
    assert rows[0] == ["master [deg]", "position [mm]", "velocity [mm/s]", "acceleration [mm/s^2]", "jerk [mm/s^3]"]
    assert len(rows) == 1 + 720 and rows[1][0] == "0.0" and rows[-1][0] == "359.5"
    # full precision: every printed value is the shortest repr that reads back exactly
    for row in rows[1:]:
        for cell in row:
            assert repr(float(cell)) == cell
    # cycloidal rise of 40 mm over 90° at 120 cycles/min: s(45°) = 20, v(45°) = 640 (hand computation)
    mid = rows[1 + 90]
    assert float(mid[0]) == 45.0 and float(mid[1]) == pytest.approx(20.0) and float(mid[2]) == pytest.approx(640.0)


def test_table_unit_and_out_file(tmp_path, capsys):
    out_file = tmp_path / "turret.csv"
    code, out, _ = run(capsys, "table", str(preset_path("carton-indexer")), "--axis", "turret", "--out", str(out_file))
    assert code == 0 and out == ""
    lines = out_file.read_text().splitlines()
    assert lines[0] == "master [deg],position [deg],velocity [deg/s],acceleration [deg/s^2],jerk [deg/s^3]"
    assert len(lines) == 361


def test_table_unknown_axis_is_exit_2(capsys):
    code, _, err = run(capsys, "table", LIDDER, "--axis", "nope")
    assert code == 2 and "lid-lift" in err and "Traceback" not in err


@pytest.mark.parametrize("step", ["0", "-1", "abc", "400"])
def test_table_bad_step_is_exit_2(capsys, step):
    with pytest.raises(SystemExit) as info:
        main(["table", LIDDER, "--axis", "lid-lift", "--step", step])
    assert info.value.code == 2


def test_new_from_preset(tmp_path, capsys):
    target = tmp_path / "mine.toml"
    assert main(["new", str(target), "--from", "label-arm"]) == 0
    assert target.read_text() == preset_path("label-arm").read_text()
    assert main(["new", str(target)]) == 2  # never overwrites silently


# Handbook coefficients (DESIGN §3, from memory of Norton, Rothbart, Chen),
# four significant digits: hand computation agrees within 0.1 %.
HANDBOOK = {
    "cycloidal": (2.000, 6.283, 39.48),
    "poly345": (1.875, 5.774, 60.0),
    "poly4567": (2.188, 7.513, 52.5),
    "modified-trapezoid": (2.000, 4.888, 61.4),
    "modified-sine": (1.760, 5.528, 69.5),
    "harmonic": (1.571, 4.935, 15.50),  # jerk π³/2 inside the segment
}


@pytest.mark.parametrize("name", preset_names())
def test_every_preset_matches_hand_computation(capsys, name):
    """Per segment with a handbook law: v = h·Cv/T, a = h·Ca/T², j = h·Cj/T³,
    T = (β/360)(60/N); axes made only of such laws and dwells: axis peaks too."""
    import tomllib

    raw = tomllib.loads(preset_path(name).read_text())
    machine = raw["machine"]
    n = machine.get("speed") or 60.0 / machine["cycle_time"]
    code, out, _ = run(capsys, "check", str(preset_path(name)), "--json")
    doc = json.loads(out)
    checked = 0
    for axis_raw, axis in zip(raw["axis"], doc["axes"]):
        pos = axis_raw.get("start", 0.0)
        hand_axis = [0.0, 0.0, 0.0]
        pure = True
        for seg_raw, seg in zip(axis_raw["segment"], axis["segments"]):
            law = seg_raw["law"]
            to = seg_raw.get("to", pos)
            h, beta = to - pos, seg_raw["span"]
            pos = to
            if law == "dwell":
                continue
            if law not in HANDBOOK:
                pure = False
                continue
            t = beta / 360 * 60 / n
            want = [abs(h) * c / t ** (k + 1) for k, c in enumerate(HANDBOOK[law])]
            for k, q in enumerate(("velocity", "acceleration", "jerk")):
                assert seg["peaks"][q]["value"] == pytest.approx(want[k], rel=1e-3), (axis["name"], seg["number"], q)
                hand_axis[k] = max(hand_axis[k], want[k])
            checked += 1
        if pure:
            for k, q in enumerate(("velocity", "acceleration", "jerk")):
                peak = axis["peaks"][q]
                if peak.get("infinite"):
                    continue
                assert peak["value"] == pytest.approx(hand_axis[k], rel=1e-3), (axis["name"], q)
    assert checked >= 3
