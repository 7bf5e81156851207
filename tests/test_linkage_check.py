"""Linkages in `camwright check` and `camwright table`, against textbook closed forms.

References, each written here independently of the solver:
* offset slider-crank: R. L. Norton, Design of Machinery, position, velocity
  and acceleration closed forms (from memory); jerk as sympy's derivative of
  the closed-form position;
* four-bar: F. Freudenstein's equation (1955) in the half-angle form of
  Norton, ch. 4 (from memory), Norton's velocity form; higher derivatives by
  finite differences of the closed form; Grashof's condition;
* six-bar: the four-bar closed form followed by the rod-and-ram triangle;
* the output-driven slider-crank: the inverted closed form crank(stroke),
  differentiated by sympy and chained with the axis program;
* every preset: finite differences of the table's positions.
Peaks of a reference are found on a dense grid and refined with
scipy.optimize.minimize_scalar.
"""

from __future__ import annotations

import csv
import io
import json
import math
import re
import tomllib

import numpy as np
import pytest
import sympy as sp
from scipy.optimize import minimize_scalar

from motionlaws import compile_axis
from workbench.cli import main
from workbench.presets import preset_path
from workbench.projectfile import load_project

from test_linkagefile import GOOD

QUANTITIES = ("velocity", "acceleration", "jerk")
PEAK_REL = 1e-7  # the product promises 0.1 %; the solver's refinement does far better
AT_DEG = 1e-3  # where a smooth peak lies, master degrees


# --- helpers ----------------------------------------------------------------------------


def run(capsys, *args):
    code = main(list(args))
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def check_doc(capsys, path):
    code, out, _ = run(capsys, "check", str(path), "--json")
    return code, json.loads(out)


def output_doc(doc, linkage, output):
    lk = next(x for x in doc["linkages"] if x["name"] == linkage)
    return next(o for o in lk["outputs"] if o["name"] == output)


def table_rows(capsys, path, name, step):
    code, out, err = run(capsys, "table", str(path), "--axis", name, "--step", str(step))
    assert code == 0, err
    rows = list(csv.reader(io.StringIO(out)))
    return rows[0], np.array(rows[1:], dtype=float)


def speed_of(name):
    return float(tomllib.loads(preset_path(name).read_text())["machine"]["speed"])


def stencil(order, half=4):
    """Central finite-difference weights on offsets −half..half (unit spacing): Taylor
    conditions solved directly (B. Fornberg, Math. Comp. 51, 1988, gives the same)."""
    x = np.arange(-half, half + 1, dtype=float)
    rhs = np.zeros(x.size)
    rhs[order] = math.factorial(order)
    return np.linalg.solve(np.vander(x, x.size, increasing=True).T, rhs)


def fd(f, theta, order, h=2e-3):
    """order-th derivative per rad of f (vectorized over θ, rad) by a 9-point central stencil."""
    w = stencil(order)
    return sum(wk * f(theta + k * h) for k, wk in zip(range(-4, 5), w)) / h**order


def peak(f, lo=0.0, hi=360.0, grid=7201):
    """(max of f, master deg) over [lo, hi] deg: dense grid, then a bounded scalar search."""
    t = np.linspace(lo, hi, grid)
    y = f(np.radians(t))
    k = int(np.argmax(y))
    a, b = t[max(k - 1, 0)], t[min(k + 1, grid - 1)]
    res = minimize_scalar(lambda x: -float(f(np.radians(np.array([x])))[0]), bounds=(a, b), method="bounded",
                          options={"xatol": 1e-9})
    return (-res.fun, res.x) if -res.fun >= y[k] else (y[k], t[k])


def assert_peaks(out, refs, speed):
    """Output JSON against reference functions of θ (rad): position and its per-rad derivatives."""
    omega = 2 * math.pi * speed / 60
    pos, d1, d2, d3 = refs
    high, at_high = peak(pos)
    low, at_low = peak(lambda t: -pos(t))
    assert out["range"]["max"]["value"] == pytest.approx(high, rel=PEAK_REL, abs=1e-9)
    assert out["range"]["min"]["value"] == pytest.approx(-low, rel=PEAK_REL, abs=1e-9)
    for k, (q, d) in enumerate(zip(QUANTITIES, (d1, d2, d3)), start=1):
        value, at = peak(lambda t, d=d: np.abs(d(t)))
        got = out["peaks"][q]
        assert got["value"] == pytest.approx(value * omega**k, rel=PEAK_REL), q
        assert abs((got["at"] - at + 180) % 360 - 180) < AT_DEG, (q, got["at"], at)


# --- slider-crank: Norton's closed form ---------------------------------------------------

A_SC, B_SC, C_SC = 55.0, 210.0, 20.0  # presets/slider-crank.toml: crank, rod, offset of the guide line (mm)


def norton_slider_crank(t2):
    """Offset slider-crank (Norton, Design of Machinery; from memory), crank at constant speed
    (α2 = 0), per rad of crank angle: slider position d, d', d''; θ3 on the branch with
    the slider beyond the crank."""
    t3 = math.pi - np.arcsin((A_SC * np.sin(t2) - C_SC) / B_SC)
    d = A_SC * np.cos(t2) - B_SC * np.cos(t3)
    w3 = A_SC / B_SC * np.cos(t2) / np.cos(t3)
    v = -A_SC * np.sin(t2) + B_SC * w3 * np.sin(t3)
    al3 = (-A_SC * np.sin(t2) + B_SC * w3**2 * np.sin(t3)) / (B_SC * np.cos(t3))
    acc = -A_SC * np.cos(t2) + B_SC * al3 * np.sin(t3) + B_SC * w3**2 * np.cos(t3)
    return d, v, acc


def slider_crank_jerk():
    """d''' per rad³: sympy's third derivative of the closed-form position."""
    t = sp.symbols("t")
    d = A_SC * sp.cos(t) + sp.sqrt(B_SC**2 - (A_SC * sp.sin(t) - C_SC) ** 2)  # −b cos θ3 = +√(b² − (a sin θ2 − c)²)
    return sp.lambdify(t, sp.diff(d, t, 3), "numpy")


def test_slider_crank_preset_against_norton(capsys):
    code, doc = check_doc(capsys, preset_path("slider-crank"))
    assert code == 0 and doc["ok"]
    lk = doc["linkages"][0]
    assert lk["status"] == "solved" and lk["dof"]["dof"] == 0
    jerk = slider_crank_jerk()
    refs = (lambda t: norton_slider_crank(t)[0], lambda t: norton_slider_crank(t)[1],
            lambda t: norton_slider_crank(t)[2], jerk)
    stroke = output_doc(doc, "pusher", "stroke")
    assert stroke["unit"] == "mm"
    assert_peaks(stroke, refs, speed_of("slider-crank"))
    # the face is 45 mm ahead of the pin, and the guide point sits at x = 0
    face = output_doc(doc, "pusher", "face-x")
    assert face["range"]["max"]["value"] == pytest.approx(stroke["range"]["max"]["value"] + 45.0, rel=1e-12)
    assert face["peaks"]["jerk"]["value"] == pytest.approx(stroke["peaks"]["jerk"]["value"], rel=1e-9)
    # used = peak / limit; max speed N·min(v_lim/v, √(a_lim/a), ∛(j_lim/j)) (DESIGN §3)
    n = speed_of("slider-crank")
    lim = stroke["limits"]
    ratios = [lim[q] / stroke["peaks"][q]["value"] for q in QUANTITIES]
    assert stroke["used"]["velocity"] == pytest.approx(1 / ratios[0], rel=1e-12)
    assert stroke["max_speed"] == pytest.approx(n * min(ratios[0], ratios[1] ** 0.5, ratios[2] ** (1 / 3)), rel=1e-12)


def test_slider_crank_table_against_norton(capsys):
    head, rows = table_rows(capsys, preset_path("slider-crank"), "pusher.stroke", 7.5)
    assert head == ["master [deg]", "position [mm]", "velocity [mm/s]", "acceleration [mm/s^2]", "jerk [mm/s^3]"]
    assert rows[0, 0] == 0.0 and rows[-1, 0] == 352.5 and len(rows) == 48
    t = np.radians(rows[:, 0])
    omega = 2 * math.pi * speed_of("slider-crank") / 60
    d, v, a = norton_slider_crank(t)
    j = slider_crank_jerk()(t)
    for col, ref in zip(rows.T[1:], (d, v * omega, a * omega**2, j * omega**3)):
        assert np.max(np.abs(col - ref)) < 1e-9 * np.max(np.abs(ref))


# --- four-bar: Freudenstein -----------------------------------------------------------------

FOUR = dict(a=30.0, b=120.0, c=80.0, d=110.0)  # presets/crank-rocker.toml (mm)


def freudenstein(t2, a, b, c, d, sign):
    """Rocker angle θ4 from Freudenstein's equation, half-angle form (Norton ch. 4, from memory)."""
    k1, k2, k3 = d / a, d / c, (a * a - b * b + c * c + d * d) / (2 * a * c)
    A = np.cos(t2) - k1 - k2 * np.cos(t2) + k3
    B = -2 * np.sin(t2)
    C = k1 - (k2 + 1) * np.cos(t2) + k3
    return 2 * np.arctan2(-B + sign * np.sqrt(B * B - 4 * A * C), 2 * A)


def four_bar(t2, a, b, c, d):
    """θ3, θ4 (rad) of the branch drawn with B above the ground line at θ2 = 0."""
    sign = next(s for s in (-1.0, 1.0) if np.sin(freudenstein(np.array([0.0]), a, b, c, d, s))[0] > 0)
    t4 = np.mod(freudenstein(t2, a, b, c, d, sign), 2 * math.pi)  # the rocker stays above: angles in [0, 360°)
    bx, by = d + c * np.cos(t4), c * np.sin(t4)
    t3 = np.arctan2(by - a * np.sin(t2), bx - a * np.cos(t2))
    return t3, t4


def test_crank_rocker_is_grashof_and_turns_fully(capsys):
    # Grashof (Norton ch. 2): s + l ≤ p + q, the shortest link the crank → crank-rocker
    spec = load_project(preset_path("crank-rocker")).parts["linkage"][0]
    ground = dict(spec.ground)
    points = {b.name: dict(b.points) for b in spec.bodies}
    links = {
        "crank": math.dist(points["crank"]["O2"], points["crank"]["A"]),
        "coupler": math.dist(points["coupler"]["A"], points["coupler"]["B"]),
        "rocker": math.dist(points["rocker"]["O4"], points["rocker"]["B"]),
        "ground": math.dist(ground["O2"], ground["O4"]),
    }
    s, l = min(links.values()), max(links.values())
    assert s + l <= sum(links.values()) - s - l and links["crank"] == s
    code, doc = check_doc(capsys, preset_path("crank-rocker"))
    assert code == 0 and doc["linkages"][0]["status"] == "solved"


def test_crank_rocker_preset_against_freudenstein(capsys):
    code, doc = check_doc(capsys, preset_path("crank-rocker"))
    speed = speed_of("crank-rocker")

    def t4(t):
        return four_bar(t, **FOUR)[1]

    def w4(t):  # Norton's velocity form: ω4 = (a ω2 / c) sin(θ2 − θ3) / sin(θ4 − θ3), ω2 = 1
        t3, t4_ = four_bar(t, **FOUR)
        return FOUR["a"] / FOUR["c"] * np.sin(t - t3) / np.sin(t4_ - t3)

    deg = 180 / math.pi
    swing = output_doc(doc, "flap", "swing")
    assert swing["unit"] == "deg"
    assert_peaks(swing, (lambda t: t4(t) * deg, lambda t: w4(t) * deg, lambda t: fd(w4, t, 1) * deg,
                         lambda t: fd(w4, t, 2) * deg), speed)
    tip = output_doc(doc, "flap", "tip-y")  # the tip is 150 mm out along the rocker
    assert_peaks(tip, (lambda t: 150 * np.sin(t4(t)), lambda t: 150 * np.cos(t4(t)) * w4(t),
                       lambda t: fd(lambda u: 150 * np.cos(t4(u)) * w4(u), t, 1),
                       lambda t: fd(lambda u: 150 * np.cos(t4(u)) * w4(u), t, 2)), speed)


def test_transmission_angle_against_the_closed_form(capsys):
    """μ at B: the acute angle between coupler and rocker (Norton ch. 4); its extremes sit at
    θ2 = 0 and 180°, where cos μ = (b² + c² − (d ∓ a)²)/(2bc)."""
    _, doc = check_doc(capsys, preset_path("crank-rocker"))
    mu = output_doc(doc, "flap", "transmission")
    a, b, c, d = FOUR.values()
    least = math.degrees(math.acos((b * b + c * c - (d - a) ** 2) / (2 * b * c)))
    most = math.degrees(math.acos((b * b + c * c - (d + a) ** 2) / (2 * b * c)))
    most = min(most, 180 - most)
    assert mu["range"]["min"]["value"] == pytest.approx(least, rel=1e-9) and mu["range"]["min"]["at"] == 0.0
    assert mu["range"]["max"]["value"] == pytest.approx(most, rel=1e-9)
    assert abs(mu["range"]["max"]["at"] - 180.0) < AT_DEG


# --- six-bar press: four-bar, then the rod and ram -------------------------------------------

SIX = dict(a=35.0, b=125.0, c=80.0, d=120.0)  # presets/six-bar-press.toml (mm)
BEAM_C, ROD, GUIDE_X, GUIDE_Y = (-15.0, -100.0), 180.0, 215.0, -300.0


def ram(t):
    """Ram height above the guide point: C on the beam (rotated with θ4 about O4), D below C on x = 215."""
    t4 = four_bar(t, **SIX)[1]
    cx = SIX["d"] + BEAM_C[0] * np.cos(t4) - BEAM_C[1] * np.sin(t4)
    cy = BEAM_C[0] * np.sin(t4) + BEAM_C[1] * np.cos(t4)
    return cy - np.sqrt(ROD**2 - (GUIDE_X - cx) ** 2) - GUIDE_Y


def test_six_bar_press_against_the_chained_closed_form(capsys):
    code, doc = check_doc(capsys, preset_path("six-bar-press"))
    assert code == 0
    out = output_doc(doc, "press", "ram")
    assert_peaks(out, (ram, lambda t: fd(ram, t, 1), lambda t: fd(ram, t, 2), lambda t: fd(ram, t, 3, h=4e-3)),
                 speed_of("six-bar-press"))


def test_a_transmission_angle_passing_90_degrees_has_infinite_acceleration(capsys):
    """μ = min(ψ, 180° − ψ) turns back where ψ passes 90°: its rate flips sign (a velocity jump)."""
    _, doc = check_doc(capsys, preset_path("six-bar-press"))
    mu = output_doc(doc, "press", "beam-transmission")

    def psi(t):
        t3, t4 = four_bar(t, **SIX)
        return np.degrees(np.abs(np.angle(np.exp(1j * (t3 - t4)))))

    t = np.linspace(0, 2 * math.pi, 36001)
    crossings = np.degrees(t[:-1][np.diff(np.sign(psi(t) - 90.0)) != 0])
    assert crossings.size == 2
    assert mu["peaks"]["acceleration"]["infinite"] and mu["peaks"]["jerk"]["infinite"]
    assert min(abs(mu["peaks"]["acceleration"]["at"] - c) for c in crossings) < 0.02
    assert mu["range"]["max"]["value"] == pytest.approx(90.0, abs=1e-3)


def test_a_transmission_angle_falling_to_zero_turns_back_there(tmp_path, capsys):
    """In the test rig μ at B is taken between the rod and the slide: it is 0 where the rod lies
    level, A at the slide's height: 40 sin(θ + 30°) = 10 (crank 40 mm, offset 30°, slide at 10 mm)."""
    path = tmp_path / "rig.toml"
    path.write_text(GOOD)
    _, doc = check_doc(capsys, path)
    mu = output_doc(doc, "L", "mu")
    level = sorted((math.degrees(x) - 30.0) % 360 for x in (math.asin(0.25), math.pi - math.asin(0.25)))
    assert mu["range"]["min"]["value"] == 0.0 and abs(mu["range"]["min"]["at"] - level[0]) < 0.01
    assert mu["peaks"]["acceleration"]["infinite"] and mu["peaks"]["jerk"]["infinite"]
    code, out, _ = run(capsys, "check", str(path))
    assert f"turns back at {level[0]:.2f}°, {level[1]:.2f}°" in out and "falls to 0°" in out


# --- servo carriage: the motor profile from the inverted closed form -------------------------

E_SV, A_SV, B_SV, HOME = 15.0, 60.0, 200.0, 160.0  # presets/servo-carriage.toml (mm)


def crank_of_stroke():
    """θ2(x) and dθ2/dx, d²θ2/dx², d³θ2/dx³ (sympy) for the crank on the upper half.

    Inverting the offset slider-crank loop (x − a cos θ)² + (e − a sin θ)² = b²:
    x cos θ + e sin θ = K/(2a) with K = x² + e² + a² − b², so
    θ = atan2(e, x) + acos(K / (2a√(x² + e²))).
    """
    x = sp.symbols("x")
    k = x**2 + E_SV**2 + A_SV**2 - B_SV**2
    theta = sp.atan2(E_SV, x) + sp.acos(k / (2 * A_SV * sp.sqrt(x**2 + E_SV**2)))
    return [sp.lambdify(x, sp.diff(theta, x, n), "numpy") for n in range(4)]


def motor_reference():
    """Motor angle (deg) and its time derivatives as functions of master angle (deg)."""
    raw = tomllib.loads(preset_path("servo-carriage").read_text())
    project = load_project(preset_path("servo-carriage"))
    program = compile_axis(project.axis("carriage"))
    f0, f1, f2, f3 = crank_of_stroke()
    omega = 2 * math.pi * raw["machine"]["speed"] / 60

    def motor(theta_deg):
        s, s1, s2, s3 = program.master(np.asarray(theta_deg, dtype=float))
        x = HOME + s
        th = f0(x)
        d1 = f1(x) * s1
        d2 = f2(x) * s1**2 + f1(x) * s2
        d3 = f3(x) * s1**3 + 3 * f2(x) * s1 * s2 + f1(x) * s3
        k = 180 / math.pi
        return th * k, d1 * omega * k, d2 * omega**2 * k, d3 * omega**3 * k

    return motor, program


def test_servo_motor_profile_against_the_inverse_closed_form(capsys):
    head, rows = table_rows(capsys, preset_path("servo-carriage"), "drive.motor", 0.5)
    assert head[1] == "position [deg]" and head[4] == "jerk [deg/s^3]"
    motor, _ = motor_reference()
    ref = motor(rows[:, 0])
    for col, r in zip(rows.T[1:], ref):
        assert np.max(np.abs(col - r)) < 1e-9 * np.max(np.abs(r))
    assert np.all(rows[(rows[:, 0] < 30.0), 2] == 0.0)  # the pick dwell: the motor stands


def test_servo_motor_peaks_against_the_inverse_closed_form(capsys):
    """Peaks per segment of the carriage program (they may sit at a segment's ends)."""
    code, doc = check_doc(capsys, preset_path("servo-carriage"))
    assert code == 0
    out = output_doc(doc, "drive", "motor")
    motor, program = motor_reference()
    bounds = [s.theta0 for s in program.shapes] + [360.0]
    for k, q in enumerate(QUANTITIES, start=1):
        best = (0.0, 0.0)
        for lo, hi in zip(bounds, bounds[1:]):
            inner = (lo + 1e-9, hi - 1e-9)
            value, at = peak(lambda t: np.abs(motor(np.degrees(t))[k]), *inner, grid=3001)
            if value > best[0] * (1 + 1e-9):
                best = (value, at)
        assert out["peaks"][q]["value"] == pytest.approx(best[0], rel=PEAK_REL), q
        assert abs(out["peaks"][q]["at"] - best[1]) < AT_DEG, q
    assert out["range"]["min"]["value"] == pytest.approx(motor(180.0)[0], rel=1e-12)
    assert out["range"]["max"]["value"] == pytest.approx(motor(0.0)[0], rel=1e-12)
    # within the motor's limits, and the highest speed that keeps them (DESIGN §3)
    n, lim = speed_of("servo-carriage"), out["limits"]
    ratios = [lim[q] / out["peaks"][q]["value"] for q in QUANTITIES]
    assert out["ok"] and out["max_speed"] == pytest.approx(n * min(ratios[0], ratios[1] ** 0.5, ratios[2] ** (1 / 3)))


# --- every preset: finite differences of the table's positions --------------------------------

LINKAGE_PRESETS = ("slider-crank", "crank-rocker", "six-bar-press", "servo-carriage")
FD_STEP = 0.25  # deg


def _cases():
    for name in LINKAGE_PRESETS:
        project = load_project(preset_path(name))
        for spec in project.parts["linkage"]:
            for o in spec.outputs:
                yield name, f"{spec.name}.{o.name}"


@pytest.mark.parametrize("name, output", list(_cases()))
def test_table_rates_are_finite_differences_of_its_positions(capsys, name, output):
    project = load_project(preset_path(name))
    spec = project.parts["linkage"][0]
    # a stencil must not straddle a segment boundary or a law's own breakpoint (where a higher
    # derivative jumps, e.g. the modified sine's at 1/8 and 7/8 of a segment)
    shapes = [s for d in spec.drivers if d.axis for s in project.programs[d.axis].shapes]
    cuts = sorted({s.theta0 + x * s.span for s in shapes for x in (0.0, *s.breakpoints)} | {360.0})
    _, rows = table_rows(capsys, preset_path(name), output, FD_STEP)
    theta, pos = rows[:, 0], rows[:, 1]
    rate = 6.0 * speed_of(name)  # master deg/s: d/dt = rate · d/dθ(deg)
    # the cycle repeats: wrap the positions so that the stencil runs over 0°
    wrapped = np.concatenate([pos[-4:], pos, pos[:4]])
    checked = 0
    for order, col in ((1, 2), (2, 3), (3, 4)):
        w = stencil(order)
        est = sum(wk * wrapped[4 + k : 4 + k + pos.size] for k, wk in zip(range(-4, 5), w)) / FD_STEP**order
        est *= rate**order
        near_cut = np.array([min(abs((t - c + 180) % 360 - 180) for c in cuts + [0.0]) < 4.5 * FD_STEP for t in theta])
        if "transmission" in output:
            near_cut |= np.abs(pos - 90.0) < 3.0  # μ folds at 90°
        keep = ~near_cut
        scale = np.max(np.abs(rows[keep, col]))
        assert np.max(np.abs(est[keep] - rows[keep, col])) < 1e-6 * scale, (order, output)
        checked += int(keep.sum())
    assert checked > 1000


# --- a driver with dwells and velocity jumps: the output is the driven coordinate itself ---------

JUMPY = GOOD.replace(
    """[[axis.segment]]
law = "cycloidal"
span = 180.0
to = 40.0

[[axis.segment]]
law = "cycloidal"
span = 180.0
to = 0.0
""",
    """[[axis.segment]]
law = "dwell"
span = 40.0

[[axis.segment]]
law = "constant-velocity"
span = 100.0
to = 30.0

[[axis.segment]]
law = "harmonic"
span = 80.0
to = 40.0

[[axis.segment]]
law = "dwell"
span = 40.0

[[axis.segment]]
law = "cycloidal"
span = 100.0
to = 0.0
""",
).replace('joint = "O"\nturns = 1.0\noffset = 30.0', 'joint = "O"\naxis = "swing"\noffset = 30.0').replace(
    '[[linkage.output]]\nname = "rod-angle"', '[[linkage.output]]\nname = "crank"\njoint = "O"\n\n[[linkage.output]]\nname = "rod-angle"'
)


def test_dwells_and_velocity_jumps_of_a_driver_reach_its_output(tmp_path, capsys):
    """A pin driven by an axis reports that axis's own motion: peaks, infinite flags and jumps
    equal the axis's (motionlaws' exact values), through dwells and velocity jumps."""
    path = tmp_path / "jumpy.toml"
    path.write_text(JUMPY)
    code, doc = check_doc(capsys, path)
    lk = doc["linkages"][0]
    assert lk["status"] == "solved", lk["message"]
    axis = next(a for a in doc["axes"] if a["name"] == "swing")
    crank = output_doc(doc, "L", "crank")
    assert crank["peaks"]["velocity"]["value"] == pytest.approx(axis["peaks"]["velocity"]["value"], rel=1e-9)
    for q in ("acceleration", "jerk"):
        assert crank["peaks"][q]["infinite"] == axis["peaks"][q]["infinite"] is True
    assert crank["peaks"]["acceleration"]["at"] == pytest.approx(axis["peaks"]["acceleration"]["at"], abs=1e-6)
    jumps = [(j["at"], j["velocity_jump"], j["acceleration_jump"]) for j in axis["joins"]
             if j["velocity_jump"] or j["acceleration_jump"]]
    got = [(j["at"], j["velocity_jump"], j["acceleration_jump"]) for j in crank["joins"]]
    assert len(got) == len(jumps) >= 3  # into and out of the constant velocity, the harmonic's end
    for (at, dv, da), (at2, dv2, da2) in zip(sorted(jumps), sorted(got)):
        assert at2 == pytest.approx(at) and dv2 == pytest.approx(dv, rel=1e-6, abs=1e-6)
        if dv == 0.0:
            assert da2 == pytest.approx(da, rel=1e-6)
    # the rod and slider move with it: their jerk is infinite where the crank's acceleration jumps
    stroke = output_doc(doc, "L", "stroke")
    assert stroke["peaks"]["acceleration"]["infinite"] and stroke["used"]["acceleration"] is None
    assert not stroke["ok"] and code == 1


# --- linkages that do not run --------------------------------------------------------------------

NON_GRASHOF = """\
version = 1

[machine]
speed = 60

[[linkage]]
name = "wobbler"

[linkage.ground]
O2 = [0.0, 0.0]
O4 = [100.0, 0.0]

[[linkage.body]]
name = "crank"
place = [0.0, 0.0, 0.0]
points = { O2 = [0.0, 0.0], A = [50.0, 0.0] }

[[linkage.body]]
name = "coupler"
place = [50.0, 0.0, 60.0]
points = { A = [0.0, 0.0], B = [60.0, 0.0] }

[[linkage.body]]
name = "rocker"
place = [100.0, 0.0, 120.0]
points = { O4 = [0.0, 0.0], B = [55.0, 0.0] }

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


def test_a_non_grashof_crank_driven_past_its_limit_stops_at_the_dead_point(tmp_path, capsys):
    a, b, c, d = 50.0, 60.0, 55.0, 100.0
    assert min(a, b, c, d) + max(a, b, c, d) > a + b + c + d - min(a, b, c, d) - max(a, b, c, d)  # not Grashof
    # the crank reaches its limit where coupler and rocker fall in line: |A − O4| = b + c
    limit = math.degrees(math.acos((a * a + d * d - (b + c) ** 2) / (2 * a * d)))
    path = tmp_path / "wobbler.toml"
    path.write_text(NON_GRASHOF)
    code, doc = check_doc(capsys, path)
    lk = doc["linkages"][0]
    assert code == 1 and not doc["ok"]
    assert lk["status"] == "dead-point" and lk["dead_point"]["reason"] == "limit"
    assert abs(lk["stopped_at"] - limit) < 1e-3
    stated = float(re.search(r"at master ([0-9.]+)°", lk["message"]).group(1))
    assert abs(stated - limit) < 1e-3 and {"B", "O4"} <= set(lk["dead_point"]["joints"])
    assert lk["outputs"][0]["peaks"] is None and lk["outputs"][0]["unit"] == "deg"
    code, out, err = run(capsys, "check", str(path))
    stated = float(re.search(r"DEAD POINT at master ([0-9.]+)°", out).group(1))
    assert code == 1 and abs(stated - limit) < 1e-2 and "Traceback" not in err
    code, out, err = run(capsys, "table", str(path), "--axis", "wobbler.swing")
    stated = float(re.search(r"at master ([0-9.]+)°", err).group(1))
    assert code == 2 and abs(stated - limit) < 1e-3 and "no table" in err


def test_an_under_driven_linkage_reports_its_free_motion(tmp_path, capsys):
    path = tmp_path / "free.toml"
    path.write_text(NON_GRASHOF.replace('[[linkage.driver]]\nname = "motor"\njoint = "O2"\nturns = 1\n', ""))
    code, doc = check_doc(capsys, path)
    lk = doc["linkages"][0]
    assert code == 1 and lk["status"] == "not-driven"
    dof = lk["dof"]
    assert dof["dof"] == 1 and dof["redundant"] == 0 and not dof["driven"]
    assert set(dof["free"][0]["bodies"]) == {"crank", "coupler", "rocker"}
    assert set(dof["free"][0]["joints"]) == {"O2", "A", "B", "O4"}
    code, out, _ = run(capsys, "check", str(path))
    assert code == 1 and "NOT DRIVEN: 1 free degree(s) of freedom" in out
    assert "free motion 1: moves crank, coupler, rocker" in out


def test_a_linkage_driven_twice_is_over_constrained(tmp_path, capsys):
    path = tmp_path / "twice.toml"
    path.write_text(GOOD.replace('[[linkage.output]]\nname = "stroke"',
                                 '[[linkage.driver]]\nname = "second"\nangle = "crank"\nturns = 1.0\n\n'
                                 '[[linkage.output]]\nname = "stroke"', 1))
    code, doc = check_doc(capsys, path)
    dof = doc["linkages"][0]["dof"]
    assert code == 1 and dof["dof"] == 0 and dof["redundant"] == 1 and set(dof["dependent"]) == {"motor", "second"}
    code, out, _ = run(capsys, "check", str(path))
    assert "OVER-CONSTRAINED" in out and "depend on others among: motor, second" in out


def test_a_linkage_that_cannot_be_assembled_says_so(tmp_path, capsys):
    path = tmp_path / "far.toml"
    path.write_text(GOOD.replace("G = [0.0, 10.0]", "G = [0.0, 500.0]"))
    code, doc = check_doc(capsys, path)
    lk = doc["linkages"][0]
    assert code == 1 and lk["status"] == "not-assembled" and lk["stopped_at"] == 0.0
    code, out, _ = run(capsys, "check", str(path))
    assert "NOT ASSEMBLED at master 0°" in out


# --- limits, words and the table's names ----------------------------------------------------------


def test_an_output_over_its_limit_fails_the_check(tmp_path, capsys):
    path = tmp_path / "over.toml"
    path.write_text(GOOD.replace("velocity = 900.0", "velocity = 100.0"))
    code, doc = check_doc(capsys, path)
    out = output_doc(doc, "L", "stroke")
    assert code == 1 and not out["ok"] and out["used"]["velocity"] > 1
    assert out["max_speed"] == pytest.approx(60.0 * 100.0 / out["peaks"]["velocity"]["value"], rel=1e-12)
    code, text, _ = run(capsys, "check", str(path))
    assert "LIMIT EXCEEDED" in text and "OVER" in text


@pytest.mark.parametrize("name", LINKAGE_PRESETS)
def test_human_report_fits_80_columns_and_keeps_its_units(capsys, name):
    code, out, _ = run(capsys, "check", str(preset_path(name)))
    assert code == 0
    lines = out.splitlines()
    assert max(len(line.rstrip()) for line in lines) <= 80
    assert "linkage " in out and "output " in out and "max speed within limits" in out
    assert "[mm/s²]" in out or "[deg/s²]" in out  # brackets survive Rich markup


def test_table_names_outputs_as_linkage_dot_output(capsys):
    path = preset_path("slider-crank")
    code, _, err = run(capsys, "table", str(path), "--axis", "pusher.nope")
    assert code == 2 and "no output 'nope' (outputs: pusher.stroke, pusher.face-x)" in err
    code, _, err = run(capsys, "table", str(path), "--axis", "nobody.stroke")
    assert code == 2 and "no axis or output 'nobody.stroke'" in err and "pusher.stroke" in err
    head, rows = table_rows(capsys, path, "pusher.stroke", 90)
    assert rows[:, 0].tolist() == [0.0, 90.0, 180.0, 270.0]
