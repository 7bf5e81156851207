"""`camwright table FILE --axis NAME` for loads: drive torque, the motor, joint reactions, cam contact
force and camshaft torque — columns, units and values.

References: the offset slider-crank's virtual-work torque (Norton, Design of
Machinery; from memory — written out in test_linkageloads.py), Newton's
second law on the pusher head along its frictionless guide, the gear
reflection T_m = T/(i·η) + J_m·i·α (common practice), and for a
spring-closed follower the force balance along its travel
N = m·s̈ + k·(x0 + s) + F_friction·sign(ṡ) with T = N·ds/dθ (power balance;
Norton, Cam Design and Manufacturing Handbook, dynamics; from memory).
"""

from __future__ import annotations

import csv
import io
import math

import numpy as np
import pytest
from test_linkageloads import CRANK, M4, OFFSET, PUSHER_SPEED, R4, RATIO, ROD, SPRING, G, slider_crank_torque

from workbench.camfile import find_cam, study_cam
from workbench.camreport import cam_loads
from workbench.cli import main
from workbench.presets import preset_path
from workbench.projectfile import load_project

OMEGA = 2 * math.pi * PUSHER_SPEED / 60  # rad/s of the crank at 80 cycles/min
STAMP = dict(mass=2.4 + 0.4 / 3, rate=8.0, preload=180.0, friction=15.0)  # presets/cam-press.toml (⅓ of the spring moves)


def table(capsys, file, name: str, step: float | None = None) -> tuple[list[str], np.ndarray]:
    args = ["table", str(file), "--axis", name] + ([] if step is None else ["--step", str(step)])
    assert main(args) == 0
    rows = list(csv.reader(io.StringIO(capsys.readouterr().out)))
    return rows[0], np.array([[float(x) for x in row] for row in rows[1:]])


def head_acceleration(theta):
    """ẍ_B (m/s²) of the pusher head at crank angle θ (rad): the offset slider-crank closed form
    (Norton, Design of Machinery; from memory), differentiated twice at steady crank speed."""
    a, b, c = CRANK, ROD, OFFSET
    s3 = (c - a * np.sin(theta)) / b
    c3 = np.sqrt(1 - s3 * s3)
    t3_1 = -a * np.cos(theta) / (b * c3)
    t3_2 = (a * np.sin(theta) + b * s3 * t3_1**2) / (b * c3)
    return OMEGA**2 * (-a * np.cos(theta) - b * c3 * t3_1**2 - b * s3 * t3_2)


def test_drive_torque_table_against_the_closed_form(capsys):
    header, rows = table(capsys, preset_path("slider-crank"), "pusher.motor.torque", 2.0)
    assert header == ["master [deg]", "torque [N*m]", "speed [deg/s]", "power [W]"]
    assert rows.shape == (180, 4) and rows[0, 0] == 0.0 and rows[-1, 0] == 358.0
    theta = np.radians(rows[:, 0])  # the crank turns once per cycle from 0: crank angle = master angle
    closed = slider_crank_torque(theta, OMEGA)
    assert np.max(np.abs(rows[:, 1] - closed)) < 1e-9 * np.max(np.abs(closed))
    assert np.allclose(rows[:, 2], 480.0)  # 80 turns a minute, deg/s
    assert np.allclose(rows[:, 3], rows[:, 1] * OMEGA, rtol=1e-12, atol=1e-12)  # power = T·ω


def test_a_step_that_does_not_divide_the_cycle(capsys):
    _, rows = table(capsys, preset_path("slider-crank"), "pusher.motor.torque", 0.7)
    assert rows.shape[0] == math.ceil(360 / 0.7) and rows[-1, 0] == pytest.approx(359.8)
    closed = slider_crank_torque(np.radians(rows[:, 0]), OMEGA)
    assert np.max(np.abs(rows[:, 1] - closed)) < 1e-9 * np.max(np.abs(closed))


def test_servo_table_reflects_the_torque_through_the_gearbox(capsys):
    header, rows = table(capsys, preset_path("slider-crank"), "pusher.motor.servo", 5.0)
    assert header == ["master [deg]", "output torque [N*m]", "output speed [deg/s]", "motor torque [N*m]",
                      "motor speed [rpm]"]
    T = rows[:, 1]
    eta = 0.9
    expected = np.where(T >= 0, T / (RATIO * eta), T * eta / RATIO)  # steady crank: α = 0, ω > 0
    assert np.max(np.abs(rows[:, 3] - expected)) < 1e-12 * np.max(np.abs(expected))
    assert np.allclose(rows[:, 4], RATIO * PUSHER_SPEED)  # rpm


def test_reaction_table_against_newton_on_the_head(capsys):
    header, rows = table(capsys, preset_path("slider-crank"), "pusher.B.reaction", 3.0)
    assert header == ["master [deg]", "force [N]", "force x [N]", "force y [N]"]
    theta = np.radians(rows[:, 0])
    # on the head from the rod, along the frictionless guide: F_x + spring = m·ẍ
    expected = M4 * head_acceleration(theta) - SPRING
    assert np.max(np.abs(rows[:, 2] - expected)) < 1e-9 * np.max(np.abs(expected))
    assert np.allclose(rows[:, 1], np.hypot(rows[:, 2], rows[:, 3]), rtol=1e-12)


def test_a_slider_reaction_has_its_couple(capsys):
    header, rows = table(capsys, preset_path("slider-crank"), "pusher.slide.reaction", 10.0)
    assert header == ["master [deg]", "force [N]", "force x [N]", "force y [N]", "couple [N*m]"]
    assert np.allclose(rows[:, 2], 0.0, atol=1e-9)  # a frictionless guide pushes across its line only
    assert np.allclose(rows[:, 4], M4 * G * R4, rtol=1e-9)  # the head's weight 20 mm ahead of its pin


def test_a_servo_at_the_crank_pin_tabulates_the_crank(capsys):
    header, rows = table(capsys, preset_path("servo-carriage"), "drive.stroke.servo", 15.0)
    assert header[1:3] == ["output torque [N*m]", "output speed [deg/s]"]
    assert np.allclose(rows[:, 4], rows[:, 2] * 10.0 / 6.0, rtol=1e-12, atol=1e-9)  # 10:1, deg/s → rpm
    header, torque = table(capsys, preset_path("servo-carriage"), "drive.stroke.torque", 15.0)
    assert header[1] == "torque [N*m]" and np.allclose(torque[:, 1], rows[:, 1], rtol=1e-12)


def stamp_balance(step: float):
    """(θ deg, contact N, camshaft torque N·m) of the stamp follower by the force balance."""
    project = load_project(preset_path("cam-press"))
    program = project.programs["stamp"]
    theta = np.round(np.arange(math.ceil(360 / step - 1e-9)) * step, 9)
    s, v, a, _ = program.kinematics(theta, project.speed)  # mm, mm/s, mm/s²
    datum = np.min(program.master(np.linspace(0, 360, 36001))[0])  # the base circle: the lowest position
    contact = STAMP["mass"] * a * 1e-3 + STAMP["rate"] * (s - datum) + STAMP["preload"] + STAMP["friction"] * np.sign(v)
    omega = 2 * math.pi * project.speed / 60
    return theta, contact, contact * v * 1e-3 / omega, np.abs(v) > 1e-9 * np.max(np.abs(v))


@pytest.mark.parametrize("step", [1.0, 0.7])
def test_cam_contact_and_torque_against_the_force_balance(capsys, step):
    theta, contact, torque, moving = stamp_balance(step)
    header, rows = table(capsys, preset_path("cam-press"), "stamp-cam.contact", step)
    assert header == ["master [deg]", "contact force [N]"]
    assert np.array_equal(rows[:, 0], theta)
    # where the follower stands still Coulomb friction has no sign: those instants lie within ±friction
    assert np.max(np.abs(rows[moving, 1] - contact[moving])) < 1e-9 * np.max(np.abs(contact))
    assert np.all(np.abs(rows[~moving, 1] - contact[~moving]) <= STAMP["friction"] * (1 + 1e-9))
    header, rows = table(capsys, preset_path("cam-press"), "stamp-cam.torque", step)
    assert header == ["master [deg]", "camshaft torque [N*m]"]
    assert np.max(np.abs(rows[:, 1] - torque)) < 1e-9 * np.max(np.abs(torque))


def test_an_oscillating_follower_s_contact_is_at_its_load_radius(capsys):
    project = load_project(preset_path("cam-press"))
    loads = cam_loads(project, study_cam(project, find_cam(project, "feed-cam")))
    _, rows = table(capsys, preset_path("cam-press"), "feed-cam.contact", 0.1)
    assert rows.shape[0] == loads.forces.theta.size
    lever = loads.load_radius * 1e-3
    assert np.allclose(rows[:, 1], loads.forces.contact / lever, rtol=1e-12)
    assert np.min(rows[:, 1]) == pytest.approx(loads.min_contact, rel=1e-3)  # the check's least force, refined


BAD_NAMES = [
    ("slider-crank", "pusher.motor.force", "its effort is a torque, table pusher.motor.torque"),
    ("slider-crank", "pusher.motr.torque", "this linkage has: pusher.motor.torque, pusher.motor.servo"),
    ("slider-crank", "pusher.O.torque", "pusher.O.reaction"),
    ("servo-carriage", "drive.stroke.force", "pin O moves an angle"),
    ("crank-rocker", "flap.shaft.servo", "no [[linkage.loads.servo]]"),
    ("six-bar-press", "press.shaft.torque", "has no [linkage.loads]"),
    ("cam-press", "stripper-cam.contact", "has no [cam.loads]"),
    ("cam-press", "stamp-cam.speed", "cam tables: stamp-cam.contact, stamp-cam.torque"),
    ("slider-crank", "pusher.motor.torq", "no table 'pusher.motor.torq'"),
]


@pytest.mark.parametrize("preset, name, words", BAD_NAMES)
def test_unknown_loads_tables_are_refused_with_what_there_is(capsys, preset, name, words):
    assert main(["table", str(preset_path(preset)), "--axis", name]) == 2
    err = capsys.readouterr().err.replace("\n", " ")
    assert words in err and "Traceback" not in err and str(preset_path(preset)) in err


def test_unknown_names_are_answered_with_the_loads_tables_too(capsys):
    assert main(["table", str(preset_path("slider-crank")), "--axis", "pusher-motor"]) == 2
    err = capsys.readouterr().err.replace("\n", " ")
    assert "pusher.motor.torque" in err and "pusher.slide.reaction" in err and "lane-gate" in err
