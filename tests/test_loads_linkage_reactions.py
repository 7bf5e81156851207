"""Joint reactions of linkages: Newton–Euler balance of every body, and a two-force-member closed form.

References, named beside each check:
* Newton's second law and Euler's equation for a rigid body in the plane,
  Σ F = m a_G and Σ M_G = J_G α (any dynamics text);
* the massless connecting rod as a two-force member in the slider-crank
  force analysis (R. L. Norton, Design of Machinery, ch. 11, from memory).
Centre-of-mass accelerations and body angular accelerations come straight
from the kinematics' own outputs (named points G), not from the loads code.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy as sp
from scipy.optimize import minimize_scalar

from solver.kinematics import PointX, PointY, solve_cycle
from solver.loads import BodyMass, BodyTorque, LinkageLoading, PointForce, linkage_loads
from tests.test_kinematics_support import four_bar, six_bar, slider_crank

SPEED = 150.0  # cycles/min
OMEGA = 2 * math.pi * SPEED / 60
G = 9.81  # m/s²


def cross(r, f):
    """z of r × f for (N, 2) arrays."""
    return r[:, 0] * f[:, 1] - r[:, 1] * f[:, 0]


def four_bar_case():
    model = four_bar(0.04, 0.12, 0.09, 0.10)
    centres = {"crank": (0.02, 0.004), "coupler": (0.06, 0.012), "rocker": (0.045, -0.006)}
    masses = {"crank": BodyMass(0.5, centres["crank"], 1e-4), "coupler": BodyMass(1.2, centres["coupler"], 2e-3),
              "rocker": BodyMass(0.8, centres["rocker"], 8e-4)}
    model.add_point("coupler", "P", (0.08, 0.03))
    loading = LinkageLoading(masses, (0.0, -G), (PointForce("coupler", "P", (30.0, -10.0)),),
                             (BodyTorque("rocker", 0.7),))
    return model, centres, loading, {"motor": ("O2", "crank")}


def six_bar_case():
    model = six_bar()
    centres = {"crank": (0.015, 0.0), "coupler": (0.05, 0.003), "rocker": (0.06, 0.01),
               "rod": (0.06, 0.0), "slider": (0.01, -0.008)}  # slider's centre off the pin: its guide takes a couple
    masses = {b: BodyMass(m, centres[b], J) for b, m, J in (
        ("crank", 0.4, 5e-5), ("coupler", 0.9, 1e-3), ("rocker", 1.1, 1.5e-3), ("rod", 0.6, 8e-4), ("slider", 2.0, 4e-4))}
    model.add_point("slider", "tool", (0.03, -0.02))
    loading = LinkageLoading(masses, (0.0, -G), (PointForce("slider", "tool", (-120.0, 15.0)),),
                             (BodyTorque("rod", -0.4),))
    return model, centres, loading, {"motor": ("O2", "crank")}


@pytest.mark.parametrize("case", [four_bar_case, six_bar_case])
def test_every_body_balances_at_every_instant(case):
    """Σ F = m a_G and Σ M_G = J α per body (Newton–Euler), from the reported reactions, drive torque and loads."""
    model, centres, loading, drivers = case()
    for body, xy in centres.items():
        model.add_point(body, "G", xy)
    result = solve_cycle(model, SPEED)
    assert result.success, result.message
    loads = linkage_loads(result, loading)
    N = result.theta.size
    for body, props in loading.masses.items():
        rg = result.point(body, "G")
        ax, ay = result.output(PointX((body, "G"))).acceleration, result.output(PointY((body, "G"))).acceleration
        alpha = result.accelerations[:, result.coordinates.index(f"{body}.phi")]
        forces, moments = [], []  # every force (N, 2) and every moment about G (N,) acting on the body
        for joint in loads.reactions.values():
            if body in (joint.body_i, joint.body_j):
                f, c = joint.on(body)
                forces.append(f)
                moments += [c, cross(joint.point - rg, f)]
        assert len(forces) >= 2  # every link has at least two joints
        for name, (pin, driven) in drivers.items():
            if body == driven:  # the motor's torque acts on the crank (body j of the driven pin)
                moments.append(loads.drives[name].effort)
        forces.append(np.broadcast_to(props.mass * np.asarray(loading.gravity), (N, 2)))
        for f in loading.forces:
            if f.body == body:
                forces.append(np.broadcast_to(f.force, (N, 2)))
                moments.append(cross(result.point(body, f.point) - rg, forces[-1]))
        moments += [np.full(N, t.torque) for t in loading.torques if t.body == body]
        want_f = props.mass * np.column_stack([ax, ay])
        want_m = props.inertia * alpha
        # errors in units of the largest single term (the sums may nearly cancel)
        scale_f = max(np.max(np.abs(f)) for f in forces)
        scale_m = max(np.max(np.abs(m)) for m in moments)
        assert np.max(np.abs(sum(forces) - want_f)) <= 1e-9 * scale_f, body
        assert np.max(np.abs(sum(moments) - want_m)) <= 1e-9 * scale_m, body
        assert scale_f > 1.0 and scale_m > 0.01  # N, N·m: the balance is between real loads


def test_pins_carry_no_couple_and_the_slider_guide_does():
    model, centres, loading, _ = six_bar_case()
    loads = linkage_loads(solve_cycle(model, SPEED), loading)
    for joint in loads.reactions.values():
        if joint.kind == "pin":
            assert np.max(np.abs(joint.couple)) <= 1e-9 * np.max(joint.magnitude)
    guide = loads.reactions["guide"]
    assert guide.kind == "slider" and guide.peak_couple.value > 0.1  # N·m: the offset slider mass tips in its guide
    # the guide's force is normal to its axis (frictionless slider): no x component along the horizontal guide
    assert np.max(np.abs(guide.force[:, 0])) <= 1e-9 * np.max(guide.magnitude)


def test_massless_rod_is_a_two_force_member():
    """Slider mass only, no gravity: the rod pushes along itself with F = m ẍ / cos φ3, the same force at O, A, B;
    the guide's normal force is −F sin φ3 (Norton, Design of Machinery, ch. 11, slider-crank force analysis,
    from memory)."""
    a, b, c, m = 0.03, 0.10, 0.012, 2.5
    result = solve_cycle(slider_crank(a, b, c, 0.3), SPEED)
    loads = linkage_loads(result, LinkageLoading({"slider": BodyMass(m)}))
    phi3 = result.body("rod")[:, 2]
    xdd = result.accelerations[:, result.coordinates.index("slider.x")]
    f_rod = m * xdd / np.cos(phi3)  # along the rod, A → B, on the slider
    along = np.column_stack([np.cos(phi3), np.sin(phi3)])
    scale = np.max(np.abs(f_rod))
    np.testing.assert_allclose(loads.reactions["B"].force, f_rod[:, None] * along, atol=1e-9 * scale)  # on slider
    np.testing.assert_allclose(loads.reactions["A"].force, f_rod[:, None] * along, atol=1e-9 * scale)  # on rod
    np.testing.assert_allclose(loads.reactions["O"].force, f_rod[:, None] * along, atol=1e-9 * scale)  # on crank
    np.testing.assert_allclose(loads.reactions["slide"].force[:, 1], -f_rod * np.sin(phi3), atol=1e-9 * scale)
    # peak bearing load at O against the closed form F(θ2) = m x''(θ2) ω² / cos φ3 (x by sympy from Norton's
    # position closed form, ch. 4, from memory), maximized on a fine grid and polished by scipy
    th = sp.symbols("th")
    x = a * sp.cos(th) + sp.sqrt(b**2 - (c - a * sp.sin(th)) ** 2)
    cos3 = sp.sqrt(1 - ((c - a * sp.sin(th)) / b) ** 2)
    F = sp.lambdify(th, m * sp.diff(x, th, 2) * OMEGA**2 / cos3, "numpy")
    fine = np.linspace(0.0, 2 * np.pi, 200_001)
    k = int(np.argmax(np.abs(F(fine))))
    best = minimize_scalar(lambda t: -abs(F(t)), bounds=(fine[k - 1], fine[k + 1]), method="bounded",
                           options={"xatol": 1e-13})
    peak = loads.reactions["O"].peak
    assert peak.value == pytest.approx(-best.fun, rel=1e-9)
    assert abs(peak.at - math.degrees((best.x - 0.3) % (2 * np.pi))) < 1e-4  # deg (crank starts at 0.3 rad)
    assert peak.value > np.max(np.abs(f_rod))  # beyond the samples
    # direction: the force on the crank at O points along the rod (or against it where the rod pulls)
    d = loads.reactions["O"].direction
    turned = np.angle(np.exp(1j * (d - phi3)))
    assert np.all(np.minimum(np.abs(turned), np.abs(np.abs(turned) - math.pi)) < 1e-9)
