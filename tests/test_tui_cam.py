"""The Cam view as a user drives it: pick a cam, turn it, read the checks, export, edit its axis.

The numbers on screen are checked against the cam solved directly in the
test — `solver.cam` on the preset's follower sizes — and against textbook
forms (DESIGN §5): the translating roller pressure angle
φ = atan((s' − e)/(s + √(Rp² − e²))) (the standard form in machine-design
texts, e.g. Norton, *Design of Machinery*, cam chapter), and the radius of
curvature of a parametric curve ρ = (x'² + y'²)^{3/2}/(x'y'' − y'x'')
evaluated by central finite differences on the pitch curve laid out by hand.
The exported CSV is compared byte for byte with `camwright profile`.
"""

from __future__ import annotations

import math
import re
from dataclasses import replace

import numpy as np
import pytest
from textual.widgets import Input, Static

from solver.cam import Cam, OscillatingRoller, TranslatingRoller, Turning, analyse, motion_from_program
from workbench.app import Workbench
from workbench.axisreport import fmt
from workbench.cli import main as cli_main
from workbench.editing import set_to
from workbench.presets import preset_path
from workbench.projectfile import load_project, loads_project
from workbench.tui.messages import ProjectEdited
from workbench.tui.screens.confirm import ChoiceDialog
from workbench.tui.screens.edit_value import EditDialog
from workbench.tui.screens.path_prompt import PathDialog
from workbench.tui.views.axis_rename import rename_dialog
from workbench.tui.views.cam import CamView
from workbench.tui.widgets.cam_empty import example_text
from workbench.tui.widgets.cam_drawing import CORNER_MARK, TROUBLE_MARK, CamDrawing, Raster
from workbench.tui.widgets.cam_plots import AnglePlot, runs
from workbench.tui.widgets.cam_verdicts import CamVerdicts

from tests.tui_pilot import settle

SIZE = (100, 30)
STAMP = dict(prime=0.060, roller=0.012, offset=0.006)  # presets/cam-press.toml, [[cam]] "stamp-cam", in m
FEED = dict(pivot=0.100, arm=0.070, prime=0.050, roller=0.010)  # [[cam]] "feed-cam"


def stamp_cam(project) -> Cam:
    """The stamp cam built straight from solver.cam (mm axis → m)."""
    motion = motion_from_program(project.programs["stamp"], 1e-3)
    return Cam(motion, TranslatingRoller(STAMP["prime"], STAMP["roller"], STAMP["offset"]), Turning.CLOCKWISE)


def shown_deg(rad: float) -> str:
    """A cam angle as the screen prints it."""
    value = round(math.degrees(rad) % 360.0, 1) % 360.0
    return f"{value:.1f}°" if abs(value - round(value)) > 1e-9 else f"{round(value):d}°"


def view(app) -> CamView:
    return app.query_one(CamView)


def rows(app) -> dict:
    return {r["check"]: r for r in app.query_one(CamVerdicts).rows}


def readout(app) -> str:
    return str(app.query_one("#cam-readout", Static).content)


def number_after(text: str, label: str) -> float:
    match = re.search(re.escape(label) + r" (-?[\d.,]+)", text)
    assert match, f"{label!r} not in {text!r}"
    return float(match.group(1).replace(",", ""))


# --- checks on screen against the solver and textbook forms -------------------------


async def test_stamp_cam_checks_match_the_solver(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        assert view(app).cam_name == "stamp-cam"
        a = analyse(stamp_cam(app.project))
        shown = rows(app)
        pa = shown["pressure angle"]
        assert pa["value"] == f"{fmt(math.degrees(a.max_pressure_angle.value))}°"
        assert pa["at"] == shown_deg(a.max_pressure_angle.at)
        assert pa["limit"] == "≤ 30° file" and pa["verdict"] == "✓ within"
        assert math.degrees(a.max_pressure_angle.value) < 30.0
        undercut = shown["undercut"]
        assert undercut["value"] == f"{fmt(a.pitch_radii.convex.value * 1e3)} mm"
        assert undercut["verdict"] == "✓ none" and not a.undercut
        ratio = shown["curvature ratio"]
        assert ratio["value"] == f"{a.pitch_radii.convex.value / STAMP['roller']:.2f}×"
        assert ratio["limit"] == "≥ 2× *"  # common practice: the file sets no curvature ratio
        radii = {r["curve"]: r for r in app.query_one(CamVerdicts).radii}
        assert radii["pitch curve"]["convex"] == f"{fmt(a.pitch_radii.convex.value * 1e3)} mm"
        assert radii["profile"]["convex"] == f"{fmt(a.profile_radii.convex.value * 1e3)} mm"
        assert radii["pitch curve"]["concave"] == ("none" if a.pitch_radii.concave is None else
                                                   f"{fmt(a.pitch_radii.concave.value * 1e3)} mm")
        assert "✓ all checks pass" in str(app.query_one("#cam-bar", Static).content)
        plot = app.query_one("#cam-pressure", AnglePlot)
        assert plot.spec.extras["largest"] == pytest.approx(math.degrees(a.max_pressure_angle.value))
        assert "limit ±30°" in plot.title and plot.points_drawn > 0


def textbook_pressure_angle(program, theta_deg: float) -> float:
    """φ = atan((s' − e)/(s + √(Rp² − e²))), s and s' = ds/dθ per rad in m (DESIGN §5 textbook form)."""
    s, s1, _, _ = (np.atleast_1d(v)[0] for v in program.master(np.array([theta_deg])))
    s, s1 = s * 1e-3, s1 * 1e-3
    e, rp = STAMP["offset"], STAMP["prime"]
    return math.degrees(math.atan((s1 - e) / (s + math.sqrt(rp * rp - e * e))))


def finite_difference_pitch_radius(program, theta_deg: float) -> float:
    """ρ = (x'² + y'²)^{3/2}/(x'y'' − y'x'') (mm) of the pitch curve laid out by hand — roller centre
    at (σe, √(Rp² − e²) + s) in the machine frame, turned into the cam frame by −σθ (σ = −1 for a
    clockwise cam) — with central differences of step 0.01°."""
    h = math.radians(0.01)
    theta = math.radians(theta_deg) + np.array([-h, 0.0, h])
    s = np.asarray(program.master(np.degrees(theta))[0]) * 1e-3
    e, rp, sigma = STAMP["offset"], STAMP["prime"], -1
    z = (sigma * e + 1j * (math.sqrt(rp * rp - e * e) + s)) * np.exp(-1j * sigma * theta)
    d1 = (z[2] - z[0]) / (2 * h)
    d2 = (z[2] - 2 * z[1] + z[0]) / h**2
    x1, y1, x2, y2 = d1.real, d1.imag, d2.real, d2.imag
    return abs((x1 * x1 + y1 * y1) ** 1.5 / (x1 * y2 - y1 * x2)) * 1e3


async def test_turning_the_cam_reads_textbook_values(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        before = app.query_one(CamDrawing).render().plain
        await pilot.press(*["right"] * 32)  # 32 × 5° = 160°: on the down stroke
        await pilot.press("shift+right", "shift+right")  # + 2 × 1°
        await settle(pilot)
        assert view(app).angle == 162.0
        text = readout(app)
        assert "at cam angle 162°" in text
        program = app.project.programs["stamp"]
        lift = float(program.master(np.array([162.0]))[0][0])
        assert number_after(text, "follower") == pytest.approx(lift, rel=1e-3)
        assert "↑ rising" in text
        assert number_after(text, "pressure angle") == pytest.approx(textbook_pressure_angle(program, 162.0),
                                                                     abs=0.051)
        assert number_after(text, "pitch ρ") == pytest.approx(finite_difference_pitch_radius(program, 162.0),
                                                              rel=6e-3)  # shown to 3 significant digits
        assert app.query_one(CamDrawing).render().plain != before  # the cam turned, the follower rose
        for plot in view(app).query(AnglePlot):
            assert plot.cursor == 162.0
        await pilot.press("left", "home")
        await settle(pilot)
        assert view(app).angle == 0.0 and "at cam angle 0°" in readout(app)
        assert "at rest" in readout(app)


async def test_worst_spots_in_turn(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        a = analyse(stamp_cam(app.project))
        await pilot.press("4", "w")  # asked before the cams are studied: done when they are
        await settle(pilot)
        assert view(app).angle == pytest.approx(float(shown_deg(a.max_pressure_angle.at).rstrip("°")))
        assert "largest pressure angle" in app.status_text
        await pilot.press("w")
        await settle(pilot)
        assert view(app).angle == pytest.approx(float(shown_deg(a.pitch_radii.convex.at).rstrip("°")))
        assert "least convex radius" in app.status_text


async def test_cam_picker_and_oscillating_follower(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4", "full_stop")
        await settle(pilot)
        assert view(app).cam_name == "feed-cam"
        motion = motion_from_program(app.project.programs["feed-lever"], math.pi / 180.0)
        follower = OscillatingRoller(FEED["pivot"], FEED["arm"], FEED["prime"], FEED["roller"])
        a = analyse(Cam(motion, follower, Turning.CLOCKWISE))
        pa = rows(app)["pressure angle"]
        assert pa["value"] == f"{fmt(math.degrees(a.max_pressure_angle.value))}°"
        assert pa["limit"] == "≤ 35° *"  # common practice for oscillating followers (cautious end of 35–45°)
        assert "follower 0° at rest" in readout(app)  # an axis in deg: the arm angle
        await pilot.press("full_stop", "full_stop", "comma")
        await settle(pilot)
        assert view(app).cam_name == "stripper-cam"
        shown = rows(app)
        assert set(shown) == {"pressure angle", "cusp", "face width", "profile radius"}
        assert shown["profile radius"]["limit"] == "≥ 8 mm file"
        assert "pitch ρ" not in readout(app)  # a flat face has no pitch curve


async def test_equal_scale_across_and_down():
    # A braille cell is 2 dots wide and 4 high on a cell about twice as tall as wide: a circle
    # drawn at one scale must come out as wide as it is tall, in dots.
    raster = Raster(40, 20, (-50.0, 50.0, -50.0, 50.0))
    t = np.linspace(0, 2 * math.pi, 721)
    x, y = raster.to_dots(50.0 * np.exp(1j * t))
    width, height = x.max() - x.min(), y.max() - y.min()
    assert width == pytest.approx(height, abs=1e-9)
    assert height <= 20 * 4 and width <= 40 * 2


def test_runs_break_where_a_radius_goes_through_infinity():
    values = np.array([50.0, 400.0, np.inf, -400.0, -60.0, -50.0, np.nan, 30.0])
    pieces = runs(values, -100.0, 100.0)
    assert [(p.start, p.stop) for p in pieces] == [(0, 2), (3, 6), (7, 8)]


# --- export ------------------------------------------------------------------------------


async def test_export_csv_equals_the_profile_command(press_file, tmp_path):
    app = Workbench(load_project(press_file))
    target = tmp_path / "from-screen.csv"
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4", "e")
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        await pilot.press("c")
        await pilot.pause()
        assert isinstance(app.screen, PathDialog)
        field = app.screen.query_one("#path", Input)
        assert field.value == str(press_file.parent / "stamp-cam.csv")
        field.value = str(tmp_path / "no-such-folder" / "x.csv")
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, PathDialog) and "no folder" in app.screen.error  # refused where typed
        field.value = str(target)
        await pilot.press("enter")
        await settle(pilot)
        assert target.exists()
        assert app.status_text.startswith(f"wrote {target}") and "✓ all checks pass" in app.status_text
    command = tmp_path / "from-command.csv"
    assert cli_main(["profile", str(press_file), "--cam", "stamp-cam", "--out", str(command)]) == 0
    assert target.read_bytes() == command.read_bytes()


async def test_export_asks_before_overwriting_and_refuses_an_uncuttable_dxf(tmp_path):
    text = preset_path("cam-press").read_text().replace(
        "prime_radius = 60.0         # mm\nroller_radius = 12.0", "prime_radius = 50.0\nroller_radius = 40.0")
    path = tmp_path / "undercut.toml"
    path.write_text(text)
    (tmp_path / "stamp-cam.svg").write_text("old")
    app = Workbench(load_project(path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4", "e", "d")
        await settle(pilot)
        assert not isinstance(app.screen, PathDialog)
        assert app.status_text.startswith("✗ no DXF") and "undercut from" in app.status_text
        assert not (tmp_path / "stamp-cam.dxf").exists()
        # the reason is longer than the status line at 100 columns: it is also shown whole
        assert [n.message for n in app._notifications] == [app.status_text.removeprefix("✗ ")]
        await pilot.press("e", "s")
        await pilot.pause()
        await pilot.press("enter")  # the proposed path exists: asked first
        await pilot.pause()
        assert isinstance(app.screen, ChoiceDialog)
        await pilot.press("o")
        await settle(pilot)
        svg = (tmp_path / "stamp-cam.svg").read_text()
        assert svg.startswith("<?xml") and "UNDERCUT" in svg
        assert "fails a check" in app.status_text


# --- the cam follows its axis as edited ----------------------------------------------------


async def test_editing_the_axis_changes_the_cam(press_file):
    disk = press_file.read_text()
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        before = rows(app)["pressure angle"]["value"]
        await pilot.press("1")
        await settle(pilot)
        # segment 2 (poly345 down) to end at 30 mm, as the Axes view sends any edit up (the cell
        # editing itself is the Axes view's tests' business)
        edited = set_to(app.project, "stamp", 1, 30.0)
        app.query_one("#axes").post_message(ProjectEdited(edited, "end position of segment 2"))
        await settle(pilot)
        assert app.project is edited and app.project.axis("stamp").segments[1].to == 30.0
        await pilot.press("4")
        await settle(pilot)
        a = analyse(stamp_cam(app.project))  # the edited project, solved directly
        after = rows(app)["pressure angle"]
        assert after["value"] == f"{fmt(math.degrees(a.max_pressure_angle.value))}°" != before
        assert after["at"] == shown_deg(a.max_pressure_angle.at)
        view(app).action_go(210.0)
        await pilot.press("right")  # 215°: on the 30 mm dwell
        await settle(pilot)
        assert number_after(readout(app), "follower") == pytest.approx(30.0)
        await pilot.press("ctrl+z")  # undo in the Cam view: back to the file's cam
        await settle(pilot)
        assert rows(app)["pressure angle"]["value"] == before
    assert press_file.read_text() == disk  # nothing written: the view showed the edited project


# --- the follower's sizes, edited in the Cam view ----------------------------------------


async def open_size(pilot, key: str) -> EditDialog:
    """`s` in the Cam view, then the size's key in the list: the value dialog."""
    await pilot.press("s")
    await pilot.pause()
    assert isinstance(pilot.app.screen, ChoiceDialog)
    await pilot.press(key)
    await pilot.pause()
    assert isinstance(pilot.app.screen, EditDialog)
    return pilot.app.screen


async def type_value(pilot, text: str) -> None:
    pilot.app.screen.query_one("#value", Input).value = text
    await pilot.pause()


async def test_an_offset_typed_in_the_cam_view_reaches_the_geometry_and_the_file(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        sizes = app.query_one("#cam-sizes", Static)
        assert str(sizes.content) == "sizes: prime_radius 60 mm · roller_radius 12 mm · offset 6 mm (s: change)"
        await pilot.press("s")  # the list names every size of the follower with its value
        await pilot.pause()
        assert [(k, w) for k, w, _ in app.screen.answers] == [("a", "prime_radius"), ("b", "roller_radius"),
                                                               ("c", "offset")]
        assert "6 mm" in app.screen.answers[2][2]
        await pilot.press("escape")
        await pilot.pause()
        dialog = await open_size(pilot, "c")
        assert dialog.query_one("#value", Input).value == "6"
        await type_value(pilot, "-4 mm")
        assert dialog.error is None
        assert "offset 6 mm → -4 mm" in str(dialog.query_one("#feedback", Static).content)
        await pilot.press("enter")
        await settle(pilot)
        assert dict(app.project.parts["cam"][0].sizes)["offset"] == -4.0
        assert app.status_text == "cam stamp-cam: offset 6 mm → -4 mm" and app.history.can_undo
        assert view(app).entry.study.cam.follower.offset == pytest.approx(-0.004)
        assert str(sizes.content) == "sizes: prime_radius 60 mm · roller_radius 12 mm · offset -4 mm (s: change)"
        view(app).action_go(160.0)
        await pilot.press("shift+right", "shift+right")
        await settle(pilot)
        program = app.project.programs["stamp"]
        s, s1, _, _ = (float(np.atleast_1d(v)[0]) for v in program.master(np.array([162.0])))
        e, rp = -4.0, 60.0  # mm: the textbook form with the new offset
        phi = math.degrees(math.atan((s1 - e) / (s + math.sqrt(rp * rp - e * e))))
        assert number_after(readout(app), "pressure angle") == pytest.approx(phi, abs=0.051)
        await pilot.press("ctrl+s")
        await settle(pilot)
    text = press_file.read_text()
    changed = [(a, b) for a, b in zip(preset_path("cam-press").read_text().splitlines(), text.splitlines()) if a != b]
    assert len(text.splitlines()) == len(preset_path("cam-press").read_text().splitlines())
    assert [b for _, b in changed] == ["offset = -4.0               # mm, to the side that eases the down stroke"]  # the comment keeps its column
    assert dict(load_project(press_file).parts["cam"][0].sizes)["offset"] == -4.0


async def test_a_size_the_cam_cannot_take_is_refused_in_the_dialog(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        before = app.project
        dialog = await open_size(pilot, "b")
        await type_value(pilot, "70")
        assert dialog.error == ("roller_radius = 70 mm: roller_radius must be smaller than prime_radius "
                                "(the base circle would vanish) — with prime_radius 60 mm, offset 6 mm")
        assert str(dialog.query_one("#feedback", Static).content) == f"✗ {dialog.error}"
        await pilot.press("enter")  # refused: the dialog stays, the model is unchanged
        await pilot.pause()
        assert app.screen is dialog and app.project is before
        await type_value(pilot, "")
        assert dialog.error == "roller_radius: type a number"  # a roller follower needs its roller
        await pilot.press("escape")
        await settle(pilot)
        assert app.project is before and not app.history.can_undo and not app.history.modified
        dialog = await open_size(pilot, "a")  # enter on the value as it was: no edit, no undo step
        assert dialog.query_one("#value", Input).value == "60"
        await pilot.press("enter")
        await settle(pilot)
        assert app.project is before and not app.history.can_undo
        assert app.status_text == "cam stamp-cam: prime_radius: unchanged"


async def test_a_size_edit_is_undone_in_one_step_and_an_optional_one_can_go(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        await open_size(pilot, "b")
        await type_value(pilot, "15")
        await pilot.press("enter")
        await settle(pilot)
        # base circle = prime circle − roller radius (definition)
        assert view(app).entry.study.cam.follower.base_radius == pytest.approx(0.045)
        undercut = rows(app)["undercut"]
        assert undercut["limit"] == "> 15 mm roller"
        await pilot.press("ctrl+z")
        await settle(pilot)
        assert dict(app.project.parts["cam"][0].sizes)["roller_radius"] == 12.0 and not app.history.modified
        assert rows(app)["undercut"]["limit"] == "> 12 mm roller"
        await pilot.press("full_stop", "full_stop")  # the stripper's flat face: face_width is optional
        await settle(pilot)
        dialog = await open_size(pilot, "c")
        await type_value(pilot, "")
        assert dialog.error is None
        await pilot.press("enter")
        await settle(pilot)
        assert app.project.parts["cam"][2].size("face_width") is None
        assert "face width" not in rows(app)
        await pilot.press("ctrl+s")
        await settle(pilot)
    assert "face_width" not in press_file.read_text()
    assert load_project(press_file).parts["cam"][2].size("face_width") is None


async def test_renaming_the_cam_s_axis_in_the_axes_view_carries_the_cam_along(press_file):
    app = Workbench(load_project(press_file))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        before = rows(app)["pressure angle"]["value"]
        await pilot.press("1")
        await settle(pilot)
        await pilot.press("n")
        await pilot.pause()
        dialog = app.screen
        assert isinstance(dialog, EditDialog) and dialog.query_one("#value", Input).value == "stamp"
        await type_value(pilot, "feed-lever")
        assert dialog.error == "name: another axis is called 'feed-lever'; axis names must be unique"
        await pilot.press("enter")  # refused: the dialog stays and nothing changes
        await pilot.pause()
        assert app.screen is dialog and not app.history.can_undo
        await type_value(pilot, "punch")
        assert str(dialog.query_one("#feedback", Static).content) == '✓ stamp → punch; cam "stamp-cam" follows'
        await pilot.press("enter")
        await settle(pilot)
        assert app.status_text == 'renamed axis stamp to punch (cam "stamp-cam" too)'
        assert app.query_one("#axes").axis_name == "punch"
        assert app.project.parts["cam"][0].axis == "punch"
        await pilot.press("4")
        await settle(pilot)
        assert "axis punch" in str(app.query_one("#cam-bar", Static).content)
        assert rows(app)["pressure angle"]["value"] == before  # the same motion: the same cam
        await pilot.press("ctrl+z")  # one step back: the axis and its cam both
        await settle(pilot)
        assert app.project.axes[0].name == "stamp" and app.project.parts["cam"][0].axis == "stamp"
        assert not app.history.can_undo and not app.history.modified
        await pilot.press("ctrl+y", "ctrl+s")
        await settle(pilot)
    old, new = preset_path("cam-press").read_text().splitlines(), press_file.read_text().splitlines()
    assert [(a, b) for a, b in zip(old, new) if a != b] == [('name = "stamp"', 'name = "punch"'),
                                                            ('axis = "stamp"', 'axis = "punch"')]
    assert load_project(press_file).parts["cam"][0].axis == "punch"


def test_the_rename_prompt_says_what_follows_the_axis():
    lidder = load_project(preset_path("tray-lidder"))  # no cams, no linkages
    assert rename_dialog(lidder, "tray-pusher").prompt == ("name — unique among the axes; no cam or linkage "
                                                           "driver follows it:")
    press = load_project(preset_path("cam-press"))
    assert rename_dialog(press, "stamp").prompt == ('name — unique among the axes; cam "stamp-cam" follows it, '
                                                    'renamed with it:')


async def test_a_cam_an_edit_cannot_lay_out_is_reported_not_raised(unlaid_press):
    broken = unlaid_press
    app = Workbench(broken)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        assert "✗ CANNOT BE LAID OUT" in str(app.query_one("#cam-bar", Static).content)
        assert "no axis 'gone'" in readout(app)
        await pilot.press("e")
        await settle(pilot)
        assert app.status_text.startswith("✗ cam stamp-cam cannot be laid out")
        await pilot.press("full_stop")
        await settle(pilot)
        assert rows(app)["pressure angle"]["verdict"] == "✓ within"


async def test_undercut_is_marked_with_a_symbol(tmp_path):
    text = preset_path("cam-press").read_text().replace(
        "prime_radius = 60.0         # mm\nroller_radius = 12.0", "prime_radius = 50.0\nroller_radius = 40.0")
    project = loads_project(text)
    motion = motion_from_program(project.programs["stamp"], 1e-3)
    a = analyse(Cam(motion, TranslatingRoller(0.050, 0.040, STAMP["offset"]), Turning.CLOCKWISE))
    assert a.undercut  # a 40 mm roller on a pitch curve whose least convex radius is smaller
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        assert rows(app)["undercut"]["verdict"] == "✗ UNDERCUT"
        assert app.query_one(CamDrawing).marks[TROUBLE_MARK] > 0
        assert app.query_one(CamDrawing).marks[CORNER_MARK] == 0
        start, end = a.undercut[0].start, a.undercut[0].end
        assert f"× undercut {shown_deg(start)}–{shown_deg(end)}" in _plain(app.query_one(CamVerdicts))
        assert "✗ CHECK FAILED" in str(app.query_one("#cam-bar", Static).content)
        middle = math.degrees((start + end) / 2)
        view(app).action_go(middle - 1.0)
        await pilot.press("shift+right")
        await settle(pilot)
        assert "× undercut here" in readout(app)


async def test_cusp_of_a_flat_face_is_marked_with_a_symbol():
    # A translating flat face has a cusp where Rb + s + s'' ≤ 0 (DESIGN §5): on a 20 mm base circle the
    # stripper's 8 mm poly345 strokes over 60° decelerate harder than that (Ca = 5.774, handbook).
    project = loads_project(preset_path("cam-press").read_text().replace("base_radius = 45.0", "base_radius = 20.0"))
    program = project.programs["stripper"]
    theta = np.linspace(0.0, 360.0, 36001)
    s, _, s2, _ = program.master(theta)
    assert np.min(20.0 + s + s2) < 0.0  # the textbook condition, straight from the motion
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4", "comma")
        await settle(pilot)
        assert view(app).cam_name == "stripper-cam"
        assert rows(app)["cusp"]["verdict"] == "✗ CUSP"
        assert app.query_one(CamDrawing).marks[TROUBLE_MARK] > 0
        assert "× cusp" in _plain(app.query_one(CamVerdicts))
        worst = dict(view(app).spots())
        view(app).action_go(worst["cusp"] + 1.0)
        await settle(pilot)
        assert "× cusp here" in readout(app)


def _plain(widget) -> str:
    """The text a Static shows, rendered to plain lines."""
    from rich.console import Console

    console = Console(width=200, record=True)
    console.print(widget.content)
    return console.export_text()


async def test_no_cam_shows_a_valid_example():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        shown = str(app.query_one("#cam-empty-text", Static).content)
        assert shown.startswith("This project has no [[cam]] table.")
        assert not app.query_one("#cam-top").display
        await pilot.press("e", "right", "s")
        await settle(pilot)
        assert view(app).angle == 0.0  # cam keys are off without a cam
        assert not isinstance(app.screen, ChoiceDialog) and view(app).check_action("sizes", ()) is False
    example = example_text("lid-lift")
    assert example in shown
    project = loads_project(preset_path("tray-lidder").read_text() + "\n" + example + "\n")
    assert [c.name for c in project.parts["cam"]] == ["lid-lift-cam"]  # the example is a valid table


# --- snapshots (state asserted first; see tests/test_tui_snapshots.py for what keeps them stable) ---

def test_cam_view_80x24(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("cam-press")))

    async def check(pilot):
        await settle(pilot)
        await pilot.press("4")
        await settle(pilot)
        view(app).action_go(150.0)
        await pilot.press("right", "right")
        await settle(pilot)
        assert view(app).angle == 160.0 and rows(app)["pressure angle"]["verdict"] == "✓ within"

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_cam_view_oscillating_120x40(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("cam-press")))

    async def check(pilot):
        await settle(pilot)
        await pilot.press("4", "full_stop", *["right"] * 9)
        await settle(pilot)
        assert view(app).cam_name == "feed-cam" and view(app).angle == 45.0
        assert "share of limit" in _plain(app.query_one(CamVerdicts))  # wide enough for the bars

    assert snap_compare(app, terminal_size=(120, 40), run_before=check)
