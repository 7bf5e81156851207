"""The one-instant path of a march step (instant.py, linalg.InstantFactor) against independent references.

References: numpy.linalg (LAPACK's LU through numpy's own wrappers) for the
factorization's solution, determinant sign and 1-norm condition number; the
batched evaluation of the same constraint equations (itself checked against
closed forms in test_kinematics_fourbar, _slider_crank and _sixbar) for the
lean evaluation of Φ, Φq, γ, η and for Newton and the derivatives.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver.kinematics import ConstantSpeed, Fixed, PointX, Prismatic, Revolute, solve_cycle
from solver.kinematics.frames import Pose
from solver.kinematics.linalg import InstantFactor
from solver.kinematics.newton import derivatives, newton
from solver.kinematics.system import System
from tests.test_kinematics_support import four_bar, six_bar, slider_crank


@pytest.mark.parametrize("seed", range(5))
def test_instant_factor_matches_numpy_linalg(seed):
    """Solution, sign of the determinant and 1-norm condition as numpy.linalg gives them (to round-off)."""
    rng = np.random.default_rng(seed)
    a = rng.standard_normal((7, 7)) + 3.0 * np.eye(7)
    rows, cols = rng.uniform(0.5, 2.0, (2, 7))
    F = InstantFactor(np.asfortranarray(a), rows.tolist(), cols.tolist())
    b = rng.standard_normal(7)
    # F solves the unscaled system A_s x_s = b_s with b_s = b·rows and x = x_s·cols
    expected = np.linalg.solve(a, b * rows) * cols
    assert np.allclose(F.solve(b[:, None])[:, 0], expected, rtol=1e-12, atol=0.0)
    assert np.allclose(F.solve_list(b.tolist()), expected, rtol=1e-12, atol=0.0)
    assert F.det_sign[0] == np.linalg.slogdet(a)[0]
    assert F.condition[0] == pytest.approx(np.linalg.cond(a, 1), rel=1e-12)


def test_instant_factor_of_a_singular_matrix():
    """An exactly singular matrix: sign 0, infinite condition, no finite solution (as numpy's slogdet, cond say)."""
    a = np.array([[1.0, 2.0], [2.0, 4.0]])
    F = InstantFactor(np.asfortranarray(a), [1.0, 1.0], [1.0, 1.0])
    assert F.det_sign[0] == np.linalg.slogdet(a)[0] == 0.0
    assert F.condition[0] == math.inf
    assert not np.isfinite(F.solve_list([1.0, 1.0])).any()


MECHANISMS = {
    "four-bar": lambda: four_bar(0.04, 0.12, 0.09, 0.10),
    "slider-crank": lambda: slider_crank(0.05, 0.15, 0.01),
    "six-bar": lambda: six_bar(),
}


@pytest.mark.parametrize("name", MECHANISMS)
def test_lean_newton_and_derivatives_agree_with_the_batched_path(name):
    """Newton from a perturbed guess and q', q'', q''' at one instant: lean path = batched path to round-off."""
    mechanism = MECHANISMS[name]()
    result = solve_cycle(mechanism, 60.0, 72)
    system = result.system
    assert system.lean_instant is not None
    k = 17
    guess = result.q[k] + 1e-4 * system.col_scale * np.sin(np.arange(system.n))
    drive = system.drive(result.theta[k : k + 1])
    lean = newton(system, guess[:, None], drive)
    # two equal columns take the batched path (dense LAPACK inverse, arrays of instants)
    batched = newton(system, np.repeat(guess[:, None], 2, axis=1), np.repeat(drive, 2, axis=2))
    assert lean.iterations == batched.iterations
    assert lean.converged[0] and batched.converged.all()
    scale = system.col_scale
    assert np.max(np.abs(lean.q[:, 0] - batched.q[:, 0]) / scale) < 1e-13
    for a, b in zip(derivatives(system, lean, drive), derivatives(system, batched, np.repeat(drive, 2, axis=2))):
        assert np.max(np.abs(a[:, 0] - b[:, 0])) <= 1e-12 * np.max(np.abs(b[:, 0]))
    assert lean.factor.det_sign[0] == batched.factor.det_sign[0]
    assert lean.factor.condition[0] == pytest.approx(batched.factor.condition[0], rel=1e-10)


@pytest.mark.parametrize("kind", [Revolute, Prismatic, Fixed])
def test_residual_jacobian_is_residual_and_jacobian(kind):
    """A kind's combined `residual_jacobian` gives exactly its `residual` and `jacobian`."""
    rng = np.random.default_rng(3)
    k, N = 3, 40
    poses = []
    for _ in range(2):
        x, y, phi = rng.standard_normal((3, k, N))
        poses.append(Pose(x, y, phi, np.cos(phi), np.sin(phi)))
    par = {"si": rng.standard_normal((2, k, 1)), "sj": rng.standard_normal((2, k, 1)),
           "n": rng.standard_normal((2, k, 1)), "angle": rng.standard_normal((1, k, 1))}
    residual, partials = kind.residual_jacobian(par, *poses)
    for a, b in zip(residual, kind.residual(par, *poses)):
        assert np.array_equal(a, b)
    for row_a, row_b in zip(partials, kind.jacobian(par, *poses)):
        for a, b in zip(row_a, row_b):
            assert np.array_equal(np.asarray(a), np.asarray(b))


class NumpyPointX(PointX):
    """PointX whose residual goes through a numpy call: on floats it gives numpy scalars, not plain numbers."""

    @classmethod
    def residual(cls, par, p):
        ax, _ = p.rotate(par["s"])
        return [np.add(p.x, ax)]


def _slider_driven(coordinate):
    m = slider_crank(0.05, 0.15, 0.01, driver="slider", motion=ConstantSpeed(0.001, 0.19))
    m.drivers.clear()
    m.add_driver("servo", coordinate, ConstantSpeed(0.001, 0.19))
    return m


def test_a_kind_that_needs_arrays_keeps_the_batched_path():
    """A kind that calls numpy on its arguments is left on the batched path, with the same results."""
    plain = _slider_driven(PointX(("slider", "B")))
    odd = _slider_driven(NumpyPointX(("slider", "B")))
    assert System(plain).lean_instant is not None
    assert System(odd).lean_instant is None
    theta = np.linspace(0.0, 1.0, 200)
    a, b = solve_cycle(plain, 60.0, theta=theta), solve_cycle(odd, 60.0, theta=theta)
    assert a.success and b.success
    assert np.max(np.abs(a.q - b.q)) < 1e-12
    assert np.max(np.abs(a.ddq - b.ddq)) <= 1e-9 * np.max(np.abs(a.ddq))
