"""The Loads view on linkage drivers: drive torque against master angle with its limit lines, the servo's
figures and verdicts, peak joint reactions — checked against `solver.loads` run directly on the preset's
numbers (converted to SI here) and the slider-crank's virtual-work closed form (Norton, Design of
Machinery; from memory — written out in test_linkageloads.py)."""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from test_linkageloads import PEAK, PUSHER_SPEED, RATIO, RMS, ROTOR, SPEED, EFFICIENCY, pusher_loading, slider_crank_torque
from textual.widgets import Input, Static

from solver.loads import Gearing, ServoLimits, linkage_loads, servo_sizing
from workbench.app import Workbench
from workbench.axisreport import fmt
from workbench.linkagefile import linkage_specs
from workbench.linkagesolve import solve_linkage
from workbench.presets import preset_path
from workbench.projectfile import load_project, loads_project
from workbench.tui.views.loads import FigureTable, LoadsView
from workbench.tui.widgets.cam_plots import AnglePlot
from workbench.tui.widgets.loads_linkage import LOADS_EXAMPLE

from tests.tui_pilot import settle

SIZE = (100, 30)


def figures(app) -> dict:
    return app.query_one(FigureTable).rows


def text(app, selector: str) -> str:
    return str(app.query_one(selector, Static).content)


def deg(value: float) -> str:
    return f"{round(value, 1) % 360.0:g}°"


def sizing(speed: float = PUSHER_SPEED):
    """The pusher's servo by solver.loads, run directly."""
    project = load_project(preset_path("slider-crank"))
    spec = linkage_specs(project)[0]
    drive = linkage_loads(solve_linkage(project, spec).result, pusher_loading(), speed=speed).drives["motor"]
    return drive, servo_sizing(drive, Gearing(RATIO, EFFICIENCY, ROTOR), ServoLimits(PEAK, RMS, SPEED * 2 * math.pi / 60))


async def open_loads(app, pilot) -> LoadsView:
    await settle(pilot)
    await pilot.press("5")
    await settle(pilot)
    return app.query_one(LoadsView)


@pytest.mark.parametrize("size", [(100, 30), (80, 24)])
async def test_the_pusher_s_drive_torque_and_servo(size):
    drive, servo = sizing()
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=size) as pilot:
        view = await open_loads(app, pilot)
        assert view.item_name == "pusher.motor" and view.item.kind == "linkage driver"
        shown = figures(app)
        assert shown["torque at pin O, peak"] == {"value": f"{fmt(drive.peak.value)} N·m", "at": deg(drive.peak.at),
                                                   "verdict": ""}
        assert shown["torque at pin O, RMS"]["value"] == f"{fmt(drive.rms)} N·m"
        peak = servo.motor.peak_torque
        used = peak.value / PEAK
        assert shown["motor torque, peak"] == {"value": f"{fmt(peak.value)} N·m", "at": deg(peak.at),
                                               "verdict": f"✓ {used * 100:.0f} % of {fmt(PEAK)} N·m"}
        assert shown["motor torque, RMS"]["verdict"] == f"✓ {servo.motor.rms_torque / RMS * 100:.0f} % of {fmt(RMS)} N·m"
        assert shown["motor speed, peak"]["value"] == "1,600 rpm"  # 20 × 80 rpm
        reactions = linkage_loads(solve_linkage(app.project, linkage_specs(app.project)[0]).result,
                                  pusher_loading()).reactions
        assert shown["pin B force, peak"]["value"] == f"{fmt(reactions['B'].peak.value)} N"
        assert shown["slider slide couple, peak"]["value"] == f"{fmt(reactions['slide'].peak_couple.value)} N·m"
        assert "✓ servo within limits" in text(app, "#loads-bar")
        torque_plot = app.query_one("#loads-contact", AnglePlot)
        assert torque_plot.title.startswith("motor torque [N·m]") and torque_plot.points_drawn > 0
        assert "limit ±0.48 N·m (dashed)" in torque_plot.spec.title and "RMS limit ±0.16 N·m" in torque_plot.spec.title
        assert sorted(line.value for line in torque_plot.spec.lines if line.kind == "limit") == [-PEAK, PEAK]
        speed_plot = app.query_one("#loads-torque", AnglePlot)
        assert speed_plot.display and speed_plot.title.startswith("motor speed [rpm]")
        assert "rigid-body estimates" in text(app, "#loads-caution")


async def test_the_readout_follows_the_closed_form():
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=SIZE) as pilot:
        view = await open_loads(app, pilot)
        view.action_go(85.0)
        await pilot.press("right")
        await pilot.pause()
        assert view.angle == 90.0
        shown = text(app, "#loads-readout")
        value = float(re.search(r"torque at pin O (-?[\d.,]+) N·m", shown).group(1).replace(",", ""))
        closed = slider_crank_torque(np.array([math.pi / 2]), 2 * math.pi * PUSHER_SPEED / 60)[0]
        assert value == float(fmt(closed).replace(",", ""))
        assert "motor" in shown and "1,600 rpm" in shown


async def test_a_motor_over_its_limit_is_said_so():
    project = loads_project(preset_path("slider-crank").read_text().replace("peak_torque = 0.48 ", "peak_torque = 0.15 "),
                            "tight.toml")
    _, servo = sizing()
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await open_loads(app, pilot)
        used = servo.motor.peak_torque.value / 0.15
        assert figures(app)["motor torque, peak"]["verdict"] == f"✗ {used * 100:.0f} % of 0.15 N·m"
        assert "✗ SERVO LIMIT EXCEEDED" in text(app, "#loads-bar")


async def test_editing_the_machine_speed_changes_the_drive_torque(tmp_path):
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=SIZE) as pilot:
        await open_loads(app, pilot)
        before = figures(app)["torque at pin O, peak"]["value"]
        await pilot.press("1", "m")
        await pilot.pause()
        app.screen.query_one("#value", Input).value = "120"
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.speed == 120.0
        await pilot.press("5")
        await settle(pilot)
        drive, servo = sizing(120.0)
        after = figures(app)["torque at pin O, peak"]["value"]
        assert after == f"{fmt(drive.peak.value)} N·m" != before
        assert figures(app)["motor speed, peak"]["value"] == "2,400 rpm"  # 20 × 120 rpm
        assert "120 cycles/min" in text(app, "#loads-bar")


async def test_a_linkage_without_loads_says_how_to_add_them():
    app = Workbench(load_project(preset_path("six-bar-press")))
    async with app.run_test(size=SIZE) as pilot:
        view = await open_loads(app, pilot)
        assert view.item_name == "press" and view.item.ok is None
        assert "· no loads given" in text(app, "#loads-bar")
        notes = text(app, "#loads-notes")
        assert "no [linkage.loads] table" in notes and "[[linkage.loads.body]]" in notes
    # the example, under the press linkage, makes a valid project with loads
    spec = linkage_specs(load_project(preset_path("six-bar-press")))[0]
    example = LOADS_EXAMPLE.format(body=spec.bodies[0].name)
    project = loads_project(preset_path("six-bar-press").read_text() + "\n" + example + "\n", "press.toml")
    assert linkage_specs(project)[0].loads.body(spec.bodies[0].name).mass == 0.8
