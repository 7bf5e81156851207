"""Reducing curves to what a plot of a given width can show (numpy only)."""

from __future__ import annotations

import numpy as np


def downsample_minmax(x: np.ndarray, y: np.ndarray, buckets: int) -> tuple[np.ndarray, np.ndarray]:
    """At most 2·`buckets` points: each bucket of x keeps its lowest and highest y, in order.

    Peaks stay visible at any width, unlike taking every n-th point.  Curves
    no longer than 2·`buckets` come back unchanged.
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    n = x.size
    if buckets < 1 or n <= 2 * buckets:
        return x, y
    edges = np.linspace(0, n, buckets + 1).astype(int)
    starts = edges[:-1]
    lo = np.minimum.reduceat(y, starts)
    hi = np.maximum.reduceat(y, starts)
    # index of each bucket's min and max: first occurrence within the bucket
    bucket_of = np.repeat(np.arange(buckets), np.diff(edges))
    is_lo = y == lo[bucket_of]
    is_hi = y == hi[bucket_of]
    i_lo = _first_per_bucket(is_lo, bucket_of, buckets)
    i_hi = _first_per_bucket(is_hi, bucket_of, buckets)
    first = np.minimum(i_lo, i_hi)
    second = np.maximum(i_lo, i_hi)
    order = np.column_stack([first, second]).ravel()
    keep = np.concatenate([[True], order[1:] != order[:-1]])
    order = order[keep]
    return x[order], y[order]


def _first_per_bucket(mask: np.ndarray, bucket_of: np.ndarray, buckets: int) -> np.ndarray:
    """Index of the first True of `mask` in each bucket (every bucket has one)."""
    idx = np.flatnonzero(mask)
    b = bucket_of[idx]
    first = np.full(buckets, -1)
    # reversed assignment leaves the smallest index per bucket
    first[b[::-1]] = idx[::-1]
    return first
