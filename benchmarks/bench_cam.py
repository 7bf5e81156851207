"""Benchmark: cam geometry on 3,600 cam angles for each follower type.

Per follower: the grid arrays alone (pitch curve, profile, pressure angle,
curvature: `cam_points`), then the full analysis (the same arrays plus the
refined extremes, undercut/cusp regions and corners: `analyse`), then the
sizing helper of the type.  Measures and prints only.

Run: .venv/bin/python benchmarks/bench_cam.py
"""

from __future__ import annotations

import math
import timeit

import numpy as np

from motionlaws import Axis, Segment, compile_axis
from solver.cam import (
    Cam,
    OscillatingFlat,
    OscillatingRoller,
    TranslatingFlat,
    TranslatingRoller,
    analyse,
    cam_points,
    largest_roller,
    motion_from_program,
    smallest_base_radius,
    smallest_prime_radius,
)

POINTS = 3600
MM = 1e-3
DEG = math.pi / 180


def axis(unit: str, lift: float) -> Axis:
    return Axis(
        "bench",
        (
            Segment("cycloidal", 80, to=lift),
            Segment("dwell", 50),
            Segment("modified-sine", 70, to=lift / 2),
            Segment("poly345", 60, to=0.0),
            Segment("dwell", 100),
        ),
        unit=unit,
    )


LINEAR = motion_from_program(compile_axis(axis("mm", 20.0)), MM)
ANGULAR = motion_from_program(compile_axis(axis("deg", 15.0)), DEG)
SMALL_SWING = motion_from_program(compile_axis(axis("deg", 4.0)), DEG)

CAMS = {
    "translating roller": Cam(LINEAR, TranslatingRoller(50 * MM, 10 * MM, 4 * MM)),
    "translating flat": Cam(LINEAR, TranslatingFlat(50 * MM)),
    "oscillating roller": Cam(ANGULAR, OscillatingRoller(130 * MM, 95 * MM, 55 * MM, 8 * MM)),
    "oscillating flat": Cam(SMALL_SWING, OscillatingFlat(130 * MM, 60 * MM, 4 * MM)),
}
SIZING = {
    "translating roller": ("smallest prime circle", smallest_prime_radius),
    "translating flat": ("smallest base circle", smallest_base_radius),
    "oscillating roller": ("smallest prime circle", smallest_prime_radius),
    "oscillating flat": ("smallest base circle", smallest_base_radius),
}


def best(fn, repeat=5, number=10) -> float:
    return min(timeit.repeat(fn, repeat=repeat, number=number)) / number


def main() -> None:
    theta = 2 * np.pi * np.arange(POINTS) / POINTS
    print(f"cam geometry, {POINTS} cam angles (best of 5, ms)")
    print(f"{'follower':<20}{'arrays':>9}{'analysis':>10}  sizing")
    for name, cam in CAMS.items():
        arrays = best(lambda: cam_points(cam, theta))
        full = best(lambda: analyse(cam, POINTS))
        label, helper = SIZING[name]
        sizing = best(lambda: helper(cam), repeat=3, number=1)
        print(f"{name:<20}{arrays * 1e3:9.2f}{full * 1e3:10.2f}  {label} {sizing * 1e3:.1f}")
    roller = CAMS["translating roller"]
    print(f"largest roller (translating): {best(lambda: largest_roller(roller)) * 1e3:.2f} ms")


if __name__ == "__main__":
    main()
