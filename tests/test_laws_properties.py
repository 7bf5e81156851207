"""Properties every normalized rise law must have (hypothesis).

Ends at 0 and 1, rest at the ends where the law is rest-to-rest, symmetry of
the symmetric laws, monotonic rise, and each derivative integrating to the
one below it (fundamental theorem of calculus, checked with scipy's adaptive
quadrature as the independent integrator).
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

from motionlaws import LAWS

RISES = [k for k, law in LAWS.items() if law.moves]
REST = [k for k in RISES if LAWS[k].rest_to_rest]
unit = st.floats(min_value=0.0, max_value=1.0, allow_nan=False)


@pytest.mark.parametrize("law_id", RISES)
def test_ends(law_id):
    y = LAWS[law_id].evaluate(np.array([0.0, 1.0]))[0]
    np.testing.assert_allclose(y, [0.0, 1.0], atol=1e-12)


@pytest.mark.parametrize("law_id", REST)
def test_rest_to_rest_velocity(law_id):
    v = LAWS[law_id].evaluate(np.array([0.0, 1.0]))[1]
    np.testing.assert_allclose(v, [0.0, 0.0], atol=1e-12)


@pytest.mark.parametrize("law_id", RISES)
@given(x=unit)
@settings(max_examples=60, deadline=None)
def test_symmetric_about_midpoint(law_id, x):
    # All built-in rise laws are point-symmetric: y(x) + y(1 − x) = 1.
    law = LAWS[law_id]
    y = law.evaluate(np.array([x, 1.0 - x]))[0]
    assert y[0] + y[1] == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("law_id", RISES)
@given(a=unit, b=unit)
@settings(max_examples=60, deadline=None)
def test_monotonic_rise(law_id, a, b):
    lo, hi = sorted((a, b))
    y = LAWS[law_id].evaluate(np.array([lo, hi]))[0]
    assert y[1] >= y[0] - 1e-13


@pytest.mark.parametrize("law_id", RISES)
@given(a=unit, b=unit)
@settings(max_examples=25, deadline=None)
def test_derivatives_integrate_to_lower_order(law_id, a, b):
    law = LAWS[law_id]
    ends = law.evaluate(np.array([a, b]))
    pts = [p for p in law.breakpoints if min(a, b) < p < max(a, b)] or None
    for k in range(3):
        integral, _ = quad(lambda t: law.evaluate(np.array([t]))[k + 1][0], a, b, points=pts, epsabs=1e-12)
        assert ends[k][1] - ends[k][0] == pytest.approx(integral, abs=1e-9 * (1 + abs(integral)))
