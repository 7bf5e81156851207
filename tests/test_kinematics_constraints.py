"""Each constraint kind's Φq, γ and η against finite differences of its residual.

Along a random cubic path q(θ) = q0 + q1 θ + q2 θ²/2 + q3 θ³/6 of the body
coordinates, the chain rule gives (definition of γ and η, DESIGN §4):
    dΦ/dθ   = Φq q1
    d²Φ/dθ² = Φq q2 − γ(q0, q1)
    d³Φ/dθ³ = Φq q3 − η(q0, q1, q2)
The derivatives of Φ along the path are taken by central finite differences
(8th-order stencils, weights from the Taylor conditions as in Fornberg 1988),
independently of the hand-derived formulas under test.
"""

from __future__ import annotations

import numpy as np
import pytest

from solver.kinematics import (
    BodyAngle,
    ConstantSpeed,
    Fixed,
    JointCoordinate,
    Mechanism,
    ModelError,
    PointX,
    PointY,
    Prismatic,
    RelativeAngle,
    Revolute,
    SliderStroke,
    System,
)
from tests.test_kinematics_support import derivative

RNG_SEED = 20240611


def two_bodies() -> Mechanism:
    m = Mechanism("probe")
    m.add_body("a", guess=(0.1, -0.05, 0.3), points={"P": (0.12, 0.03), "O": (0.0, 0.0)})
    m.add_body("b", guess=(0.25, 0.1, -0.7), points={"Q": (-0.04, 0.09), "R": (0.2, -0.01)})
    m.add_point("ground", "G", (0.05, -0.02))
    return m


KINDS = {
    "revolute": lambda: Revolute("pin", ("a", "P"), ("b", "Q")),
    "revolute-to-ground": lambda: Revolute("pin", ("ground", "G"), ("b", "R")),
    "prismatic": lambda: Prismatic("slide", ("a", "P"), ("b", "Q"), axis=(0.6, 0.8), angle=0.4),
    "prismatic-on-ground": lambda: Prismatic("slide", ("ground", "G"), ("b", "R"), axis=(1.0, -0.3)),
    "fixed": lambda: Fixed("weld", ("a", "P"), ("b", "Q"), angle=-0.2),
    "relative-angle": lambda: RelativeAngle("rel", "a", "b"),
    "slider-stroke": lambda: SliderStroke("stroke", ("a", "P"), ("b", "R"), axis=(-0.3, 1.0)),
    "body-angle": lambda: BodyAngle("b"),
    "point-x": lambda: PointX(("a", "P")),
    "point-y": lambda: PointY(("b", "Q")),
}


def system_with(kind: str) -> System:
    m = two_bodies()
    m.add_joint(KINDS[kind]())
    return System(m)


def random_path(n: int, seed: int):
    rng = np.random.default_rng(seed)
    return [rng.uniform(-1.0, 1.0, n) for _ in range(4)]


def path(q0, q1, q2, q3, theta):
    return q0 + q1 * theta + q2 * theta**2 / 2 + q3 * theta**3 / 6


@pytest.mark.parametrize("kind", sorted(KINDS))
@pytest.mark.parametrize("seed", [RNG_SEED, RNG_SEED + 1, RNG_SEED + 2])
def test_jacobian_gamma_eta_match_finite_differences(kind, seed):
    system = system_with(kind)
    q0, q1, q2, q3 = random_path(system.n, seed)
    no_drive = system.drive(np.zeros(1))

    def phi(theta):
        return system.residual(path(q0, q1, q2, q3, theta)[:, None], no_drive)[:, 0]

    def phi_at(q):
        return system.residual(q[:, None], no_drive)[:, 0]

    jac = system.jacobian(q0[:, None])[:, :, 0]
    # Finite-difference Jacobian, column by column.
    fd_jac = np.column_stack(
        [derivative(lambda t, k=k: phi_at(q0 + t * np.eye(system.n)[k]), 0.0, 1, 1e-3) for k in range(system.n)]
    )
    np.testing.assert_allclose(jac, fd_jac, rtol=0, atol=1e-9)

    gamma = system.gamma(q0[:, None], q1[:, None], no_drive)[:, 0]
    eta = system.eta(q0[:, None], q1[:, None], q2[:, None], no_drive)[:, 0]
    d2 = derivative(phi, 0.0, 2, 2e-2)
    d3 = derivative(phi, 0.0, 3, 2e-2)
    np.testing.assert_allclose(jac @ q2 - gamma, d2, rtol=0, atol=1e-8)
    np.testing.assert_allclose(jac @ q3 - eta, d3, rtol=0, atol=1e-7)
    # The checks above can fail: γ, η are not trivially zero for the kinds that rotate vectors.
    if kind in ("revolute", "prismatic", "point-x", "slider-stroke"):
        assert np.max(np.abs(gamma)) > 1e-3 and np.max(np.abs(eta)) > 1e-3


def test_driver_adds_motion_derivatives():
    """Φ = g(q) − d(θ): Φq q' = d', and d'', d''' enter γ and η (DESIGN §4)."""
    m = two_bodies()
    m.add_driver("turn", BodyAngle("a"), lambda t: (0.5 * t**2, t, 1.0 + 0 * t, 0 * t + 0.25))
    system = System(m)
    theta = np.array([0.3])
    drive = system.drive(theta)
    q = system.initial_guess()[:, None]
    zero = np.zeros_like(q)
    np.testing.assert_allclose(system.residual(q, drive)[-1], q[2] - 0.5 * 0.3**2)
    np.testing.assert_allclose(system.velocity_rhs(drive)[-1], 0.3)
    np.testing.assert_allclose(system.gamma(q, zero, drive)[-1], 1.0)
    np.testing.assert_allclose(system.eta(q, zero, zero, drive)[-1], 0.25)


def test_joint_coordinate_resolves_to_the_joint_kind():
    m = two_bodies()
    m.add_joint(Revolute("pin", ("a", "P"), ("b", "Q")))
    m.add_joint(Prismatic("slide", ("ground", "G"), ("a", "O")))
    assert isinstance(JointCoordinate("pin").resolve(m), RelativeAngle)
    assert isinstance(JointCoordinate("slide").resolve(m), SliderStroke)
    m.add_joint(Fixed("weld", ("ground", "G"), ("b", "R")))
    with pytest.raises(ModelError, match="no joint coordinate"):
        m.add_driver("d", JointCoordinate("weld"), ConstantSpeed())


@pytest.mark.parametrize(
    "build, item, key",
    [
        (lambda m: m.add_joint(Revolute("p", ("a", "nope"), ("b", "Q"))), "p", "i"),
        (lambda m: m.add_joint(Revolute("p", ("zz", "P"), ("b", "Q"))), "p", "i"),
        (lambda m: m.add_joint(Revolute("p", ("a", "P"), ("a", "O"))), "p", "j"),
        (lambda m: m.add_joint(Prismatic("s", ("a", "P"), ("b", "Q"), axis=(0.0, 0.0))), "s", "axis"),
        (lambda m: m.add_body("a"), "a", "name"),
        (lambda m: m.add_body("c", guess=(0.0, float("nan"), 0.0)), "c", "guess"),
        (lambda m: m.add_driver("d", BodyAngle("a"), 3.0), "d", "motion"),
    ],
)
def test_bad_model_input_names_item_and_key(build, item, key):
    m = two_bodies()
    with pytest.raises(ModelError) as info:
        build(m)
    assert info.value.item == item and info.value.key == key
