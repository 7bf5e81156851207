"""Benchmark: an 8-segment axis evaluated at 36,000 master angles (s, v, a, j)
beside a bare numpy evaluation of the cycloidal formula and its three
derivatives on the same grid.  Target: within 3× of the bare evaluation.

Run: .venv/bin/python benchmarks/bench_motionlaws.py
"""

from __future__ import annotations

import timeit

import numpy as np

from motionlaws import Axis, Segment, compile_axis

N = 36_000
SPEED = 120.0  # cycles/min

AXIS = Axis(
    "bench",
    (
        Segment("cycloidal", 45, 40.0),
        Segment("dwell", 30),
        Segment("modified-sine", 60, 10.0),
        Segment("poly345", 45, 55.0),
        Segment("dwell", 30),
        Segment("modified-trapezoid", 60, 20.0),
        Segment("poly4567", 45, 5.0),
        Segment("harmonic", 45, 0.0),
    ),
)


def bare_cycloidal(theta_deg: np.ndarray):
    """y, y', y'', y''' of one cycloidal rise over the whole grid, scaled to time."""
    x = theta_deg / 360.0
    w = 2.0 * np.pi
    s, c = np.sin(w * x), np.cos(w * x)
    t = 60.0 / SPEED
    return 40.0 * (x - s / w), 40.0 * (1 - c) / t, 40.0 * w * s / t**2, 40.0 * w * w * c / t**3


def best(fn, repeat=7, number=20) -> float:
    return min(timeit.repeat(fn, repeat=repeat, number=number)) / number


def main() -> None:
    theta = np.linspace(0.0, 360.0, N, endpoint=False)
    program = compile_axis(AXIS)
    ours = best(lambda: program.kinematics(theta, SPEED))
    bare = best(lambda: bare_cycloidal(theta))
    print(f"8-segment axis, {N} angles, s v a j : {ours * 1e3:7.3f} ms")
    print(f"bare numpy cycloidal, same grid     : {bare * 1e3:7.3f} ms")
    print(f"ratio                               : {ours / bare:7.2f}x  (target <= 3x)")


if __name__ == "__main__":
    main()
