"""The orthant engine (races among several classes) against independent evaluations.

References used here, each computed without the engine's square-wave series:
* the one-dimensional engine (certify.density.bessel) for d = 1 and for products
  of independent coordinates;
* scipy quadrature of the bivariate inversion formula
      P(Y1 > 0, Y2 > 0) = 1/4 + (1/2pi) int_0^oo Im phi(t, 0)/t dt + (1/2pi) int_0^oo Im phi(0, t)/t dt
                          + (1/2pi^2) int int_0^oo Re[phi(t1, -t2) - phi(t1, t2)] / (t1 t2) dt1 dt2,
  with phi(t) = e^{i<t, mu>} prod J_0(2 |<t, v_j>| w_j) (scipy.special.j0), for a few cosines;
* exact identities (orthants of one coordinate system sum to the marginals).
"""

import math
import random

import numpy as np
import pytest

from certify.arith import acb, arb, workprec
from certify.density.bessel import BesselVariable, density_enclosure
from certify.density.orthant import (VectorGroup, VectorVariable, covariance, orthant_enclosure,
                                     truncation_tail, DirectionalTail)


def _meet(a, b) -> bool:
    return a.lower <= b.upper and b.lower <= a.upper


def _cosines(rng, n, lo=0.4, hi=1.4):
    return [rng.uniform(lo, hi) for _ in range(n)]


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_one_dimension_agrees_with_the_line_engine(seed):
    rng = random.Random(seed)
    ws = _cosines(rng, 10)
    mu = rng.uniform(-1.0, 1.0)
    line = density_enclosure(BesselVariable(arb(mu), tuple(arb(w) for w in ws)), 1e-7)
    vec = VectorVariable((arb(mu),), tuple(VectorGroup((acb(0.5),), (arb(w),)) for w in ws))
    out = orthant_enclosure(vec, 1e-7)
    up, down = out[(1,)], out[(-1,)]
    assert _meet(up.enclosure, line.enclosure)
    assert up.enclosure.width < 1e-7 and down.enclosure.width < 1e-7
    # P(Y > 0) + P(Y < 0) = 1 (Y is continuous)
    assert up.enclosure.lower + down.enclosure.lower <= 1 <= up.enclosure.upper + down.enclosure.upper


@pytest.mark.parametrize("seed", [4, pytest.param(5, marks=pytest.mark.slow)])
def test_independent_coordinates_factor(seed):
    rng = random.Random(seed)
    w1, w2 = _cosines(rng, 9), _cosines(rng, 8)
    m1, m2 = rng.uniform(-0.8, 0.8), rng.uniform(-0.8, 0.8)
    p1 = density_enclosure(BesselVariable(arb(m1), tuple(arb(w) for w in w1)), 1e-9).enclosure
    p2 = density_enclosure(BesselVariable(arb(m2), tuple(arb(w) for w in w2)), 1e-9).enclosure
    groups = tuple(VectorGroup((acb(0.5), acb(0)), (arb(w),)) for w in w1) + \
        tuple(VectorGroup((acb(0), acb(0.5)), (arb(w),)) for w in w2)
    out = orthant_enclosure(VectorVariable((arb(m1), arb(m2)), groups), 1e-5,
                            signs=[(1, 1), (-1, -1), (1, -1), (-1, 1)])
    ref = {(1, 1): (p1.lower * p2.lower, p1.upper * p2.upper),
           (-1, -1): ((1 - p1.upper) * (1 - p2.upper), (1 - p1.lower) * (1 - p2.lower)),
           (1, -1): (p1.lower * (1 - p2.upper), p1.upper * (1 - p2.lower)),
           (-1, 1): ((1 - p1.upper) * p2.lower, (1 - p1.lower) * p2.upper)}
    for s, e in out.items():
        lo, hi = ref[s]
        assert e.enclosure.lower <= hi and lo <= e.enclosure.upper, s
        assert e.enclosure.width < 1e-5


def _phi(t1, t2, mu, vecs, ws):
    """Characteristic function of Y = mu + sum_j 2 Re(v_j U_j) w_j (floating point)."""
    from scipy.special import j0

    val = 1.0
    for v, w in zip(vecs, ws):
        val *= j0(2 * abs(t1 * v[0] + t2 * v[1]) * w)
    return np.exp(1j * (t1 * mu[0] + t2 * mu[1])) * val


def _bivariate_reference(mu, vecs, ws, T=40.0):
    """P(Y1 > 0, Y2 > 0) by the bivariate inversion formula and scipy quadrature."""
    from scipy import integrate

    def one(axis):
        f = (lambda t: (_phi(t, 0, mu, vecs, ws).imag / t)) if axis == 0 else \
            (lambda t: (_phi(0, t, mu, vecs, ws).imag / t))
        val, err = integrate.quad(f, 0, T, limit=400, epsabs=1e-12)
        return val

    def two(t2, t1):
        return (_phi(t1, -t2, mu, vecs, ws) - _phi(t1, t2, mu, vecs, ws)).real / (t1 * t2)

    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # subdivision warnings: the check's tolerance absorbs them
        dbl, err = integrate.dblquad(two, 0, T, 0, T, epsabs=1e-10, epsrel=1e-10)
    return 0.25 + (one(0) + one(1)) / (2 * math.pi) + dbl / (2 * math.pi ** 2)


@pytest.mark.slow
@pytest.mark.parametrize("seed", [11, 12])
def test_few_cosines_against_bivariate_quadrature(seed):
    # generic directions in C^2 (rank two each) so that phi decays in every direction;
    # weights ~ 1 so that phi is below 1e-12 beyond |t| = 40 (bound checked below)
    rng = random.Random(seed)
    n = 9
    vecs = [(complex(rng.uniform(-1, 1), rng.uniform(-1, 1)),
             complex(rng.uniform(-1, 1), rng.uniform(-1, 1))) for _ in range(n)]
    ws = _cosines(rng, n, 0.8, 1.6)
    mu = (rng.uniform(-0.7, 0.7), rng.uniform(-0.7, 0.7))
    var = VectorVariable((arb(mu[0]), arb(mu[1])),
                         tuple(VectorGroup((acb(v[0].real, v[0].imag), acb(v[1].real, v[1].imag)),
                                           (arb(w),)) for v, w in zip(vecs, ws)))
    out = orthant_enclosure(var, 1e-5, signs=[(1, 1)])[(1, 1)]
    ref = _bivariate_reference(mu, vecs, ws)
    # the reference's own error: quadrature tolerance plus the cut at |t| = 40
    assert float(out.enclosure.lower) - 1e-7 <= ref <= float(out.enclosure.upper) + 1e-7
    assert out.enclosure.width < 1e-5


def test_orthants_of_one_system_add_up_to_marginals():
    rng = random.Random(21)
    n = 10
    vecs = [(acb(rng.uniform(-1, 1), rng.uniform(-1, 1)), acb(rng.uniform(-1, 1), 0)) for _ in range(n)]
    ws = _cosines(rng, n)
    mu = (arb(0.3), arb(-0.2))
    var = VectorVariable(mu, tuple(VectorGroup(v, (arb(w),)) for v, w in zip(vecs, ws)))
    out = orthant_enclosure(var, 1e-5, signs=[(1, 1), (1, -1)])
    # P(Y1 > 0) from the line engine: Y1 = mu_1 + sum 2 |v_j1| w_j cos
    line = density_enclosure(BesselVariable(mu[0], tuple(2 * abs(v[0]) * arb(w) for v, w in zip(vecs, ws))),
                             1e-8).enclosure
    lo = out[(1, 1)].enclosure.lower + out[(1, -1)].enclosure.lower
    hi = out[(1, 1)].enclosure.upper + out[(1, -1)].enclosure.upper
    assert lo <= line.upper and line.lower <= hi


def test_covariance_is_exact_for_cosines():
    v = (acb(1, 2), acb(-1, 0.5))
    var = VectorVariable((arb(0), arb(0)), (VectorGroup(v, (arb(0.5), arb(0.25))),))
    cov = covariance(var)
    m = 0.25 + 0.0625
    # Cov = 2 Re(v_i conj v_j) sum w^2
    assert abs(float(cov[0][0].mid()) - 2 * 5 * m) < 1e-12
    assert abs(float(cov[0][1].mid()) - 2 * (-1 + 1) * m) < 1e-12
    assert abs(float(cov[1][1].mid()) - 2 * 1.25 * m) < 1e-12


def test_tail_bound_dominates_the_lattice_sum():
    # the rigorous tail must exceed a direct (floating point) sum of |c(k)| |Phi_0| over a
    # large ring outside the box
    from scipy.special import j0

    rng = random.Random(31)
    n = 8
    vecs = [(rng.uniform(-1, 1), rng.uniform(-1, 1)) for _ in range(n)]  # real: rank one each
    ws = _cosines(rng, n, 0.8, 1.5)
    var = VectorVariable((arb(0), arb(0)), tuple(VectorGroup((acb(a), acb(b)), (arb(w),))
                                                 for (a, b), w in zip(vecs, ws)))
    eps = [0.5, 0.4]
    K = [7, 9]
    with workprec(64):
        tail = DirectionalTail(var, 64)
        bound, J = truncation_tail(tail, K, [arb(e) for e in eps])
    direct = 0.0
    R = 60
    for k1 in range(-R, R + 1):
        for k2 in range(-R, R + 1):
            if abs(k1) <= K[0] and abs(k2) <= K[1]:
                continue
            if (k1 and k1 % 2 == 0) or (k2 and k2 % 2 == 0):
                continue
            c = 1.0
            for k in (k1, k2):
                c *= 0.5 if k == 0 else 1 / (math.pi * abs(k))
            phi = 1.0
            for (a, b), w in zip(vecs, ws):
                phi *= j0(2 * abs(a * k1 * eps[0] + b * k2 * eps[1]) * w)
            direct += c * abs(phi)
    assert bound.is_finite() and direct <= float(bound.upper())


@pytest.mark.slow
def test_truncated_mod8_law_against_bivariate_quadrature():
    # the law of delta(8;3,5,7) truncated to its zeros below height 30 (no residual):
    # the orthant engine against scipy quadrature of the inversion formula, same law
    from certify.orders import _gather, plan_chain
    from certify.race.order import order_groups, ordering
    from certify.spectrum.spectrum import SpectrumStore

    store = SpectrumStore()
    q = ordering(8, 3, 5, 7)
    plan = plan_chain(q, 4, store)
    _, var = _gather(q, order_groups(q), plan, store, plan.prec)
    groups, vecs, ws = [], [], []
    for g in var.groups:
        keep = tuple(w for w in g.weights if float(w.mid()) > 1 / 30.0)
        groups.append(VectorGroup(g.vector, keep))
        v = tuple(complex(float(c.real.mid()), float(c.imag.mid())) for c in g.vector)
        vecs += [v] * len(keep)
        ws += [float(w.mid()) for w in keep]
    trunc = VectorVariable(var.mu, tuple(groups))
    out = orthant_enclosure(trunc, 1e-5, signs=[(1, 1)])[(1, 1)]
    ref = _bivariate_reference((0.0, 0.0), vecs, ws, T=60.0)
    assert float(out.enclosure.lower) - 1e-6 <= ref <= float(out.enclosure.upper) + 1e-6
    assert out.enclosure.width < 1e-5


def test_enclosures_stay_inside_the_unit_interval():
    # a law whose orthant has probability 0 (|mu| exceeds the sum of the weights): the
    # enclosure is intersected with [0, 1], and must contain 0 (resp. 1 for the opposite)
    ws = [0.3 / (j + 1) for j in range(10)]
    var = VectorVariable((arb(-1.0),), tuple(VectorGroup((acb(0.5),), (arb(w),)) for w in ws))
    out = orthant_enclosure(var, 1e-4)
    assert out[(1,)].enclosure.lower == 0 < out[(1,)].enclosure.upper < 1e-4
    assert out[(-1,)].enclosure.upper == 1 and out[(-1,)].enclosure.lower > 1 - 1e-4
