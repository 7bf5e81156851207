"""True maxima of |f| on [0, 1], refined beyond any sampling grid.

A law's derivative is sampled densely on each smooth piece (ends and
breakpoints included exactly), then the best sample is refined by repeated
zooming on a finer grid around it.  The zoom shrinks the bracket by
`ZOOM_POINTS / 2` each round, so after `ZOOM_ROUNDS` rounds the location is
known to about 1e-8 of the span and the value (at a smooth maximum, error
quadratic in the location) to far better than the 0.1 % the product promises.
"""

from __future__ import annotations

import numpy as np

SAMPLES_PER_PIECE = 513  # 512 intervals: includes x = 1/2, 1/4, 1/8 exactly
ZOOM_POINTS = 65  # each zoom round shrinks the bracket 32-fold
ZOOM_ROUNDS = 3
TIE = 1e-9  # relative: maxima closer than this count as equal; the first wins


def _grid(breakpoints) -> np.ndarray:
    edges = np.unique(np.concatenate(([0.0], np.asarray(breakpoints, float), [1.0])))
    parts = [np.linspace(a, b, SAMPLES_PER_PIECE) for a, b in zip(edges[:-1], edges[1:])]
    return np.concatenate(parts)


def first_max(values: np.ndarray) -> int:
    """Index of the first element within `TIE` of the maximum of `values`."""
    top = values.max()
    return int(np.argmax(values >= top - TIE * abs(top)))


def refined_max_abs(f, breakpoints=(), lo: float = 0.0, hi: float = 1.0) -> tuple[float, float]:
    """(max |f|, x at the first maximum) for vectorized f on [lo, hi].

    `breakpoints` are x where f may have a kink (piece joins); each side of a
    kink is searched separately, so a maximum at a kink is found exactly.
    """
    x = lo + (hi - lo) * _grid([(b - lo) / (hi - lo) for b in breakpoints if lo < b < hi])
    y = np.abs(f(x))
    i = first_max(y)
    best_x, best_y = float(x[i]), float(y[i])
    # Refine inside the two neighbouring cells.  Neighbouring samples lie on
    # one smooth piece (each piece is sampled on its own, ends included), so
    # no bracket crosses a kink.
    for side in (-1, +1):
        j = i + side
        if not 0 <= j < len(x) or x[j] == x[i]:
            continue
        a, b = sorted((x[i], x[j]))
        for _ in range(ZOOM_ROUNDS):
            xs = np.linspace(a, b, ZOOM_POINTS)
            ys = np.abs(f(xs))
            k = int(np.argmax(ys))
            if ys[k] > best_y:  # any gain counts here: same maximum, finer
                best_x, best_y = float(xs[k]), float(ys[k])
            h = xs[1] - xs[0]
            a, b = max(a, xs[k] - h), min(b, xs[k] + h)
    return best_y, best_x
