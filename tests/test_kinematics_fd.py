"""Shared helpers for the kinematics tests: finite-difference weights and test linkages."""

from __future__ import annotations

import math

import numpy as np


def fd_weights(order: int, half_width: int, h: float) -> tuple[np.ndarray, np.ndarray]:
    """Central finite-difference offsets and weights for the `order`-th derivative.

    Weights solve the Vandermonde (Taylor) conditions sum w_k x_k^j = j!·δ_jd for
    j < 2·half_width + 1 (B. Fornberg, "Generation of finite difference formulas
    on arbitrarily spaced grids", Math. Comp. 51, 1988, gives the same weights).
    """
    x = h * np.arange(-half_width, half_width + 1, dtype=float)
    size = x.size
    vander = np.vander(x, size, increasing=True).T  # row j: x^j
    rhs = np.zeros(size)
    rhs[order] = math.factorial(order)
    return x, np.linalg.solve(vander, rhs)


def derivative(f, x0: float, order: int, h: float, half_width: int = 4):
    """order-th derivative of f (scalar -> array) at x0 by a central stencil."""
    offsets, weights = fd_weights(order, half_width, h)
    return sum(w * np.asarray(f(x0 + dx)) for dx, w in zip(offsets, weights))


def test_stencils_differentiate_a_known_function():
    """d^k/dx^k sin x = sin(x + kπ/2) (calculus); the stencils used by the other tests must reproduce it."""
    x0 = 0.7
    for order, h in ((1, 1e-3), (2, 2e-2), (3, 2e-2)):
        got = derivative(np.sin, x0, order, h)
        assert abs(got - math.sin(x0 + order * math.pi / 2)) < 1e-9
