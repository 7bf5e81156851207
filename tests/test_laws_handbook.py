"""Peak coefficients of every law against the handbook table of DESIGN §3.

Table values are from memory of the standard cam-design handbooks
(R. L. Norton, *Cam Design and Manufacturing Handbook*; H. A. Rothbart,
*Cam Design Handbook*; F. Y. Chen, *Mechanics and Design of Cam Mechanisms*),
printed there to four significant digits, hence the 5e-4 relative tolerance.
The exact forms are closed-form derivations (piecewise integration) and must
hold to 1e-9.
"""

import math

import pytest

from motionlaws import LAWS

PI = math.pi

# law: (Cv, Ca, Cj) — handbook table, four significant digits (from memory)
HANDBOOK = {
    "harmonic": (1.571, 4.935, None),  # Cj infinite at a join with a dwell
    "cycloidal": (2.000, 6.283, 39.48),
    "poly345": (1.875, 5.774, 60.0),
    "poly4567": (2.188, 7.513, 52.5),
    "modified-trapezoid": (2.000, 4.888, 61.4),
    "modified-sine": (1.760, 5.528, 69.5),
}

# Exact closed forms (derived by integrating the acceleration pieces; the
# polynomial values by differentiating the polynomial and solving y^(k+1) = 0).
EXACT = {
    "harmonic": (PI / 2, PI**2 / 2, PI**3 / 2),
    "cycloidal": (2.0, 2 * PI, 4 * PI**2),
    "poly345": (15 / 8, 10 / math.sqrt(3), 60.0),
    "poly4567": (35 / 16, None, 52.5),
    "modified-trapezoid": (2.0, 8 * PI / (2 + PI), 32 * PI**2 / (2 + PI)),
    "modified-sine": (4 * PI / (4 + PI), 4 * PI**2 / (4 + PI), 16 * PI**3 / (4 + PI)),
}


@pytest.mark.parametrize("law_id", sorted(HANDBOOK))
def test_coefficients_match_handbook_table(law_id):
    got = LAWS[law_id].coefficients
    for name, want, value in zip(("Cv", "Ca", "Cj"), HANDBOOK[law_id], got):
        if want is None:
            continue
        assert value == pytest.approx(want, rel=5e-4), f"{law_id} {name}"


@pytest.mark.parametrize("law_id", sorted(EXACT))
def test_coefficients_match_exact_forms(law_id):
    got = LAWS[law_id].coefficients
    for name, want, value in zip(("Cv", "Ca", "Cj"), EXACT[law_id], got):
        if want is None:
            continue
        assert value == pytest.approx(want, rel=1e-9), f"{law_id} {name}"


def test_poly4567_peak_acceleration_from_roots_of_jerk():
    # Independent: y''' = 0 where 840x - 5040x^2 + 8400x^3 - 4200x^4 ... solved
    # with numpy.roots on the exact derivative of 35x⁴ − 84x⁵ + 70x⁶ − 20x⁷.
    import numpy as np

    p = np.polynomial.Polynomial([0, 0, 0, 0, 35, -84, 70, -20])
    roots = p.deriv(3).roots()
    xs = [r.real for r in roots if abs(r.imag) < 1e-12 and 0 <= r.real <= 1]
    want = max(abs(p.deriv(2)(x)) for x in xs + [0.0, 1.0])
    assert LAWS["poly4567"].coefficients[1] == pytest.approx(want, rel=1e-9)


@pytest.mark.parametrize(
    "law_id, at",
    [
        # where each peak sits (closed forms; symmetric laws peak velocity mid-span)
        ("cycloidal", (0.5, 0.25, 0.0)),
        ("harmonic", (0.5, 0.0, 0.5)),
        ("poly345", (0.5, 0.5 - math.sqrt(3) / 6, 0.0)),
        ("modified-trapezoid", (0.5, 0.125, 0.0)),
        ("modified-sine", (0.5, 0.125, 0.0)),
    ],
)
def test_peak_locations(law_id, at):
    for (value, where), want in zip(LAWS[law_id].peaks, at):
        assert where == pytest.approx(want, abs=1e-7)


def test_dwell_and_constant_velocity():
    assert LAWS["dwell"].coefficients == (0.0, 0.0, 0.0)
    assert LAWS["constant-velocity"].coefficients == (1.0, 0.0, 0.0)
