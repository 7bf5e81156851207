"""Linkage loads in `camwright check`: the numbers against references.

* the JSON against `solver.loads` run directly in the test on the preset's
  numbers, converted to SI by hand here;
* the carton pusher's crank torque against the virtual-work closed form of
  the offset slider-crank, T = Σ (m·a_G·dr_G/dθ + J·α·dφ/dθ) − Σ m·g·dr_G/dθ
  − F·dx/dθ, with the textbook position closed form (R. L. Norton, Design of
  Machinery, slider-crank position/velocity/acceleration and the virtual
  work method; from memory);
* the motor figures against the gear reflection T_m = T/(i·η) + J_m·i·α
  (where the motor drives; T·η/i + J_m·i·α where the load drives back) —
  the power balance of a gearbox with losses (common practice in drive
  makers' sizing guides);
* a servo at the crank pin of an output-driven linkage against the power
  balance T·φ̇ = F·ṡ (virtual power) and Newton's second law on the
  carriage (the rod now carries its inertia).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from solver.kinematics import JointCoordinate
from solver.loads import BodyMass, Gearing, LinkageLoading, PointForce, ServoLimits, linkage_loads, servo_sizing
from workbench.cli import main
from workbench.linkagefile import linkage_specs
from workbench.linkageloads_study import study_loads
from workbench.linkagesolve import solve_linkage
from workbench.linkagestudy import study_linkage
from workbench.presets import preset_path
from workbench.projectfile import load_project

G = 9.81  # m/s², as the presets give it
# presets/slider-crank.toml in SI, converted by hand (mm → m, kg·mm² → kg·m²)
CRANK, ROD, OFFSET = 0.055, 0.210, 0.020  # m: crank, rod, guide 20 mm above the crank bearing
M2, R2, J2 = 0.6, 0.020, 600e-6  # crank: kg, centre on the crank line (m), kg·m²
M3, R3, J3 = 0.9, 0.105, 3300e-6  # rod
M4, R4 = 2.5, 0.020  # head: centre 20 mm ahead of pin B on the guide line
SPRING = -60.0  # N along x at head.face
RATIO, EFFICIENCY, ROTOR = 20.0, 0.9, 4e-6  # gearbox 20:1, η, kg·m²
PEAK, RMS, SPEED = 0.48, 0.16, 3000.0  # N·m, N·m, rpm
PUSHER_SPEED = 80.0  # cycles/min


def pusher_loading() -> LinkageLoading:
    return LinkageLoading(
        masses={"crank": BodyMass(M2, (R2, 0.0), J2), "rod": BodyMass(M3, (R3, 0.0), J3), "head": BodyMass(M4, (R4, 0.0))},
        gravity=(0.0, -G),
        forces=(PointForce("head", "face", (SPRING, 0.0)),),
    )


def check_json(path, capsys) -> tuple[int, dict]:
    code = main(["check", str(path), "--json"])
    return code, json.loads(capsys.readouterr().out)


def slider_crank_torque(theta, omega):
    """Crank torque (N·m) of the carton pusher at crank angle θ (rad) and ω (rad/s), by virtual work.

    Offset slider-crank (Norton, Design of Machinery; from memory): sin θ3 = (c − a sin θ)/b on the
    open branch, x_B = a cos θ + b cos θ3; derivatives per radian of crank angle, then a_G = ω²·r_G''.
    """
    a, b, c = CRANK, ROD, OFFSET
    s, co = np.sin(theta), np.cos(theta)
    s3 = (c - a * s) / b
    c3 = np.sqrt(1.0 - s3 * s3)
    t3_1 = -a * co / (b * c3)  # dθ3/dθ
    t3_2 = (a * s + b * s3 * t3_1**2) / (b * c3)  # d²θ3/dθ²
    x_1 = -a * s - b * s3 * t3_1  # dx_B/dθ
    x_2 = -a * co - b * c3 * t3_1**2 - b * s3 * t3_2
    g2_1 = R2 * np.array([-s, co])  # crank centre: r2 (cos θ, sin θ)
    g2_2 = -R2 * np.array([co, s])
    a_1, a_2 = a * np.array([-s, co]), -a * np.array([co, s])  # pin A
    g3_1 = a_1 + R3 * t3_1 * np.array([-s3, c3])  # rod centre: A + r3 (cos θ3, sin θ3)
    g3_2 = a_2 + R3 * (t3_2 * np.array([-s3, c3]) - t3_1**2 * np.array([c3, s3]))
    w2 = omega**2
    inertia = w2 * (M2 * np.sum(g2_2 * g2_1, axis=0) + M3 * np.sum(g3_2 * g3_1, axis=0) + J3 * t3_2 * t3_1
                    + M4 * x_2 * x_1)  # the crank turns steadily: no J2·α term
    weight = -G * (M2 * g2_1[1] + M3 * g3_1[1])  # g = (0, −G); the head moves level
    return inertia - weight - SPRING * x_1


@pytest.fixture(scope="module")
def pusher():
    project = load_project(preset_path("slider-crank"))
    spec = linkage_specs(project)[0]
    return project, spec, study_loads(project, spec)


def test_pusher_crank_torque_matches_the_virtual_work_closed_form(pusher):
    _, _, study = pusher
    drive = study.drivers[0].drive
    omega = 2 * math.pi * PUSHER_SPEED / 60
    closed = slider_crank_torque(drive.theta, omega)
    scale = np.max(np.abs(closed))
    assert np.max(np.abs(drive.effort - closed)) < 1e-9 * scale
    # the refined peak against the closed form's own maximum (scipy, bounded around its sampled best)
    k = int(np.argmax(np.abs(closed)))
    found = minimize_scalar(lambda t: -abs(slider_crank_torque(np.array([t]), omega)[0]),
                            bounds=(drive.theta[k] - 0.01, drive.theta[k] + 0.01), method="bounded",
                            options={"xatol": 1e-12})
    assert study.drivers[0].peak.value == pytest.approx(-found.fun, rel=1e-9)
    assert study.drivers[0].peak.at == pytest.approx(math.degrees(found.x), abs=1e-4)
    # RMS over a uniform cycle: the mean of the square of the closed form on a fine grid
    fine = np.linspace(0, 2 * math.pi, 36000, endpoint=False)
    assert study.drivers[0].rms == pytest.approx(np.sqrt(np.mean(slider_crank_torque(fine, omega) ** 2)), rel=1e-9)


def test_check_json_matches_solver_loads_run_directly(pusher, capsys):
    project, spec, _ = pusher
    code, doc = check_json(preset_path("slider-crank"), capsys)
    assert code == 0
    entry = next(e for e in doc["linkage_loads"] if e["linkage"] == "pusher")
    result = solve_linkage(project, spec).result
    loads = linkage_loads(result, pusher_loading())
    drive = loads.drives["motor"]
    d = entry["drivers"][0]
    assert d["name"] == "motor" and d["effort_unit"] == "N*m" and d["tables"]["effort"] == "pusher.motor.torque"
    assert d["peak"]["value"] == pytest.approx(drive.peak.value, rel=1e-12)
    assert d["peak"]["at"] == pytest.approx(drive.peak.at, abs=1e-6)
    assert d["rms"] == pytest.approx(drive.rms, rel=1e-12)
    assert d["peak_speed"] == {"value": pytest.approx(480.0), "at": 0.0, "unit": "deg/s"}  # 80 cycles/min × 360°
    sizing = servo_sizing(drive, Gearing(RATIO, EFFICIENCY, ROTOR), ServoLimits(PEAK, RMS, SPEED * 2 * math.pi / 60))
    motor = d["servo"]["motor"]
    assert motor["peak_torque"]["value"] == pytest.approx(sizing.motor.peak_torque.value, rel=1e-12)
    assert motor["rms_torque"] == pytest.approx(sizing.motor.rms_torque, rel=1e-12)
    assert motor["peak_speed"]["value"] == pytest.approx(sizing.motor.peak_speed.value * 60 / (2 * math.pi), rel=1e-12)
    checks = {c["quantity"]: c for c in d["servo"]["checks"]}
    for c in sizing.checks:
        assert checks[c.quantity]["used"] == pytest.approx(c.used, rel=1e-12) and checks[c.quantity]["ok"] == c.ok
    assert checks["speed"]["limit"] == SPEED and checks["speed"]["value"] == pytest.approx(1600.0)  # 20 × 80 rpm
    reactions = {r["joint"]: r for r in entry["reactions"]}
    assert set(reactions) == {"O", "A", "B", "slide"}
    for name, r in loads.reactions.items():
        assert reactions[name]["peak"]["value"] == pytest.approx(r.peak.value, rel=1e-12)
        assert reactions[name]["kind"] == r.kind and reactions[name]["bodies"] == [r.body_i, r.body_j]
    assert reactions["O"]["peak_couple"] is None
    assert reactions["slide"]["peak_couple"]["value"] == pytest.approx(loads.reactions["slide"].peak_couple.value)
    # the head's weight acts 20 mm ahead of B on a level guide: the guide holds it with a steady couple
    assert reactions["slide"]["peak_couple"]["value"] == pytest.approx(M4 * G * R4, rel=1e-9)
    assert "shocks, elasticity, backlash, friction" in entry["caution"] and "rules that apply locally" in entry["caution"]


def test_motor_torque_is_the_load_torque_reflected_through_the_gearbox(pusher):
    _, _, study = pusher
    d = study.drivers[0]
    T, w, a = d.drive.effort, d.drive.rate, d.drive.acceleration
    driving = T * w >= 0
    expected = np.where(driving, T / (RATIO * EFFICIENCY), T * EFFICIENCY / RATIO) + ROTOR * RATIO * a
    assert np.max(np.abs(d.servo.sizing.torque - expected)) < 1e-12 * np.max(np.abs(expected))
    assert np.any(~driving)  # the linkage drives the motor back over part of the cycle: both branches are checked
    assert d.servo.peak_torque.value >= np.max(np.abs(expected))
    assert d.servo.peak_torque.value == pytest.approx(np.max(np.abs(expected)), rel=1e-5)
    assert d.servo.peak_speed.value == pytest.approx(RATIO * PUSHER_SPEED)  # rpm: the crank turns at 80 rpm


CARRIAGE_MASS = 3.2  # kg, presets/servo-carriage.toml
CARRIAGE_RATIO, CARRIAGE_EFFICIENCY, CARRIAGE_ROTOR = 10.0, 0.92, 3e-6


@pytest.fixture(scope="module")
def carriage():
    project = load_project(preset_path("servo-carriage"))
    spec = linkage_specs(project)[0]
    return project, spec, study_loads(project, spec)


def test_a_servo_at_the_crank_pin_balances_the_power_of_the_carriage_drive(carriage):
    project, spec, study = carriage
    d = study.drivers[0]
    assert d.of == "torque at pin O" and d.servo.at == "O"
    result = solve_linkage(project, spec).result  # the file's own model: the rail drives the carriage
    loading = LinkageLoading(
        masses={"crank": BodyMass(0.5, (0.020, 0.0), 300e-6), "rod": BodyMass(0.6, (0.100, 0.0), 2000e-6),
                "carriage": BodyMass(CARRIAGE_MASS)},
        gravity=(0.0, -G),
    )
    rail = linkage_loads(result, loading).drives["stroke"]
    crank = result.output(JointCoordinate("O"))
    power_rail = rail.effort * rail.rate  # virtual power: the same work whichever joint it enters by
    power_crank = d.drive.effort * crank.velocity
    assert np.max(np.abs(power_crank - power_rail)) < 1e-9 * np.max(np.abs(power_rail))
    moving = np.abs(crank.velocity) > 1e-3 * np.max(np.abs(crank.velocity))
    ratio = rail.rate[moving] / crank.velocity[moving]  # ds/dφ
    assert np.allclose(d.drive.effort[moving], rail.effort[moving] * ratio, rtol=1e-9, atol=1e-12)
    # motor side through the gearbox, with the crank's own acceleration
    T, w, a = d.drive.effort, crank.velocity, crank.acceleration
    expected = np.where(T * w >= 0, T / (CARRIAGE_RATIO * CARRIAGE_EFFICIENCY), T * CARRIAGE_EFFICIENCY / CARRIAGE_RATIO)
    expected = expected + CARRIAGE_ROTOR * CARRIAGE_RATIO * a
    assert np.max(np.abs(d.servo.sizing.torque - expected)) < 1e-12 * np.max(np.abs(expected))


def test_with_the_motor_at_the_crank_the_rod_carries_the_carriage(carriage):
    project, _, study = carriage
    reaction = next(r for r in study.reactions if r.joint == "B").reaction
    theta = np.degrees(reaction.theta)
    _, _, acc, _ = project.programs["carriage"].kinematics(theta, project.speed)  # mm/s², the axis it follows
    # Newton's second law along the frictionless rail: only the rod pushes the carriage along it
    assert np.max(np.abs(reaction.force[:, 0] - CARRIAGE_MASS * acc * 1e-3)) < 1e-9 * CARRIAGE_MASS * np.max(np.abs(acc)) * 1e-3


def test_a_motor_over_its_limit_fails_the_check(tmp_path, capsys):
    text = preset_path("slider-crank").read_text().replace("peak_torque = 0.48 ", "peak_torque = 0.15 ")
    path = tmp_path / "tight.toml"
    path.write_text(text)
    code, doc = check_json(path, capsys)
    assert code == 1 and doc["ok"] is False
    entry = doc["linkage_loads"][0]
    checks = {c["quantity"]: c for c in entry["drivers"][0]["servo"]["checks"]}
    assert entry["ok"] is False and checks["peak_torque"]["ok"] is False and checks["peak_torque"]["used"] > 1
    assert checks["rms_torque"]["ok"] is True
    assert main(["check", str(path)]) == 1
    out = capsys.readouterr().out
    assert "SERVO LIMIT EXCEEDED" in out and "OVER" in out and "rigid-body estimates" in out


def test_a_linkage_without_loads_adds_no_loads_entry(capsys):
    code, doc = check_json(preset_path("six-bar-press"), capsys)
    assert "linkage_loads" not in doc and doc["linkages"]
    assert code == (0 if doc["ok"] else 1)


def test_loads_without_a_servo_are_reported_and_do_no_net_work(capsys):
    code, doc = check_json(preset_path("crank-rocker"), capsys)
    entry = doc["linkage_loads"][0]
    assert entry["linkage"] == "flap" and entry["drivers"][0]["servo"] is None and entry["ok"] is True
    # energy over a closed cycle (kinetic energy periodic, gravity and a constant torque on a swinging
    # rocker conservative): the drive's net work is zero — mean power over the uniform cycle grid
    project = load_project(preset_path("crank-rocker"))
    study = study_loads(project, linkage_specs(project)[0])
    drive = study.drivers[0].drive
    assert abs(np.mean(drive.power)) < 1e-9 * np.max(np.abs(drive.power))


def test_a_dead_point_leaves_the_loads_partial_and_failed(tmp_path, capsys):
    """A 60 mm rod cannot reach the guide 20 mm above a 55 mm crank pointing down: a limit position."""
    text = preset_path("slider-crank").read_text().replace("B = [210.0, 0.0]", "B = [60.0, 0.0]", 1)
    path = tmp_path / "short-rod.toml"
    path.write_text(text.replace("place = [264.0, 20.0, 0.0]", "place = [114.0, 20.0, 0.0]"))
    project = load_project(path)
    study = study_loads(project, linkage_specs(project)[0])
    assert study.status == "dead-point" and not study.complete and not study.ok
    assert 180.0 < math.degrees(study.drivers[0].drive.theta[-1]) < 270.0  # the crank points down at 270°
    code, doc = check_json(path, capsys)
    entry = doc["linkage_loads"][0]
    assert code == 1 and entry["ok"] is False and entry["complete"] is False and "limit position" in entry["message"]


def test_a_motor_on_the_rocker_is_refused_at_the_rocker_s_limit_position(tmp_path, capsys):
    """Driven from the rocker, a crank-rocker has dead points where the rocker turns back (crank and
    coupler in line, Norton, Design of Machinery, Grashof linkages; from memory): the motor there would
    need an unbounded torque.  The angle said is the first one, where the kinematic study finds the
    rocker's lowest angle."""
    path = tmp_path / "rocker-motor.toml"
    path.write_text(preset_path("crank-rocker").read_text() + '\n[[linkage.loads.servo]]\ndriver = "shaft"\nat = "O4"\n')
    project = load_project(path)
    spec = linkage_specs(project)[0]
    swing = study_linkage(project, spec).outputs[0]
    assert swing.name == "swing"
    code, doc = check_json(path, capsys)
    entry = doc["linkage_loads"][0]
    assert code == 1 and entry["ok"] is False and entry["status"] == "invalid"
    assert 'servo "shaft": key "at": angle at pin O4 stands still at master' in entry["message"]
    said = float(entry["message"].split("at master ")[1].split("°")[0])
    assert said == pytest.approx(swing.minimum.at, abs=2e-3)  # 4 significant digits in the message
