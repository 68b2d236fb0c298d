"""Property tests (hypothesis): random curves over small fields satisfy the theorems checked."""

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from certify.curves.lpoly import l_polynomial, power_sums
from certify.curves.model import make_curve
from certify.curves.traces import frobenius_sum, hasse_check
from certify.errors import BadInput


def _poly(coeffs):
    return " + ".join(f"{c}*t^{i}" for i, c in enumerate(coeffs)) or "0"


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(q=st.sampled_from([5, 7, 11]),
       a=st.lists(st.integers(0, 10), min_size=1, max_size=4),
       b=st.lists(st.integers(0, 10), min_size=1, max_size=5))
def test_random_curves(q, a, b):
    try:
        E = make_curve(q, _poly(a), _poly(b))
    except BadInput:
        return  # singular or isotrivial: refused with a message (tested elsewhere)
    if E.l_degree > 6:
        return
    assert E.minimal_disc_degree == 12 * E.k_inf
    L = l_polynomial(E, confirm=1)
    N = L.degree
    for i in range(N // 2 + 1):
        assert L.coeffs[N - i] == L.sign * q ** (N - 2 * i) * L.coeffs[i]
    for n in range(1, 4):
        hasse_check(E, n)
    c = power_sums(list(L.coeffs), L.degrees_used + len(L.degrees_confirmed))
    assert all(c[n] == frobenius_sum(E, n) for n in range(1, len(c)))
