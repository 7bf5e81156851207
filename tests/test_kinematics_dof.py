"""Degrees of freedom from the rank of Φq (DESIGN §4: DOF = coordinates − rank).

A planar four-bar has mobility 1 by the Gruebler–Kutzbach count
M = 3(n − 1) − 2 j1 = 3·3 − 2·4 = 1 (Norton, Design of Machinery, ch. 2; from memory);
one driver makes it kinematically driven, a second over-constrains it.
"""

from __future__ import annotations

from solver.kinematics import BodyAngle, ConstantSpeed, Revolute
from solver.kinematics.cycle import solve_cycle
from solver.kinematics.dof import analyse_dof
from solver.kinematics.newton import assemble
from solver.kinematics.result import NOT_DRIVEN
from solver.kinematics.system import System
from tests.test_kinematics_support import four_bar, six_bar

A, B, C, D = 0.04, 0.12, 0.09, 0.10


def report_for(model):
    system = System(model)
    q, _ = assemble(system, system.initial_guess(), 0.0)
    return analyse_dof(system, q)


def test_driven_four_bar_and_six_bar_have_zero_dof():
    """Gruebler: four-bar 3·3 − 2·4 = 1, six-bar 3·5 − 2·7 = 1 (pins and one slider); one driver each."""
    for model in (four_bar(A, B, C, D), six_bar()):
        report = report_for(model)
        assert report.driven and report.dof == 0 and report.redundant == 0
        assert "kinematically driven" in report.message


def test_under_driven_four_bar_names_its_free_motion():
    model = four_bar(A, B, C, D)
    model.remove("motor")
    report = report_for(model)
    assert report.dof == 1 and report.redundant == 0 and not report.driven
    (motion,) = report.free
    assert set(motion.bodies) == {"crank", "coupler", "rocker"}
    assert set(motion.joints) == {"O2", "A", "B", "O4"}
    assert "under-driven" in report.message and "O2" in report.message
    result = solve_cycle(model, 60.0)
    assert result.status == NOT_DRIVEN and not result.success and result.theta.size == 0
    assert "under-driven" in result.message


def test_under_driven_six_bar_moves_all_its_bodies():
    model = six_bar()
    model.remove("motor")
    report = report_for(model)
    assert report.dof == 1
    assert set(report.free[0].bodies) == {"crank", "coupler", "rocker", "rod", "slider"}


def test_over_constrained_four_bar_names_the_conflicting_drivers():
    model = four_bar(A, B, C, D)
    model.add_driver("rocker-angle", BodyAngle("rocker"), ConstantSpeed(0.0, 1.2))
    report = report_for(model)
    assert report.equations == 10 and report.rank == 9 and report.redundant == 1 and report.dof == 0
    assert {"motor", "rocker-angle"} <= set(report.dependent)
    assert "over-constrained" in report.message
    assert solve_cycle(model, 60.0).status == NOT_DRIVEN


def test_redundant_pin_is_reported_with_the_free_motion():
    """A second pin on the same axis adds two equations but no constraint: rank stays 8 without a driver."""
    model = four_bar(A, B, C, D)
    model.remove("motor")
    model.add_point("ground", "O4 again", (D, 0.0))
    model.add_joint(Revolute("O4b", ("ground", "O4 again"), ("rocker", "O4")))
    report = report_for(model)
    assert report.equations == 10 and report.rank == 8
    assert report.dof == 1 and report.redundant == 2
    assert {"O4", "O4b"} <= set(report.dependent)
    assert "under-driven" in report.message and "over-constrained" in report.message
