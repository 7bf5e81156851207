"""Quintic Hermite interpolation reproduces polynomials of degree ≤ 5 exactly (interpolation theory:
the interpolant matching value, first and second derivative at both ends of an interval is unique
among quintics, so a quintic is its own interpolant)."""

from __future__ import annotations

import numpy as np

from solver.kinematics.hermite import interpolate


def test_quintics_are_reproduced_on_uneven_nodes():
    rng = np.random.default_rng(5)
    polys = [np.polynomial.Polynomial(rng.uniform(-1, 1, 6)) for _ in range(3)]
    nodes = np.array([-0.3, 0.1, 0.35, 1.2, 1.25])
    theta = np.linspace(nodes[0], nodes[-1], 301)
    q = np.array([p(nodes) for p in polys])
    dq = np.array([p.deriv()(nodes) for p in polys])
    ddq = np.array([p.deriv(2)(nodes) for p in polys])
    got = interpolate(nodes, q, dq, ddq, theta)
    want = np.array([p(theta) for p in polys])
    assert np.max(np.abs(got - want)) < 1e-13


def test_a_sextic_is_not_reproduced():
    """The check above can fail: one degree more leaves an error of the size h⁶/46080 · 720 at mid-interval."""
    nodes = np.array([0.0, 1.0])
    p = np.polynomial.Polynomial([0, 0, 0, 0, 0, 0, 1.0])
    mid = interpolate(nodes, p(nodes)[None], p.deriv()(nodes)[None], p.deriv(2)(nodes)[None], np.array([0.5]))
    assert abs(mid[0, 0] - p(0.5) - 720 / 46080) < 1e-12
