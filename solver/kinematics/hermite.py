"""Quintic Hermite interpolation of q from values, first and second derivatives at nodes.

Between nodes θ_a, θ_b (h = θ_b − θ_a, t = (θ − θ_a)/h) the quintic matching
q, q', q'' at both ends is (standard basis, e.g. any numerical-analysis text):

    q(t) = H0 q_a + h H1 q'_a + h² H2 q''_a + H3 q_b + h H4 q'_b + h² H5 q''_b
    H0 = 1 − 10t³ + 15t⁴ − 6t⁵     H3 = 10t³ − 15t⁴ + 6t⁵
    H1 = t − 6t³ + 8t⁴ − 3t⁵       H4 = −4t³ + 7t⁴ − 3t⁵
    H2 = (t² − 3t³ + 3t⁴ − t⁵)/2   H5 = (t³ − 2t⁴ + t⁵)/2

Its error is O(h⁶ q⁽⁶⁾), so from nodes a few degrees apart the guess it
gives a fine instant is already close to the solution.
"""

from __future__ import annotations

import numpy as np


def interpolate(nodes: np.ndarray, q: np.ndarray, dq: np.ndarray, ddq: np.ndarray, theta: np.ndarray) -> np.ndarray:
    """q at master angles `theta` (N,) from nodes (K,) with q, q', q'' each (n, K); returns (n, N).

    `theta` must lie within [nodes[0], nodes[-1]]; nodes increase strictly.
    """
    k = np.clip(np.searchsorted(nodes, theta, side="right") - 1, 0, len(nodes) - 2)
    h = nodes[k + 1] - nodes[k]
    t = (theta - nodes[k]) / h
    t2 = t * t
    t3 = t2 * t
    u = 1.0 - t
    # the basis above in factored form (fewer operations), H0 = 1 − H3 folded into q_a + H3 (q_b − q_a)
    H3 = t3 * (10.0 + t * (-15.0 + 6.0 * t))
    H1 = (t * u * u * u * (1.0 + 3.0 * t)) * h  # = t − 6t³ + 8t⁴ − 3t⁵
    H4 = (t3 * (-4.0 + 3.0 * t) * u) * h  # = −4t³ + 7t⁴ − 3t⁵
    hh = 0.5 * h * h
    H2 = (t2 * u * u * u) * hh  # = (t² − 3t³ + 3t⁴ − t⁵)/2
    H5 = (t3 * u * u) * hh  # = (t³ − 2t⁴ + t⁵)/2
    if k.size > 1 and (k[1:] >= k[:-1]).all():  # increasing θ: each node's values repeated over its run
        counts = np.bincount(k, minlength=len(nodes) - 1)
        last = len(nodes) - 1

        def at(a, shift):
            return np.repeat(a[:, shift : shift + last], counts, axis=1)
    else:

        def at(a, shift):
            return np.take(a, k + shift, axis=1)

    qa = at(q, 0)
    out = at(q, 1)
    out -= qa
    out *= H3
    out += qa
    out += H1 * at(dq, 0)
    out += H2 * at(ddq, 0)
    out += H4 * at(dq, 1)
    out += H5 * at(ddq, 1)
    return out
