"""Drive loads of linkages (kinetostatics) against closed forms, virtual power and energy.

References, named beside each check:
* offset slider-crank position x_B(θ2) = a cos θ2 + √(b² − (c − a sin θ2)²)
  (R. L. Norton, Design of Machinery, ch. 4, from memory), differentiated
  by sympy;
* virtual work / power: the drive's power equals the rate of change of
  kinetic energy plus the power against gravity and external loads (any
  dynamics text; Norton, Design of Machinery, ch. 11, from memory);
* conservation of energy over a closed cycle.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy as sp

from motionlaws import Axis, Segment, compile_axis
from solver.kinematics import MM, PointX, PointY, ProgramMotion, solve_cycle
from solver.loads import (
    BodyMass, BodyTorque, LinkageLoading, LoadsError, PointForce, drive_efforts_by_power, kinetic_energy,
    linkage_loads,
)
from tests.test_kinematics_support import four_bar, slider_crank

A, B, C = 0.03, 0.10, 0.012  # m: crank, rod, offset (test geometry, as the kinematics tests)
FOUR = (0.04, 0.12, 0.09, 0.10)  # m: Grashof crank-rocker (as the kinematics tests)
SPEED = 120.0  # cycles/min
OMEGA = 2 * math.pi * SPEED / 60
G = 9.81  # m/s²


def slider_x():
    """x_B(θ2) and its first two derivatives per rad, as numpy functions (Norton's closed form, by sympy)."""
    th = sp.symbols("th")
    x = A * sp.cos(th) + sp.sqrt(B**2 - (C - A * sp.sin(th)) ** 2)
    return [sp.lambdify(th, sp.diff(x, th, k), "numpy") for k in (0, 1, 2)]


def close(got, want, rel, what):
    scale = np.max(np.abs(want))
    err = np.max(np.abs(got - want))
    assert err <= rel * scale, f"{what}: max error {err:.3e} vs {rel:.0e} of {scale:.3e}"


class Fluctuating:
    """Crank angle θ2 = θ0 + θ + ε sin θ (a crank whose speed fluctuates over the cycle), with derivatives per rad."""

    def __init__(self, start, eps):
        self.start, self.eps = start, eps

    def __call__(self, theta):
        theta = np.asarray(theta, dtype=float)
        e = self.eps
        return (self.start + theta + e * np.sin(theta), 1.0 + e * np.cos(theta), -e * np.sin(theta), -e * np.cos(theta))


def test_slider_mass_only_crank_torque_is_inertia_force_times_velocity_ratio():
    """T = m ẍ · dx/dθ2 (virtual work; Norton, Design of Machinery, ch. 11, from memory)."""
    theta0, m = 0.3, 2.5
    result = solve_cycle(slider_crank(A, B, C, theta0), SPEED)
    assert result.success, result.message
    loads = linkage_loads(result, LinkageLoading({"slider": BodyMass(m)}))
    theta2 = theta0 + result.theta
    _, x1, x2 = (f(theta2) for f in slider_x())
    want = m * x2 * OMEGA**2 * x1  # ẍ = x'' ω² at constant crank speed
    drive = loads.drives["motor"]
    assert drive.effort_unit == "N·m"
    close(drive.effort, want, 1e-9, "crank torque")
    # the true peak against the closed form maximized on a fine grid and polished (scipy)
    from scipy.optimize import minimize_scalar

    fine = np.linspace(0.0, 2 * np.pi, 200_001)
    tq = lambda t: m * slider_x()[2](t) * OMEGA**2 * slider_x()[1](t)  # noqa: E731
    k = int(np.argmax(np.abs(tq(fine))))
    best = minimize_scalar(lambda t: -abs(tq(t)), bounds=(fine[k - 1], fine[k + 1]), method="bounded",
                           options={"xatol": 1e-12})
    assert drive.peak.value == pytest.approx(-best.fun, rel=1e-9)
    at_master = math.degrees((best.x - theta0) % (2 * math.pi))
    assert abs(drive.peak.at - at_master) < 1e-4  # deg
    # the refined peak is not below the largest sample, and the samples alone miss it by more than it errs
    assert drive.peak.value >= np.max(np.abs(drive.effort))


def test_heavy_crank_with_gravity_and_fluctuating_speed_against_hand_closed_form():
    """Uniform crank of mass mc (J_O = mc a²/3), slider mass ms, massless rod, gravity −y, crank speed not constant.

    Hand derivation (energy: drive power = d(KE)/dt + d(V)/dt, joints ideal):
      KE = ½ J_O ω2² + ½ ms ẋ²,   V = mc g (a/2) sin θ2 (+ the slider's, constant: it runs level),
      T ω2 = J_O ω2 α2 + ms ẋ ẍ + mc g (a/2) cos θ2 ω2,   ẋ = x' ω2,   ẍ = x'' ω2² + x' α2,
      so  T = J_O α2 + mc g (a/2) cos θ2 + ms ẍ x'.
    J_O = mc a²/12 + mc (a/2)² = mc a²/3 (uniform rod, parallel-axis theorem).
    """
    theta0, eps, mc, ms = 0.3, 0.25, 1.8, 2.5
    motion = Fluctuating(theta0, eps)
    result = solve_cycle(slider_crank(A, B, C, theta0, motion=motion), SPEED)
    assert result.success, result.message
    loading = LinkageLoading(
        {"crank": BodyMass(mc, (A / 2, 0.0), mc * A * A / 12), "slider": BodyMass(ms)}, gravity=(0.0, -G)
    )
    loads = linkage_loads(result, loading)
    th2, d1, d2, _ = motion(result.theta)
    w2, al2 = d1 * OMEGA, d2 * OMEGA**2
    _, x1, x2 = (f(th2) for f in slider_x())
    xdd = x2 * w2**2 + x1 * al2
    want = mc * A * A / 3 * al2 + mc * G * (A / 2) * np.cos(th2) + ms * xdd * x1
    close(loads.drives["motor"].effort, want, 1e-9, "crank torque")
    # the drive's own kinematics as reported: rate and acceleration of the driven pin
    np.testing.assert_allclose(loads.drives["motor"].rate, w2, rtol=1e-14)
    np.testing.assert_allclose(loads.drives["motor"].acceleration, al2, rtol=1e-14, atol=1e-12)


def masses_four_bar(gravity=(0.0, -G), force=(30.0, -10.0), torque=0.7, crank_torque=0.0):
    """A four-bar with offset centres of mass on all three links and constant external loads (test values)."""
    a, b, c, d = FOUR
    model = four_bar(a, b, c, d)
    centres = {"crank": (0.02, 0.004), "coupler": (0.06, 0.012), "rocker": (0.045, -0.006)}
    for body, xy in centres.items():
        model.add_point(body, "G", xy)
    model.add_point("coupler", "P", (0.08, 0.03))
    masses = {
        "crank": BodyMass(0.5, centres["crank"], 1.0e-4),
        "coupler": BodyMass(1.2, centres["coupler"], 2.0e-3),
        "rocker": BodyMass(0.8, centres["rocker"], 8.0e-4),
    }
    forces = (PointForce("coupler", "P", force),) if force is not None else ()
    torques = tuple(t for t in (BodyTorque("rocker", torque), BodyTorque("crank", crank_torque)) if t.torque)
    return model, LinkageLoading(masses, gravity, forces, torques)


def test_four_bar_virtual_power_equals_lagrange_multiplier_torque():
    """Two independent routes to the crank torque agree to solver tolerance (virtual power, Norton ch. 11;
    Lagrange multipliers, Haug 1989 ch. 6 — both from memory)."""
    model, loading = masses_four_bar()
    result = solve_cycle(model, SPEED)
    assert result.success, result.message
    lagrange = linkage_loads(result, loading).drives["motor"].effort
    power = drive_efforts_by_power(result, loading)["motor"]
    close(power, lagrange, 1e-10, "virtual power vs multipliers")
    assert np.ptp(lagrange) > 1.0  # N·m: a real load curve, not a constant


def test_four_bar_drive_power_balances_kinetic_energy_rate_and_external_power():
    """τ·ω2 = Σ (m v_G·a_G + J ω α) − P_ext, with v_G, a_G, ω, α straight from the kinematics' outputs
    (power balance; Norton, Design of Machinery, ch. 11, from memory)."""
    model, loading = masses_four_bar()
    result = solve_cycle(model, SPEED)
    loads = linkage_loads(result, loading)
    total = np.zeros(result.theta.size)
    for body, props in loading.masses.items():
        x, y = result.output(PointX((body, "G"))), result.output(PointY((body, "G")))
        k = result.coordinates.index(f"{body}.phi")
        w, al = result.velocities[:, k], result.accelerations[:, k]
        total += props.mass * (x.velocity * x.acceleration + y.velocity * y.acceleration) + props.inertia * w * al
        total -= props.mass * (loading.gravity[0] * x.velocity + loading.gravity[1] * y.velocity)
    px, py = result.output(PointX(("coupler", "P"))), result.output(PointY(("coupler", "P")))
    fx, fy = loading.forces[0].force
    total -= fx * px.velocity + fy * py.velocity
    total -= loading.torques[0].torque * result.velocities[:, result.coordinates.index("rocker.phi")]
    drive = loads.drives["motor"]
    close(drive.power, total, 1e-9, "drive power vs energy rate")
    np.testing.assert_allclose(drive.rate, OMEGA, rtol=1e-14)


@pytest.mark.parametrize(
    "gravity, crank_torque, net",
    [
        ((0.0, 0.0), 0.0, 0.0),  # inertia alone: kinetic energy returns to its start value
        ((0.0, -G), 0.0, 0.0),  # gravity and a constant force are conservative: no net work either
        ((0.0, -G), 1.3, -2 * math.pi * 1.3),  # a torque on the crank does 1.3·2π per turn: the drive takes it back
    ],
)
def test_net_drive_work_over_a_cycle(gravity, crank_torque, net):
    """∫τ dθ2 over one turn at constant speed = −(work of the non-conservative loads) (conservation of energy)."""
    force = None if crank_torque == 0.0 and gravity == (0.0, 0.0) else (30.0, -10.0)
    model, loading = masses_four_bar(gravity=gravity, force=force, torque=0.0, crank_torque=crank_torque)
    result = solve_cycle(model, SPEED)
    tau = linkage_loads(result, loading).drives["motor"].effort
    work = np.mean(tau) * 2 * math.pi  # periodic rectangle rule: spectrally accurate for a smooth cycle
    peak = np.max(np.abs(tau)) * 2 * math.pi
    assert abs(work - net) <= 1e-10 * peak, (work, net)
    assert peak > 1.0  # the curve itself is far from zero


def test_loads_rescale_exactly_with_machine_speed():
    """Static + ω²·inertial: loads at another speed equal a fresh solve at that speed (kinematics scale as N^k)."""
    model, loading = masses_four_bar()
    slow = linkage_loads(solve_cycle(model, 60.0), loading)
    fast = solve_cycle(model, 300.0)
    want = linkage_loads(fast, loading)
    got = slow.at_speed(300.0)
    close(got.drives["motor"].effort, want.drives["motor"].effort, 1e-12, "rescaled torque")
    close(got.reactions["B"].force, want.reactions["B"].force, 1e-12, "rescaled reaction")
    # and the kinetic energy scales as N²
    ke = kinetic_energy(fast, loading)
    np.testing.assert_allclose(kinetic_energy(fast, loading, speed=60.0), ke * (60.0 / 300.0) ** 2, rtol=1e-13)


def test_driven_slider_effort_is_a_force_equal_to_mass_times_acceleration():
    """Slider driven by a cycloidal program, crank free, massless crank and rod: the drive pushes the slider
    mass alone, F = m d̈ (Newton's second law), and virtual power gives the same force."""
    axis = Axis("slider", (Segment("cycloidal", 180.0, 120.0), Segment("cycloidal", 180.0, 90.0)), unit="mm", start=90.0)
    program = compile_axis(axis)
    # stroke 90…120 mm stays between the dead points at √((b − a)² − c²) ≈ 69 mm and √((a + b)² − c²) ≈ 129 mm
    model = slider_crank(A, B, C, 1.2, driver="slider", motion=ProgramMotion(program, scale=MM))
    result = solve_cycle(model, SPEED)
    assert result.success, result.message
    m = 1.7
    loading = LinkageLoading({"slider": BodyMass(m)})
    drive = linkage_loads(result, loading).drives["servo"]
    assert drive.unit == "m" and drive.effort_unit == "N"
    _, _, d2, _ = program.master(np.degrees(result.theta))
    close(drive.effort, m * d2 * MM * OMEGA**2, 1e-9, "slider force")
    close(drive_efforts_by_power(result, loading)["servo"], drive.effort, 1e-10, "virtual power")


def test_a_force_that_jumps_peaks_at_its_one_sided_value():
    """Harmonic rise and return of the driven slider: its acceleration h·π²/(2β²)·cos(πx)·ω² (harmonic
    law, Ca = π²/2, any cam handbook) jumps from and to rest at both ends of each, so the force
    F = m d̈ (Newton's second law) peaks right at a jump: the rise's one-sided value, no more."""
    axis = Axis("slider", (Segment("dwell", 60.0), Segment("harmonic", 90.0, 120.0), Segment("dwell", 30.0),
                           Segment("harmonic", 180.0, 90.0)), unit="mm", start=90.0)
    model = slider_crank(A, B, C, 1.2, driver="slider", motion=ProgramMotion(compile_axis(axis), scale=MM))
    result = solve_cycle(model, SPEED)
    assert result.success, result.message
    m = 1.7
    drive = linkage_loads(result, LinkageLoading({"slider": BodyMass(m)})).drives["servo"]
    h, beta = 0.030, math.radians(90.0)
    want = m * h * math.pi**2 / (2 * beta**2) * OMEGA**2
    assert drive.peak.value == pytest.approx(want, rel=1e-9)
    assert min(abs(drive.peak.at - 60.0), abs(drive.peak.at - 150.0)) < 1e-6


def test_loading_errors_name_the_item_and_key():
    model, _ = masses_four_bar()
    result = solve_cycle(model, SPEED)
    cases = [
        (LinkageLoading({"crank ": BodyMass(1.0)}), "crank ", "body"),
        (LinkageLoading({"crank": BodyMass(-1.0)}), "crank", "mass"),
        (LinkageLoading({"crank": BodyMass(1.0, (0.0,), 0.0)}), "crank", "centre"),
        (LinkageLoading({"ground": BodyMass(1.0)}), "ground", "body"),
        (LinkageLoading(forces=(PointForce("rocker", "Q", (1.0, 0.0)),)), "rocker.Q", "point"),
        (LinkageLoading(forces=(PointForce("rocker", "B", (1.0, math.nan)),)), "rocker.B", "force"),
        (LinkageLoading(gravity=(0.0, -G, 0.0)), None, "gravity"),
    ]
    for loading, item, key in cases:
        with pytest.raises(LoadsError) as err:
            linkage_loads(result, loading)
        assert (err.value.item, err.value.key) == (item, key), err.value.message


def test_a_cycle_stopped_at_a_dead_point_gives_loads_up_to_it():
    """Non-Grashof four-bar (s + l > p + q; Grashof's criterion, Norton ch. 2) stops at its limit position:
    loads cover the solved stretch, are not treated as periodic, and still agree by both routes."""
    a, b, c, d = 0.09, 0.05, 0.07, 0.06  # m, as the kinematics' dead-point test
    model = four_bar(a, b, c, d, 0.0)
    result = solve_cycle(model, 60.0)
    assert not result.success
    loading = LinkageLoading({"coupler": BodyMass(1.0, (0.025, 0.0), 2e-4), "rocker": BodyMass(0.5, (0.035, 0.0), 2e-4)},
                             gravity=(0.0, -G))
    loads = linkage_loads(result, loading)
    drive = loads.drives["motor"]
    assert not loads.complete and not drive.periodic
    assert drive.effort.shape == result.theta.shape
    close(drive_efforts_by_power(result, loading)["motor"], drive.effort, 1e-9, "virtual power, partial cycle")
    assert 0.0 <= math.radians(drive.peak.at) <= result.theta[-1] + 1e-12
    assert drive.peak.value >= np.max(np.abs(drive.effort))


def test_a_model_that_is_not_driven_is_refused():
    model = four_bar(*FOUR)
    model.remove("motor")
    result = solve_cycle(model, SPEED)
    with pytest.raises(LoadsError, match="no solved instants"):
        linkage_loads(result, LinkageLoading())


def test_a_force_at_local_coordinates_equals_the_same_force_at_the_named_point():
    """A load's point may be named or given as body-local (x, y): same point, same torque (definition)."""
    model, named = masses_four_bar()
    result = solve_cycle(model, SPEED)
    local = LinkageLoading(named.masses, named.gravity, (PointForce("coupler", (0.08, 0.03), (30.0, -10.0)),), named.torques)
    np.testing.assert_array_equal(linkage_loads(result, local).drives["motor"].effort,
                                  linkage_loads(result, named).drives["motor"].effort)
    # and the force matters: without it the torque differs by far more than rounding
    bare = LinkageLoading(named.masses, named.gravity, (), named.torques)
    assert np.max(np.abs(linkage_loads(result, bare).drives["motor"].effort
                         - linkage_loads(result, named).drives["motor"].effort)) > 0.1
