"""The lowest-order polynomial meeting given end conditions (Hermite form).

Used by the `polynomial` and `blend` segment laws.  Conditions are given in
position units per power of the normalized abscissa x in [0, 1]: the k-th
derivative d^k s / dx^k at x = 0 and at x = 1.
"""

from __future__ import annotations

from math import factorial

import numpy as np


def hermite_coefficients(start: list[float], end: list[float]) -> np.ndarray:
    """Coefficients c (ascending powers) of the lowest-order s(x) with
    s^(k)(0) = start[k] and s^(k)(1) = end[k] for every k given.

    `start` and `end` each hold the position first, then as many successive
    derivatives as are given (velocity, acceleration, jerk).  With n
    conditions in all, the polynomial has degree n − 1 and is unique.
    """
    n = len(start) + len(end)
    if not start or not end:
        raise ValueError("both ends need a position")
    rows, rhs = [], []
    powers = np.arange(n)
    for k, value in enumerate(start):  # d^k/dx^k x^p at 0 is k! when p == k
        row = np.zeros(n)
        row[k] = factorial(k)
        rows.append(row)
        rhs.append(value)
    for k, value in enumerate(end):  # d^k/dx^k x^p at 1 is p!/(p-k)!
        row = np.array(
            [factorial(p) / factorial(p - k) if p >= k else 0.0 for p in powers]
        )
        rows.append(row)
        rhs.append(value)
    return np.linalg.solve(np.array(rows), np.array(rhs, dtype=float))
