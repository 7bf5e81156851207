"""Curve reduction for plots and braille rasterization (numpy helpers of the workbench).

Braille characters follow the Unicode Braille Patterns block: U+2800 plus
one bit per dot, dots 1-2-3-7 down the left column (0x01, 0x02, 0x04, 0x40)
and 4-5-6-8 down the right (0x08, 0x10, 0x20, 0x80).
"""

from __future__ import annotations

import numpy as np
import pytest

from workbench.tui.sampling import downsample_minmax
from workbench.tui.widgets.braille import braille_cells, line_dots


def test_downsample_keeps_extremes_and_order():
    x = np.arange(3601) * 0.1
    rng = np.random.default_rng(7)
    y = np.sin(np.radians(x) * 3) + 0.01 * rng.standard_normal(x.size)
    y[1234] = 5.0  # a one-sample spike must survive
    y[2345] = -4.0
    xs, ys = downsample_minmax(x, y, 120)
    assert xs.size <= 240
    assert np.all(np.diff(xs) > 0)
    assert ys.max() == 5.0 and xs[ys.argmax()] == x[1234]
    assert ys.min() == -4.0 and xs[ys.argmin()] == x[2345]
    # every bucket's own min and max are kept
    edges = np.linspace(0, x.size, 121).astype(int)
    for a, b in zip(edges[:-1], edges[1:]):
        inside = (xs >= x[a]) & (xs <= x[b - 1])
        assert ys[inside].max() == y[a:b].max() and ys[inside].min() == y[a:b].min()


def test_downsample_leaves_short_curves_alone():
    x = np.arange(10.0)
    xs, ys = downsample_minmax(x, x**2, 20)
    assert np.array_equal(xs, x) and np.array_equal(ys, x**2)


@pytest.mark.parametrize("x, y", [([0, 17], [0, 5]), ([3, 3], [9, 0]), ([0, 10, 2, 30], [0, 25, 3, 1])])
def test_line_dots_have_no_gaps_and_keep_vertices(x, y):
    px, py = line_dots(np.array(x, float), np.array(y, float))
    steps = np.maximum(np.abs(np.diff(px)), np.abs(np.diff(py)))
    assert steps.max() <= 1  # 8-connected
    for vx, vy in zip(x, y):
        assert np.any((px == vx) & (py == vy))


def test_braille_characters_follow_unicode_dot_bits():
    # A horizontal line along the top dot row of two cells: dots 1 and 4 in each → U+2809 "⠉".
    cols, rows, chars = braille_cells(np.array([0.0, 1.99]), np.array([0.0, 0.0]), 2, 1)
    assert list(cols) == [0, 1] and list(rows) == [0, 0] and chars == ["⠉", "⠉"]
    # A vertical line down the left column of one cell: dots 1, 2, 3, 7 → 0x47 "⡇".
    cols, rows, chars = braille_cells(np.array([0.0, 0.0]), np.array([0.0, 0.99]), 1, 1)
    assert chars == ["⡇"]
    # Points outside the area are dropped.
    cols, rows, chars = braille_cells(np.array([-3.0, 0.2]), np.array([0.0, 0.0]), 1, 1)
    assert list(cols) == [0]
