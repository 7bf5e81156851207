"""`camwright profile`: CSV points, DXF outline and SVG drawing of a cam, each
read back and compared with the others, with the cam solver, and with the
eccentric-disk closed form."""

import csv
import io
import math
import os
import xml.etree.ElementTree as ET

import ezdxf
import numpy as np
import pytest

from solver.cam import Cam, TranslatingRoller, Turning, analyse, closed_outline, motion_from_program
from workbench.cli import main
from workbench.presets import preset_path
from workbench.projectfile import loads_project

from test_camfile import GOOD

PRESS = str(preset_path("cam-press"))
SVG_NS = "{http://www.w3.org/2000/svg}"


def profile(capsys, *argv):
    code = main(["profile", *argv])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def read_csv(path):
    rows = list(csv.reader(io.StringIO(path.read_text())))
    return rows[0], np.array([[float(x) for x in row] for row in rows[1:]])


@pytest.fixture()
def stamp_files(tmp_path, capsys):
    out = {}
    for fmt in ("csv", "dxf", "svg"):
        path = tmp_path / f"stamp.{fmt}"
        code, _, err = profile(capsys, PRESS, "--cam", "stamp-cam", "--out", str(path))
        assert code == 0 and "wrote" in err, err
        out[fmt] = path
    return out


def test_csv_header_units_and_closure(stamp_files):
    header, rows = read_csv(stamp_files["csv"])
    assert header == ["cam angle [deg]", "follower [mm]", "profile x [mm]", "profile y [mm]",
                      "pitch x [mm]", "pitch y [mm]", "pressure angle [deg]", "profile radius [mm]"]
    assert len(rows) == 3600 + 1
    assert rows[0, 0] == 0.0 and rows[-1, 0] == 360.0 and np.allclose(np.diff(rows[:, 0]), 0.1)
    # the point list closes on itself: the 360° row is the 0° row
    assert np.array_equal(rows[-1, 1:], rows[0, 1:])
    # and has no step anywhere: neighbours are never further apart than a 0.1° arc of the pitch curve
    step = np.hypot(*np.diff(rows[:, 2:4], axis=0).T)
    reach = np.hypot(rows[:, 4], rows[:, 5]).max() * math.radians(0.1)
    assert step.max() < 1.5 * reach


def test_csv_points_are_the_solver_profile(stamp_files):
    _, rows = read_csv(stamp_files["csv"])
    project = loads_project(preset_path("cam-press").read_text(), PRESS)
    a = analyse(Cam(motion_from_program(project.programs["stamp"], 1e-3),
                    TranslatingRoller(0.060, 0.012, 0.006), Turning.CLOCKWISE))
    np.testing.assert_allclose(rows[:-1, 2:4], a.profile * 1e3, rtol=0, atol=1e-12)
    np.testing.assert_allclose(rows[:-1, 4:6], a.pitch * 1e3, rtol=0, atol=1e-12)
    np.testing.assert_allclose(rows[:-1, 1], a.lift * 1e3, rtol=0, atol=1e-12)
    np.testing.assert_allclose(rows[:-1, 6], np.degrees(a.pressure_angle), rtol=1e-12)
    # the roller profile lies one roller radius from the pitch curve (offset curve)
    gap = np.hypot(rows[:, 4] - rows[:, 2], rows[:, 5] - rows[:, 3])
    np.testing.assert_allclose(gap, 12.0, rtol=1e-9)


def test_dxf_reads_back_and_matches_the_csv(stamp_files):
    doc = ezdxf.readfile(stamp_files["dxf"])
    assert doc.header["$INSUNITS"] == 4  # millimetres
    msp = doc.modelspace()
    outlines = msp.query('LWPOLYLINE[layer=="CAM-PROFILE"]')
    assert len(outlines) == 1
    outline = outlines[0]
    assert outline.closed
    points = np.array([(x, y) for x, y, *_ in outline.get_points()])
    _, rows = read_csv(stamp_files["csv"])
    csv_points = rows[:-1, 2:4]
    assert len(points) == len(csv_points)
    # the outline runs counter-clockwise from the point for cam angle 0; the cam turns
    # clockwise, so cam-angle order is already counter-clockwise: the same points, same order
    np.testing.assert_allclose(points, csv_points, rtol=0, atol=1e-9)
    area2 = np.dot(points[:, 0], np.roll(points[:, 1], -1)) - np.dot(np.roll(points[:, 0], -1), points[:, 1])
    assert area2 > 0  # counter-clockwise
    pitch = msp.query('LWPOLYLINE[layer=="CAM-PITCH"]')[0]
    np.testing.assert_allclose([(x, y) for x, y, *_ in pitch.get_points()], rows[:-1, 4:6], atol=1e-9)
    circle = msp.query('CIRCLE[layer=="CAM-BASE-CIRCLE"]')[0]
    assert circle.dxf.radius == pytest.approx(60.0 - 12.0) and tuple(circle.dxf.center)[:2] == (0.0, 0.0)
    assert len(msp.query('LINE[layer=="CAM-CENTRE"]')) == 3
    notes = msp.query('MTEXT[layer=="CAM-NOTES"]')[0].text
    assert "stamp-cam" in notes and "machinery-safety" in notes


def test_svg_is_well_formed_with_three_curves(stamp_files):
    root = ET.parse(stamp_files["svg"]).getroot()
    assert root.tag == f"{SVG_NS}svg" and root.get("width").endswith("mm")
    ids = {e.get("id"): e for e in root.iter() if e.get("id")}
    assert {"profile", "pitch-curve", "base-circle"} <= set(ids)
    assert float(ids["base-circle"].get("r")) == pytest.approx(48.0)
    # the profile path is the closed outline in mm, y flipped for SVG
    d = ids["profile"].get("d")
    assert d.startswith("M ") and d.endswith(" Z")
    pts = np.array([[float(v) for v in pair.split(",")] for pair in d[2:-2].split()])
    project = loads_project(preset_path("cam-press").read_text(), PRESS)
    a = analyse(Cam(motion_from_program(project.programs["stamp"], 1e-3),
                    TranslatingRoller(0.060, 0.012, 0.006), Turning.CLOCKWISE))
    want = closed_outline(a)[:-1] * 1e3 * np.array([1.0, -1.0])
    np.testing.assert_allclose(pts, want, atol=1e-4)  # written to 0.1 µm
    text = " ".join(t.text or "" for t in root.iter(f"{SVG_NS}text"))
    assert "cam stamp-cam" in text and "translating roller" in text
    assert "ALL CHECKS PASS" in text and "pressure angle" in text and "no undercut" in text
    assert "machinery-safety" in text


def test_eccentric_disk_flat_face_profile_is_a_circle(tmp_path, capsys):
    # DESIGN §5 exact check: a radial flat-faced follower on an eccentric disk moves
    # s = ε(1 − cos θ) — two harmonic segments of lift 2ε over 180° each — so feeding
    # that motion back must give a circle of radius Rb + ε whose centre lies ε from the
    # shaft. The DXF outline and the CSV points must both lie on it.
    eps, rb = 8.0, 40.0
    text = f"""version = 1
[machine]
speed = 60
[[axis]]
name = "lift"
unit = "mm"
[[axis.segment]]
law = "harmonic"
span = 180.0
to = {2 * eps}
[[axis.segment]]
law = "harmonic"
span = 180.0
to = 0.0
[[cam]]
name = "eccentric"
axis = "lift"
turning = "ccw"
[cam.follower]
type = "translating-flat"
base_radius = {rb}
"""
    path = tmp_path / "ecc.toml"
    path.write_text(text)
    dxf, table = tmp_path / "ecc.dxf", tmp_path / "ecc.csv"
    assert profile(capsys, str(path), "--cam", "eccentric", "--out", str(dxf), "--points", "720")[0] == 0
    assert profile(capsys, str(path), "--cam", "eccentric", "--out", str(table), "--points", "720")[0] == 0
    outline = ezdxf.readfile(dxf).modelspace().query("LWPOLYLINE")[0]
    pts = np.array([(x, y) for x, y, *_ in outline.get_points()])
    _, rows = read_csv(table)
    for xy in (pts, rows[:-1, 2:4]):  # the CSV without its closing row
        centre = xy.mean(axis=0)  # uniform in cam angle on a circle: the mean is the centre
        assert math.hypot(*centre) == pytest.approx(eps, rel=1e-9)
        np.testing.assert_allclose(np.hypot(*(xy - centre).T), rb + eps, rtol=1e-9)
    assert len(pts) == 720 and len(rows) == 721


def test_points_option_and_stdout(capsys):
    code, out, _ = profile(capsys, PRESS, "--cam", "feed-cam", "--format", "csv", "--points", "360")
    rows = list(csv.reader(io.StringIO(out)))
    assert code == 0 and len(rows) == 1 + 361
    assert rows[0][1] == "follower [deg]"  # an oscillating follower: the arm angle
    assert rows[1][0] == "0.0" and rows[-1][0] == "360.0"


@pytest.mark.parametrize("points", ["10", "abc", "1e9", "36.5"])
def test_bad_points_is_exit_2(points):
    with pytest.raises(SystemExit) as info:
        main(["profile", PRESS, "--cam", "stamp-cam", "--format", "csv", "--points", points])
    assert info.value.code == 2


def test_unknown_cam_and_missing_format_are_exit_2(tmp_path, capsys):
    code, out, err = profile(capsys, PRESS, "--cam", "nope", "--format", "svg")
    assert code == 2 and out == "" and 'key "--cam"' in err and "stamp-cam" in err and "Traceback" not in err
    code, _, err = profile(capsys, PRESS, "--cam", "stamp-cam", "--out", str(tmp_path / "cam.txt"))
    assert code == 2 and not (tmp_path / "cam.txt").exists()
    assert err.startswith("camwright profile: --out ") and "txt is not a format it writes (csv, dxf, svg)" in err
    code, _, err = profile(capsys, PRESS, "--cam", "stamp-cam")
    assert code == 2 and err.startswith("camwright profile: --format is missing") and "Traceback" not in err


def test_writes_are_atomic_and_replace(tmp_path, capsys):
    target = tmp_path / "cam.svg"
    target.write_text("old")
    assert profile(capsys, PRESS, "--cam", "stripper-cam", "--out", str(target))[0] == 0
    assert os.listdir(tmp_path) == ["cam.svg"] and target.read_text().startswith("<?xml")


def test_flat_face_svg_has_no_pitch_curve(tmp_path, capsys):
    target = tmp_path / "strip.svg"
    assert profile(capsys, PRESS, "--cam", "stripper-cam", "--out", str(target))[0] == 0
    ids = {e.get("id") for e in ET.parse(target).getroot().iter() if e.get("id")}
    assert {"profile", "base-circle"} <= ids and "pitch-curve" not in ids


def undercut_file(tmp_path):
    steep = GOOD.replace("span = 120.0\nto = 20.0", "span = 40.0\nto = 20.0").replace(
        'span = 60.0\n\n[[axis.segment]]\nlaw = "cycloidal"', 'span = 140.0\n\n[[axis.segment]]\nlaw = "cycloidal"', 1)
    steep = steep.replace("roller_radius = 10.0\noffset", "roller_radius = 40.0\noffset").replace(
        "curvature_ratio = 2.5\n", "")
    path = tmp_path / "undercut.toml"
    path.write_text(steep)
    return path


def test_uncuttable_outline_refuses_dxf_unless_forced(tmp_path, capsys):
    path = undercut_file(tmp_path)
    dxf = tmp_path / "cut.dxf"
    code, _, err = profile(capsys, str(path), "--cam", "lift-cam", "--out", str(dxf))
    assert code == 1 and not dxf.exists() and "undercut from" in err and "--force" in err
    code, _, err = profile(capsys, str(path), "--cam", "lift-cam", "--out", str(dxf), "--force")
    assert code == 1 and dxf.exists() and "UNDERCUT" in err
    # CSV and SVG are for looking at it: written, with the warning and exit code 1
    svg = tmp_path / "cut.svg"
    code, _, err = profile(capsys, str(path), "--cam", "lift-cam", "--out", str(svg))
    assert code == 1 and "CHECK FAILED" in svg.read_text() and "UNDERCUT" in err
