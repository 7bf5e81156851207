"""The Loads view: spring-closed cam followers' contact force and camshaft torque, and the linkage hook.

Figures on screen are checked against `solver.loads` run directly in the
test on the preset's numbers, and readouts against the rigid-body force
balance along the follower, N = m·s̈ + k·(x0 + s) + F_friction·sign(ṡ)
(the textbook kinetostatics of a force-closed follower, e.g. Norton, *Cam
Design and Manufacturing Handbook*, dynamics chapter; from memory), with the
cycloidal law's closed form y = x − sin(2πx)/(2π) (DESIGN §3) and
T·ω = N·ṡ for the camshaft torque (power balance, frictionless contact).
Moving mass = follower + a third of the spring (common practice).
"""

from __future__ import annotations

import math
import re
import shutil
from dataclasses import replace

import numpy as np
import pytest
from textual.widgets import Input, Static

from solver.loads import FollowerLoad, follower_forces, preload_for_margin, scaled_motion
from workbench.app import Workbench
from workbench.axisreport import fmt
from workbench.editing import set_speed
from workbench.presets import preset_path
from workbench.projectfile import load_project, loads_project
from workbench.tui.views.loads import LOADS_EXAMPLE, FigureTable, LoadsView
from workbench.tui.widgets import loads_data
from workbench.tui.widgets.cam_plots import AnglePlot, Curve, PlotSpec
from workbench.tui.widgets.loads_data import Figure, LoadsItem

from tests.tui_pilot import settle

SIZE = (100, 30)
STAMP = dict(mass=2.4, spring_mass=0.4, rate=8.0, preload=180.0, friction=15.0, margin=50.0)  # presets/cam-press
FEED = dict(mass=0.6, rate=2.0, preload=40.0, margin=20.0, arm=0.070)


def view(app) -> LoadsView:
    return app.query_one(LoadsView)


def figures(app) -> dict:
    return app.query_one(FigureTable).rows


def readout(app) -> str:
    return str(app.query_one("#loads-readout", Static).content)


def number_after(text: str, label: str) -> float:
    match = re.search(re.escape(label) + r" (-?[\d.,]+)", text)
    assert match, f"{label!r} not in {text!r}"
    return float(match.group(1).replace(",", ""))


def stamp_load() -> FollowerLoad:
    """The stamp follower in SI: kg, N/m, N."""
    return FollowerLoad(mass=STAMP["mass"] + STAMP["spring_mass"] / 3.0, spring_rate=STAMP["rate"] * 1e3,
                        preload=STAMP["preload"], friction=STAMP["friction"])


def deg(value: float) -> str:
    return f"{round(value, 1) % 360.0:g}°"


async def test_stamp_follower_figures_match_the_solver():
    app = Workbench(load_project(preset_path("cam-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        assert view(app).item_name == "stamp-cam"
        motion = scaled_motion(app.project.programs["stamp"], 1e-3)
        forces = follower_forces(motion, stamp_load(), 90.0)
        shown = figures(app)
        least = shown["least contact force"]
        assert least["value"] == f"{fmt(forces.min_contact)} N" and least["at"] == deg(forces.min_contact_at)
        assert least["verdict"] == "✓ kept" and not forces.jumps
        spare = forces.min_contact - STAMP["margin"]
        assert shown["margin wanted"]["verdict"] == f"✓ met, {fmt(spare)} N to spare"
        assert shown["max speed without jump"]["value"] == f"{fmt(forces.jump_speed)} cycles/min"
        need = preload_for_margin(motion, stamp_load(), 90.0, STAMP["margin"])
        assert shown["preload for the margin"]["value"] == f"{fmt(need)} N"
        assert need == pytest.approx(STAMP["preload"] - spare)  # the preload adds to N everywhere
        peak = shown["camshaft torque, peak"]
        assert peak["value"] == f"{fmt(forces.peak_torque)} N·m" and peak["at"] == deg(forces.peak_torque_at)
        assert shown["camshaft torque, RMS"]["value"] == f"{fmt(forces.rms_torque)} N·m"
        assert "✓ contact holds" in str(app.query_one("#loads-bar", Static).content)
        caution = str(app.query_one("#loads-caution", Static).content)
        assert "rigid-body estimates" in caution
        contact = app.query_one("#loads-contact", AnglePlot)
        assert "margin 50 N (dashed)" in contact.title and contact.points_drawn > 0


def cycloidal_return(theta_deg: float, start: float = 230.0, span: float = 90.0, lift: float = 20.0):
    """s (m), ds/dθ (m/rad), d²s/dθ² (m/rad²) of the stamp's cycloidal return, by its closed form."""
    beta = math.radians(span)
    x = (theta_deg - start) / span
    y = x - math.sin(2 * math.pi * x) / (2 * math.pi)
    y1 = 1 - math.cos(2 * math.pi * x)
    y2 = 2 * math.pi * math.sin(2 * math.pi * x)
    return lift * (1 - y) * 1e-3, -lift * y1 / beta * 1e-3, -lift * y2 / beta**2 * 1e-3


async def test_readout_follows_the_force_balance():
    app = Workbench(load_project(preset_path("cam-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        # on the base circle at rest: only the preload
        assert number_after(readout(app), "contact force") == pytest.approx(STAMP["preload"])
        view(app).action_go(210.0)
        await pilot.press("right")  # 215°: at rest on the 20 mm dwell
        await settle(pilot)
        assert "at cam angle 215°" in readout(app)
        assert number_after(readout(app), "contact force") == pytest.approx(STAMP["preload"] + STAMP["rate"] * 20.0)
        assert number_after(readout(app), "camshaft torque") == 0.0
        await pilot.press(*["right"] * 6)  # 245°: a sixth into the cycloidal return
        await settle(pilot)
        s, s1, s2 = cycloidal_return(245.0)
        w = 2 * math.pi * 90.0 / 60.0
        m = STAMP["mass"] + STAMP["spring_mass"] / 3.0
        n = m * s2 * w * w + STAMP["rate"] * 1e3 * s + STAMP["preload"] - STAMP["friction"]  # moving down
        assert number_after(readout(app), "contact force") == pytest.approx(n, rel=5e-4)
        assert number_after(readout(app), "camshaft torque") == pytest.approx(n * s1, rel=5e-4)
        for plot in view(app).query(AnglePlot):
            assert plot.cursor == 245.0


async def test_oscillating_follower_forces_at_the_roller():
    app = Workbench(load_project(preset_path("cam-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5", "full_stop")
        await settle(pilot)
        assert view(app).item_name == "feed-cam"
        arm = FEED["arm"]
        load = FollowerLoad(mass=FEED["mass"] * arm**2, spring_rate=FEED["rate"] * 1e3 * arm**2,
                            preload=FEED["preload"] * arm)  # moments about the pivot: force × arm
        forces = follower_forces(scaled_motion(app.project.programs["feed-lever"], math.pi / 180.0), load, 90.0)
        least = figures(app)["least contact force at 70 mm"]
        assert least["value"] == f"{fmt(forces.min_contact / arm)} N"
        assert figures(app)["camshaft torque, peak"]["value"] == f"{fmt(forces.peak_torque)} N·m"
        assert "70 mm from the pivot" in str(app.query_one("#loads-notes", Static).content)


async def test_editing_the_machine_speed_changes_the_loads(tmp_path):
    path = tmp_path / "press.toml"
    shutil.copy(preset_path("cam-press"), path)
    app = Workbench(load_project(path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        before = figures(app)["camshaft torque, peak"]["value"]
        await pilot.press("1", "m")
        await pilot.pause()
        app.screen.query_one("#value", Input).value = "150"
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.speed == 150.0
        await pilot.press("5")
        await settle(pilot)
        forces = follower_forces(scaled_motion(app.project.programs["stamp"], 1e-3), stamp_load(), 150.0)
        after = figures(app)["camshaft torque, peak"]["value"]
        assert after == f"{fmt(forces.peak_torque)} N·m" != before
        assert figures(app)["max speed without jump"]["verdict"] == "✓ now 150 cycles/min"
        assert "150 cycles/min" in str(app.query_one("#loads-bar", Static).content)


async def test_above_the_jump_speed_the_follower_is_said_to_jump():
    project = set_speed(load_project(preset_path("cam-press")), 500.0)
    forces = follower_forces(scaled_motion(project.programs["stamp"], 1e-3), stamp_load(), 500.0)
    assert forces.jumps and forces.jump_speed < 500.0  # the speed above the highest without jump
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        shown = figures(app)
        assert shown["least contact force"]["value"] == f"{fmt(forces.min_contact)} N"
        assert shown["least contact force"]["verdict"] == "✗ LOST: the follower jumps"
        assert shown["margin wanted"]["verdict"].startswith("✗ NOT MET")
        assert shown["max speed without jump"]["verdict"] == "✗ now 500 cycles/min"
        assert "✗ CONTACT AT RISK" in str(app.query_one("#loads-bar", Static).content)


async def test_a_linkage_without_loads_is_named(monkeypatch):
    project = load_project(preset_path("cam-press"))
    with_linkage = replace(project, parts={**project.parts, "linkage": [{"name": "stamp-drive"}]})
    monkeypatch.delitem(loads_data.LOADS_SOURCES, "linkage", raising=False)
    app = Workbench(with_linkage)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        pending = str(app.query_one("#loads-pending", Static).content)
        assert "1 [[linkage]] table" in pending and "not shown in this view yet" in pending


async def test_a_linkage_source_plugs_into_the_hook(monkeypatch):
    project = load_project(preset_path("cam-press"))
    with_linkage = replace(project, parts={**project.parts, "linkage": [{"name": "stamp-drive"}]})

    def drive(p):
        curve = Curve(np.array([0.0, 180.0, 360.0]), np.array([0.0, 3.0, 0.0]), "white")
        spec = PlotSpec(("driver torque [N·m]",), (curve,))
        return [LoadsItem("stamp-drive", "linkage driver", True, "✓ within", ("crank",), (spec,),
                          (Figure("driver torque, peak", "3 N·m", "180°"),))]

    monkeypatch.setitem(loads_data.LOADS_SOURCES, "linkage", drive)
    app = Workbench(with_linkage)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5", "comma")
        await settle(pilot)
        assert view(app).item_name == "stamp-drive"
        assert figures(app)["driver torque, peak"]["value"] == "3 N·m"
        assert str(app.query_one("#loads-pending", Static).content) == ""
        assert not app.query_one("#loads-torque", AnglePlot).display  # one plot given: one shown


async def test_no_loads_shows_a_valid_example():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        shown = str(app.query_one("#loads-empty-text", Static).content)
        assert shown.startswith("No loads to show") and LOADS_EXAMPLE in shown
        assert "[linkage.loads]" in shown and "presets/slider-crank.toml" in shown  # the linkage way too
        assert app.query_one("#loads-empty").display and not app.query_one("#loads-plots").display
    # the example under the stripper cam (which has no loads) makes a valid project
    text = preset_path("cam-press").read_text() + "\n" + LOADS_EXAMPLE + "\n"
    project = loads_project(text)
    assert project.parts["cam"][-1].loads is not None


# --- snapshots ----------------------------------------------------------------------------

def test_loads_view_80x24(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("cam-press")))

    async def check(pilot):
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        view(app).action_go(240.0)
        await pilot.press("right")
        await settle(pilot)
        assert view(app).angle == 245.0 and figures(app)["least contact force"]["verdict"] == "✓ kept"

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_loads_view_oscillating_120x40(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("cam-press")))

    async def check(pilot):
        await settle(pilot)
        await pilot.press("5", "full_stop")
        await settle(pilot)
        view(app).action_go(85.0)
        await pilot.press("right")
        await settle(pilot)
        assert view(app).item_name == "feed-cam" and view(app).angle == 90.0

    assert snap_compare(app, terminal_size=(120, 40), run_before=check)


async def test_a_failing_source_is_said_and_the_others_still_show(monkeypatch):
    def broken(project):
        raise ValueError("singular matrix at 212°")

    monkeypatch.setitem(loads_data.LOADS_SOURCES, "linkage", broken)
    app = Workbench(load_project(preset_path("cam-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        assert [i.name for i in view(app).items] == ["stamp-cam", "feed-cam", "[[linkage]]"]
        await pilot.press("comma")
        await settle(pilot)
        assert "✗ NOT COMPUTED" in str(app.query_one("#loads-bar", Static).content)
        assert "singular matrix at 212°" in str(app.query_one("#loads-notes", Static).content)


# --- the cursor's abscissa, and items of words only ---------------------------------------


async def test_a_linkage_item_reads_at_master_angle_a_cam_item_at_cam_angle():
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        assert view(app).item.kind == "linkage driver"
        await pilot.press("right", "right")
        await settle(pilot)
        assert view(app).angle == 10.0
        assert readout(app).startswith("at master angle 10° (← →): torque at pin O ")
        assert "cam angle" not in readout(app)
    app = Workbench(load_project(preset_path("cam-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5", "right")
        await settle(pilot)
        # the camshaft turns once per cycle (README, Cams): its cam angle is the master angle, and the
        # readout above (test_readout_follows_the_force_balance) matches the axis at that master angle
        assert view(app).item.kind == "cam follower"
        assert readout(app).startswith("at cam angle 5° (← →): contact force ")


def words_only_shown(app) -> bool:
    """True when the view shows an item's words and nothing else: no plot strip, no figure table, no
    caution, no cursor readout."""
    return (not app.query_one("#loads-plots").display and not app.query_one(FigureTable).display
            and not app.query_one("#loads-caution").display and not app.query_one("#loads-readout").display
            and app.query_one("#loads-notes").has_class("-words"))


async def test_a_linkage_without_loads_shows_its_hint_alone():
    from workbench.tui.widgets.loads_linkage import LOADS_EXAMPLE as LINKAGE_EXAMPLE

    app = Workbench(load_project(preset_path("six-bar-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        assert [(i.name, i.plots, i.figures) for i in view(app).items] == [("press", (), ())]
        assert words_only_shown(app)
        notes = str(app.query_one("#loads-notes", Static).content)
        assert notes.startswith("This linkage has no [linkage.loads] table")
        assert LINKAGE_EXAMPLE.format(body="crank") in notes
        bar_bottom = app.query_one("#loads-bar").region.bottom
        assert app.query_one("#loads-notes").content_region.y == bar_bottom + 1  # one blank row
        assert not view(app).check_action("step", ()) and not view(app).check_action("go", ())
        await pilot.press("right")  # no cursor: nothing moves
        await settle(pilot)
        assert view(app).angle == 0.0 and str(app.query_one("#loads-readout", Static).content) == ""


async def test_stepping_from_a_plotted_item_to_words_and_back(monkeypatch):
    def failed(project):
        return [LoadsItem("stamp-drive", "linkage driver", False, "✗ CANNOT BE COMPUTED", (), (), (),
                          ("the loads cannot be computed now — body crank: mass: must be above 0",))]

    monkeypatch.setitem(loads_data.LOADS_SOURCES, "linkage", failed)
    app = Workbench(load_project(preset_path("cam-press")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("5", "comma")  # back from the first cam to the last item
        await settle(pilot)
        assert view(app).item_name == "stamp-drive" and words_only_shown(app)
        assert "✗ CANNOT BE COMPUTED" in str(app.query_one("#loads-bar", Static).content)
        await pilot.press("full_stop")
        await settle(pilot)
        assert view(app).item_name == "stamp-cam" and not words_only_shown(app)
        assert app.query_one("#loads-plots").display and app.query_one("#loads-plots").region.height >= 7
        assert app.query_one("#loads-contact", AnglePlot).points_drawn > 0
        assert "least contact force" in figures(app) and app.query_one(FigureTable).display
        assert readout(app).startswith("at cam angle 0°")
        await pilot.press("right")
        await settle(pilot)
        assert view(app).angle == 5.0


def test_loads_view_words_only_80x24(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("six-bar-press")))  # a linkage without [linkage.loads]

    async def check(pilot):
        await settle(pilot)
        await pilot.press("5")
        await settle(pilot)
        assert words_only_shown(app) and view(app).item_name == "press"

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)
