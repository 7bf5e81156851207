"""Four-bar linkage against Freudenstein's closed form, its loop equations, Grashof and the transmission angle.

Links (tests/test_kinematics_support.four_bar): crank a = O2A, coupler b = AB,
rocker c = O4B, ground d = O2O4; the solver's body angles are Norton's
θ2, θ3, θ4.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver.kinematics.cycle import solve_cycle
from solver.kinematics.result import DEAD_POINT
from solver.kinematics.transmission import TransmissionAngle
from tests.test_kinematics_support import four_bar, fourbar_closed_form

A, B, C, D = 0.04, 0.12, 0.09, 0.10  # m: a Grashof crank-rocker (s + l = 0.16 < p + q = 0.19)
SPEED = 90.0
OMEGA = 2 * math.pi * SPEED / 60


def wrap(x):
    return np.angle(np.exp(1j * x))


@pytest.fixture(scope="module", params=[True, False], ids=["open", "crossed"])
def branch(request):
    start = 0.4
    result = solve_cycle(four_bar(A, B, C, D, start, open_branch=request.param), SPEED)
    assert result.success, result.message
    return request.param, start, result


def test_positions_match_freudenstein_on_both_branches(branch):
    open_branch, start, result = branch
    theta2 = start + result.theta
    t3, t4 = fourbar_closed_form(A, B, C, D, theta2, open_branch)
    # Freudenstein (1955) closed form, Norton ch. 4 half-angle solution
    assert np.max(np.abs(wrap(result.q[:, 5] - t3))) < 1e-12
    assert np.max(np.abs(wrap(result.q[:, 8] - t4))) < 1e-12
    # Freudenstein's equation itself: K1 cos θ4 − K2 cos θ2 + K3 = cos(θ2 − θ4)
    K1, K2, K3 = D / A, D / C, (A * A - B * B + C * C + D * D) / (2 * A * C)
    t4s = result.q[:, 8]
    np.testing.assert_allclose(K1 * np.cos(t4s) - K2 * np.cos(theta2) + K3, np.cos(theta2 - t4s), atol=1e-12)
    # the other branch is really another configuration: never closer than 0.1 rad
    other3, _ = fourbar_closed_form(A, B, C, D, theta2, not open_branch)
    assert np.min(np.abs(wrap(result.q[:, 5] - other3))) > 0.1


def test_velocity_and_acceleration_satisfy_the_loop_equations(branch):
    """Norton ch. 6-7 (from memory): ω3 = aω2 sin(θ4−θ2)/(b sin(θ3−θ4)), ω4 = aω2 sin(θ2−θ3)/(c sin(θ4−θ3)),
    α3 = (CD − AF)/(AE − BD), α4 = (CE − BF)/(AE − BD) with α2 = 0 and
    A = c sin θ4, B = b sin θ3, C = aω2² cos θ2 + bω3² cos θ3 − cω4² cos θ4,
    D = c cos θ4, E = b cos θ3, F = −aω2² sin θ2 − bω3² sin θ3 + cω4² sin θ4."""
    _, start, result = branch
    t2 = start + result.theta
    t3, t4 = result.q[:, 5], result.q[:, 8]
    w2 = OMEGA
    w3 = A * w2 * np.sin(t4 - t2) / (B * np.sin(t3 - t4))
    w4 = A * w2 * np.sin(t2 - t3) / (C * np.sin(t4 - t3))
    vel = result.velocities
    np.testing.assert_allclose(vel[:, 5], w3, rtol=0, atol=1e-10 * np.max(np.abs(w3)))
    np.testing.assert_allclose(vel[:, 8], w4, rtol=0, atol=1e-10 * np.max(np.abs(w4)))
    cA, cB = C * np.sin(t4), B * np.sin(t3)
    cC = A * w2**2 * np.cos(t2) + B * w3**2 * np.cos(t3) - C * w4**2 * np.cos(t4)
    cD, cE = C * np.cos(t4), B * np.cos(t3)
    cF = -A * w2**2 * np.sin(t2) - B * w3**2 * np.sin(t3) + C * w4**2 * np.sin(t4)
    al3 = (cC * cD - cA * cF) / (cA * cE - cB * cD)
    al4 = (cC * cE - cB * cF) / (cA * cE - cB * cD)
    acc = result.accelerations
    np.testing.assert_allclose(acc[:, 5], al3, rtol=0, atol=1e-9 * np.max(np.abs(al3)))
    np.testing.assert_allclose(acc[:, 8], al4, rtol=0, atol=1e-9 * np.max(np.abs(al4)))
    # and the loop a e^{iθ2} + b e^{iθ3} − c e^{iθ4} − d = 0 differentiated three times in time
    e2, e3, e4 = (np.exp(1j * t) for t in (t2, t3, t4))
    j = result.jerks
    w3s, w4s, a3s, a4s, j3s, j4s = vel[:, 5], vel[:, 8], acc[:, 5], acc[:, 8], j[:, 5], j[:, 8]

    def third(L, e, w, al, jk):  # d³/dt³ of L e^{iθ}: L e^{iθ}(i j − 3 ω α − i ω³)
        return L * e * (1j * jk - 3 * w * al - 1j * w**3)

    loop3 = third(A, e2, w2, 0.0, 0.0) + third(B, e3, w3s, a3s, j3s) - third(C, e4, w4s, a4s, j4s)
    scale = C * np.max(np.abs(j4s))
    assert np.max(np.abs(loop3)) < 1e-9 * scale


def norton_transmission(theta2):
    """μ = arccos[(b² + c² − a² − d² + 2ad cos θ2)/(2bc)], taken acute (Norton, Design of Machinery, ch. 4, from memory)."""
    psi = np.arccos((B * B + C * C - A * A - D * D + 2 * A * D * np.cos(theta2)) / (2 * B * C))
    return np.where(psi > math.pi / 2, math.pi - psi, psi)


def test_transmission_angle_matches_norton(branch):
    _, start, result = branch
    mu = result.output(TransmissionAngle("B", ("coupler", "A"), ("rocker", "O4")))
    np.testing.assert_allclose(mu.value, norton_transmission(start + result.theta), rtol=0, atol=1e-12)
    # its rate is the relative angular velocity of coupler and rocker, up to sign
    rel = result.velocities[:, 8] - result.velocities[:, 5]
    np.testing.assert_allclose(np.abs(mu.velocity), np.abs(rel), rtol=1e-12, atol=1e-12)


def grashof(links):
    """Grashof (1883, as in Norton ch. 2; from memory): s + l < p + q lets the shortest link turn fully."""
    s, p, q, l = sorted(links)
    return s + l < p + q


@pytest.mark.parametrize(
    "a, b, c, d",
    [
        (0.04, 0.12, 0.09, 0.10),  # Grashof, crank shortest: crank-rocker
        (0.10, 0.12, 0.11, 0.04),  # Grashof, ground shortest: drag link
        (0.09, 0.05, 0.07, 0.06),  # non-Grashof: triple rocker
        (0.10, 0.04, 0.09, 0.12),  # Grashof, coupler shortest: double rocker
        (0.07, 0.10, 0.05, 0.11),  # non-Grashof
    ],
)
def test_crank_turns_fully_exactly_when_grashof_allows(a, b, c, d):
    """The crank (driven at O2) can turn fully iff the linkage is Grashof and the crank or the ground is shortest."""
    shortest = min(a, b, c, d)
    expected = grashof((a, b, c, d)) and shortest in (a, d)
    # start inside the crank's range: |b − c| ≤ |A − O4| ≤ b + c (triangle A-B-O4)
    grid = np.linspace(-math.pi, math.pi, 721)
    reach = np.sqrt(a * a + d * d - 2 * a * d * np.cos(grid))
    feasible = grid[(reach > abs(b - c) + 1e-3) & (reach < b + c - 1e-3)]
    start = 0.0 if expected else float(feasible[len(feasible) // 2])
    result = solve_cycle(four_bar(a, b, c, d, start), 60.0, instants=720)
    assert result.success == expected, result.message
    if not expected:
        assert result.status == DEAD_POINT

