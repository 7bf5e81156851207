"""The Linkage view as a user drives it: pick a linkage and an output, step the cycle, read the peaks.

The numbers on screen are checked against the linkage study computed
directly in the test (`workbench.linkagestudy.study_linkage` on the same
project) and against textbook closed forms written here:

* the offset slider-crank of presets/slider-crank.toml — position,
  velocity and acceleration of the slider, R. L. Norton, *Design of
  Machinery*, offset slider-crank analysis (from memory; derived again
  below from the loop equation a·e^{iθ2} − b·e^{iθ3} − c·i − d = 0);
  jerk as sympy's third derivative of the closed-form position;
* the output-driven slider-crank of presets/servo-carriage.toml — the
  crank angle from the slider travel, the same loop solved for θ2;
* the limit position of a non-Grashof four-bar — the crank stops where
  coupler and rocker fall in line, |A − O4| = b + c (law of cosines).

Displayed numbers have 4 significant digits (`axisreport.fmt`), so they
are compared with a relative tolerance of 6e-4; master angles are shown to
0.1° (0.01° where a linkage stops).
"""

from __future__ import annotations

import math
import re
import shutil
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
import sympy as sp
from scipy.optimize import minimize_scalar
from textual.widgets import Input, Static

from workbench.app import Workbench
from workbench.axisreport import fmt
from workbench.editing import set_to
from workbench.linkagefile import linkage_specs
from workbench.linkagesolve import solve_linkage
from workbench.linkagestudy import study_linkage
from workbench.presets import preset_path
from workbench.projectfile import load_project, loads_project
from workbench.tui.messages import ProjectEdited
from workbench.tui.screens.edit_value import EditDialog
from workbench.tui.screens.help import binding_sections
from workbench.tui.views.linkage import LinkageView
from workbench.tui.widgets.linkage_data import hermite
from workbench.tui.widgets.linkage_drawing import INVOLVED_MARK, LinkageDrawing, Raster
from workbench.tui.widgets.linkage_empty import EXAMPLE, example_text
from workbench.tui.widgets.linkage_layout import arrange
from workbench.tui.widgets.linkage_plots import LinkagePlot
from workbench.tui.widgets.linkage_report import LinkageReport

from tests.tui_pilot import settle

SIZE = (100, 30)
SHOWN_REL = 6e-4  # 4 significant digits on screen: at most half a unit in the 4th digit
LINKAGE_PRESETS = ("slider-crank", "crank-rocker", "six-bar-press", "servo-carriage")
A_SC, B_SC, C_SC = 55.0, 210.0, 20.0  # presets/slider-crank.toml: crank, rod, offset of the guide line (mm)
SPEED_SC = 80.0  # its machine speed, cycles/min
A_SV, B_SV, C_SV, HOME_SV = 60.0, 200.0, 15.0, 160.0  # presets/servo-carriage.toml: crank, rod, offset, travel at 0


# --- helpers ------------------------------------------------------------------------------


async def open_view(pilot) -> None:
    await settle(pilot)
    await pilot.press("3")
    await settle(pilot)


def view(app) -> LinkageView:
    return app.query_one(LinkageView)


def rows(app) -> dict:
    return app.query_one(LinkageReport).rows


def report_text(app) -> str:
    return "\n".join(app.query_one(LinkageReport).lines)


def report_plain(app) -> str:
    """The report as it reads on screen, table included."""
    from rich.console import Console

    report = app.query_one(LinkageReport)
    console = Console(width=report.size.width, record=True, color_system=None)
    console.print(report.content)
    return console.export_text()


def readout(app) -> str:
    return str(app.query_one("#lk-readout", Static).content)


def bar(app) -> str:
    return str(app.query_one("#lk-bar", Static).content)


def shown_number(text: str) -> float:
    """The number at the start of a shown value: "46,147 mm/s³" → 46147.0."""
    return float(text.split()[0].replace(",", ""))


def number_after(text: str, label: str) -> float:
    match = re.search(re.escape(label) + r" ([-\d.,e+]+)", text)
    assert match, f"{label!r} not in {text!r}"
    return float(match.group(1).replace(",", ""))


def shown_at(deg: float) -> str:
    """A master angle as the table prints it (0.1°)."""
    value = round(deg % 360.0, 1) % 360.0
    return f"{value:.1f}°" if abs(value - round(value)) > 1e-9 else f"{round(value):d}°"


def study_of(project, name=None):
    spec = next(s for s in linkage_specs(project) if name is None or s.name == name)
    return spec, study_linkage(project, spec)


# --- Norton's offset slider-crank ---------------------------------------------------------


def norton_slider_crank(t2: np.ndarray, omega: float):
    """Offset slider-crank, crank at constant speed ω (α2 = 0): slider travel d (mm), ḋ (mm/s), d̈ (mm/s²)
    at crank angle θ2 (rad).  R. L. Norton, Design of Machinery (from memory); the loop
    a·e^{iθ2} − b·e^{iθ3} − c·i − d = 0 gives sin θ3 = (a sin θ2 − c)/b, θ3 on the branch with the
    slider beyond the crank (θ3 in (90°, 270°)), d = a cos θ2 − b cos θ3,
    ω3 = a ω cos θ2 / (b cos θ3), ḋ = −a ω sin θ2 + b ω3 sin θ3,
    α3 = (−a ω² sin θ2 + b ω3² sin θ3)/(b cos θ3), d̈ = −a ω² cos θ2 + b α3 sin θ3 + b ω3² cos θ3."""
    a, b, c = A_SC, B_SC, C_SC
    t3 = math.pi - np.arcsin((a * np.sin(t2) - c) / b)
    d = a * np.cos(t2) - b * np.cos(t3)
    w3 = a * omega * np.cos(t2) / (b * np.cos(t3))
    v = -a * omega * np.sin(t2) + b * w3 * np.sin(t3)
    al3 = (-a * omega**2 * np.sin(t2) + b * w3**2 * np.sin(t3)) / (b * np.cos(t3))
    acc = -a * omega**2 * np.cos(t2) + b * al3 * np.sin(t3) + b * w3**2 * np.cos(t3)
    return d, v, acc


def slider_crank_jerk(omega: float):
    """d⃛ (mm/s³) at θ2 (rad): sympy's third derivative of the closed-form position
    d = a cos θ2 + √(b² − (a sin θ2 − c)²), times ω³."""
    t = sp.symbols("t")
    d = A_SC * sp.cos(t) + sp.sqrt(B_SC**2 - (A_SC * sp.sin(t) - C_SC) ** 2)
    f = sp.lambdify(t, sp.diff(d, t, 3), "numpy")
    return lambda t2: f(t2) * omega**3


def closed_form_peak(f) -> tuple[float, float]:
    """(max of f, master deg) over one cycle: a 0.05° grid, then a bounded scalar search."""
    t = np.linspace(0.0, 360.0, 7201)
    y = f(np.radians(t))
    k = int(np.argmax(y))
    a, b = t[max(k - 1, 0)], t[min(k + 1, t.size - 1)]
    res = minimize_scalar(lambda x: -float(f(np.radians(np.array([x])))[0]), bounds=(a, b), method="bounded",
                          options={"xatol": 1e-9})
    return (-res.fun, res.x) if -res.fun >= y[k] else (y[k], t[k])


# --- every preset against its study ----------------------------------------------------------------


@pytest.mark.parametrize("preset", LINKAGE_PRESETS)
async def test_each_preset_shows_its_study(preset):
    project = load_project(preset_path(preset))
    spec, study = study_of(project)
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        assert view(app).linkage_name == spec.name and view(app).fresh
        assert "✓ solved" in bar(app) and study.status == "solved"
        for d in spec.drivers:
            line = next(x for x in app.query_one(LinkageReport).lines if x.startswith(f"driver {d.name}:"))
            assert (f"follows axis {d.axis}" in line) if d.axis else ("per cycle" in line)
        for out in spec.outputs:
            assert view(app).output_name == out.name
            got, want = rows(app), next(o for o in study.outputs if o.name == out.name)
            unit = want.unit
            assert got["lowest"]["value"] == f"{fmt(want.minimum.value)} {unit}"
            assert got["highest"]["value"] == f"{fmt(want.maximum.value)} {unit}"
            assert got["highest"]["at"] == shown_at(want.maximum.at)
            checks = {c.quantity: c for c in want.checks}
            for q, power in (("velocity", "/s"), ("acceleration", "/s²"), ("jerk", "/s³")):
                peak = want.peaks[q]
                value = "infinite" if peak.infinite else f"{fmt(0.0 if abs(peak.value) < 1e-9 else peak.value)} {unit}{power}"
                assert got[q]["value"] == value, (out.name, q)
                assert got[q]["at"] == shown_at(peak.at)
                if q in checks:
                    assert got[q]["limit"] == f"{fmt(checks[q].limit)} {unit}{power}"
                    assert got[q]["used"] == pytest.approx(checks[q].used)
                    assert f"{checks[q].used * 100:.0f} %" in report_plain(app)  # the share, in 100 columns
                    assert got[q]["verdict"] == ("✓ within" if checks[q].used <= 1.0 else "✗ OVER")
                else:
                    assert got[q]["limit"] == "—" and got[q]["verdict"] == "· no limit"
            if want.max_speed is not None:
                assert f"✓ {fmt(want.max_speed)} cycles/min (now {fmt(project.speed)} cycles/min)" in report_text(app)
            rate = app.query_one("#lk-rate", LinkagePlot)
            assert rate.spec is not None and rate.points_drawn > 0
            if view(app).rate in checks:
                assert f"limit ±{fmt(checks[view(app).rate].limit)}" in rate.spec.title
            await pilot.press("o")
            await settle(pilot)
        drawing = app.query_one(LinkageDrawing)
        assert set(drawing.joint_cells) == {j.name for j in spec.joints}  # every joint drawn


# --- the slider-crank against Norton's closed form ----------------------------------------------------


async def test_slider_crank_peaks_match_norton():
    omega = 2 * math.pi * SPEED_SC / 60.0
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        shown = rows(app)
    high, at_high = closed_form_peak(lambda t: norton_slider_crank(t, omega)[0])
    low, _ = closed_form_peak(lambda t: -norton_slider_crank(t, omega)[0])
    assert shown_number(shown["highest"]["value"]) == pytest.approx(high, rel=SHOWN_REL)
    assert shown_number(shown["lowest"]["value"]) == pytest.approx(-low, rel=SHOWN_REL)
    assert float(shown["highest"]["at"].rstrip("°")) == pytest.approx(at_high, abs=0.051)
    v, at_v = closed_form_peak(lambda t: np.abs(norton_slider_crank(t, omega)[1]))
    a, at_a = closed_form_peak(lambda t: np.abs(norton_slider_crank(t, omega)[2]))
    jerk = slider_crank_jerk(omega)
    j, at_j = closed_form_peak(lambda t: np.abs(jerk(t)))
    for q, value, at in (("velocity", v, at_v), ("acceleration", a, at_a), ("jerk", j, at_j)):
        assert shown_number(shown[q]["value"]) == pytest.approx(value, rel=SHOWN_REL), q
        assert float(shown[q]["at"].rstrip("°")) == pytest.approx(at, abs=0.051), q
    assert shown["velocity"]["used"] == pytest.approx(v / 600.0, rel=1e-6)  # limit 600 mm/s in the preset


async def test_stepping_moves_the_drawing_to_the_solved_point():
    project = load_project(preset_path("slider-crank"))
    spec = linkage_specs(project)[0]
    omega = 2 * math.pi * SPEED_SC / 60.0
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        drawing = app.query_one(LinkageDrawing)
        start = drawing.joint_cells["A"]
        await pilot.press(*["right"] * 9, "shift+right", "shift+right")  # 9 × 5° + 2 × 1°
        await settle(pilot)
        assert view(app).angle == 47.0
        solved = solve_linkage(project, spec, theta=np.radians([47.0])).result
        for joint, (body, point) in (("A", ("crank", "A")), ("B", ("rod", "B"))):
            x, y = solved.point(body, point)[0] * 1e3
            assert drawing.joint_cells[joint] == drawing.raster.cell_of(complex(x, y)), joint
        assert drawing.joint_cells["A"] != start  # the crank turned
        d, v, acc = (float(x[0]) for x in norton_slider_crank(np.radians(np.array([47.0])), omega))
        text = readout(app)
        assert "at master 47°" in text
        assert number_after(text, "stroke") == pytest.approx(d, rel=SHOWN_REL)
        assert number_after(text, "↓") == pytest.approx(v, rel=SHOWN_REL)  # moving back toward the crank
        assert number_after(text, "acceleration") == pytest.approx(acc, rel=SHOWN_REL)
        assert "driver motor at 47°" in text
        for plot in app.query(LinkagePlot):
            assert plot.cursor == 47.0
        await pilot.press("left", "home")
        await settle(pilot)
        assert view(app).angle == 0.0 and drawing.joint_cells["A"] == start


async def test_equal_scale_across_and_down():
    # A braille cell is 2 dots wide and 4 high on a cell about twice as tall as wide: a circle drawn at one
    # scale must come out as wide as it is tall, in dots.
    raster = Raster(40, 20, (-50.0, 50.0, -50.0, 50.0))
    x, y = raster.to_dots(50.0 * np.exp(1j * np.linspace(0, 2 * math.pi, 721)))
    assert x.max() - x.min() == pytest.approx(y.max() - y.min(), abs=1e-9)


def test_arrangement_puts_a_long_flat_linkage_above_the_figures():
    flat, square = (380.0, 125.0), (180.0, 190.0)  # slider-crank and crank-rocker drawings, mm
    wide = arrange(120, 36, flat, table=55, wide_table=70, figure_rows=10, plots=True)
    assert wide.above and wide.side_rows == 10 and wide.drawing_width is None
    tall = arrange(120, 36, square, table=55, wide_table=70, figure_rows=10, plots=True)
    assert not tall.above and tall.drawing_width + 70 + 2 <= 120  # beside, with room for the bars
    small = arrange(80, 20, flat, table=55, wide_table=70, figure_rows=10, plots=True)
    assert not small.above and small.drawing_width == 80 - 55 - 2 and small.plot_rows == 7
    assert arrange(80, 20, flat, table=55, wide_table=70, figure_rows=10, plots=False).plot_rows == 0


def test_hermite_is_exact_on_a_cubic():
    t = np.array([0.0, 0.5, 1.5])
    f, df = (lambda s: 2 * s**3 - s + 1), (lambda s: 6 * s**2 - 1)
    for at in (0.2, 0.75, 1.2):
        assert hermite(t, f(t), df(t), at) == pytest.approx(f(at), abs=1e-12)


# --- keys: outputs, plots, worst spots ----------------------------------------------------------------


async def test_output_plot_and_worst_keys():
    project = load_project(preset_path("crank-rocker"))
    spec, study = study_of(project)
    app = Workbench(project)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_view(pilot)
        swing = next(o for o in study.outputs if o.name == "swing")
        worst = max(swing.checks, key=lambda c: c.used)
        assert view(app).rate == worst.quantity  # until one is picked, the most used limit is plotted
        await pilot.press("w")
        await settle(pilot)
        assert view(app).angle == pytest.approx(swing.peaks[worst.quantity].at % 360.0, abs=1e-6)
        assert f"{worst.quantity} peak" in app.status_text
        await pilot.press("p")
        await settle(pilot)
        assert view(app).rate_chosen and app.query_one("#lk-rate", LinkagePlot).spec.parts[0].startswith(view(app).rate)
        await pilot.press("o", "o")
        await settle(pilot)
        assert view(app).output_name == "transmission"
        assert "transmission angle at B [deg]" in str(app.query_one(LinkageReport).content.renderables[0])
        await pilot.press("O")
        await settle(pilot)
        assert view(app).output_name == "tip-y"
        await pilot.press("z")
        await settle(pilot)
        assert view(app).zoomed and not app.query_one("#lk-plots").display
        assert app.query_one(LinkageDrawing).size.width == 120  # the drawing takes the view
        await pilot.press("z")
        await settle(pilot)
        assert app.query_one("#lk-plots").display
        sections = dict(binding_sections(app, [("Linkage view", view(app))]))
        described = {row[1] for row in sections["Linkage view"]}
        assert {"Output", "Plot", "Zoom", "Worst spot"} <= described  # the help is built from the bindings


# --- the output-driven linkage ---------------------------------------------------------------------


def crank_from_travel(s: np.ndarray) -> np.ndarray:
    """Crank angle θ2 (deg) of the offset slider-crank for slider travel s (mm): the loop
    (s − a cos θ2)² + (a sin θ2 − c)² = b² gives cos(θ2 − φ) = (s² + a² + c² − b²)/(2a√(s² + c²)),
    φ = atan2(c, s); the preset's branch (crank up and back at home) is θ2 = φ + acos(…)."""
    a, b, c = A_SV, B_SV, C_SV
    phi = np.arctan2(c, s)
    return np.degrees(phi + np.arccos((s * s + a * a + c * c - b * b) / (2 * a * np.hypot(s, c))))


async def test_servo_carriage_shows_the_motor_profile():
    project = load_project(preset_path("servo-carriage"))
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        assert view(app).output_name == "motor"
        header = str(app.query_one(LinkageReport).content.renderables[0])
        assert "angle at pin O [deg]" in header and "motor profile at pin O (output-driven)" in header
        assert "driver stroke: the travel on slider rail follows axis carriage, offset 160 mm" in report_text(app)
        await pilot.press(*["right"] * 15)  # 75°: half way through the out stroke
        await settle(pilot)
        travel = HOME_SV + float(project.programs["carriage"].master(np.array([75.0]))[0][0])
        text = readout(app)
        assert number_after(text, "motor") == pytest.approx(float(crank_from_travel(np.array([travel]))[0]),
                                                            rel=SHOWN_REL)
        assert number_after(text, "driver stroke at") == pytest.approx(travel, rel=SHOWN_REL)
        assert app.query_one("#lk-rate", LinkagePlot).spec.extras["cuts"] == (30.0, 180.0, 210.0)


# --- edits in the Axes view reach the linkage ---------------------------------------------------------


@pytest.fixture
def carriage_file(tmp_path) -> Path:
    path = tmp_path / "carriage.toml"
    shutil.copy(preset_path("servo-carriage"), path)
    return path


async def edit_from_axes_view(pilot, edited) -> None:
    """An edit sent up as the Axes view sends every edit (how its cells are typed is its own tests'
    business)."""
    pilot.app.query_one("#axes").post_message(ProjectEdited(edited, "edited in the Axes view"))
    await settle(pilot)
    assert pilot.app.project is edited


async def test_editing_the_driving_axis_changes_the_output_peak(carriage_file):
    disk = carriage_file.read_text()
    app = Workbench(load_project(carriage_file))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        before = rows(app)["velocity"]["value"]
        await pilot.press("1")
        await settle(pilot)
        assert app.query_one("#axes").axis_name == "carriage"
        await edit_from_axes_view(pilot, set_to(app.project, "carriage", 1, 60.0))  # segment 2 (modified sine out)
        assert app.project.axis("carriage").segments[1].to == 60.0
        await pilot.press("3")
        await settle(pilot)
        _, study = study_of(app.project)  # the edited project, studied directly
        motor = next(o for o in study.outputs if o.name == "motor")
        after = rows(app)["velocity"]
        assert after["value"] == f"{fmt(motor.peaks['velocity'].value)} deg/s" != before
        assert after["at"] == shown_at(motor.peaks["velocity"].at)
        await pilot.press("ctrl+z")  # undo from the Linkage view: back to the file's linkage
        await settle(pilot)
        assert rows(app)["velocity"]["value"] == before
    assert carriage_file.read_text() == disk  # nothing written: the view showed the edited project


async def test_renaming_the_driving_axis_keeps_the_linkage_running(carriage_file):
    app = Workbench(load_project(carriage_file))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        before = rows(app)["velocity"]["value"]
        await pilot.press("1")
        await settle(pilot)
        await pilot.press("n")  # the Axes view's rename: the value dialog
        await pilot.pause()
        assert isinstance(app.screen, EditDialog)
        assert app.screen.prompt == ('name — unique among the axes; linkage "drive" driver "stroke" follows it, '
                                     'renamed with it:')
        app.screen.query_one("#value", Input).value = "gripper"  # the other axis: refused, nothing changes
        await pilot.pause()
        assert app.screen.error == "name: another axis is called 'gripper'; axis names must be unique"
        app.screen.query_one("#value", Input).value = "sled"
        await pilot.pause()
        assert app.screen.error is None
        await pilot.press("enter")
        await settle(pilot)
        assert app.status_text == 'renamed axis carriage to sled (linkage "drive" driver "stroke" too)'
        assert app.query_one("#axes").axis_name == "sled"
        assert [d.axis for d in linkage_specs(app.project)[0].drivers] == ["sled"]
        await pilot.press("3")
        await settle(pilot)
        assert "✗" not in bar(app)  # still built and solved under the new name
        assert rows(app)["velocity"]["value"] == before  # the same motion: the same peak
        await pilot.press("ctrl+s")
        await settle(pilot)
    text = carriage_file.read_text()
    assert 'name = "sled"               # the motion program: carriage stroke, mm' in text  # the comment keeps its column
    assert 'axis = "sled"\n' in text and 'name = "carriage"\n' in text  # the body keeps its name
    assert linkage_specs(load_project(carriage_file))[0].drivers[0].axis == "sled"


async def test_an_edit_elsewhere_needs_no_new_study():
    app = Workbench(load_project(preset_path("slider-crank")))  # a crank turned steadily: no axis drives it
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        entry = view(app).entry
        await pilot.press("1")
        await settle(pilot)
        await edit_from_axes_view(pilot, set_to(app.project, app.project.axes[0].name, 0, 25.0))
        await pilot.press("3")
        await settle(pilot)
        assert view(app).entry is entry and view(app).fresh  # the lane-gate axis does not move the pusher


# --- linkages that do not run ---------------------------------------------------------------------------

A_NG, B_NG, C_NG, D_NG = 50.0, 60.0, 55.0, 100.0  # crank, coupler, rocker, ground: not Grashof
WOBBLER = f"""\
version = 1

[machine]
speed = 60

[[linkage]]
name = "wobbler"

[linkage.ground]
O2 = [0.0, 0.0]
O4 = [{D_NG}, 0.0]

[[linkage.body]]
name = "crank"
place = [0.0, 0.0, 0.0]
points = {{ O2 = [0.0, 0.0], A = [{A_NG}, 0.0] }}

[[linkage.body]]
name = "coupler"
place = [50.0, 0.0, 60.0]
points = {{ A = [0.0, 0.0], B = [{B_NG}, 0.0] }}

[[linkage.body]]
name = "rocker"
place = [100.0, 0.0, 120.0]
points = {{ O4 = [0.0, 0.0], B = [{C_NG}, 0.0] }}

[[linkage.joint]]
name = "O2"
pin = ["ground.O2", "crank.O2"]

[[linkage.joint]]
name = "A"
pin = ["crank.A", "coupler.A"]

[[linkage.joint]]
name = "B"
pin = ["coupler.B", "rocker.B"]

[[linkage.joint]]
name = "O4"
pin = ["ground.O4", "rocker.O4"]

[[linkage.driver]]
name = "motor"
joint = "O2"
turns = 1

[[linkage.output]]
name = "swing"
angle = "rocker"
"""
DRIVER = '[[linkage.driver]]\nname = "motor"\njoint = "O2"\nturns = 1\n'


async def test_a_dead_point_is_shown_where_it_stops():
    a, b, c, d = A_NG, B_NG, C_NG, D_NG
    assert min(a, b, c, d) + max(a, b, c, d) > a + b + c + d - min(a, b, c, d) - max(a, b, c, d)  # not Grashof
    limit = math.degrees(math.acos((a * a + d * d - (b + c) ** 2) / (2 * a * d)))  # coupler and rocker in line
    project = loads_project(WOBBLER)
    app = Workbench(project)
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        shown = float(re.search(r"DEAD POINT at master ([\d.]+)°", bar(app)).group(1))
        assert shown == pytest.approx(limit, abs=0.006)  # shown to 0.01°
        assert view(app).angle == pytest.approx(limit, abs=1e-3)  # drawn where it stops
        assert "stops at master" in app.status_text
        text = report_text(app)
        assert f"joints involved: A{INVOLVED_MARK}, B{INVOLVED_MARK}, O4{INVOLVED_MARK}" in text
        assert "limit position" in text and "bodies it moves: coupler, rocker" in text
        drawing = app.query_one(LinkageDrawing)
        picture = drawing.render().plain
        assert f"B{INVOLVED_MARK}" in picture and f"O4{INVOLVED_MARK}" in picture  # named in the drawing
        # the drawing holds the linkage at the dead point: B where coupler and rocker fall in line
        tip = a * np.exp(1j * math.radians(limit))
        along = (complex(d, 0.0) - tip) / abs(complex(d, 0.0) - tip)
        assert drawing.joint_cells["B"] == drawing.raster.cell_of(tip + b * along)
        assert "✗ it stops here" in readout(app) and "grow without bound" in readout(app)
        assert rows(app) == {}  # no peaks for a cycle that does not solve
        # the swing's range so far reaches the rocker's angle at the stop: the angle of B − O4 with
        # coupler and rocker in line (the construction above)
        swing_at_stop = math.degrees(np.angle(tip + b * along - d))
        reached = app.query_one("#lk-position", LinkagePlot).spec.parts[1]
        assert reached.endswith(f" … {swing_at_stop:.4g} deg so far"), reached
        await pilot.press("right")
        await settle(pilot)
        assert view(app).angle == pytest.approx(limit, abs=1e-3) and "cannot be stepped past" in app.status_text
        await pilot.press("left", "left")
        await settle(pilot)
        assert view(app).angle == pytest.approx(limit - 10.0, abs=1e-3)
        assert "stops here" not in readout(app) and "at master" in readout(app)
        position = app.query_one("#lk-position", LinkagePlot).spec
        assert position.parts[-1] == f"stops at {limit:.2f}°"


async def test_an_under_driven_linkage_names_its_free_motion():
    app = Workbench(loads_project(WOBBLER.replace(DRIVER, "")))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        assert "✗ NOT DRIVEN: 1 free degree(s) of freedom" in bar(app)
        text = report_text(app)
        assert "free motion 1: moves crank, coupler, rocker; joints it works: O2, A, B, O4" in text
        assert "drawn assembled at master 0°" in text
        assert "no drivers" in text
        assert set(app.query_one(LinkageDrawing).joint_cells) == {"O2", "A", "B", "O4"}  # drawn as it stands
        await pilot.press("right", "w")
        await settle(pilot)
        assert view(app).angle == 0.0 and "does not move" in readout(app)


async def test_a_linkage_that_does_not_assemble_says_so():
    far = 400.0  # the ground pivots 400 mm apart; crank, coupler and rocker reach 165 mm end to end
    app = Workbench(loads_project(WOBBLER.replace("O4 = [100.0, 0.0]", f"O4 = [{far}, 0.0]")))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        assert "✗ NOT ASSEMBLED at master 0.00°" in bar(app)
        text = report_text(app)
        assert "drawn as near as it comes to assembling at master 0°" in text
        line = next(x for x in app.query_one(LinkageReport).lines if x.startswith("joints that stay open:"))
        gaps = [float(g) for g in re.findall(r"\(([\d.]+) mm apart\)", line)]
        # the nearest configuration lays the chain straight along O2–O4: its joints' gaps add up to the
        # shortfall of the chain (geometry of a straight line)
        assert sum(gaps) == pytest.approx(far - (A_NG + B_NG + C_NG), rel=SHOWN_REL)
        assert "B!" in line and app.query_one(LinkageDrawing).render().plain.count(INVOLVED_MARK) >= 2
        assert not app.query_one("#lk-plots").display  # nothing to plot


async def test_a_study_that_fails_is_said_not_left_computing(monkeypatch):
    import workbench.tui.views.linkage_studies as linkage_studies

    def broken(project, spec):
        raise RuntimeError("solver out of order")

    monkeypatch.setattr(linkage_studies, "study_entry", broken)
    app = Workbench(load_project(preset_path("slider-crank")))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        assert "✗ COULD NOT BE STUDIED" in bar(app) and view(app).fresh
        assert "RuntimeError: solver out of order" in report_text(app) and "solver out of order" in app.status_text
        assert "drawn as placed in the file" in report_text(app)
        assert set(app.query_one(LinkageDrawing).joint_cells) == {"O", "A", "B", "slide"}  # the file's drawing


async def test_an_axis_a_driver_follows_gone_is_said_where():
    project = load_project(preset_path("servo-carriage"))
    spec = linkage_specs(project)[0]
    gone = replace(spec, drivers=(replace(spec.drivers[0], axis="no-such-axis"),))
    app = Workbench(replace(project, parts={**project.parts, "linkage": [gone]}))
    async with app.run_test(size=SIZE) as pilot:
        await open_view(pilot)
        assert "✗ CANNOT BE BUILT" in bar(app)
        assert 'driver "stroke": key "axis": no axis \'no-such-axis\'' in report_text(app)


async def test_no_linkage_shows_a_valid_example():
    app = Workbench(load_project(preset_path("tray-lidder")))
    async with app.run_test(size=(80, 24)) as pilot:
        await open_view(pilot)
        assert not app.query_one("#lk-top").display and app.query_one("#lk-empty").display
        await pilot.press("right", "o", "w")
        await settle(pilot)
        assert view(app).angle == 0.0  # linkage keys are off without a linkage
        await pilot.resize_terminal(120, 40)
        await settle(pilot)
        content = app.query_one("#lk-empty-text", Static).content
    from rich.console import Console

    console = Console(width=200, record=True)
    console.print(content)
    shown = console.export_text()
    assert "This project has no [[linkage]] table." in shown and '[[linkage.driver]]' in shown
    readme = (Path(__file__).parents[1] / "README.md").read_text()
    for key in ("[linkage.ground]", 'pin = ["crank.A", "rod.A"]', 'slider = ["ground.G", "head.B"]', "turns = 1.0"):
        assert key in readme and key in EXAMPLE  # the README's slider-crank, shortened
    project = loads_project(preset_path("tray-lidder").read_text() + "\n" + example_text() + "\n")
    spec, study = study_of(project, "pusher")  # the example is a valid table, and it runs
    assert study.status == "solved" and [o.name for o in spec.outputs] == ["stroke"]


# --- snapshots (state asserted first; see tests/test_tui_snapshots.py for what keeps them stable) ---------

def test_linkage_view_80x24(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("slider-crank")))

    async def check(pilot):
        await open_view(pilot)
        await pilot.press(*["right"] * 9)
        await settle(pilot)
        assert view(app).angle == 45.0 and rows(app)["velocity"]["verdict"] == "✓ within"

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)


def test_linkage_view_output_driven_120x40(snap_compare, plain_environment):
    app = Workbench(load_project(preset_path("servo-carriage")))

    async def check(pilot):
        await open_view(pilot)
        await pilot.press(*["right"] * 20)
        await settle(pilot)
        assert view(app).angle == 100.0 and view(app).output_name == "motor"

    assert snap_compare(app, terminal_size=(120, 40), run_before=check)


def test_linkage_dead_point_80x24(snap_compare, plain_environment):
    app = Workbench(loads_project(WOBBLER))

    async def check(pilot):
        await open_view(pilot)
        assert "DEAD POINT" in bar(app)

    assert snap_compare(app, terminal_size=(80, 24), run_before=check)
