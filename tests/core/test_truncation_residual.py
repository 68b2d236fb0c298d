"""The truncation bound with residual groups (docs/method.md, section 4c) against
independent evaluations: mpmath's J_0 on finite zero multisets, the section-4 bound on
the same data, and S_1 of the batched moments (which now carry most characters alone)
against mpmath's L'/L(1, chi)."""

from __future__ import annotations

import math
import random
from fractions import Fraction

import mpmath
import pytest
from flint import dirichlet_char

from certify.arith import arb, workprec
from certify.density.bessel import (TRUNCATION_ISOLATED, TRUNCATION_RESIDUAL, BesselVariable,
                                    ResidualGroup, _tail_data, density_enclosure,
                                    residual_truncation_bound)
from certify.spectrum.moments import conductor_power_sums

J01 = mpmath.besseljzero(0, 1)


def _random_groups(rng, n_groups, n_zeros, K=10, lowest=0.05):
    """Finite multisets of ordinates per group, their scales and exact power sums (balls)."""
    out = []
    for _ in range(n_groups):
        c = rng.uniform(0.3, 4.0)
        gam = sorted(rng.uniform(lowest, 40.0) for _ in range(n_zeros))
        out.append((c, gam))
    with workprec(120):
        groups = []
        for c, gam in out:
            a = [1 / (arb(1) / 4 + arb(g) ** 2) for g in gam]
            sums = tuple(sum((x ** k for x in a), arb(0)) for k in range(1, K + 1))
            groups.append(ResidualGroup(arb(c), sums, "g"))
    return out, groups


def _lemma_b_mp(c, gam, xi, K):
    """Lemma B (i) for every k and (ii), evaluated in mpmath from the ordinates."""
    a = [1 / (mpmath.mpf(1) / 4 + mpmath.mpf(g) ** 2) for g in gam]
    R = [sum(x ** k for x in a) for k in range(1, K + 1)]
    best = mpmath.mpf(1)
    x = c * xi
    for k in range(2, K + 1):
        G = x ** 2 * R[0] - J01 ** (2 - 2 * k) * x ** (2 * k) * R[k - 1]
        best = min(best, mpmath.exp(-G / 4))
    m = mpmath.sqrt(max(R[k] / R[k - 1] for k in range(1, K)))
    best = min(best, mpmath.sqrt(2 / (mpmath.pi * c * m * xi)))
    return best


@pytest.mark.parametrize("seed", range(4))
def test_lemma_b_bounds_the_product_of_j0(seed):
    """|prod J_0(c xi / |rho|)| (mpmath) never exceeds the bounds of Lemma B, at random xi."""
    rng = random.Random(seed)
    mpmath.mp.dps = 30
    try:
        for _ in range(6):
            c = rng.uniform(0.2, 5.0)
            gam = [rng.uniform(0.0, 30.0) for _ in range(rng.randint(5, 40))]
            for xi in (rng.uniform(0.01, 0.5), rng.uniform(0.5, 5.0), rng.uniform(5.0, 60.0)):
                prod = mpmath.fprod(abs(mpmath.besselj(0, c * xi / mpmath.sqrt(mpmath.mpf(1) / 4 + g * g)))
                                    for g in gam)
                assert prod <= _lemma_b_mp(c, gam, xi, 8) * (1 + mpmath.mpf(10) ** -20)
    finally:
        mpmath.mp.dps = 15


@pytest.mark.parametrize("seed", range(3))
def test_block_tail_bound_exceeds_the_true_tail(seed):
    """The engine's section-4c bound is above sum_{n odd > N} (2/(pi n)) |Phi_0(n eps)|,
    summed with mpmath's J_0 over finite multisets until the terms are negligible."""
    rng = random.Random(100 + seed)
    raw, groups = _random_groups(rng, rng.randint(2, 5), 12)
    iso = [rng.uniform(0.05, 1.5) for _ in range(rng.randint(0, 3))]
    eps_f = rng.uniform(0.02, 0.3)
    N = 2 * rng.randint(0, 30) + 1
    with workprec(100):
        eps = arb(eps_f)
        data = _tail_data([arb(w) for w in iso], groups)
        bound, _ = residual_truncation_bound(data, eps, N, 1e-6)
    assert bound.is_finite()
    mpmath.mp.dps = 20
    try:
        weights = list(iso) + [c / math.sqrt(0.25 + g * g) for c, gam in raw for g in gam]
        total = mpmath.mpf(0)
        n = N + 2
        while True:
            xi = n * eps_f
            phi = mpmath.fprod(abs(mpmath.besselj(0, w * xi)) for w in weights)
            term = 2 / (mpmath.pi * n) * phi
            total += term
            if term < mpmath.mpf(10) ** -25 or n > N + 3000:
                break
            n += 2
    finally:
        mpmath.mp.dps = 15
    assert float(total) <= float(bound.upper())
    # and the bound is a useful one here: below the trivial bound sum 2/(pi n) over one block
    assert float(bound.upper()) < 1.0


def test_residual_truncation_agrees_with_isolated_weights():
    """Many groups: the same zeros given directly (section 4 truncation) or as residual
    groups (section 4c) give overlapping enclosures; the residual form needs fewer terms."""
    rng = random.Random(7)
    raw, _ = _random_groups(rng, 40, 25)
    with workprec(110):
        def weight(c, g):
            return arb(c) / (arb(1) / 4 + arb(g) ** 2).sqrt()

        direct = tuple(weight(c, g) for c, gam in raw for g in gam)
        # as a race isolates them: the zeros below 3 given directly, the others as residual sums
        low = tuple(weight(c, g) for c, gam in raw for g in gam if g < 3)
        groups = []
        for c, gam in raw:
            a_res = [1 / (arb(1) / 4 + arb(g) ** 2) for g in gam if g >= 3]
            groups.append(ResidualGroup(arb(c), tuple(sum((x ** k for x in a_res), arb(0))
                                                      for k in range(1, 17)), "g"))
        mu = arb(3) / 2
        a = density_enclosure(BesselVariable(mu, direct), 1e-8)
        b = density_enclosure(BesselVariable(mu, low, tuple(groups)), 1e-8)
    assert a.parameters["truncation"] == TRUNCATION_ISOLATED
    assert b.parameters["truncation"] == TRUNCATION_RESIDUAL
    assert a.enclosure.lower <= b.enclosure.upper and b.enclosure.lower <= a.enclosure.upper
    assert a.enclosure.width <= Fraction(1, 10**8) and b.enclosure.width <= Fraction(1, 10**8)
    assert b.parameters["last_odd_index"] <= a.parameters["last_odd_index"]


def test_isolated_only_mode_refuses_rather_than_guess():
    """With no isolated weight the section-4 bound is infinite: forced to it, the engine
    refuses (fails closed); in auto mode section 4c certifies."""
    rng = random.Random(11)
    _, groups = _random_groups(rng, 30, 25, K=16, lowest=3.0)
    var = BesselVariable(arb(1), (), tuple(groups))
    from certify.errors import PrecisionExhausted

    with pytest.raises(PrecisionExhausted):
        density_enclosure(var, 1e-6, truncation=TRUNCATION_ISOLATED)
    d = density_enclosure(var, 1e-6)
    assert d.enclosure.width <= Fraction(1, 10**6)


def _primitive(q):
    return [n for n in range(1, q) if math.gcd(n, q) == 1 and dirichlet_char(q, n).is_primitive()]


@pytest.mark.parametrize("seed", range(2))
def test_batched_first_moment_against_mpmath(seed):
    """S_1 = log(q/pi) + psi((1+kappa)/2) + 2 Re L'/L(1, chi) (docs/method.md, section 2) for
    random characters of random conductors, with L(1) and L'(1) from mpmath's digamma and
    Stieltjes constants: for non-principal chi, L(s) = q^-s sum_a chi(a) zeta(s, a/q) and
    zeta(s, x) = 1/(s-1) - psi(x) - gamma_1(x) (s-1) + ..., the poles cancelling."""
    rng = random.Random(50 + seed)
    q = rng.choice([q for q in range(20, 60) if len(_primitive(q)) >= 4])
    labels = _primitive(q)
    got = conductor_power_sums(q, labels, 3, 60)
    mpmath.mp.dps = 25
    try:
        for n in rng.sample(labels, 2):
            chi = dirichlet_char(q, n)
            kappa = int(chi.parity())
            L = dL = mpmath.mpc(0)
            for a in range(1, q):
                if math.gcd(a, q) != 1:
                    continue
                v = chi(a)
                c = mpmath.mpc(float(v.real.mid()), float(v.imag.mid()))
                x = mpmath.mpf(a) / q
                L += c * (-mpmath.digamma(x))
                dL += c * (-mpmath.stieltjes(1, x))
            L, dL = L / q, dL / q - mpmath.log(q) * L / q
            s1 = mpmath.log(q / mpmath.pi) + mpmath.digamma(mpmath.mpf(1 + kappa) / 2) \
                + 2 * mpmath.re(dL / L)
            ball = got[n][0][0]
            # the character values enter as doubles: agreement to 1e-10 is what that allows
            assert abs(float(ball.mid()) - float(s1)) < 1e-10
            assert float(ball.rad()) < 1e-15
    finally:
        mpmath.mp.dps = 15
