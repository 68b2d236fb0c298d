"""The density engine against independent evaluations."""

from fractions import Fraction

import mpmath
import pytest

from certify.arith import arb, workprec
from certify.density.bessel import BesselVariable, ResidualGroup, density_enclosure
from certify.density.besselj import check_j01, rayleigh_sigma


def test_rayleigh_sums_against_bessel_zeros():
    # sigma_k = sum_n j_{0,n}^{-2k}; mpmath's besseljzero is an independent path
    mpmath.mp.dps = 20
    zs = [mpmath.besseljzero(0, n) for n in range(1, 400)]
    for k in (2, 3, 4):
        ref = sum(z ** (-2 * k) for z in zs)
        # the partial sum misses n >= 400, less than 1e-9 for k >= 2
        assert 0 <= float(rayleigh_sigma(k)) - float(ref) < 1e-9
    assert rayleigh_sigma(1) == Fraction(1, 4) and rayleigh_sigma(2) == Fraction(1, 32)
    lo, hi = check_j01()
    assert float(lo) < float(mpmath.besseljzero(0, 1)) < float(hi)
    mpmath.mp.dps = 15


def _two_cosines(mu, w1, w2):
    """P(mu + w1 cos T1 + w2 cos T2 > 0) by one mpmath quadrature (independent of the engine)."""
    mpmath.mp.dps = 30

    def inner(t):
        c = (-mu - w1 * mpmath.cos(t)) / w2
        c = min(max(c, -1), 1)
        return mpmath.acos(c) / mpmath.pi

    # the integrand has kinks where |c| = 1; split there
    pts = [0, mpmath.pi]
    for v in (-1, 1):
        x = (-mu - v * w2) / w1
        if -1 < x < 1:
            pts.append(mpmath.acos(x))
    pts = sorted(pts)
    val = mpmath.quad(inner, pts) / mpmath.pi
    mpmath.mp.dps = 15
    return val


@pytest.mark.parametrize("mu,w1,w2", [("0.7", "1.3", "0.9"), ("-0.2", "0.5", "2.1")])
def test_two_cosines_against_quadrature(mu, w1, w2):
    ref = _two_cosines(mpmath.mpf(mu), mpmath.mpf(w1), mpmath.mpf(w2))
    with workprec(80):
        var = BesselVariable(arb(mu), (arb(w1), arb(w2)))
        d = density_enclosure(var, 1e-12)
    assert d.enclosure.contains(Fraction(str(ref)))
    assert d.enclosure.width <= Fraction(1, 10**12)


def test_three_cosines_fourier_path_against_two_cosine_limit():
    """Three weights use the Fourier series; a tiny third weight must reproduce the two-weight value."""
    ref = _two_cosines(mpmath.mpf("0.7"), mpmath.mpf("1.3"), mpmath.mpf("0.9"))
    with workprec(80):
        d = density_enclosure(BesselVariable(arb("0.7"), (arb("1.3"), arb("0.9"), arb("1e-9"))), 1e-3)
    # |P(X3 > 0) - P(X2 > 0)| <= P(|X2| < 1e-9), far below the tolerance used here
    assert abs(d.enclosure.mid - Fraction(str(ref))) < Fraction(1, 10**3)
    assert d.enclosure.width <= Fraction(1, 10**3)


def test_one_cosine_closed_form():
    with workprec(80):
        d = density_enclosure(BesselVariable(arb("0.3"), (arb("1.1"),)), 1e-15)
    mpmath.mp.dps = 40
    ref = mpmath.acos(mpmath.mpf("-0.3") / mpmath.mpf("1.1")) / mpmath.pi
    ref_lo, ref_hi = Fraction(str(ref)) - Fraction(1, 10**35), Fraction(str(ref)) + Fraction(1, 10**35)
    mpmath.mp.dps = 15
    # the arb inputs 0.3 and 1.1 are 80-bit approximations: compare to within 1e-20
    assert d.enclosure.lower - Fraction(1, 10**20) <= ref_lo and ref_hi <= d.enclosure.upper + Fraction(1, 10**20)
    assert d.enclosure.width <= Fraction(1, 10**15)


def test_residual_group_agrees_with_direct_weights():
    """The same weights given directly, or through their exact power sums, give overlapping enclosures."""
    with workprec(120):
        gammas = [arb(5 + 2 * j) + arb(j) / 7 for j in range(200)]
        scale = arb(2)
        direct = tuple(scale / (arb(1) / 4 + g * g).sqrt() for g in gammas)
        low = tuple(scale / (arb(1) / 4 + g * g).sqrt() for g in gammas[:40])
        high = gammas[40:]
        sums = tuple(sum(((arb(1) / 4 + g * g) ** (-k) for g in high), arb(0)) for k in range(1, 25))
        mu = arb(1) / 2
        a = density_enclosure(BesselVariable(mu, direct), 1e-10)
        b = density_enclosure(BesselVariable(mu, low, (ResidualGroup(scale, sums),)), 1e-10)
    assert a.enclosure.lower <= b.enclosure.upper and b.enclosure.lower <= a.enclosure.upper
    assert a.enclosure.width <= Fraction(1, 10**10) and b.enclosure.width <= Fraction(1, 10**10)
    names = [e.name for e in b.budget]
    assert names == ["aliasing", "frequency truncation", "residual zeros", "rounding and zero enclosures"]
    assert all(e.bound >= 0 for e in b.budget)
