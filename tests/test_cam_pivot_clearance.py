"""An oscillating follower's pivot must lie outside the disc its turning cam sweeps.

The clearance is pivot distance − the largest radius of the cam outline (the
profile the follower touches), and the check "pivot clear of the cam" fails
when it is ≤ 0 — geometry, not a rule of thumb.  References:

* Eccentric circular disc: a cam whose outline is a circle of radius R with
  its centre ε off the shaft reaches R + ε from the shaft and no farther
  (triangle inequality: |c + R·u| ≤ |c| + R, equality where u points along
  c) — a closed form.  The follower motion that keeps a roller (or a flat
  face) on that disc comes from the two-circle intersection (the tangent
  line) and is differentiated by sympy, as in tests/test_cam_eccentric.py;
  the pitch curve is then the circle of radius R + r and the profile the
  disc itself (an offset of a circle is a concentric circle).
* Dwell-only cam: the follower never moves, so the outline is the base
  circle — for a roller, prime radius − roller radius (the profile), not
  the prime radius (the pitch curve) — by the definition of the base circle
  (DESIGN §5: the profile is the pitch curve offset by the roller radius).
* The preset's feed cam: the outline laid out by hand — roller centre from
  the arm angle, the pitch curve's normal by central finite differences,
  the profile r inward along it (DESIGN §5) — on a 0.01° grid.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
import sympy as sp
from rich.console import Console
from textual.widgets import Input, Static

from solver.cam import (
    MIN_POINTS,
    Cam,
    OscillatingFlat,
    OscillatingRoller,
    TranslatingRoller,
    Turning,
    analyse,
    cam_points,
    check_cam,
    motion_from_function,
    motion_from_program,
)
from workbench.app import Workbench
from workbench.axisreport import fmt
from workbench.cli import main as cli_main
from workbench.presets import preset_path
from workbench.projectfile import load_project
from workbench.tui.screens.confirm import ChoiceDialog
from workbench.tui.screens.edit_value import EditDialog
from workbench.tui.views.cam import CamView
from workbench.tui.widgets.cam_verdicts import CamVerdicts, angle

from tests.tui_pilot import settle

MM = 1e-3
DISC = 30 * MM  # R
ECC = 8 * MM  # ε
ROLLER = 10 * MM
TILT = 0.37  # rad: the disc centre's direction in the cam frame, off every grid angle used here
TOL = 1e-9  # relative to the layout size, as the analysis promises for its refined extremes
FEED = dict(pivot=100.0, arm=70.0, prime=50.0, roller=10.0)  # presets/cam-press.toml, "feed-cam", mm
SIZE = (100, 30)


def sympy_motion(expr, theta):
    """s(θ), s', s'' from a sympy expression (sympy differentiates)."""
    funcs = [sp.lambdify(theta, sp.diff(expr, theta, k), "numpy") for k in range(3)]
    return motion_from_function(lambda th: tuple(np.broadcast_to(f(th), th.shape) + 0.0 for f in funcs))


def disc_centre(sigma, th):
    """The disc centre in the machine frame at cam angle θ: ε·e^{i(σθ + TILT)}."""
    return ECC * sp.cos(sigma * th + TILT), ECC * sp.sin(sigma * th + TILT)


def roller_on_disc(turning, pivot, arm) -> Cam:
    """An oscillating roller kept on the disc: |pivot − L·e^{−iψ} − c| = R + r (law of cosines)."""
    sigma = int(turning)
    th = sp.symbols("theta", real=True)
    cx, cy = disc_centre(sigma, th)
    qx, qy = pivot - cx, -cy  # the pivot seen from the disc centre
    q = sp.sqrt(qx**2 + qy**2)
    reach = DISC + ROLLER
    psi = sp.acos((q**2 + arm**2 - reach**2) / (2 * arm * q)) - sp.atan2(qy, qx)
    prime = reach - ECC  # the pitch circle's nearest point to the shaft
    follower = OscillatingRoller(pivot, arm, prime, ROLLER)
    return Cam(sympy_motion(psi - follower.initial_arm_angle, th), follower, turning)


def flat_on_disc(turning, pivot, face_offset) -> Cam:
    """An oscillating flat face kept tangent to the disc (the face line one radius from its centre)."""
    sigma = int(turning)
    th = sp.symbols("theta", real=True)
    cx, cy = disc_centre(sigma, th)
    # Face line n·X = d·sin ψ − f with n = (sin ψ, cos ψ); tangent to the disc when
    # n·c + R = d·sin ψ − f, i.e. A·sin ψ − B·cos ψ = R + f with A = d − cx, B = cy.
    A, B = pivot - cx, cy
    psi = sp.atan2(B, A) + sp.asin((DISC + face_offset) / sp.sqrt(A**2 + B**2))
    follower = OscillatingFlat(pivot, DISC - ECC, face_offset)  # base circle: the disc's nearest point
    return Cam(sympy_motion(psi - follower.initial_arm_angle, th), follower, turning)


def farthest_point() -> complex:
    """The disc's point farthest from the shaft, cam frame: (R + ε)·e^{i·TILT} (closed form)."""
    return (DISC + ECC) * complex(math.cos(TILT), math.sin(TILT))


def profile_at(cam: Cam, at: float) -> complex:
    return complex(cam_points(cam, [at]).profile[0])


# --- eccentric disc: closed form R + ε ------------------------------------------------------


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("pivot_mm, clear", [(90.0, True), (35.0, False)])
def test_roller_on_an_eccentric_disc(turning, pivot_mm, clear):
    cam = roller_on_disc(turning, pivot_mm * MM, 60 * MM)
    a = analyse(cam)
    centre = ECC * complex(math.cos(TILT), math.sin(TILT))
    profile = a.profile[:, 0] + 1j * a.profile[:, 1]
    assert np.max(np.abs(np.abs(profile - centre) - DISC)) < TOL * DISC  # the outline is the disc
    # Largest outline radius R + ε (triangle inequality), not the pitch circle's R + r + ε.
    assert a.largest_radius.value == pytest.approx(DISC + ECC, abs=TOL * DISC)
    assert abs(profile_at(cam, a.largest_radius.at) - farthest_point()) < 1e-6 * DISC
    want = pivot_mm * MM - (DISC + ECC)  # +52 mm clear, or the pivot 3 mm inside the disc
    assert a.pivot_clearance.value == pytest.approx(want, abs=TOL * DISC)
    assert a.pivot_clearance.at == a.largest_radius.at
    check = check_cam(a).get("pivot_clearance")
    assert check.ok is clear and check.value == a.pivot_clearance.value and check.limit == 0.0
    if not clear:
        assert not check_cam(a).ok  # one failed check fails the cam


@pytest.mark.parametrize("turning", list(Turning))
@pytest.mark.parametrize("pivot_mm, clear", [(100.0, True), (32.0, False)])
def test_flat_face_on_an_eccentric_disc(turning, pivot_mm, clear):
    cam = flat_on_disc(turning, pivot_mm * MM, -10 * MM)  # the face 10 mm beyond the pivot line
    a = analyse(cam)
    assert a.largest_radius.value == pytest.approx(DISC + ECC, abs=TOL * DISC)  # closed form R + ε
    assert abs(profile_at(cam, a.largest_radius.at) - farthest_point()) < 1e-6 * DISC
    assert a.pivot_clearance.value == pytest.approx(pivot_mm * MM - DISC - ECC, abs=TOL * DISC)
    assert check_cam(a).get("pivot_clearance").ok is clear


def test_the_refined_maximum_finds_what_a_coarse_grid_misses():
    """36 cam angles (10° apart) straddle the farthest point; the refined maximum is R + ε exactly."""
    cam = roller_on_disc(Turning.COUNTERCLOCKWISE, 90 * MM, 60 * MM)
    a = analyse(cam, points=MIN_POINTS)
    grid = a.outline_radius
    assert grid.shape == a.theta.shape
    np.testing.assert_allclose(grid, np.hypot(a.profile[:, 0], a.profile[:, 1]), rtol=1e-14)  # each point's radius
    short = (DISC + ECC) - float(grid.max())
    assert short > 1e-4 * DISC  # the grid alone under-reads (the radius is flat only to 2nd order)
    assert a.largest_radius.value == pytest.approx(DISC + ECC, abs=TOL * DISC)  # closed form R + ε
    assert a.largest_radius.value >= grid.max()


# --- dwell-only cams: the base circle --------------------------------------------------------


STILL = motion_from_function(lambda th: (np.zeros_like(th), np.zeros_like(th), np.zeros_like(th)))


@pytest.mark.parametrize("pivot_mm, clear", [(45.0, True), (40.0, False), (38.0, False)])
def test_dwell_only_roller_outline_is_the_base_circle_not_the_pitch_circle(pivot_mm, clear):
    """Rp 50 mm, r 10 mm: the outline is the 40 mm base circle.  A 45 mm pivot is clear by 5 mm (the
    pitch circle would have said −5 mm); 40 mm sits on the outline and fails (≤ 0); 38 mm is inside."""
    follower = OscillatingRoller(pivot_mm * MM, 70 * MM, 50 * MM, 10 * MM)
    a = analyse(Cam(STILL, follower))
    assert np.max(np.abs(a.outline_radius - 40 * MM)) < 1e-12  # base circle = Rp − r (definition)
    assert a.largest_radius.value == pytest.approx(40 * MM, abs=1e-12)
    assert a.pivot_clearance.value == pytest.approx((pivot_mm - 40.0) * MM, abs=1e-12)
    check = check_cam(a).get("pivot_clearance")
    assert check.ok is clear


def test_dwell_only_flat_face_outline_is_its_base_circle():
    follower = OscillatingFlat(40 * MM, 45 * MM, -10 * MM)  # face beyond the pivot: the pivot 5 mm inside
    a = analyse(Cam(STILL, follower))
    assert a.largest_radius.value == pytest.approx(45 * MM, abs=1e-12)  # base circle (definition)
    assert a.pivot_clearance.value == pytest.approx(-5 * MM, abs=1e-12)
    assert not check_cam(a).get("pivot_clearance").ok


def test_a_translating_follower_has_no_pivot_check():
    a = analyse(Cam(STILL, TranslatingRoller(50 * MM, 10 * MM)))
    assert a.pivot_clearance is None and check_cam(a).get("pivot_clearance") is None
    assert a.largest_radius.value == pytest.approx(40 * MM, abs=1e-12)  # base circle = Rp − r


# --- the preset's feed cam against the outline laid out by hand ------------------------------


def hand_largest_radius(project, pivot_mm: float, turning: Turning) -> float:
    """Largest outline radius, mm, of the feed cam on a 0.01° grid: roller centre from the arm
    angle (law of cosines for ψ0), pitch normal by central differences, profile r inward (DESIGN §5)."""
    d, L, rp, r = pivot_mm, FEED["arm"], FEED["prime"], FEED["roller"]
    psi0 = math.acos((d * d + L * L - rp * rp) / (2 * d * L))
    theta = np.radians(np.arange(0.0, 360.0, 0.01))
    h = 1e-5
    program = project.programs["feed-lever"]
    low = float(np.min(program.master(np.linspace(0.0, 360.0, 36001))[0]))
    sigma = int(turning)

    def pitch(th):
        s = np.radians(program.master(np.degrees(th) % 360.0)[0] - low)
        return np.exp(-1j * sigma * th) * (d - L * np.exp(-1j * (psi0 + s)))

    tangent = (pitch(theta + h) - pitch(theta - h)) / (2 * h)
    normal = 1j * tangent / np.abs(tangent)
    normal *= np.sign(np.real(np.conj(normal) * pitch(theta)))  # outward, away from the shaft
    return float(np.max(np.abs(pitch(theta) - r * normal)))


def feed_file(tmp_path: Path, pivot: float) -> Path:
    text = preset_path("cam-press").read_text()
    old = "pivot_distance = 100.0 "
    assert old in text
    path = tmp_path / "press.toml"
    path.write_text(text.replace(old, f"pivot_distance = {pivot:.1f}  "))
    return path


def run_check(capsys, path: Path, *extra: str):
    code = cli_main(["check", str(path), *extra])
    return code, capsys.readouterr().out


def test_check_json_and_text_fail_a_pivot_inside_the_cam(capsys, tmp_path):
    path = feed_file(tmp_path, 40.0)  # the pivot on the 40 mm base circle, inside the lifted cam
    project = load_project(path)
    largest = hand_largest_radius(project, 40.0, Turning.CLOCKWISE)
    code, out = run_check(capsys, path, "--json")
    doc = json.loads(out)
    feed = next(c for c in doc["cams"] if c["name"] == "feed-cam")
    check = next(c for c in feed["checks"] if c["quantity"] == "pivot_clearance")
    assert check["unit"] == "mm" and check["limit"] == 0.0 and check["ok"] is False
    assert check["value"] == pytest.approx(40.0 - largest, abs=1e-6)
    assert feed["largest_radius"]["value"] == pytest.approx(largest, abs=1e-6)
    assert feed["pivot_clearance"] == {"value": check["value"], "at": check["at"]}
    assert feed["ok"] is False and doc["ok"] is False and code == 1
    for other in ("stamp-cam", "stripper-cam"):  # translating followers: no pivot, no check
        cam = next(c for c in doc["cams"] if c["name"] == other)
        assert cam["pivot_clearance"] is None
        assert "pivot_clearance" not in [c["quantity"] for c in cam["checks"]]
    code, out = run_check(capsys, path)
    assert code == 1
    assert "pivot clearance" in out and "IN CAM" in out
    assert f"clearance {fmt(40.0 - largest)} mm" in out  # the amount in words, with its unit
    at = fmt(round(check["at"], 6), 5)
    assert f"follower there at {at}°" in " ".join(out.split())


STILL_FILE = """version = 1
[machine]
name = "Still arm"
speed = 60
[[axis]]
name = "arm"
unit = "deg"
start = 0.0
[[axis.segment]]
law = "dwell"
span = 360.0
[[cam]]
name = "still-cam"
axis = "arm"
turning = "ccw"
[cam.follower]
type = "oscillating-roller"
pivot_distance = {pivot}
arm_length = 70.0
prime_radius = 50.0
roller_radius = 10.0
"""


@pytest.mark.parametrize("pivot, ok, code", [(40.0, False, 1), (45.0, True, None)])
def test_check_on_a_dwell_cam_reads_the_base_circle(capsys, tmp_path, pivot, ok, code):
    """Base circle Rp − r = 40 mm (definition): a pivot on it fails (≤ 0), one 5 mm out passes."""
    path = tmp_path / "still.toml"
    path.write_text(STILL_FILE.format(pivot=pivot))
    got, out = run_check(capsys, path, "--json")
    cam = json.loads(out)["cams"][0]
    check = next(c for c in cam["checks"] if c["quantity"] == "pivot_clearance")
    assert check["value"] == pytest.approx(pivot - 40.0, abs=1e-9) and check["ok"] is ok
    assert cam["largest_radius"]["value"] == pytest.approx(40.0, abs=1e-9)
    if code is not None:
        assert got == code and cam["ok"] is False


def test_check_passes_the_preset_with_its_clearance(capsys):
    path = preset_path("cam-press")
    largest = hand_largest_radius(load_project(path), FEED["pivot"], Turning.CLOCKWISE)
    code, out = run_check(capsys, path, "--json")
    feed = next(c for c in json.loads(out)["cams"] if c["name"] == "feed-cam")
    check = next(c for c in feed["checks"] if c["quantity"] == "pivot_clearance")
    assert check["ok"] is True and check["value"] == pytest.approx(FEED["pivot"] - largest, abs=1e-6)
    code, out = run_check(capsys, path)
    assert "pivot clearance [mm]" in out and "clear" in out


def test_the_refined_outline_radius_matches_the_hand_layout():
    project = load_project(preset_path("cam-press"))
    motion = motion_from_program(project.programs["feed-lever"], math.pi / 180.0)
    follower = OscillatingRoller(*(FEED[k] * MM for k in ("pivot", "arm", "prime", "roller")))
    a = analyse(Cam(motion, follower, Turning.CLOCKWISE))
    largest = hand_largest_radius(project, FEED["pivot"], Turning.CLOCKWISE)
    assert a.largest_radius.value / MM == pytest.approx(largest, abs=1e-6)
    assert a.pivot_clearance.value / MM == pytest.approx(FEED["pivot"] - largest, abs=1e-6)


# --- the Cam view: a sizes edit that puts the pivot inside ---------------------------------


def rows(app) -> dict:
    return {r["check"]: r for r in app.query_one(CamVerdicts).rows}


def verdicts_text(app) -> str:
    """What the verdicts panel shows, rendered to plain text (wide, so that no line wraps)."""
    console = Console(width=200, record=True)
    console.print(app.query_one(CamVerdicts).content)
    return console.export_text()


async def test_a_pivot_moved_inside_the_cam_fails_in_the_verdicts(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4", "full_stop")
        await settle(pilot)
        assert app.query_one(CamView).cam_name == "feed-cam"
        largest = hand_largest_radius(app.project, FEED["pivot"], Turning.CLOCKWISE)
        row = rows(app)["pivot clearance"]
        assert row["verdict"] == "✓ clear" and row["ok"]
        assert row["value"] == f"{fmt(FEED['pivot'] - largest)} mm" and row["limit"] == "> 0 mm"
        await pilot.press("s")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        await pilot.press("a")  # pivot_distance
        await pilot.pause()
        assert isinstance(app.screen, EditDialog)
        app.screen.query_one("#value", Input).value = "40"
        await pilot.pause()
        feedback = str(app.screen.query_one("#feedback", Static).content)
        assert "pivot_distance 100 mm → 40 mm" in feedback and "pivot clearance" in feedback
        assert feedback.startswith("! ")  # accepted, but what it makes fails: not marked ✓
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.parts["cam"][1].size("pivot_distance") == 40.0
        largest = hand_largest_radius(app.project, 40.0, Turning.CLOCKWISE)
        row = rows(app)["pivot clearance"]
        assert row["verdict"] == "✗ IN CAM" and not row["ok"]
        assert row["value"] == f"{fmt(40.0 - largest)} mm"
        assert "✗ CHECK FAILED" in str(app.query_one("#cam-bar", Static).content)
        assert f"pivot not clear of the cam: its largest radius {fmt(largest)} mm" in verdicts_text(app)
        at = next(c.at for c in app.query_one(CamView).entry.study.verdict.checks if c.quantity == "pivot_clearance")
        await pilot.press("w")  # the worst spot first: where the cam reaches past the pivot
        await settle(pilot)
        assert app.query_one(CamView).angle == pytest.approx(float(angle(at).rstrip("°")))
        assert "the cam reaching the pivot" in app.status_text
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert rows(app)["pivot clearance"]["verdict"] == "✓ clear"
