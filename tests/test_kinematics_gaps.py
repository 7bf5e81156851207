"""Where a linkage too short to close stays open (`solver.kinematics.open_gaps`).

A four-bar whose coupler and rocker together are shorter than the distance
from the crank pin to the rocker pivot cannot be assembled.  Its nearest
configuration in least squares lays the chain straight along the line of
centres (geometry: any bend only widens the gaps), so the joints' gaps add
up to the missing length, (d − a) − (b + c), and the driver holds.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver.kinematics import ConstantSpeed, JointCoordinate, Mechanism, Revolute, System, open_gaps


def short_chain(a: float, b: float, c: float, d: float) -> Mechanism:
    """Crank a (O2–A) driven at the master angle, coupler b, rocker c, ground d; b + c < d − a."""
    m = Mechanism("too short")
    m.add_point("ground", "O2", (0.0, 0.0))
    m.add_point("ground", "O4", (d, 0.0))
    m.add_body("crank", guess=(0.0, 0.0, 0.1), points={"O2": (0.0, 0.0), "A": (a, 0.0)})
    m.add_body("coupler", guess=(a, 0.2, 0.3), points={"A": (0.0, 0.0), "B": (b, 0.0)})
    m.add_body("rocker", guess=(d, 0.0, 2.8), points={"O4": (0.0, 0.0), "B": (c, 0.0)})
    m.add_joint(Revolute("O2", ("ground", "O2"), ("crank", "O2")))
    m.add_joint(Revolute("A", ("crank", "A"), ("coupler", "A")))
    m.add_joint(Revolute("B", ("coupler", "B"), ("rocker", "B")))
    m.add_joint(Revolute("O4", ("ground", "O4"), ("rocker", "O4")))
    m.add_driver("motor", JointCoordinate("O2"), ConstantSpeed(1.0, 0.0))
    return m


@pytest.mark.parametrize("a, b, c, d", [(0.02, 0.03, 0.025, 0.12), (0.05, 0.04, 0.06, 0.3)])
def test_the_gaps_of_a_chain_too_short_add_up_to_the_missing_length(a, b, c, d):
    q, gaps = open_gaps(short_chain(a, b, c, d), 0.0)
    by_name = {g.name: g for g in gaps}
    missing = (d - a) - (b + c)
    joints = [by_name[n].length for n in ("O2", "A", "B", "O4")]
    assert sum(joints) == pytest.approx(missing, rel=1e-6)
    assert by_name["motor"].length is None and by_name["motor"].size < 1e-9  # an angle, held
    assert [g.size for g in gaps] == sorted((g.size for g in gaps), reverse=True)  # widest first
    # every link lies on the line of centres: body angles 0 or π
    angles = np.asarray(q)[[2, 5, 8]]
    assert np.allclose(np.sin(angles), 0.0, atol=1e-6)


def test_the_drivers_hold_where_the_chain_cannot_close():
    """With the crank driven to 90° (off the line of centres), the nearest configuration keeps the
    crank there and leaves the chain open: the crank pin A sits at (0, a), so the missing length is
    |O4 − A| − (b + c) = √(d² + a²) − (b + c) (Pythagoras), shared along the straight chain."""
    a, b, c, d = 0.05, 0.04, 0.06, 0.3
    q, gaps = open_gaps(short_chain(a, b, c, d), math.pi / 2)
    by_name = {g.name: g for g in gaps}
    assert q[2] == pytest.approx(math.pi / 2, abs=1e-9)  # the crank's angle, as driven
    assert by_name["motor"].size < 1e-9
    joints = [by_name[n].length for n in ("O2", "A", "B", "O4")]
    assert sum(joints) == pytest.approx(math.hypot(d, a) - (b + c), rel=1e-6)


def test_the_nearest_configuration_is_a_least_squares_minimum():
    """At a local minimum of ½‖r‖² the gradient Jᵀr vanishes (first-order optimality), checked here
    with a central finite-difference Jacobian of the scaled equations."""
    mechanism = short_chain(0.05, 0.04, 0.06, 0.3)
    q, _ = open_gaps(mechanism, 0.0)
    system = System(mechanism)
    drive = system.drive(np.array([0.0]))

    def scaled(x):
        return system.residual(x[:, None], drive)[:, 0] * system.row_scale

    h = 1e-7
    jac = np.column_stack([(scaled(q + h * e) - scaled(q - h * e)) / (2 * h) for e in np.eye(q.size)])
    gradient = jac.T @ scaled(q)
    assert np.linalg.norm(gradient * system.col_scale) < 1e-7 * np.linalg.norm(scaled(q))


def test_a_linkage_that_closes_has_no_gap():
    # the same four-bar with a coupler long enough: it assembles, every gap ~ 0
    q, gaps = open_gaps(short_chain(0.02, 0.07, 0.05, 0.1), 0.0)
    assert max(g.size for g in gaps) < 1e-9
