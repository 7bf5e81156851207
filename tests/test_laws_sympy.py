"""Every closed-form law against sympy's symbolic derivatives, and the
piecewise laws against an independent symbolic integration of their
acceleration pieces (sympy, a general-purpose reference library)."""

import math

import numpy as np
import pytest
import sympy as sp

from motionlaws import LAWS

x = sp.symbols("x", real=True)
pi = sp.pi

CLOSED = {
    "harmonic": (1 - sp.cos(pi * x)) / 2,
    "cycloidal": x - sp.sin(2 * pi * x) / (2 * pi),
    "poly345": 10 * x**3 - 15 * x**4 + 6 * x**5,
    "poly4567": 35 * x**4 - 84 * x**5 + 70 * x**6 - 20 * x**7,
    "constant-velocity": x,
}

XS = np.linspace(0.0, 1.0, 41)


@pytest.mark.parametrize("law_id", sorted(CLOSED))
def test_closed_form_derivatives(law_id):
    expr = CLOSED[law_id]
    got = LAWS[law_id].evaluate(XS)
    for k in range(4):
        f = sp.lambdify(x, sp.diff(expr, x, k), "numpy")
        want = np.broadcast_to(f(XS), XS.shape)
        np.testing.assert_allclose(got[k], want, rtol=1e-12, atol=1e-9)


def _piecewise_from_acceleration(pieces):
    """Integrate acceleration pieces symbolically from rest; scale so y(1) = 1."""
    A = sp.symbols("A", positive=True)
    y0, v0 = sp.Integer(0), sp.Integer(0)
    out = []
    for a_expr, lo, hi in pieces:
        a = A * a_expr
        v = v0 + sp.integrate(a, (x, lo, x))
        y = y0 + sp.integrate(v, (x, lo, x))
        out.append((y, lo, hi))
        y0, v0 = y.subs(x, hi), v.subs(x, hi)
    amp = sp.solve(sp.Eq(y0, 1), A)[0]
    return [(sp.simplify(y.subs(A, amp)), lo, hi) for y, lo, hi in out]


PIECEWISE = {
    # Modified trapezoid: sine ramps on eighths, constant on quarters.
    "modified-trapezoid": [
        (sp.sin(4 * pi * x), 0, sp.Rational(1, 8)),
        (sp.Integer(1), sp.Rational(1, 8), sp.Rational(3, 8)),
        (sp.cos(4 * pi * (x - sp.Rational(3, 8))), sp.Rational(3, 8), sp.Rational(5, 8)),
        (sp.Integer(-1), sp.Rational(5, 8), sp.Rational(7, 8)),
        (-sp.cos(4 * pi * (x - sp.Rational(7, 8))), sp.Rational(7, 8), 1),
    ],
    # Modified sine: quarter sine, long half cosine over 3/4, quarter sine.
    "modified-sine": [
        (sp.sin(4 * pi * x), 0, sp.Rational(1, 8)),
        (sp.cos(sp.Rational(4, 3) * pi * (x - sp.Rational(1, 8))), sp.Rational(1, 8), sp.Rational(7, 8)),
        (-sp.cos(4 * pi * (x - sp.Rational(7, 8))), sp.Rational(7, 8), 1),
    ],
}


@pytest.mark.parametrize("law_id", sorted(PIECEWISE))
def test_piecewise_laws_against_symbolic_integration(law_id):
    pieces = _piecewise_from_acceleration(PIECEWISE[law_id])
    law = LAWS[law_id]
    for y, lo, hi in pieces:
        xs = np.linspace(float(lo), float(hi), 9)[1:-1]
        got = law.evaluate(xs)
        for k in range(4):
            f = sp.lambdify(x, sp.diff(y, x, k), "numpy")
            np.testing.assert_allclose(got[k], np.broadcast_to(f(xs), xs.shape), rtol=1e-10, atol=1e-10)
    # the symbolic amplitude equals the exact Ca of DESIGN §3
    assert law.evaluate(np.array([0.125]))[2][0] == pytest.approx(
        {"modified-trapezoid": 8 * math.pi / (2 + math.pi), "modified-sine": 4 * math.pi**2 / (4 + math.pi)}[law_id],
        rel=1e-12,
    )
