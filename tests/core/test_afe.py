"""The smoothed approximate functional equation against Arb's Hurwitz-sum values."""

import math
import random

import mpmath
import pytest
from flint import dirichlet_char

from certify.arith import acb, arb, workprec
from certify.spectrum.afe import SmoothedL


def _random_primitive(rng, lo, hi):
    while True:
        q = rng.randrange(lo, hi)
        n = rng.randrange(1, q)
        if math.gcd(n, q) == 1 and dirichlet_char(q, n).is_primitive():
            return q, n


@pytest.mark.parametrize("seed", range(3))
def test_central_value_and_signs_agree_with_hurwitz_path(seed):
    """Random primitive characters (a fresh draw per seed): L(1/2) balls overlap and
    Y(t) has the sign of Arb's Hardy Z at random heights."""
    rng = random.Random(77 + seed)
    for _ in range(3):
        q, n = _random_primitive(rng, 5, 300)
        S = SmoothedL(q, n)
        chi = dirichlet_char(q, n)
        with workprec(64):
            cv = S.central_value(64)
            ref = chi.l(acb(1) / 2)
            assert cv.overlaps(ref), (q, n)
            assert float(cv.real.rad()) < 1e-6
            for _ in range(3):
                t = arb(rng.uniform(0.1, 25.0))
                y = S.hardy_y(t, 64)
                z = chi.hardy_z(t).real
                if z > 0:
                    assert y > 0, (q, n, t)
                elif z < 0:
                    assert y < 0, (q, n, t)


def test_real_character_root_number_is_one():
    """Gauss: a real primitive character has tau(chi) = i^kappa sqrt(q), so eps = 1."""
    for q, n in [(5, 4), (8, 3), (12, 11), (13, 12), (21, 20)]:
        S = SmoothedL(q, n)
        assert S.root_number(80).overlaps(acb(1))


def test_lambda_against_mpmath_off_the_line():
    """Lambda(s) at a point off the critical line against mpmath's L-value (independent)."""
    q, n = 7, 3
    chi = dirichlet_char(q, n)
    vals = [complex(chi(a)) if math.gcd(a, q) == 1 else 0 for a in range(q)]
    s = mpmath.mpc(0.3, 2.0)
    kappa = int(chi.parity())
    mpmath.mp.dps = 30
    ref = (q / mpmath.pi) ** ((s + kappa) / 2) * mpmath.gamma((s + kappa) / 2) * mpmath.dirichlet(s, vals)
    mpmath.mp.dps = 15
    with workprec(80):
        lam = SmoothedL(q, n).lambda_value(acb("0.3", "2.0"), 80)
    assert abs(complex(lam) - complex(ref)) < 1e-12 and float(lam.real.rad()) < 1e-15


def test_truncation_tail_bound_contains_longer_sums():
    """The ball of a short sum contains the value of a much longer one."""
    S = SmoothedL(31, 3)
    with workprec(60):
        s = acb(arb(1) / 2, arb(5))
        short = S.partial(s, 30)
        long = S.partial(s, 120)
        assert short.overlaps(long) and long.rad() < short.rad()


def test_precision_is_not_capped_by_values_cached_at_a_lower_one():
    """Z(t, chi_{401,377}) near its zero at t = 0.0672654913... (found by a race mod 401):
    asked first at 64 bits, then at 200, the second ball must be as narrow as 200 bits
    allow (the character values were once cached at the first precision, capping every
    later sum near 2^-70) and contain Arb's own Hurwitz-sum value at 300 bits."""
    S = SmoothedL(401, 377)
    t = arb(0.0672654913155749)  # a double: exact
    with workprec(64):
        S.hardy_z(t, 64)
    with workprec(200):
        z = S.hardy_z(t, 200)
    assert z.rad() < arb(2) ** -150
    with workprec(300):
        ref = dirichlet_char(401, 377).hardy_z(t).real
    assert ref.rad() < arb(2) ** -200
    assert z.overlaps(ref) and abs(z) < arb(2) ** -50  # the point is within 1e-15 of a zero
