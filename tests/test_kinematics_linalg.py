"""The batched factorizations against numpy's LAPACK solve, determinant and condition number."""

from __future__ import annotations

import numpy as np
import pytest

from solver.kinematics.linalg import DenseFactor, SparseFactor
from solver.kinematics.system import System
from tests.test_kinematics_slider_crank import A, B, C
from tests.test_kinematics_support import four_bar, six_bar, slider_crank

MODELS = {
    "four-bar": lambda: four_bar(0.04, 0.12, 0.09, 0.10),
    "six-bar": six_bar,
    "slider-crank": lambda: slider_crank(A, B, C),
}


def random_stack(system, count, seed):
    rng = np.random.default_rng(seed)
    q = np.empty((system.n, count))
    q[0::3] = rng.uniform(-1, 1, (system.B, count)) * system.length
    q[1::3] = rng.uniform(-1, 1, (system.B, count)) * system.length
    q[2::3] = rng.uniform(-np.pi, np.pi, (system.B, count))
    return q, rng.standard_normal((system.m, count))


@pytest.mark.parametrize("name", sorted(MODELS))
def test_solutions_determinant_sign_and_condition(name):
    system = System(MODELS[name]())
    q, b = random_stack(system, 500, 11)
    jac = system.jacobian(q)
    stacked = np.moveaxis(jac, 2, 0).copy()
    want = np.linalg.solve(stacked, b.T[:, :, None])[:, :, 0].T  # numpy / LAPACK gesv
    scaled = np.moveaxis(system.scaled_jacobian(jac), 2, 0)
    exact_cond = np.linalg.cond(scaled, 1)
    keep = exact_cond < 1e8  # random configurations can be near singular; compare where solutions are meaningful
    assert keep.mean() > 0.9
    compact = system.residual_jacobian(q, system.drive(np.zeros(q.shape[1])))[1]
    np.testing.assert_array_equal(compact.dense(), jac)
    sparse = SparseFactor(system.elimination_plan(), compact.values, system.row_scale, system.col_scale)
    dense = DenseFactor(jac, system.row_scale, system.col_scale)
    for factor in (sparse, dense):
        got = factor.solve(b)
        err = np.max(np.abs(got - want)[:, keep] / (np.abs(want[:, keep]).max(axis=0) * exact_cond[keep]))
        assert err < 1e-13
        np.testing.assert_array_equal(factor.det_sign[keep], np.sign(np.linalg.det(stacked))[keep])
    np.testing.assert_allclose(dense.condition[keep], exact_cond[keep], rtol=1e-8)
    # the pivot estimate only screens: it stays within a modest factor below the exact value
    ratio = sparse.condition[keep] / exact_cond[keep]
    assert np.all(ratio <= 1.0 + 1e-9) and np.median(ratio) > 1e-2


def test_plan_pivots_on_constant_entries_of_the_pins():
    """A four-bar has 4 pins: their ±1 entries in x, y columns take all 6 xy pivots, leaving the 3 φ columns."""
    system = System(MODELS["four-bar"]())
    plan = system.elimination_plan()
    assert len(plan.steps) == 6
    assert sorted(plan.rest_cols % 3) == [2, 2, 2]
