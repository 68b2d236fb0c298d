"""L(E, s) in balls: functional equation, root numbers, central derivatives, against mpmath."""

import random

import mpmath
import pytest

from certify.arith import acb, arb, workprec
from certify.source.ell_l import EllipticL, tail_bound
from certify.source.ellcurve import curve_from_ainvs, discriminant

# a-invariants from memory (the list); analytic ranks 0, 1, 2, 3
FOUR = [([0, -1, 1, -10, -20], 11, 1), ([0, 0, 1, -1, 0], 37, -1),
        ([0, 1, 1, -2, 0], 389, 1),
        pytest.param([0, 0, 1, -7, 6], 5077, -1, marks=pytest.mark.slow)]


@pytest.mark.parametrize("a,N,eps", FOUR)
def test_functional_equation_30_digits(a, N, eps):
    E = curve_from_ainvs(a)
    assert E.conductor == N
    L = EllipticL(E)
    assert L.eps == eps
    s = acb(1.25, 0.125)  # an exact point off the critical line
    with workprec(120):
        r = L.fe_residual(s, 120, eps)
        v = L.lambda_value(s, 120)
        wrong = L.fe_residual(s, 120, -eps)
    # the two smoothings agree to 30 digits relative to |Lambda(s)| ...
    assert abs(r).upper() < 1e-30 * abs(v).lower()
    # ... and with the other sign they provably disagree
    assert not (wrong.real.contains(0) and wrong.imag.contains(0))


def test_root_number_by_functional_equation_matches_local_data():
    rng = random.Random(7)
    done = 0
    while done < 3:
        a = [rng.randint(-6, 6) for _ in range(5)]
        if discriminant(a) == 0:
            continue
        E = curve_from_ainvs(a)
        if E.conductor > 3000 or E.root_number_local is None:
            continue
        L = EllipticL(E)
        assert L.decide_root_number(prec=60) == E.root_number_local, a
        done += 1


def test_root_number_decided_when_local_data_open():
    # y^2 = x^3 - x (conductor 32): additive at 2, no local formula implemented
    E = curve_from_ainvs([0, 0, 0, -1, 0])
    assert E.root_number_local is None
    L = EllipticL(E)
    assert L.eps in (1, -1) and "functional equation" in L.eps_source
    with workprec(80):
        r = L.fe_residual(acb(1.25, 0.125), 80, L.eps)
    assert abs(r).upper() < 1e-18


@pytest.mark.parametrize("a,rank", [([0, -1, 1, -10, -20], 0), ([0, 0, 1, -1, 0], 1),
                                    ([0, 1, 1, -2, 0], 2)])
def test_central_jet_order(a, rank):
    L = EllipticL(curve_from_ainvs(a))
    c = L.central_jet(rank + 2, 100)
    for k in range(rank):
        assert c[k].real.contains(0) and c[k].real.rad() < 1e-25
    assert not c[rank].real.contains(0)


def test_l_value_11_against_mpmath_eta_series():
    """Lambda(E, 2) for conductor 11 from the eta-product q-expansion and mpmath's
    own upper incomplete gamma, split at t0 = 0.8 (a different smoothing): an
    independent path to the same value."""
    from tests.ellq.test_traces import _eta_coefficients

    N = 11
    mpmath.mp.dps = 30
    A = mpmath.sqrt(N) / (2 * mpmath.pi)
    an = _eta_coefficients(200)
    t0 = mpmath.mpf("0.8")
    s = mpmath.mpf(2)
    ref = mpmath.fsum(an[n] * ((n / A) ** (-s) * mpmath.gammainc(s, n * t0 / A)
                               + (n / A) ** (s - 2) * mpmath.gammainc(2 - s, n / (A * t0)))
                      for n in range(1, 201))
    L = EllipticL(curve_from_ainvs([0, -1, 1, -10, -20]))
    with workprec(100):
        v = L.lambda_value(acb(2), 100)
    assert v.real.overlaps(arb(mpmath.nstr(ref, 28)) + arb(0, 1e-26)) and v.real.rad() < 1e-25
    assert tail_bound(11, 200, 2.0) < 1e-100
