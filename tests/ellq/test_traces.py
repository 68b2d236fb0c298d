"""Frobenius traces: brute force, an eta product, BSGS against exact counts, Hasse."""

import random

import numpy as np
import pytest

from certify.errors import BadInput
from certify.source.ectraces import an_list, count_trace, primes_upto, traces_upto
from certify.source.ellcurve import curve_from_ainvs, discriminant


def brute_trace(a, p):
    """a_p = p + 1 - #E(F_p) by checking every (x, y) (pure Python, no shortcut)."""
    a1, a2, a3, a4, a6 = a
    n = 1  # the point at infinity
    for x in range(p):
        for y in range(p):
            if (y * y + a1 * x * y + a3 * y - x**3 - a2 * x * x - a4 * x - a6) % p == 0:
                n += 1
    return p + 1 - n


def _random_curve(rng):
    while True:
        a = [rng.randint(-50, 50) for _ in range(5)]
        if discriminant(a) != 0:
            return curve_from_ainvs(a)


@pytest.mark.parametrize("seed", range(4))
def test_brute_force_small_primes(seed):
    E = _random_curve(random.Random(seed))
    ps, ap = traces_upto(E, 60)
    for p, v in zip(ps, ap):
        p = int(p)
        ld = E.local_at(p)
        if ld is None:
            assert v == brute_trace(E.minimal, p)
            assert v == brute_trace(E.ainvs, p) or discriminant(E.ainvs) % p == 0
        else:
            assert v == ld.a_p
            # at a bad prime: p - #E_ns-style count of the minimal model's points
            assert v == {"split": 1, "nonsplit": -1, "additive": 0}[ld.reduction]


def _eta_coefficients(nmax):
    """Coefficients of q prod_{n>=1} (1 - q^n)^2 (1 - q^{11 n})^2 (exact integers)."""
    c = [0] * (nmax + 1)
    c[0] = 1
    for n in range(1, nmax + 1):
        for k, m in ((n, 2), (11 * n, 2)):
            if k > nmax:
                continue
            for _ in range(m):
                for i in range(nmax, k - 1, -1):
                    c[i] -= c[i - k]
    return [0] + c[:nmax]  # shift by q


def test_conductor_11_against_eta_product():
    """The newform of level 11 is eta(z)^2 eta(11 z)^2 (modularity; from memory)."""
    E = curve_from_ainvs([0, -1, 1, -10, -20])
    a = an_list(E, 300)
    eta = _eta_coefficients(300)
    assert a[1:301] == eta[1:301]


@pytest.mark.parametrize("seed", range(3))
def test_bsgs_matches_counts(seed):
    rng = random.Random(100 + seed)
    E = _random_curve(rng)
    ps, ap = traces_upto(E, 9000, seed=seed, count_limit=50)
    sel = [i for i in range(len(ps)) if ps[i] > 50]
    pick = rng.sample(sel, 60)
    for i in pick:
        p = int(ps[i])
        if E.local_at(p) is None:
            assert ap[i] == count_trace(E.minimal, p), p


def test_hasse_every_prime():
    E = curve_from_ainvs([0, 0, 1, -7, 6])
    ps, ap = traces_upto(E, 200000)
    assert ps.size == 17984  # pi(2 * 10^5)
    assert np.all(ap.astype(np.float64) ** 2 <= 4 * ps)


def test_an_multiplicative_and_bounded():
    E = curve_from_ainvs([0, 1, 1, -2, 0])
    a = an_list(E, 2000)
    assert a[6] == a[2] * a[3] and a[35] == a[5] * a[7]
    for n in range(1, 2001):
        d = sum(1 for k in range(1, n + 1) if n % k == 0) if n < 200 else 2 * int(n**0.5)
        assert abs(a[n]) <= d * n**0.5 + 1e-9


def test_primes_and_bad_bounds():
    assert list(primes_upto(30)) == [2, 3, 5, 7, 11, 13, 17, 19, 23, 29]
    E = curve_from_ainvs([0, 0, 1, -1, 0])
    with pytest.raises(BadInput):
        traces_upto(E, 10**12)
    with pytest.raises(BadInput):
        traces_upto(E, 2.5)
