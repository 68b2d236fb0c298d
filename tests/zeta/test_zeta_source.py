"""zeta as a source of the spectrum layer: moments, zeros, zero count, against mpmath.

mpmath (a general-purpose library) is the independent path: its zeta and
gamma give log xi numerically, its zetazero and nzeros locate and count zeros
by their own algorithms.
"""

import random
from functools import lru_cache
from fractions import Fraction
from math import comb

import mpmath
import pytest

from certify.arith import acb, arb, workprec
from certify.certificate.zerocount import count_zeros
from certify.errors import Inconsistent
from certify.spectrum.moments import central_value, log_xi_coefficients, zero_power_sums
from certify.spectrum.spectrum import residual_checks, residual_sums
from certify.spectrum.zeros import find_zeros


@lru_cache(maxsize=4)
def _mp_log_xi_taylor(count: int, dps: int = 35):
    """Taylor coefficients of log xi(s) at s = 1 by mpmath's numerical differentiation."""
    with mpmath.workdps(dps):
        def log_xi(s):
            if s == 1:
                return mpmath.log(mpmath.mpf(1) / 2)
            return mpmath.log(s * (s - 1) / 2 * mpmath.pi ** (-s / 2) * mpmath.gamma(s / 2)
                              * mpmath.zeta(s))
        return mpmath.taylor(log_xi, 1, count)


def test_s1_is_two_plus_euler_minus_log_four_pi():
    """S_1(zeta) = sum over all zeros of 1/(rho(1-rho)) = 2 + gamma_E - log 4 pi, exactly."""
    S = zero_power_sums(1, 1, 0, 3, 200)
    with workprec(300):
        exact = 2 + arb.const_euler() - (4 * arb.pi()).log()
        assert S[0].overlaps(exact)
    assert float(S[0].rad()) < 2.0**-200
    with mpmath.workdps(40):
        ref = 2 + mpmath.euler - mpmath.log(4 * mpmath.pi)
        assert abs(mpmath.mpf(S[0].mid().str(45, radius=False)) - ref) < mpmath.mpf(10) ** -35
        assert abs(ref - mpmath.mpf("0.0461914")) < 1e-7  # the value quoted in DESIGN.md


def test_log_xi_coefficients_against_mpmath():
    cs = log_xi_coefficients(6, 200)
    ref = _mp_log_xi_taylor(6)
    for k in range(1, 7):
        assert abs(cs[k - 1].imag.mid()) == 0 or float(abs(cs[k - 1].imag)) < 1e-40
        assert abs(float(cs[k - 1].real.mid()) - float(ref[k])) < 1e-25 + 1e-20 * abs(float(ref[k]))
        assert float(cs[k - 1].real.rad()) < 1e-40


def test_power_sums_against_mpmath_formula():
    """S_m from mpmath's log xi through the binomial formula (docs/method.md, 2b) for m <= 6."""
    S = zero_power_sums(1, 1, 0, 6, 150)
    c = _mp_log_xi_taylor(6)
    for m in range(1, 7):
        with mpmath.workdps(50):  # the alternating sum cancels: keep mpmath's precision
            ref = sum(comb(2 * m - j - 1, m - 1) * 2 * (-1) ** (j - 1) * j * c[j]
                      for j in range(1, m + 1))
        assert abs(float(S[m - 1].mid()) - float(ref)) < 1e-30 + 1e-12 * abs(float(ref))
    # every S_m is positive (a sum of positive terms under RH) and they decrease
    assert all(S[m] < S[m - 1] for m in range(1, 6))


def test_deflated_series_against_stieltjes_constants():
    """zeta(1 + x) - 1/x = sum (-1)^n gamma_n x^n / n!: Arb's series against mpmath.stieltjes."""
    from math import factorial

    from certify.arith import acb_series, series_cap

    with workprec(128), series_cap(6):
        d = acb_series.zeta(acb_series([acb(1), acb(1)]), deflate=1)
        coeffs = d.coeffs()
    with mpmath.workdps(30):
        for n in range(6):
            ref = (-1) ** n * mpmath.stieltjes(n) / factorial(n)
            assert abs(float(coeffs[n].real.mid()) - float(ref)) < 1e-25


def test_power_sums_against_zeros_plus_residual_check():
    """S_1/2 and S_2/2 against the isolated zeros: the residual sums are consistent (R_k >= 0,
    R_{k+1}(1/4+T^2) <= R_k, R_1 within the zero-counting window)."""
    zl = find_zeros(1, 1, 120.0, 1e-10)
    S = zero_power_sums(1, 1, 0, 4, 100)
    with workprec(128):
        R = residual_sums([s / 2 for s in S], zl.zeros)
        notes = residual_checks("zeta", R, 120.0, 1, 1)
    assert notes and all(r > 0 for r in R)


def test_residual_check_detects_a_missing_zero():
    zl = find_zeros(1, 1, 80.0, 1e-10)
    S = zero_power_sums(1, 1, 0, 4, 100)
    k = random.Random(13).randrange(len(zl.zeros))
    missing = zl.zeros[:k] + zl.zeros[k + 1:]
    with workprec(128):
        R = residual_sums([s / 2 for s in S], missing)
        with pytest.raises(Inconsistent):
            residual_checks("zeta", R, 80.0, 1, 1)


def test_first_zeros_against_mpmath_zetazero():
    zl = find_zeros(1, 1, 50.0, 1e-15)
    assert len(zl.zeros) == 10  # N(50) = 10
    with mpmath.workdps(25):
        for k, z in enumerate(zl.zeros, start=1):
            ref = mpmath.zetazero(k).imag
            lo = mpmath.mpf((z - arb(0, z.rad())).mid().str(30, radius=False)) - mpmath.mpf(float(z.rad()))
            hi = mpmath.mpf(z.mid().str(30, radius=False)) + mpmath.mpf(float(z.rad()))
            assert lo - mpmath.mpf(10) ** -20 <= ref <= hi + mpmath.mpf(10) ** -20
            assert float(z.rad()) <= 1e-15


@pytest.mark.slow
def test_zeros_to_height_250_against_mpmath_zetazero():
    zl = find_zeros(1, 1, 250.0, 1e-20)
    with mpmath.workdps(30):
        assert len(zl.zeros) == int(mpmath.nzeros(250))
        rng = random.Random()
        for k in sorted(rng.sample(range(1, len(zl.zeros) + 1), 12)) + [1, len(zl.zeros)]:
            z = zl.zeros[k - 1]
            ref = mpmath.zetazero(k).imag
            mid = mpmath.mpf(z.mid().str(35, radius=False))
            assert abs(mid - ref) <= mpmath.mpf(float(z.rad())) + mpmath.mpf(10) ** -25


def test_central_value_is_zeta_one_half():
    cv = central_value(1, 1, prec=120)
    with mpmath.workdps(30):
        ref = mpmath.zeta(0.5)
    assert abs(complex(cv.mid()) - complex(ref)) < 1e-28
    assert not cv.contains(0)


@pytest.mark.parametrize("T", [Fraction(14), Fraction(15), Fraction(26), Fraction(50),
                               Fraction(100), Fraction(1503, 10)])
def test_zero_count_against_mpmath_nzeros(T):
    n, _ = count_zeros(1, 1, 0, T)
    assert n == int(mpmath.nzeros(float(T)))


def test_zero_count_random_heights():
    rng = random.Random()
    zl = find_zeros(1, 1, 200.0, 1e-8)
    mids = [float(z.mid()) for z in zl.zeros]
    for _ in range(4):
        # a height between two consecutive zeros, away from both
        i = rng.randrange(len(mids) - 1)
        T = Fraction((mids[i] + mids[i + 1]) / 2).limit_denominator(1000)
        n, _ = count_zeros(1, 1, 0, T)
        assert n == i + 1 == int(mpmath.nzeros(float(T)))


def test_zeta_goes_through_the_analytic_l_interface():
    """One code path: (conductor 1, label 1) and ZetaL() give the same zeros and power sums."""
    from certify.spectrum.lfunction import positive_ordinate_sums, zero_power_sums_of
    from certify.spectrum.moments import ZetaL, analytic_l
    from certify.spectrum.zeros import find_zeros_of

    L = analytic_l(1, 1)
    assert isinstance(L, ZetaL) and L.self_dual and L.central_order == 0 and L.name == "zeta(s)"
    a = find_zeros(1, 1, 40.0, 1e-12)
    b = find_zeros_of(ZetaL(), 40.0, 1e-12)
    assert len(a.zeros) == len(b.zeros) == 6 and a.z_calls == b.z_calls
    assert all(x.overlaps(y) for x, y in zip(a.zeros, b.zeros))
    with workprec(200):
        S = zero_power_sums_of(ZetaL(), 4, 120)
        T = zero_power_sums(1, 1, 0, 4, 120)
        assert all(s.overlaps(t) for s, t in zip(S, T))
        P = positive_ordinate_sums(ZetaL(), S)
        assert (2 * P[0] - S[0]).contains(0)
