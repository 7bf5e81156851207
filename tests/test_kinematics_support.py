"""Shared helpers for the kinematics tests (finite-difference stencils, test linkages), checked here."""

from __future__ import annotations

import math

import numpy as np

from solver.kinematics import ConstantSpeed, JointCoordinate, Mechanism, Prismatic, Revolute


def fd_weights(order: int, half_width: int, h: float) -> tuple[np.ndarray, np.ndarray]:
    """Central finite-difference offsets and weights for the `order`-th derivative.

    Weights solve the Vandermonde (Taylor) conditions sum w_k x_k^j = j!·δ_jd for
    j < 2·half_width + 1 (B. Fornberg, "Generation of finite difference formulas
    on arbitrarily spaced grids", Math. Comp. 51, 1988, gives the same weights).
    """
    x = h * np.arange(-half_width, half_width + 1, dtype=float)
    size = x.size
    vander = np.vander(x, size, increasing=True).T  # row j: x^j
    rhs = np.zeros(size)
    rhs[order] = math.factorial(order)
    return x, np.linalg.solve(vander, rhs)


def derivative(f, x0: float, order: int, h: float, half_width: int = 4):
    """order-th derivative of f (scalar -> array) at x0 by a central stencil."""
    offsets, weights = fd_weights(order, half_width, h)
    return sum(w * np.asarray(f(x0 + dx)) for dx, w in zip(offsets, weights))


def test_stencils_differentiate_a_known_function():
    """d^k/dx^k sin x = sin(x + kπ/2) (calculus); the stencils used by the other tests must reproduce it."""
    x0 = 0.7
    for order, h in ((1, 1e-3), (2, 2e-2), (3, 2e-2)):
        got = derivative(np.sin, x0, order, h)
        assert abs(got - math.sin(x0 + order * math.pi / 2)) < 1e-9


def four_bar(a, b, c, d, theta2=0.5, open_branch=True, motion=None) -> Mechanism:
    """Crank a (O2–A), coupler b (A–B), rocker c (O4–B), ground d (O2–O4 along +x).

    Each body's local x axis runs along its link, so φ of crank, coupler and
    rocker are Norton's θ2, θ3, θ4.  The rough guess places the coupler on the
    open (uncrossed) or crossed branch from the closed
    form, perturbed so the solver must assemble.
    """
    th3, th4 = fourbar_closed_form(a, b, c, d, np.array([theta2]), open_branch)
    m = Mechanism("four-bar")
    m.add_point("ground", "O2", (0.0, 0.0))
    m.add_point("ground", "O4", (d, 0.0))
    m.add_body("crank", guess=(0.0, 0.0, theta2), points={"O2": (0.0, 0.0), "A": (a, 0.0)})
    ax, ay = a * math.cos(theta2), a * math.sin(theta2)
    m.add_body("coupler", guess=(ax + 0.01 * a, ay - 0.01 * a, th3[0] + 0.05), points={"A": (0.0, 0.0), "B": (b, 0.0)})
    m.add_body("rocker", guess=(d, 0.0, th4[0] - 0.05), points={"O4": (0.0, 0.0), "B": (c, 0.0)})
    m.add_joint(Revolute("O2", ("ground", "O2"), ("crank", "O2")))
    m.add_joint(Revolute("A", ("crank", "A"), ("coupler", "A")))
    m.add_joint(Revolute("B", ("coupler", "B"), ("rocker", "B")))
    m.add_joint(Revolute("O4", ("ground", "O4"), ("rocker", "O4")))
    m.add_driver("motor", JointCoordinate("O2"), motion or ConstantSpeed(1.0, theta2))
    return m


def fourbar_closed_form(a, b, c, d, theta2, open_branch=True):
    """θ3, θ4 of a four-bar from Freudenstein's equation.

    F. Freudenstein (1955), in the half-angle form of R. L. Norton, Design of
    Machinery, ch. 4 (from memory): K1 = d/a, K2 = d/c,
    K3 = (a² − b² + c² + d²)/(2ac), K4 = d/b, K5 = (c² − d² − a² − b²)/(2ab);
    θ4 = 2 atan2(−B ∓ √(B² − 4AC), 2A), θ3 = 2 atan2(−E ∓ √(E² − 4DF), 2D),
    the minus sign for the open branch.
    """
    K1, K2, K3 = d / a, d / c, (a * a - b * b + c * c + d * d) / (2 * a * c)
    K4, K5 = d / b, (c * c - d * d - a * a - b * b) / (2 * a * b)
    ct, st = np.cos(theta2), np.sin(theta2)
    A = ct - K1 - K2 * ct + K3
    B = -2.0 * st
    C = K1 - (K2 + 1.0) * ct + K3
    D = ct - K1 + K4 * ct + K5
    E = -2.0 * st
    F = K1 + (K4 - 1.0) * ct + K5
    sign = -1.0 if open_branch else 1.0
    th4 = 2.0 * np.arctan2(-B + sign * np.sqrt(B * B - 4 * A * C), 2 * A)
    th3 = 2.0 * np.arctan2(-E + sign * np.sqrt(E * E - 4 * D * F), 2 * D)
    return th3, th4


def test_four_bar_closed_form_closes_the_loop():
    """The vector loop a e^{iθ2} + b e^{iθ3} − c e^{iθ4} − d = 0 (Norton ch. 4) holds for both branches."""
    a, b, c, d = 0.04, 0.12, 0.09, 0.1
    t2 = np.linspace(0.0, 2 * np.pi, 37)
    for open_branch in (True, False):
        t3, t4 = fourbar_closed_form(a, b, c, d, t2, open_branch)
        loop = a * np.exp(1j * t2) + b * np.exp(1j * t3) - c * np.exp(1j * t4) - d
        assert np.max(np.abs(loop)) < 1e-14


def slider_crank(a, b, c, theta2=0.3, driver="crank", motion=None) -> Mechanism:
    """Offset slider-crank: crank a (O–A), rod b (A–B), slider pin B on the line y = c.

    The slider's stroke (joint "slide") is the x of B, measured from the
    guide point (0, c).  `driver` "crank" drives the crank pin "O";
    "slider" drives the stroke and leaves the crank pin free.
    """
    ax, ay = a * math.cos(theta2), a * math.sin(theta2)
    xb = ax + math.sqrt(b * b - (c - ay) ** 2)
    phi3 = math.atan2(c - ay, xb - ax)
    m = Mechanism("slider-crank")
    m.add_point("ground", "O", (0.0, 0.0))
    m.add_point("ground", "G", (0.0, c))
    m.add_body("crank", guess=(0.0, 0.0, theta2 + 0.03), points={"O": (0.0, 0.0), "A": (a, 0.0)})
    m.add_body("rod", guess=(ax, ay + 0.002, phi3 - 0.04), points={"A": (0.0, 0.0), "B": (b, 0.0)})
    m.add_body("slider", guess=(xb - 0.003, c, 0.0), points={"B": (0.0, 0.0)})
    m.add_joint(Revolute("O", ("ground", "O"), ("crank", "O")))
    m.add_joint(Revolute("A", ("crank", "A"), ("rod", "A")))
    m.add_joint(Revolute("B", ("rod", "B"), ("slider", "B")))
    m.add_joint(Prismatic("slide", ("ground", "G"), ("slider", "B"), axis=(1.0, 0.0)))
    if driver == "crank":
        m.add_driver("motor", JointCoordinate("O"), motion or ConstantSpeed(1.0, theta2))
    else:
        m.add_driver("servo", JointCoordinate("slide"), motion)
    return m


# Six-bar with a slider output, dimensions invented for the tests (m): a Grashof
# crank-rocker O2-A-B-O4 whose rocker carries an arm out to C; a rod C-D drives
# a slider D along the horizontal guide y = SIX_GUIDE_Y.
SIX = dict(a=0.03, b=0.10, c=0.07, d=0.08, arm=(0.11, 0.02), rod=0.12, guide_y=0.16)


def six_bar_closed_loop(theta2, q_guess=None):
    """Independent position solution of the six-bar: scipy.optimize.root on its two vector loops.

    Unknowns θ3, θ4, θ5 (coupler, rocker, rod angles) and x_D; equations
    a e^{iθ2} + b e^{iθ3} − c e^{iθ4} − d = 0 and O4 + A4 arm + r5 e^{iθ5} = (x_D, y_g),
    solved per instant from the previous instant's answer.
    """
    from scipy.optimize import root

    a, b, c, d = SIX["a"], SIX["b"], SIX["c"], SIX["d"]
    ux, uy = SIX["arm"]
    r5, yg = SIX["rod"], SIX["guide_y"]

    def loops(z, t2):
        t3, t4, t5, xd = z
        l1 = a * np.exp(1j * t2) + b * np.exp(1j * t3) - c * np.exp(1j * t4) - d
        arm = (ux + 1j * uy) * np.exp(1j * t4)
        l2 = d + arm + r5 * np.exp(1j * t5) - (xd + 1j * yg)
        return [l1.real, l1.imag, l2.real, l2.imag]

    out = np.empty((len(theta2), 4))
    z = np.asarray(q_guess, dtype=float)
    for i, t2 in enumerate(theta2):
        sol = root(loops, z, args=(t2,), method="hybr", tol=1e-13)
        z = sol.x
        assert np.max(np.abs(loops(z, t2))) < 1e-13, sol.message
        out[i] = z
    return out


def six_bar(theta2=0.0, motion=None) -> Mechanism:
    """The six-bar of SIX as a mechanism; guesses from the closed-loop solution, perturbed."""
    a, b, c, d = SIX["a"], SIX["b"], SIX["c"], SIX["d"]
    ux, uy = SIX["arm"]
    r5, yg = SIX["rod"], SIX["guide_y"]
    t3, t4 = fourbar_closed_form(a, b, c, d, np.array([theta2]))
    t3, t4 = float(t3[0]), float(t4[0])
    cx = d + ux * math.cos(t4) - uy * math.sin(t4)
    cy = ux * math.sin(t4) + uy * math.cos(t4)
    xd = cx + math.sqrt(r5 * r5 - (yg - cy) ** 2)
    t5 = math.atan2(yg - cy, xd - cx)
    m = Mechanism("six-bar")
    m.add_point("ground", "O2", (0.0, 0.0))
    m.add_point("ground", "O4", (d, 0.0))
    m.add_point("ground", "G", (0.0, yg))
    m.add_body("crank", guess=(0.0, 0.0, theta2), points={"O2": (0.0, 0.0), "A": (a, 0.0)})
    m.add_body("coupler", guess=(a * math.cos(theta2), a * math.sin(theta2), t3 + 0.03), points={"A": (0.0, 0.0), "B": (b, 0.0)})
    m.add_body("rocker", guess=(d + 0.001, 0.0, t4 - 0.02), points={"O4": (0.0, 0.0), "B": (c, 0.0), "C": (ux, uy)})
    m.add_body("rod", guess=(cx, cy, t5 + 0.02), points={"C": (0.0, 0.0), "D": (r5, 0.0)})
    m.add_body("slider", guess=(xd + 0.002, yg, 0.0), points={"D": (0.0, 0.0)})
    m.add_joint(Revolute("O2", ("ground", "O2"), ("crank", "O2")))
    m.add_joint(Revolute("A", ("crank", "A"), ("coupler", "A")))
    m.add_joint(Revolute("B", ("coupler", "B"), ("rocker", "B")))
    m.add_joint(Revolute("O4", ("ground", "O4"), ("rocker", "O4")))
    m.add_joint(Revolute("C", ("rocker", "C"), ("rod", "C")))
    m.add_joint(Revolute("D", ("rod", "D"), ("slider", "D")))
    m.add_joint(Prismatic("guide", ("ground", "G"), ("slider", "D"), axis=(1.0, 0.0)))
    m.add_driver("motor", JointCoordinate("O2"), motion or ConstantSpeed(1.0, theta2))
    return m


def test_six_bar_closed_loop_solution_closes_both_loops():
    """scipy.optimize.root's answer satisfies both vector loops (its own equations, evaluated apart)."""
    t2 = np.linspace(0.0, 2 * np.pi, 25)
    a, b, c, d = SIX["a"], SIX["b"], SIX["c"], SIX["d"]
    t3, t4 = fourbar_closed_form(a, b, c, d, t2[:1])
    z = six_bar_closed_loop(t2, [t3[0], t4[0], 0.3, 0.2])
    loop = a * np.exp(1j * t2) + b * np.exp(1j * z[:, 0]) - c * np.exp(1j * z[:, 1]) - d
    assert np.max(np.abs(loop)) < 1e-12
