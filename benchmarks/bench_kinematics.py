"""Benchmark: one machine cycle at 3,600 instants (positions, velocities,
accelerations, jerks) of a four-bar and of a six-bar with a slider output.

Printed beside:
  (a) a naive loop of scipy.optimize.root, one call per instant, for
      positions alone (same constraint equations, warm-started from the
      previous instant, finite-difference Jacobian as root does by default);
  (b) a vectorized numpy closed form of the four-bar (Freudenstein half-angle
      positions, loop equations solved by Cramer's rule for velocity,
      acceleration and jerk).
Targets: at least 50x faster than (a); within 10x of (b).  Measures and
prints only.

Timings are wall clock, best of many runs (the least disturbed: the machine
is shared), with the median and the 90th percentile beside it to show the
spread; minor page faults per solve (fresh memory the OS must map) and the
time per solver stage (best of the runs) follow.  "again" is the same
mechanism solved again (its compiled form and its assembly are remembered,
as after an edit of speed, limits or a motion segment); "new geometry"
forgets both before every run, as after an edit of a dimension.  The
recorded history of the performance work (HISTORY) is printed at the end.

Run: .venv/bin/python benchmarks/bench_kinematics.py [--quick] [--repeat N]
     (--quick leaves out the slow scipy loop)
"""

from __future__ import annotations

import argparse
import math
import sys
import time
import timeit
from contextlib import contextmanager
from pathlib import Path

import numpy as np
from scipy.optimize import root

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import solver.kinematics.cycle as cycle  # noqa: E402
import solver.kinematics.compiled as compiled_module  # noqa: E402
from solver.kinematics import ConstantSpeed, JointCoordinate, Mechanism, Prismatic, Revolute  # noqa: E402
from solver.kinematics.cycle import solve_cycle  # noqa: E402
from solver.kinematics.system import System  # noqa: E402

N = 3600
SPEED = 120.0  # cycles/min
OMEGA = 2 * math.pi * SPEED / 60
FOUR = (0.04, 0.12, 0.09, 0.10)  # crank, coupler, rocker, ground (m): Grashof crank-rocker
SIX = dict(a=0.03, b=0.10, c=0.07, d=0.08, arm=(0.11, 0.02), rod=0.12, guide_y=0.16)


def closed_form_angles(a, b, c, d, t2):
    """θ3, θ4 of the open four-bar (Freudenstein; Norton's half-angle form)."""
    K1, K2, K3 = d / a, d / c, (a * a - b * b + c * c + d * d) / (2 * a * c)
    K4, K5 = d / b, (c * c - d * d - a * a - b * b) / (2 * a * b)
    ct, st = np.cos(t2), np.sin(t2)
    A = ct - K1 - K2 * ct + K3
    B = -2.0 * st
    C = K1 - (K2 + 1.0) * ct + K3
    D = ct - K1 + K4 * ct + K5
    F = K1 + (K4 - 1.0) * ct + K5
    t4 = 2.0 * np.arctan2(-B - np.sqrt(B * B - 4 * A * C), 2 * A)
    t3 = 2.0 * np.arctan2(-B - np.sqrt(B * B - 4 * D * F), 2 * D)
    return t3, t4


def four_bar_closed_form(t2, w2=OMEGA):
    """θ3, θ4 and their first three time derivatives, crank at constant speed, all vectorized."""
    a, b, c, d = FOUR
    t3, t4 = closed_form_angles(a, b, c, d, t2)
    ct, st = np.cos(t2), np.sin(t2)
    c3, s3, c4, s4 = np.cos(t3), np.sin(t3), np.cos(t4), np.sin(t4)
    det = b * c * (s3 * c4 - c3 * s4)

    def solve(rx, ry):  # [-b s3, c s4; b c3, -c c4] [x3, x4] = [rx, ry]
        return (-c * c4 * rx - c * s4 * ry) / det, (-b * s3 * ry - b * c3 * rx) / det

    w3, w4 = solve(a * st * w2, -a * ct * w2)
    al3, al4 = solve(
        a * ct * w2**2 + b * c3 * w3**2 - c * c4 * w4**2, a * st * w2**2 + b * s3 * w3**2 - c * s4 * w4**2
    )
    rx = -(a * st * w2**3 + b * (-3 * c3 * w3 * al3 + s3 * w3**3) - c * (-3 * c4 * w4 * al4 + s4 * w4**3))
    ry = -(-a * ct * w2**3 + b * (-3 * s3 * w3 * al3 - c3 * w3**3) - c * (-3 * s4 * w4 * al4 - c4 * w4**3))
    j3, j4 = solve(rx, ry)
    return t3, t4, w3, w4, al3, al4, j3, j4


def four_bar() -> Mechanism:
    a, b, c, d = FOUR
    t3, t4 = (float(v[0]) for v in closed_form_angles(a, b, c, d, np.array([0.0])))
    m = Mechanism("four-bar")
    m.add_point("ground", "O2", (0.0, 0.0))
    m.add_point("ground", "O4", (d, 0.0))
    m.add_body("crank", (0.0, 0.0, 0.0), {"O2": (0.0, 0.0), "A": (a, 0.0)})
    m.add_body("coupler", (a, 0.0, t3 + 0.05), {"A": (0.0, 0.0), "B": (b, 0.0)})
    m.add_body("rocker", (d, 0.0, t4 - 0.05), {"O4": (0.0, 0.0), "B": (c, 0.0)})
    m.add_joint(Revolute("O2", ("ground", "O2"), ("crank", "O2")))
    m.add_joint(Revolute("A", ("crank", "A"), ("coupler", "A")))
    m.add_joint(Revolute("B", ("coupler", "B"), ("rocker", "B")))
    m.add_joint(Revolute("O4", ("ground", "O4"), ("rocker", "O4")))
    m.add_driver("motor", JointCoordinate("O2"), ConstantSpeed(1.0))
    return m


def six_bar() -> Mechanism:
    a, b, c, d = SIX["a"], SIX["b"], SIX["c"], SIX["d"]
    ux, uy = SIX["arm"]
    r5, yg = SIX["rod"], SIX["guide_y"]
    t3, t4 = (float(v[0]) for v in closed_form_angles(a, b, c, d, np.array([0.0])))
    cx, cy = d + ux * math.cos(t4) - uy * math.sin(t4), ux * math.sin(t4) + uy * math.cos(t4)
    xd = cx + math.sqrt(r5 * r5 - (yg - cy) ** 2)
    m = Mechanism("six-bar")
    m.add_point("ground", "O2", (0.0, 0.0))
    m.add_point("ground", "O4", (d, 0.0))
    m.add_point("ground", "G", (0.0, yg))
    m.add_body("crank", (0.0, 0.0, 0.0), {"O2": (0.0, 0.0), "A": (a, 0.0)})
    m.add_body("coupler", (a, 0.0, t3), {"A": (0.0, 0.0), "B": (b, 0.0)})
    m.add_body("rocker", (d, 0.0, t4), {"O4": (0.0, 0.0), "B": (c, 0.0), "C": (ux, uy)})
    m.add_body("rod", (cx, cy, math.atan2(yg - cy, xd - cx)), {"C": (0.0, 0.0), "D": (r5, 0.0)})
    m.add_body("slider", (xd, yg, 0.0), {"D": (0.0, 0.0)})
    for name, i, j in (
        ("O2", ("ground", "O2"), ("crank", "O2")),
        ("A", ("crank", "A"), ("coupler", "A")),
        ("B", ("coupler", "B"), ("rocker", "B")),
        ("O4", ("ground", "O4"), ("rocker", "O4")),
        ("C", ("rocker", "C"), ("rod", "C")),
        ("D", ("rod", "D"), ("slider", "D")),
    ):
        m.add_joint(Revolute(name, i, j))
    m.add_joint(Prismatic("guide", ("ground", "G"), ("slider", "D"), axis=(1.0, 0.0)))
    m.add_driver("motor", JointCoordinate("O2"), ConstantSpeed(1.0))
    return m


HISTORY = """\
Recorded history of the performance work, one row per change, cumulative: each version
solved "again" 90 times in separate processes taking turns (2-core machine shared with
other test suites, so the median moves with their load; the best is the least disturbed
run); instructions per four-bar solve counted by valgrind (deterministic).

change                                              four-bar ms     six-bar ms     four-bar
                                                    best median    best median    M instr.
baseline (before this work)                         24.1   36.5    36.9   56.7    96.6
scratch memory pooled across solves                 21.4   30.8    32.6   48.4    97.7
nodes passed between stages as arrays               20.7   32.7    30.8   49.6    92.6
poses moved by the Newton step: no 2nd cos, sin     21.1   30.9    30.4   50.1    91.6
pivot rows exchanged by whole-row selects           20.3   31.3    31.7   48.5    89.8
constant multipliers and pivots worked out once     19.0   30.8    29.1   47.7    83.1
affine kinds (angle drivers) as a matrix product    17.8   27.0    28.4   36.5    78.9
less Python per evaluation (views, objects reused)  16.7   25.7    27.9   43.8    74.2
compiled form remembered by structure               14.7   23.6    24.1   36.6    68.2
fewer array ops: pin eta, branch check, dense       15.3   25.0    23.8   35.3    67.8
malloc threshold lifted: no page faults             15.1   22.6    24.9   38.1    67.8
in-place solves, Jacobian constants kept            15.5   25.1    23.7   37.3    66.6
no take_along_axis or tile in the factor            13.6   21.4    23.7   37.3    65.5
one-instant Newton tests on plain floats            14.9   22.7    24.0   34.0    63.6
assembly and first state remembered                 12.9   21.2    21.4   30.6    60.1
Hermite guesses gathered by runs                    13.3   19.9    22.9   32.6    58.5
small trims                                         12.7   20.0    21.1   31.0    58.3
-- a second pass; the solver's break handling had landed meanwhile (+0.2 M) --
start of the pass, re-measured (*)                  13.4   19.8    20.6   32.9    58.5
one instant on floats: kinds per instance, LAPACK   10.1   16.1    17.4   26.8    51.3
fewer array calls per batched evaluation and solve   9.4   15.0    17.4   25.6    50.4
pivot rows by whole-row comparison, not argmax       8.7   14.3    15.1   25.0    45.4
dense remainder scaled in place (this version)       9.1   14.9    14.7   25.3    45.0

(*) 360 solves per version in one alternation; the version run first in each round
measured ~3 ms slow there, so the start row comes from a second alternation in reverse
order (120 solves; this version 9.4 / 13.8 and 15.4 / 23.6 in it).
Page faults per solve: four-bar ~990 -> 0, six-bar ~1,750 -> 0.  Six-bar instructions
159.1 -> 105.7 M in the first pass, 106.2 -> 81.5 M in the second.  Numpy closed form of
the four-bar: best 0.92-1.2 ms meanwhile.
Tried and left out (measured): the Newton step and the velocity as one two-column solve
(-7% instructions at 185 instants, +1..4% at 3,600 and at one instant); solving every
2-degree node of a march step in one batch (each extra instant costs ~36 k instructions
per dense iteration: the march would double); a cubic or extrapolated predictor (28 -> 25
iterations per cycle: the cubic pays an eta and a solve per step back, the extrapolated
one would change where the march searches for dead points); march steps over 45 degrees (the
branch check rejects them: defect 0.015-0.034 > 0.01); blocks of instants sized for the
cache (a Newton pass costs ~1.5 ms of fixed overhead); LAPACK on stacks of 3,600
matrices (inverse 12.6 ms, solve 5 ms); scipy's getrf/getri for one instant (no faster
than numpy's inv and slogdet while the evaluation around it made ~100 numpy calls; with
the kinds on floats they are: ~2 us against ~14 us for numpy's inv).  In the second pass:
gathering only the pose components a kind reads (the gathers are memcpy-fast, ~35 us for
all of a four-bar at 3,600 instants; one call per component costs more); cos and sin as
one complex exponential (no faster: ~0.5 ms for 10,800 angles either way, numpy's float64
sin and cos run scalar libm here); the elimination plan on floats for one instant
(estimated ~5 of ~25 us per march iteration: not done)."""


def naive_root_loop(mechanism, theta, q0):
    """Positions only: scipy.optimize.root once per instant on the same equations."""
    system = System(mechanism)
    drive = system.drive(theta)
    q = np.asarray(q0, dtype=float)
    out = np.empty((theta.size, q.size))
    for i in range(theta.size):
        d = drive[:, :, i : i + 1]
        q = root(lambda z: system.residual(z[:, None], d)[:, 0], q, method="hybr", tol=1e-12).x
        out[i] = q
    return out


def runs(fn, repeat=20, number=1, timer=time.perf_counter) -> np.ndarray:
    """Times per call (s) of `repeat` runs of `number` calls each, sorted."""
    return np.sort(np.array(timeit.repeat(fn, repeat=repeat, number=number, timer=timer)) / number)


def spread(times: np.ndarray) -> str:
    """best, median and 90th percentile of sorted run times, in ms."""
    return f"best {times[0] * 1e3:7.2f} ms  (median {np.median(times) * 1e3:6.2f}, p90 {np.quantile(times, 0.9) * 1e3:6.2f})"


def page_faults(fn, repeat=5) -> float:
    """Minor page faults per call (fresh memory pages the OS maps); NaN where not measurable."""
    try:
        import resource
    except ImportError:  # not on this platform
        return math.nan
    fn()
    before = resource.getrusage(resource.RUSAGE_SELF).ru_minflt
    for _ in range(repeat):
        fn()
    return (resource.getrusage(resource.RUSAGE_SELF).ru_minflt - before) / repeat


STAGES = (  # (label, owner, attribute) of the cycle solver's stages, timed where called from outside another stage
    ("build System + plan", cycle, "System"),
    ("assemble + dof", cycle, "assemble"),
    ("assemble + dof", cycle, "analyse_dof"),
    ("first instant", cycle, "solve_instant"),
    ("march (coarse)", cycle, "march"),
    ("nodes (batched level)", cycle.CycleSolver, "_densify"),
    ("fine instants", cycle.CycleSolver, "_fine"),
)


@contextmanager
def staged(totals: dict):
    """Time the stages of STAGES into `totals` (label -> s) while inside the block."""
    depth = [0]
    saved = [(owner, name, getattr(owner, name)) for _, owner, name in STAGES]

    def timed(label, fn):
        def call(*args, **kwargs):
            depth[0] += 1
            start = time.perf_counter()
            try:
                return fn(*args, **kwargs)
            finally:
                depth[0] -= 1
                if depth[0] == 0:
                    totals[label] = totals.get(label, 0.0) + time.perf_counter() - start
        return call

    for (label, owner, name), (_, _, fn) in zip(STAGES, saved):
        setattr(owner, name, timed(label, fn))
    try:
        yield
    finally:
        for owner, name, fn in saved:
            setattr(owner, name, fn)


def forget_compiled() -> None:
    """Drop the remembered compiled forms and assemblies, as an edit of the geometry would."""
    compiled_module._compiled.clear()
    cycle._starts.clear()


def solve_new_geometry(model):
    forget_compiled()
    return solve_cycle(model, SPEED, N)


def stage_times(model, repeat) -> dict:
    """Best time (s) of each stage over `repeat` solves again, and the rest of solve_cycle as "other"."""
    best: dict = {}
    solve_cycle(model, SPEED, N)
    for _ in range(repeat):
        totals: dict = {}
        with staged(totals):
            start = time.perf_counter()
            solve_cycle(model, SPEED, N)
            totals["total"] = time.perf_counter() - start
        totals["other"] = totals["total"] - sum(v for k, v in totals.items() if k != "total")
        for k, v in totals.items():
            best[k] = min(best.get(k, math.inf), v)
    return best


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="leave out the slow scipy root loop")
    parser.add_argument("--repeat", type=int, default=40, help="runs per timing (best, median, p90 reported)")
    args = parser.parse_args()
    repeat = args.repeat
    theta = 2 * math.pi * np.arange(N) / N
    rows = []
    for name, build in (("four-bar", four_bar), ("six-bar", six_bar)):
        model = build()
        result = solve_cycle(model, SPEED, N)
        assert result.success, result.message
        ours = runs(lambda: solve_cycle(model, SPEED, N), repeat=repeat)
        ours_cpu = runs(lambda: solve_cycle(model, SPEED, N), repeat=repeat, timer=time.process_time)
        faults = page_faults(lambda: solve_cycle(model, SPEED, N))
        cold = runs(lambda: solve_new_geometry(model), repeat=max(5, repeat // 2))
        if args.quick:
            naive, agree = math.nan, math.nan
        else:
            naive = runs(lambda: naive_root_loop(model, theta, result.q[0]), repeat=1)[0]
            check = naive_root_loop(model, theta[:200], result.q[0])
            agree = np.max(np.abs(check - result.q[:200]))
        rows.append((name, ours, ours_cpu, faults, cold, naive, agree, stage_times(model, max(5, repeat // 2))))
    closed = runs(lambda: four_bar_closed_form(theta), repeat=max(7, repeat // 2), number=20)
    closed_cpu = runs(lambda: four_bar_closed_form(theta), repeat=max(7, repeat // 2), number=20, timer=time.process_time)
    t3, t4, *_ = four_bar_closed_form(theta)
    four = solve_cycle(four_bar(), SPEED, N)
    err = np.max(np.abs(np.angle(np.exp(1j * (four.q[:, 8] - t4)))))
    print(f"{N} instants per cycle, positions + velocities + accelerations + jerks; {repeat} runs each")
    for name, ours, ours_cpu, faults, cold, naive, agree, _ in rows:
        print(f"{name:9s} solver, again              : {spread(ours)}   CPU best {ours_cpu[0] * 1e3:.2f} ms"
              f"   page faults/solve {faults:.0f}")
        print(f"{name:9s} solver, new geometry       : {spread(cold)}")
        if not args.quick:
            print(f"{name:9s} scipy root per instant (q) : {naive * 1e3:8.2f} ms   -> {naive / ours[0]:6.1f}x faster"
                  f" (target >= 50x)   [max |dq| vs solver {agree:.1e}]")
    print(f"four-bar  numpy closed form          : {spread(closed)}   CPU best {closed_cpu[0] * 1e3:.2f} ms"
          f"   [max |d theta4| {err:.1e} rad]")
    four_ours, four_cpu = rows[0][1], rows[0][2]
    four_cold = rows[0][4]
    print(f"four-bar  solver / closed form       : {four_ours[0] / closed[0]:5.1f}x best-to-best,"
          f" {np.median(four_ours) / np.median(closed):5.1f}x median-to-median,"
          f" CPU {four_cpu[0] / closed_cpu[0]:5.1f}x; new geometry {four_cold[0] / closed[0]:5.1f}x   (target <= 10x)")
    for name, *_, stages in rows:
        parts = ", ".join(f"{k} {v * 1e3:.2f}" for k, v in stages.items() if k != "total")
        print(f"{name:9s} stages, best of each (ms)  : {parts}")
    print()
    print(HISTORY)


if __name__ == "__main__":
    main()
