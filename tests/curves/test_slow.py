"""Longer checks (run with `pytest -m slow`)."""

import pytest

from certify.curves.family import twist_family
from certify.curves.lpoly import l_polynomial, power_sums
from certify.curves.model import make_curve
from certify.curves.race import trace_race
from certify.curves.traces import frobenius_sum, hasse_check

pytestmark = pytest.mark.slow


def test_degree_twelve_curve_confirmed_twice():
    E = make_curve(5, "t*(t^4 + 2)^2", "(2*t^3 + 3)*(t^4 + 2)^3")
    L = l_polynomial(E, confirm=2)
    assert L.degree == 12 and L.degrees_confirmed == (8, 9)
    c = power_sums(list(L.coeffs), 9)
    assert c[9] == frobenius_sum(E, 9)
    for n in range(1, 8):
        hasse_check(E, n)
    R = trace_race(E, L, "cumulative", 1e-10)
    assert R.density.width < 1e-9


def test_family_over_f7_sample():
    R = twist_family(7, "t", "t^2 + 3", 3, sample=60, seed=5, target_width=1e-3)
    assert len(R.members) == 60
    assert len(R.certified) >= 55
    lo, hi = R.within
    assert 0 <= lo <= hi <= 1
