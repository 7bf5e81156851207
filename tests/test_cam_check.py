"""Cams in `camwright check`: JSON values against the cam geometry and load
solvers and against textbook closed forms, limits and their sources, verdicts
in words and the exit code."""

import json
import math

import numpy as np
import pytest
from scipy.optimize import brentq

from motionlaws import compile_axis
from solver.cam import (
    OSCILLATING_PRESSURE_ANGLE,
    TRANSLATING_PRESSURE_ANGLE,
    Cam,
    OscillatingRoller,
    TranslatingFlat,
    TranslatingRoller,
    Turning,
    analyse,
    motion_from_program,
)
from solver.loads import FollowerLoad, follower_forces
from workbench.cli import main
from workbench.presets import preset_path
from workbench.projectfile import loads_project

from test_camfile import GOOD

H_MM, BETA_DEG = 20.0, 120.0  # the "lift" axis of GOOD: cycloidal rise and return
SWING_DEG, SWING_BETA = 20.0, 150.0  # the "swing" axis of GOOD: 3-4-5 polynomial out and back


def check_json(capsys, tmp_path, text):
    path = tmp_path / "rig.toml"
    path.write_text(text)
    code = main(["check", str(path), "--json"])
    out = capsys.readouterr().out
    doc = json.loads(out)
    return code, doc, {c["name"]: c for c in doc.get("cams", [])}


def check_text(capsys, tmp_path, text):
    path = tmp_path / "rig.toml"
    path.write_text(text)
    code = main(["check", str(path)])
    return code, capsys.readouterr().out


def cycloid(theta):
    """The lift axis by hand (mm, per radian): cycloidal rise 0–120°, dwell, cycloidal return 180–300°."""
    beta = math.radians(BETA_DEG)
    theta = np.mod(theta, 2 * math.pi)
    s = np.zeros_like(theta)
    s1 = np.zeros_like(theta)
    rise = theta < beta
    x = theta[rise] / beta
    s[rise] = H_MM * (x - np.sin(2 * math.pi * x) / (2 * math.pi))
    s1[rise] = H_MM / beta * (1 - np.cos(2 * math.pi * x))
    s[(theta >= beta) & (theta < math.pi)] = H_MM
    ret = (theta >= math.pi) & (theta < math.pi + beta)
    x = (theta[ret] - math.pi) / beta
    s[ret] = H_MM * (1 - x + np.sin(2 * math.pi * x) / (2 * math.pi))
    s1[ret] = -H_MM / beta * (1 - np.cos(2 * math.pi * x))
    return s, s1


def test_pressure_angle_against_the_textbook_form(capsys, tmp_path):
    # Translating roller, standard textbook form (DESIGN §5; e.g. Norton, Cam Design and
    # Manufacturing Handbook): φ = atan((s' − e)/(s + √(Rp² − e²))), s' per radian.
    _, _, cams = check_json(capsys, tmp_path, GOOD)
    rp, e = 60.0, 3.0
    theta = np.linspace(0, 2 * math.pi, 2_000_001)
    s, s1 = cycloid(theta)
    phi = np.degrees(np.arctan((s1 - e) / (s + math.sqrt(rp * rp - e * e))))
    k = int(np.argmax(np.abs(phi)))
    got = cams["lift-cam"]["pressure_angle"]
    assert got["value"] == pytest.approx(abs(phi[k]), abs=1e-6)
    assert got["at"] == pytest.approx(math.degrees(theta[k]), abs=1e-3)


def test_pitch_curvature_against_finite_differences(capsys, tmp_path):
    # ρ = (x'² + y'²)^{3/2}/(x'y'' − y'x'') (DESIGN §5) with central finite differences of the
    # pitch curve written out by hand: the roller centre (σe, √(Rp² − e²) + s) turned by −σθ.
    _, _, cams = check_json(capsys, tmp_path, GOOD)
    rp, e, r, sigma = 60.0, 3.0, 10.0, 1  # ccw

    def pitch(t):
        s, _ = cycloid(t)
        z = (sigma * e + 1j * (math.sqrt(rp * rp - e * e) + s)) * np.exp(-1j * sigma * t)
        return z.real, z.imag

    theta = np.linspace(0, 2 * math.pi, 720_000, endpoint=False)
    h = 1e-4
    (xm, ym), (x0, y0), (xp, yp) = pitch(theta - h), pitch(theta), pitch(theta + h)
    x1, y1 = (xp - xm) / (2 * h), (yp - ym) / (2 * h)
    x2, y2 = (xp - 2 * x0 + xm) / h**2, (yp - 2 * y0 + ym) / h**2
    # the pitch curve runs clockwise for a ccw cam, so convex means a negative cross product here
    rho = -((x1**2 + y1**2) ** 1.5) / (x1 * y2 - y1 * x2)
    convex = rho[rho > 0]
    got = cams["lift-cam"]["radius_of_curvature"]
    assert got["pitch"]["convex"]["value"] == pytest.approx(convex.min(), rel=1e-5)
    # the roller profile is the pitch curve offset by the roller radius: ρ_profile = ρ_pitch − r
    assert got["profile"]["convex"]["value"] == pytest.approx(got["pitch"]["convex"]["value"] - r, abs=1e-9)
    # this pitch curve is nowhere hollow: convex all round, as the finite differences say too
    assert got["pitch"]["concave"] is None and np.all(rho > 0)


def solver_study(project, axis, follower, turning):
    program = project.programs[axis]
    scale = 1e-3 if project.axis(axis).unit == "mm" else math.pi / 180
    return analyse(Cam(motion_from_program(program, scale), follower, turning))


def test_json_matches_the_cam_solver(capsys, tmp_path):
    code, doc, cams = check_json(capsys, tmp_path, GOOD)
    project = loads_project(GOOD, "rig.toml")
    expected = {
        "lift-cam": solver_study(project, "lift", TranslatingRoller(0.060, 0.010, 0.003), Turning.COUNTERCLOCKWISE),
        "swing-cam": solver_study(project, "swing", OscillatingRoller(0.110, 0.080, 0.055, 0.010), Turning.CLOCKWISE),
        "flat-cam": solver_study(project, "lift", TranslatingFlat(0.070, 0.0, 0.060), Turning.CLOCKWISE),
    }
    assert set(cams) == set(expected)
    for name, a in expected.items():
        cam = cams[name]
        assert cam["pressure_angle"]["value"] == pytest.approx(math.degrees(a.max_pressure_angle.value), rel=1e-12)
        assert cam["pressure_angle"]["at"] == pytest.approx(math.degrees(a.max_pressure_angle.at), abs=1e-6)
        prof = cam["radius_of_curvature"]["profile"]["convex"]
        assert prof["value"] == pytest.approx(a.profile_radii.convex.value * 1e3, rel=1e-12)
        assert prof["at"] == pytest.approx(math.degrees(a.profile_radii.convex.at), abs=1e-6)
        if a.pitch_radii is not None:
            assert cam["radius_of_curvature"]["pitch"]["convex"]["value"] == pytest.approx(
                a.pitch_radii.convex.value * 1e3, rel=1e-12)
            assert cam["undercut"] == {"found": False, "regions": []} and cam["cusp"] is None
        else:
            assert cam["radius_of_curvature"]["pitch"] is None and cam["undercut"] is None
            assert cam["cusp"]["found"] is bool(a.cusp)
            assert cam["face"]["width"] == pytest.approx(a.face.width * 1e3, rel=1e-12)
        assert cam["corners"] == []
        assert cam["base_radius"] == pytest.approx(a.follower.base_radius * 1e3)
    assert doc["ok"] is all(c["ok"] for c in cams.values()) and code == (0 if doc["ok"] else 1)


def test_limits_say_where_they_come_from(capsys, tmp_path):
    _, _, cams = check_json(capsys, tmp_path, GOOD)
    assert cams["lift-cam"]["limits"] == {
        "pressure_angle": {"value": 32.0, "unit": "deg", "source": "file"},
        "curvature_ratio": {"value": 2.5, "unit": "", "source": "file"},
    }
    swing = cams["swing-cam"]["limits"]
    assert swing["pressure_angle"]["source"] == "common practice"
    assert swing["pressure_angle"]["value"] == pytest.approx(math.degrees(OSCILLATING_PRESSURE_ANGLE))
    assert swing["curvature_ratio"] == {"value": 2.0, "unit": "", "source": "common practice"}
    flat = cams["flat-cam"]["limits"]
    assert flat == {"pressure_angle": {"value": pytest.approx(math.degrees(TRANSLATING_PRESSURE_ANGLE)),
                                       "unit": "deg", "source": "common practice"}}
    quantities = [c["quantity"] for c in cams["flat-cam"]["checks"]]
    assert quantities == ["pressure_angle", "cusp", "face_width"]
    ratio = next(c for c in cams["lift-cam"]["checks"] if c["quantity"] == "curvature_ratio")
    assert ratio["limit"] == 2.5
    assert ratio["value"] == pytest.approx(cams["lift-cam"]["radius_of_curvature"]["pitch"]["convex"]["value"] / 10.0)
    assert ratio["headroom"] == pytest.approx(1 - 2.5 / ratio["value"])


def test_human_report_in_words(capsys, tmp_path):
    code, out = check_text(capsys, tmp_path, GOOD)
    assert "cam lift-cam" in out and "cam swing-cam" in out and "cam flat-cam" in out
    assert "pressure angle [deg]" in out and "pitch radius [mm]" in out and "cusp radius [mm]" in out  # units shown, not eaten as markup
    assert "common practice" in out and "no undercut" in out and "no cusp" in out
    assert "loads on cam lift-cam" in out and "rigid-body estimates" in out and "kept" in out
    assert "max speed without jump [cycles/min]" in out and "camshaft torque, RMS [N·m]" in out


def test_a_pressure_angle_over_its_limit_fails_the_check(capsys, tmp_path):
    text = GOOD.replace("pressure_angle = 32.0", "pressure_angle = 10.0")
    code, doc, cams = check_json(capsys, tmp_path, text)
    lift = cams["lift-cam"]
    check = next(c for c in lift["checks"] if c["quantity"] == "pressure_angle")
    assert check["ok"] is False and check["used"] == pytest.approx(lift["pressure_angle"]["value"] / 10.0)
    assert lift["ok"] is False and doc["ok"] is False and code == 1
    code, out = check_text(capsys, tmp_path, text)
    assert code == 1 and "OVER" in out and "CHECK FAILED" in out


def test_undercut_fails_with_the_cam_angle(capsys, tmp_path):
    steep = GOOD.replace("span = 120.0\nto = 20.0", "span = 40.0\nto = 20.0").replace(
        "span = 60.0\n\n[[axis.segment]]\nlaw = \"cycloidal\"", "span = 140.0\n\n[[axis.segment]]\nlaw = \"cycloidal\"", 1)
    project = loads_project(steep, "rig.toml")
    a = solver_study(project, "lift", TranslatingRoller(0.060, 0.010, 0.003), Turning.COUNTERCLOCKWISE)
    roller = math.ceil(a.pitch_radii.convex.value * 1e3 * 1.2)  # a roller larger than the sharpest pitch curvature
    assert roller < 60
    text = steep.replace("roller_radius = 10.0\noffset", f"roller_radius = {roller}.0\noffset").replace(
        "curvature_ratio = 2.5\n", "")
    code, doc, cams = check_json(capsys, tmp_path, text)
    lift = cams["lift-cam"]
    assert lift["undercut"]["found"] is True and code == 1
    region = lift["undercut"]["regions"][0]
    # the sharpest point of the pitch curve lies inside the undercut region
    at = math.degrees(a.pitch_radii.convex.at)
    assert region["from"] < at < region["to"]
    code, out = check_text(capsys, tmp_path, text)
    assert "UNDERCUT" in out and "undercut at" in out


def test_no_cams_no_cam_key(capsys):
    assert main(["check", str(preset_path("tray-lidder")), "--json"]) == 1
    assert "cams" not in json.loads(capsys.readouterr().out)


# --- loads -----------------------------------------------------------------

def with_lift_loads(text, **values):
    """GOOD with the lift cam's [cam.loads] replaced by `values`."""
    start = text.index("[cam.loads]\nfollower_mass = 1.5")
    end = text.index("[[cam]]", start)
    body = "".join(f"{k} = {v!r}\n" for k, v in values.items())
    return text[:start] + "[cam.loads]\n" + body + "\n" + text[end:]


def test_jump_speed_constant_force_closed_form(capsys, tmp_path):
    # k = 0: contact N = m·s''·ω² + F0 first reaches zero where s'' is most negative,
    # s''_min = −2πh/β² for a cycloidal rise or return (h in m, β in rad), so
    # ω_jump = β·√(F0/(2π·m·h)) (Newton's second law along the follower line, e.g.
    # Norton, Design of Machinery, force-closed cam-follower dynamics).
    m_f, m_s, f0 = 1.2, 0.6, 150.0
    text = with_lift_loads(GOOD, follower_mass=m_f, spring_mass=m_s, spring_rate=0.0, preload=f0)
    _, _, cams = check_json(capsys, tmp_path, text)
    m = m_f + m_s / 3  # a third of the spring's mass moves with the follower (common practice)
    h, beta = H_MM * 1e-3, math.radians(BETA_DEG)
    want = beta * math.sqrt(f0 / (2 * math.pi * m * h)) * 60 / (2 * math.pi)
    loads = cams["lift-cam"]["loads"]
    assert loads["jump_speed"] == pytest.approx(want, rel=1e-6)
    assert loads["moving_mass"] == pytest.approx(m)


def test_jump_speed_with_a_spring_against_hand_computation(capsys, tmp_path):
    # Hand computation: the speed at which min over the rise and the return of
    # m·a + k·s + F0 first touches zero, with the cycloid written out and solved by brentq.
    m, k, f0 = 2.0, 9.0, 60.0  # kg, N/mm, N
    text = with_lift_loads(GOOD, follower_mass=m, spring_rate=k, preload=f0)
    _, _, cams = check_json(capsys, tmp_path, text)
    h, beta = H_MM * 1e-3, math.radians(BETA_DEG)
    x = np.linspace(0, 1, 400_001)
    shape = x - np.sin(2 * math.pi * x) / (2 * math.pi)
    acc = 2 * math.pi * np.sin(2 * math.pi * x) / beta**2  # s'' per h on the rise; the return is its mirror

    def min_contact(w):
        rise = m * h * acc * w * w + k * 1e3 * h * shape + f0
        back = -m * h * acc * w * w + k * 1e3 * h * (1 - shape) + f0
        return min(rise.min(), back.min())

    want = brentq(min_contact, 1.0, 500.0, xtol=1e-12) * 60 / (2 * math.pi)
    assert cams["lift-cam"]["loads"]["jump_speed"] == pytest.approx(want, rel=1e-6)


def test_oscillating_jump_speed_referred_to_the_load_radius(capsys, tmp_path):
    # Loads at radius R on the arm, k = 0: moment F0·R against inertia m·R² with the arm's
    # angular deceleration ψ'' ω², ψ''_max = Ca·ψ/β² for the 3-4-5 polynomial with
    # Ca = 10/√3 (y'' = 60x − 180x² + 120x³, largest at x = (3 − √3)/6; handbook 5.774,
    # DESIGN §3): ω_jump = β·√(F0/(m·R·Ca·ψ)).
    m, f0, r_mm = 0.5, 30.0, 60.0
    text = GOOD.replace("spring_rate = 1.5", "spring_rate = 0.0")
    _, _, cams = check_json(capsys, tmp_path, text)
    ca = 10 / math.sqrt(3)
    psi, beta, r = math.radians(SWING_DEG), math.radians(SWING_BETA), r_mm * 1e-3
    want = beta * math.sqrt(f0 / (m * r * ca * psi)) * 60 / (2 * math.pi)
    assert cams["swing-cam"]["loads"]["jump_speed"] == pytest.approx(want, rel=1e-6)
    assert cams["swing-cam"]["loads"]["load_radius"] == r_mm and cams["lift-cam"]["loads"]["load_radius"] is None


def test_preload_for_the_margin_gives_the_margin(capsys, tmp_path):
    _, _, cams = check_json(capsys, tmp_path, GOOD)
    loads = cams["lift-cam"]["loads"]
    need = loads["preload_for_margin"]
    assert loads["margin"] == 20.0
    text = GOOD.replace("preload = 80.0", f"preload = {need!r}")
    _, _, again = check_json(capsys, tmp_path, text)
    # the preload adds to the contact force at every angle, so the least force is exactly the margin
    assert again["lift-cam"]["loads"]["min_contact"]["value"] == pytest.approx(20.0, abs=1e-6)
    # oscillating: the same in forces at the load radius
    swing = cams["swing-cam"]["loads"]
    text = GOOD.replace("preload = 30.0", f"preload = {swing['preload_for_margin']!r}")
    _, _, again = check_json(capsys, tmp_path, text)
    assert again["swing-cam"]["loads"]["min_contact"]["value"] == pytest.approx(0.0, abs=1e-6)


def test_torque_matches_the_load_solver(capsys, tmp_path):
    _, doc, cams = check_json(capsys, tmp_path, GOOD)
    project = loads_project(GOOD, "rig.toml")
    cam_motion = motion_from_program(project.programs["lift"], 1e-3)

    def motion(theta_deg):
        s, s1, s2 = cam_motion(np.radians(theta_deg))
        return s, s1, s2, None

    load = FollowerLoad(mass=1.5 + 0.3 / 3, spring_rate=5000.0, preload=80.0, friction=5.0)
    forces = follower_forces(motion, load, doc["speed"])
    loads = cams["lift-cam"]["loads"]
    assert loads["torque"]["peak"]["value"] == pytest.approx(forces.peak_torque, rel=1e-12)
    assert loads["torque"]["rms"] == pytest.approx(forces.rms_torque, rel=1e-12)
    assert loads["min_contact"]["value"] == pytest.approx(forces.min_contact, rel=1e-12)
    assert loads["contact_kept"] is True and loads["ok"] is True


def test_contact_lost_at_machine_speed_fails_the_check(capsys, tmp_path):
    _, _, cams = check_json(capsys, tmp_path, GOOD)
    jump = cams["lift-cam"]["loads"]["jump_speed"]
    text = GOOD.replace("speed = 100", f"speed = {jump * 1.05:.3f}")
    code, doc, cams = check_json(capsys, tmp_path, text)
    loads = cams["lift-cam"]["loads"]
    assert loads["contact_kept"] is False and loads["ok"] is False
    assert cams["lift-cam"]["geometry_ok"] is True and cams["lift-cam"]["ok"] is False and code == 1
    code, out = check_text(capsys, tmp_path, text)
    assert "LOST" in out and "CONTACT AT RISK" in out


def test_preset_cam_press_is_within_everything(capsys):
    code = main(["check", str(preset_path("cam-press")), "--json"])
    doc = json.loads(capsys.readouterr().out)
    assert code == 0 and doc["ok"] is True
    names = {c["name"]: c for c in doc["cams"]}
    assert {c["follower"]["type"] for c in names.values()} == {
        "translating-roller", "oscillating-roller", "translating-flat"}
    assert names["stamp-cam"]["loads"]["contact_kept"] is True


def test_a_cam_left_without_its_axis_by_an_edit_is_reported_not_raised():
    # A loaded file is checked whole; an edited project (the workbench renames an axis or
    # switches its unit) may leave a cam that cannot be laid out: the report says so.
    from dataclasses import replace

    from workbench.camreport import cam_section

    project = loads_project(GOOD, "rig.toml")
    lift, swing, flat = project.parts["cam"]
    project.parts["cam"] = [replace(lift, axis="gone"), replace(swing, axis="lift"), flat]
    key, docs, renderables, ok = cam_section(project)
    assert key == "cams" and ok is False
    assert docs[0]["ok"] is False and 'key "axis"' in docs[0]["error"] and "'gone'" in docs[0]["error"]
    assert docs[1]["ok"] is False and 'key "type"' in docs[1]["error"] and "needs an axis in deg" in docs[1]["error"]
    assert docs[2]["name"] == "flat-cam" and "pressure_angle" in docs[2]
    assert "CANNOT BE LAID OUT" in str(renderables[0])
