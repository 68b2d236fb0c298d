"""Zeros, central values and exact power sums against independent evaluations."""

import mpmath
import pytest

from certify.arith import arb, workprec
from certify.spectrum.moments import central_value, zero_power_sums
from certify.spectrum.spectrum import residual_sums
from certify.spectrum.zeros import find_zeros


def _mp_L(s, q, chi_values):
    """L(s, chi) by mpmath's Hurwitz-zeta sum, chi given on 0..q-1 (independent path)."""
    return mpmath.dirichlet(s, chi_values)


# First ordinates from memory of published zero tables (Math. Comp. 23 (1969), moduli <= 24),
# recomputed here without rigour by the design's prototype.
FIRST_ZEROS = [
    (4, 3, [0, 1, 0, -1], 6.0209489047),
    (3, 2, [0, 1, -1], 8.0397371557),
    (5, 4, [0, 1, -1, -1, 1], 6.6484533447),
]


@pytest.mark.parametrize("q,label,values,gamma1", FIRST_ZEROS)
def test_first_zero_enclosures(q, label, values, gamma1):
    zl = find_zeros(q, label, 12.0, 1e-20)
    z = zl.zeros[0]
    assert float(arb(z.rad())) < 1e-20
    assert abs(float(z.mid()) - gamma1) < 1e-9
    # independent check with mpmath: L changes sign (as Z) across the enclosure
    mpmath.mp.dps = 40
    g = mpmath.mpf(z.mid().str(40, radius=False))
    val = _mp_L(mpmath.mpc(0.5, g), q, values)
    assert abs(val) < 1e-15
    # and is far from zero a little away from it
    assert abs(_mp_L(mpmath.mpc(0.5, g + mpmath.mpf("0.01")), q, values)) > 1e-4
    mpmath.mp.dps = 15


@pytest.mark.parametrize("q,label,values", [(4, 3, [0, 1, 0, -1]), (5, 4, [0, 1, -1, -1, 1]),
                                            (7, 2, None)])
def test_central_value_against_mpmath(q, label, values):
    from certify.source.dirichlet import characters
    chi = next(c for c in characters(q) if c.label == label)
    mpmath.mp.dps = 30
    if values is None:
        # exact roots of unity from the character's exponents, evaluated by mpmath
        values = [0 if chi.exponent(a) is None else
                  mpmath.expjpi(mpmath.mpf(2 * chi.exponent(a)) / chi.order) for a in range(q)]
    cv = central_value(q, label, prec=100)
    ref = _mp_L(mpmath.mpf(0.5), q, values)
    assert abs(complex(cv.mid()) - complex(ref)) < 1e-25
    assert float(cv.real.rad()) < 1e-25 and float(cv.imag.rad()) < 1e-25
    assert not cv.contains(0)
    mpmath.mp.dps = 15


def test_s1_closed_form_for_chi_minus_4():
    # S_1 = log(q/pi) + psi(1) + 2 L'/L(1, chi_{-4}); with L(1) = pi/4 and the classical value of
    # L'(1, chi_{-4}) = (pi/4)(gamma + 2 log 2 + 3 log pi - 4 log Gamma(1/4)) (Dirichlet beta;
    # from memory) this gives gamma + 6 log 2 + 5 log pi - 8 log Gamma(1/4) = 0.155567979923586...
    S = zero_power_sums(4, 3, 1, 1, 150)
    with workprec(200):
        b = arb.const_euler() + 6 * arb(2).log() + 5 * arb.pi().log() - 8 * (arb(1) / 4).lgamma()
        assert S[0].overlaps(b)
        assert float(arb(S[0].rad())) < 1e-40


@pytest.mark.parametrize("q,label,real", [(4, 3, True), (3, 2, True), (5, 2, False)])
def test_power_sums_against_isolated_zeros_plus_tail(q, label, real):
    """S_1, S_2 from log Lambda agree with zero sums to height T plus a tail estimate."""
    from certify.source.dirichlet import characters
    chi = next(c for c in characters(q) if c.label == label)
    T = 250.0
    zeros = list(find_zeros(q, label, T, 1e-12).zeros)
    if not real:
        zeros += list(find_zeros(q, chi.conjugate_label, T, 1e-12).zeros)
    S = zero_power_sums(q, label, chi.parity, 2, 80)
    target = [S[0] / 2, S[1] / 2] if real else S
    R = residual_sums(target, zeros)
    n_sets = 1 if real else 2
    import math
    # tail of sum over gamma > T of gamma^-2 with zero density (1/2pi) log(q t/2pi): (log(qT/2pi)+1)/(2 pi T)
    tail1 = n_sets * (math.log(q * T / (2 * math.pi)) + 1) / (2 * math.pi * T)
    assert 0.9 * tail1 < float(R[0].mid()) < 1.1 * tail1
    tail2 = n_sets * (math.log(q * T / (2 * math.pi)) + 1 / 3) / (2 * math.pi * 3 * T**3)
    assert 0.8 * tail2 < float(R[1].mid()) < 1.2 * tail2


def test_power_sum_formula_inverts_the_series_identity_exactly():
    """sum_m (-1)^(m+1) S_m (x + x^2)^m / m = sum_k a_k x^k, inverted by the closed form (sympy)."""
    import sympy as sp
    from certify.spectrum.moments import power_sums_from_coefficients

    M = 12
    x = sp.symbols("x")
    S = sp.symbols(f"S1:{M + 1}")
    lhs = sp.expand(sum((-1) ** (m + 1) * S[m - 1] * (x + x**2) ** m / m for m in range(1, M + 1)))
    a = [lhs.coeff(x, k) for k in range(1, M + 1)]  # a_k = 2 Re c_k
    for m in range(1, M + 1):
        recovered = sum(sp.binomial(2 * m - j - 1, m - 1) * (-1) ** (j - 1) * j * a[j - 1]
                        for j in range(1, m + 1))
        assert sp.expand(recovered - S[m - 1]) == 0
    # and the package's implementation is this formula (with Re c_j = a_j / 2)
    vals = [sp.Rational(k, 7) for k in range(1, M + 1)]
    subs = dict(zip(S, vals))
    re_c = [arb(int(sp.numer(v)), 1) / int(sp.denom(v)) / 2 for v in (ak.subs(subs) for ak in a)]
    with workprec(200):
        got = power_sums_from_coefficients(re_c, M)
    for g, v in zip(got, vals):
        assert g.contains(arb(int(sp.numer(v))) / int(sp.denom(v)))
