"""Zeros of L(E, s) for conductor 11 against an independent mpmath evaluation,
and the certified density against a floating-point Gil-Pelaez integral."""

import math

import mpmath
import pytest

from certify.arith import arb
from certify.ecrace import certify_ec_race
from certify.source.ell_l import EllipticL
from certify.source.ellcurve import curve_from_ainvs
from certify.spectrum.zeros import find_zeros_of
from tests.ellq.test_traces import _eta_coefficients


def _mp_hardy_z(t, an, N=11):
    """Z(t) of the level-11 form from eta-product coefficients, with mpmath's gammainc and
    the smoothing t0 = 0.9 (a different split of the Mellin integral than certify's t0 = 1),
    for root number +1: Z = Re Lambda(1 + i t) * 2 pi / (sqrt(N) |Gamma(1 + i t)|)."""
    A = mpmath.sqrt(N) / (2 * mpmath.pi)
    s = mpmath.mpc(1, t)
    t0 = mpmath.mpf("0.9")
    lam = mpmath.fsum(an[n] * ((n / A) ** (-s) * mpmath.gammainc(s, n * t0 / A)
                               + (n / A) ** (s - 2) * mpmath.gammainc(2 - s, n / (A * t0)))
                      for n in range(1, len(an)) if an[n])
    g = mpmath.sqrt(mpmath.pi * t / mpmath.sinh(mpmath.pi * t))
    return mpmath.re(lam) * 2 * mpmath.pi / (mpmath.sqrt(N) * g)


@pytest.mark.slow  # mpmath's complex incomplete gamma: seconds per Z value
def test_first_zeros_conductor_11_against_mpmath():
    L = EllipticL(curve_from_ainvs([0, -1, 1, -10, -20]))
    zl = find_zeros_of(L, 14.0, 1e-15, t_from=0.1)
    assert len(zl.zeros) >= 5
    # from memory: the first ordinate of the curve of conductor 11 is 6.3626...
    assert zl.zeros[0].overlaps(arb("6.3626") + arb(0, 1e-4))
    an = _eta_coefficients(90)  # e^(-n t0/A) < 1e-60 beyond: truncation far below the check
    with mpmath.workdps(32):
        for z in zl.zeros[:3]:
            g = mpmath.findroot(lambda t: _mp_hardy_z(t, an), float(z.mid()))
            ref = arb(mpmath.nstr(g, 25)) + arb(0, 1e-20)
            assert z.overlaps(ref), (z, g)
            assert z.rad() < 1e-15


@pytest.mark.slow
def test_density_against_gil_pelaez_quadrature():
    """P(X > 0) = 1/2 + (1/pi) int_0^inf sin(mu xi) prod J_0(w xi) exp(-v xi^2/2) / xi dxi,
    with the certified zeros and a Gaussian for the residual part (variance v = 2 R_1):
    a floating-point path independent of the engine's square-wave series."""
    from scipy.integrate import quad
    from scipy.special import j0

    r = certify_ec_race([0, -1, 1, -10, -20], 6)
    ws = [2 / math.hypot(0.5, float(z.mid())) for z in r.zeros]
    v = 2 * float(r.residual[0].mid())
    mu = float(r.mean)

    def f(xi):
        p = math.sin(mu * xi) / xi * math.exp(-v * xi * xi / 2)
        for w in ws:
            p *= j0(w * xi)
        return p

    val = 0.5 + quad(f, 0, 60, limit=2000, epsabs=1e-11)[0] / math.pi
    assert abs(val - float(r.density.mid)) < 2e-5
