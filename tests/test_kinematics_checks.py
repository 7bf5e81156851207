"""The solver's own checks: a batch that lands on the wrong branch is caught and re-marched.

The batched stages solve each instant from an interpolated guess; these
tests plant the other assembly branch (Freudenstein's crossed solution) in
what a batch returns and require the final answer to be the drawn (open)
branch everywhere — so the branch-consistency checks and the repairs are
exercised, not just the happy path.
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest

import solver.kinematics.cycle as cycle
from solver.kinematics import ModelError, TransmissionAngle, mobility, solve_cycle
from tests.test_kinematics_support import four_bar, fourbar_closed_form

A, B, C, D = 0.04, 0.12, 0.09, 0.10
START = 0.4


def crossed(q, theta):
    """q with coupler and rocker moved to the crossed branch at master angles theta (rad)."""
    t3, t4 = fourbar_closed_form(A, B, C, D, START + theta, open_branch=False)
    q = q.copy()
    q[5], q[8] = t3, t4
    return q


def planting(batch_size_test, where):
    """A stand-in for cycle.newton that plants the crossed branch in batches passing `batch_size_test`."""
    real = cycle.newton

    def fake(system, q, drive, plan=None, *args, **kwargs):
        solved = real(system, q, drive, plan, *args, **kwargs)
        n = q.shape[1]
        if batch_size_test(n):
            theta = drive[0, 0] - START  # the motor drive is ConstantSpeed(1, START)
            idx = where(n)
            solved.q[:, idx] = crossed(solved.q[:, idx], theta[idx])
        return solved

    return fake


def assert_open_branch(result):
    assert result.success, result.message
    t3, t4 = fourbar_closed_form(A, B, C, D, START + result.theta, open_branch=True)
    wrap = lambda x: np.angle(np.exp(1j * x))  # noqa: E731
    assert np.max(np.abs(wrap(result.q[:, 5] - t3))) < 1e-9
    assert np.max(np.abs(wrap(result.q[:, 8] - t4))) < 1e-9


def test_fine_instants_on_the_wrong_branch_are_re_marched(monkeypatch):
    instants = 1800
    monkeypatch.setattr(cycle, "newton", planting(lambda n: n == instants, lambda n: np.arange(700, 712)))
    assert_open_branch(solve_cycle(four_bar(A, B, C, D, START), 60.0, instants=instants))


def test_a_node_batch_on_the_wrong_branch_falls_back_to_marching(monkeypatch):
    monkeypatch.setattr(cycle, "newton", planting(lambda n: 100 < n < 400, lambda n: np.array([n // 2])))
    marches, repairs = [], []
    real_march, real_repair = cycle.march, cycle.CycleSolver._repair
    monkeypatch.setattr(cycle, "march", lambda *a, **k: marches.append(1) or real_march(*a, **k))
    monkeypatch.setattr(cycle.CycleSolver, "_repair", lambda *a, **k: repairs.append(1) or real_repair(*a, **k))
    assert_open_branch(solve_cycle(four_bar(A, B, C, D, START), 60.0, instants=1800))
    assert len(marches) >= 2 and not repairs  # caught among the nodes, before the fine instants


def test_mobility_without_a_cycle():
    report, q = mobility(four_bar(A, B, C, D, START), 0.0)
    assert report.driven and q is not None and q.shape == (9,)


def test_transmission_angle_needs_a_pin_and_its_bodies():
    result = solve_cycle(four_bar(A, B, C, D, START), 60.0, instants=36)
    with pytest.raises(ModelError, match="not joined by pin"):
        result.output(TransmissionAngle("B", ("crank", "A"), ("rocker", "O4")))
    with pytest.raises(ModelError, match="no joint named"):
        result.output(TransmissionAngle("Z", ("coupler", "A"), ("rocker", "O4")))


def test_solver_loads_no_user_interface_code():
    """Architecture (DESIGN §2): solver imports numpy, scipy, motionlaws only — never workbench, textual or rich."""
    code = (
        "import sys, solver.kinematics;"
        "bad = [m for m in sys.modules if m.split('.')[0] in ('workbench', 'textual', 'rich')];"
        "print(','.join(bad))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == ""


@pytest.mark.parametrize("theta", [np.array([0.0]), np.linspace(1.0, 2.0, 7), np.linspace(-2.0, -1.0, 7)])
def test_instants_away_from_the_drawing_stay_on_the_drawn_branch(theta):
    """Rough coordinates show master angle 0: the solver follows that branch to the first instant, either way."""
    result = solve_cycle(four_bar(A, B, C, D, START), 60.0, theta=theta)
    assert result.theta.size == theta.size
    assert_open_branch(result)
