"""Trace races: the rank's effect on the bias, densities against independent quadrature,
the limit formula against exact trace sums, and the relation search."""

import math

import pytest
from scipy import integrate

from certify.arith import arb, workprec
from certify.curves.family import twist
from certify.curves.lpoly import l_polynomial
from certify.curves.model import make_curve
from certify.curves.race import relation_search, trace_race
from certify.errors import PrecisionExhausted
from certify.ffield.poly import parse_poly

# Curves of rank 0, 1, 2 found by search: the degree-2 quadratic twists of
# y^2 = x^3 + t x + t^2 + 1 over F_5 (deg L = 6 each); the rank is the exact
# multiplicity of (1 - 5u) in L(E_f, u), computed here, not assumed.
BASE = (5, "t", "t^2 + 1")
TWISTS = {"t^2 + 3": 0, "t^2 + 2": 1, "t^2 + 1": 2}


def _twist(f):
    E = make_curve(*BASE)
    return twist(E, parse_poly(f, E.field))


def _quadrature_density(mu: float, w: list[float]) -> float:
    """P(mu + sum w_k cos Theta_k > 0) by scipy quadrature, the last phase integrated in closed form.

    P(c + w cos Theta > 0) = arccos(clip(-c/w))/pi; the remaining phases are integrated
    numerically over [0, pi]^(k-1) (cos is symmetric). Independent of the Fourier engine.
    """
    def inner(c):
        x = max(-1.0, min(1.0, -c / w[-1]))
        return math.acos(x) / math.pi

    if len(w) == 1:
        return inner(mu)
    if len(w) == 2:
        val, err = integrate.quad(lambda a: inner(mu + w[0] * math.cos(a)), 0, math.pi, epsabs=1e-11, limit=400)
        return val / math.pi
    if len(w) == 3:
        val, err = integrate.dblquad(lambda b, a: inner(mu + w[0] * math.cos(a) + w[1] * math.cos(b)),
                                     0, math.pi, 0, math.pi, epsabs=1e-10)
        return val / math.pi**2
    raise ValueError


@pytest.mark.parametrize("mode", ["cumulative", "degree"])
def test_rank_lowers_the_density(mode):
    dens = {}
    for f, rank in TWISTS.items():
        Ef = _twist(f)
        L = l_polynomial(Ef)
        assert L.rank == rank
        R = trace_race(Ef, L, mode, 1e-6)
        dens[rank] = R.density
        # the averaged mean is (1/2 - r) sqrt q/(sqrt q - 1) (cumulative) or 1/2 - r (degree)
        with workprec(128):
            sq = arb(5).sqrt()
            expected = (arb(1) / 2 - rank) * (sq / (sq - 1) if mode == "cumulative" else 1)
            assert (R.mean() - expected).contains(0)
    assert dens[0].lower > 0.5 > dens[1].upper
    assert dens[1].lower > dens[2].upper


@pytest.mark.parametrize("f", list(TWISTS))
@pytest.mark.parametrize("mode", ["cumulative", "degree"])
def test_density_against_quadrature(f, mode):
    Ef = _twist(f)
    L = l_polynomial(Ef)
    R = trace_race(Ef, L, mode, 1e-6)
    w = [float(x.mid()) for x in R.variable.weights]
    vals = [_quadrature_density(float(m.mid()), w) for m in R.variable.mu]
    indep = sum(vals) / len(vals)
    assert R.density.lower - 1e-8 <= indep <= R.density.upper + 1e-8
    assert R.density.width < 2e-4  # k = 2 or 3 angles: per-class width floor 1e-4


def test_periodic_case_is_exact():
    # y^2 = x^3 + t x + t^2 + 1 over F_5: L = 1 + 5u + 25u^2, inverse roots 5 e^(+-2 pi i/3) (torsion);
    # the limit is periodic mod 6 with sign pattern - + + - + + : density exactly 2/3.
    E = make_curve(*BASE)
    L = l_polynomial(E)
    R = trace_race(E, L, "cumulative", observe=8)
    assert R.variable.period == 6 and not R.variable.weights
    assert R.density.lower == R.density.upper
    assert R.density.lower * 3 == 2
    # the exact trace sums (point counts) have the predicted sign from X = 3 on
    for o in R.observed[2:]:
        assert (o["normalised"] > 0) == (o["limit_formula"] > 0)


def test_limit_formula_tracks_exact_sums():
    # a curve with five non-torsion angles (deg L = 11, rank 1; found by a random search over F_5)
    E = make_curve(5, "2 + 2*t + 2*t^2 + 4*t^5", "4 + 4*t + t^7 + t^8")
    L = l_polynomial(E)
    assert L.degree == 11 and L.rank == 1 and len([r for r in L.roots if not r.torsion_order]) == 5
    for mode in ("cumulative", "degree"):
        R = trace_race(E, L, mode, 1e-6, observe=8)
        for o in R.observed[5:]:
            # the remainder is O(1/X) + O(q^(-X/4)): a weak but honest check at X = 6..8
            assert abs(o["normalised"] - o["limit_formula"]) < 0.7
        assert R.density.upper < 0.5  # rank 1 biases the race towards negative values
        assert R.density.width < 1e-5


def test_relation_search_finds_planted_relation_and_bounds_otherwise():
    with workprec(256):
        a = arb(2) / 7 * arb.pi() + arb(1) / 1000
        b = arb.pi() - a  # a + b = pi: relation 2 x_a + 2 x_b - 1 = 0
        cands, bound = relation_search([a, b])
        assert cands and bound is None
        k = cands[0]
        s = k[0] + (k[1] * a + k[2] * b) / (2 * arb.pi())
        assert s.contains(0)
        c = arb(2).sqrt()  # theta = sqrt 2 and sqrt 3: no relation with 1 over Q
        d = arb(3).sqrt()
        cands, bound = relation_search([c, d])
        assert not cands and bound > 1000


def test_relation_case_against_the_orbit():
    # the degree-4 twist by f = t^4 + 1 of y^2 = x^3 + t x + 2t^3 + 3 over F_5 has an even
    # L-polynomial: its angles pair up as theta + theta' = pi, so LI fails.  The box-subdivision
    # enclosure on the orbit closure is checked against the frequency of {G(X) > 0} along the
    # orbit itself, X = 1..200000, G the limit function evaluated in floating point (independent
    # of the torus code).
    import numpy as np

    E = make_curve(5, "t", "2*t^3 + 3")
    Ef = twist(E, parse_poly("t^4 + 1", E.field))
    L = l_polynomial(Ef)
    assert all(c == 0 for c in L.coeffs[1::2])
    # degree race: L has (1 - 5u)^2 (1 + 5u)^2, so the mean is 0 for odd X, and the angles pair
    # as theta, pi - theta, so every cosine cancels for odd X: the limit is 0 on the odd X (refused)
    with pytest.raises(PrecisionExhausted, match="vanishes identically on the progression X = 1 mod 2"):
        trace_race(Ef, L, "degree", 1e-3, max_boxes=20000)
    for mode in ("cumulative",):
        R = trace_race(Ef, L, mode, 1e-3, max_boxes=20000)
        assert R.parameters["relations"]
        assert R.density.width < 2e-3
        X = np.arange(1, 200001)
        P = R.variable.period
        G = np.array([float(m.mid()) for m in R.variable.mu])[X % P]
        sq = math.sqrt(5)
        for r in L.roots:
            if r.torsion_order:
                continue
            th = float(r.angle.mid())
            if mode == "cumulative":
                B = -2 * r.multiplicity / (1 - np.exp(-1j * th) / sq)
            else:
                B = -2 * r.multiplicity
            G = G + np.real(B * np.exp(1j * th * X))
        freq = float(np.mean(G > 0))
        assert float(R.density.lower) - 2e-3 <= freq <= float(R.density.upper) + 2e-3
