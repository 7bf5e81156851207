"""Benchmark: rigid-body loads (drive torque + joint reactions) at 3,600 instants of a four-bar and a six-bar.

The linkages are the kinematics tests' (tests/test_kinematics_support.py),
with invented masses on every moving body, gravity and one external force.
Printed for each: the kinematic solve (for scale), the loads of the whole
cycle (one stacked solve of Φqᵀλ = Q − M q̈ for static and inertial parts,
drive efforts and every joint's reaction), the same by virtual power, the
refined peaks of every drive and reaction, servo figures, and a per-instant
Python loop over np.linalg.solve for the multipliers alone as a baseline.
Measures and prints only.

Run: .venv/bin/python benchmarks/bench_loads.py
"""

from __future__ import annotations

import sys
import time
import timeit
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from solver.kinematics import solve_cycle  # noqa: E402
from solver.loads import (  # noqa: E402
    BodyMass, Gearing, LinkageLoading, PointForce, drive_efforts_by_power, linkage_loads, servo_sizing,
)
from solver.loads.linkage import Kinetostatics  # noqa: E402
from solver.loads.linkage_dynamics import body_motion, dense_jacobian, generalized_forces  # noqa: E402
from tests.test_kinematics_support import four_bar, six_bar  # noqa: E402

N = 3600
SPEED = 120.0  # cycles/min
GRAVITY = (0.0, -9.81)


def four_bar_case():
    model = four_bar(0.04, 0.12, 0.09, 0.10)
    masses = {"crank": BodyMass(0.5, (0.02, 0.0), 1e-4), "coupler": BodyMass(1.2, (0.06, 0.01), 2e-3),
              "rocker": BodyMass(0.8, (0.045, 0.0), 8e-4)}
    return model, LinkageLoading(masses, GRAVITY, (PointForce("coupler", "B", (30.0, -10.0)),))


def six_bar_case():
    model = six_bar()
    masses = {"crank": BodyMass(0.4, (0.015, 0.0), 5e-5), "coupler": BodyMass(0.9, (0.05, 0.0), 1e-3),
              "rocker": BodyMass(1.1, (0.06, 0.01), 1.5e-3), "rod": BodyMass(0.6, (0.06, 0.0), 8e-4),
              "slider": BodyMass(2.0, (0.01, -0.008), 4e-4)}
    return model, LinkageLoading(masses, GRAVITY, (PointForce("slider", "D", (-120.0, 0.0)),))


def loop_multipliers(result, loading):
    """Baseline: the same equations, one np.linalg.solve per instant in a Python loop."""
    comp = loading.compile(result.system.mechanism, result.system.bodies)
    motion = body_motion(comp, result.q, result.dq, result.ddq)
    static, inertial = generalized_forces(comp, motion)
    rhs = static + (2 * np.pi * SPEED / 60) ** 2 * inertial
    jac = dense_jacobian(result.system, result.q)  # (m, n, N)
    return np.array([np.linalg.solve(jac[:, :, k].T, rhs[k]) for k in range(result.theta.size)])


def best(fn, repeat=20) -> float:
    """Best wall time of `repeat` runs (s)."""
    return min(timeit.repeat(fn, repeat=repeat, number=1))


def best_cpu(fn, repeat=20) -> float:
    """Best process CPU time of `repeat` runs (s)."""
    return min(timeit.repeat(fn, repeat=repeat, number=1, timer=time.process_time))


def peaks(result, loading):
    loads = Kinetostatics(result, loading).loads(SPEED)  # fresh: no cached local re-solves
    out = [d.peak for d in loads.drives.values()]
    out += [r.peak for r in loads.reactions.values()]
    return out


def main() -> None:
    print(f"{N} instants per cycle at {SPEED:g} cycles/min; times are the best of 20 runs")
    for name, build in (("four-bar", four_bar_case), ("six-bar", six_bar_case)):
        model, loading = build()
        result = solve_cycle(model, SPEED, N)
        assert result.success, result.message
        loads = linkage_loads(result, loading)
        drive = loads.drives["motor"]
        power = drive_efforts_by_power(result, loading)["motor"]
        agree = np.max(np.abs(power - drive.effort)) / np.max(np.abs(drive.effort))
        t_kin = best(lambda: solve_cycle(model, SPEED, N))
        t_loads = best(lambda: linkage_loads(result, loading))
        c_loads = best_cpu(lambda: linkage_loads(result, loading))
        t_power = best(lambda: drive_efforts_by_power(result, loading))
        t_peaks = best(lambda: peaks(result, loading), repeat=5)
        t_servo = best(lambda: servo_sizing(Kinetostatics(result, loading).loads(SPEED).drives["motor"], Gearing(5.0, 0.9, 2e-4)), repeat=5)
        t_loop = best(lambda: loop_multipliers(result, loading), repeat=3)
        bodies, joints = len(result.system.bodies), len(loads.reactions)
        print(f"\n{name}: {bodies} moving bodies, {joints} joints, {result.system.n} coordinates")
        print(f"  kinematics (q, q', q'', q''')            : {t_kin * 1e3:8.2f} ms")
        print(f"  loads: drive torque + all reactions      : {t_loads * 1e3:8.2f} ms   (CPU {c_loads * 1e3:.2f} ms)")
        print(f"  drive torque by virtual power            : {t_power * 1e3:8.2f} ms   [max rel. difference to multipliers {agree:.1e}]")
        print(f"  refined peaks, {1 + joints} curves (dense re-solve) : {t_peaks * 1e3:8.2f} ms")
        print(f"  servo sizing incl. its loads and peaks    : {t_servo * 1e3:8.2f} ms")
        print(f"  baseline: np.linalg.solve per instant    : {t_loop * 1e3:8.2f} ms   -> loads {t_loop / t_loads:5.1f}x faster")
        print(f"  crank torque: peak {drive.peak.value:.4f} N·m at {drive.peak.at:.3f} deg, RMS {drive.rms:.4f} N·m")
        worst = max(loads.reactions.values(), key=lambda r: r.peak.value)
        print(f"  largest joint force: {worst.name} {worst.peak.value:.2f} N at {worst.peak.at:.3f} deg")


if __name__ == "__main__":
    main()
