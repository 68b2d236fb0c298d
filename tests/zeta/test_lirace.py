"""The race pi(x) against li(x): published digits, exact identities, an independent quadrature."""

import random
from fractions import Fraction

import mpmath
import numpy as np
import pytest
from scipy.special import j0

from certify.arith import arb, certified_significant, sci_text as sci, workprec
from certify.density.bessel import BesselVariable, ResidualGroup, density_enclosure
from certify.errors import BadInput
from certify.lirace import MAX_SIG_DIGITS, certify_li_race
from certify.race.question import mean_of, prime_vs_li, spectral_groups
from certify.spectrum.spectrum import SpectrumStore, residual_sums

STORE = SpectrumStore()  # zeta's zeros and moments, shared by the tests of this module


@pytest.fixture(scope="module")
def below10():
    return certify_li_race("pi<li", sig_digits=10, store=STORE)


def test_question_mean_and_group():
    above, below = prime_vs_li("pi>li"), prime_vs_li("pi<li")
    assert mean_of(above) == -1 and mean_of(below) == 1  # the prime squares
    (g,) = spectral_groups(above)
    assert g.primitive_keys == ((1, 1),) and g.is_real and g.parity == 0
    assert float(g.scale.mid()) == 2.0 and g.scale.rad() == 0  # weights 2/|rho|
    assert above.label == "delta(pi>li)" and "pi(x) > li(x)" in above.statement
    assert below.label == "delta(pi<li)" and "pi(x) < li(x)" in below.statement


def test_published_value_1994(below10):
    """"Chebyshev's bias", Experimental Mathematics 3 (1994): delta(pi<li) = 0.99999973.

    The enclosure lies in the truncation [0.99999973, 0.99999974] of that printed
    value (the true value 0.9999997370... rounds to ...74 at 8 places, so the
    printed digits are a truncation), and 1 - delta in [2.6e-7, 2.7e-7).
    """
    lo, hi = below10.density.lower, below10.density.upper
    assert Fraction("0.99999973") <= lo <= hi <= Fraction("0.99999974")
    assert Fraction("2.6e-7") <= below10.small_lower <= below10.small_upper < Fraction("2.7e-7")


def test_ten_significant_digits_of_the_small_side(below10):
    assert below10.small_name == "1 - delta"
    assert below10.small_lower == 1 - below10.density.upper
    assert below10.small_upper == 1 - below10.density.lower
    k, text = below10.significant
    assert k >= 10 and below10.sig_target_met
    assert text.startswith("2.62996732") and text.endswith("e-7")
    # the relative width that 10 significant digits need, no looser
    assert (below10.small_upper - below10.small_lower) / below10.small_lower < Fraction(1, 10**10)
    assert {h.name for h in below10.hypotheses} == {"RH", "LI"}
    assert all(h.status == "assumed" and h.evidence for h in below10.hypotheses)
    names = [e.name for e in below10.budget]
    assert names == ["aliasing", "frequency truncation", "residual zeros",
                     "rounding and zero enclosures"]
    assert below10.parameters["zeros_used"] > 20
    d = below10.to_dict()
    assert d["small_side"]["significant_digits"] == k and d["small_side"]["target_met"]
    assert [h["name"] for h in d["hypotheses"]] == ["RH", "LI"]


def test_variance_identity_against_mpmath(below10):
    """Var X = sum over positive ordinates of 2/(1/4 + gamma^2) = 2 + gamma_E - log 4 pi."""
    v = below10.variance
    with mpmath.workdps(40):
        ref = 2 + mpmath.euler - mpmath.log(4 * mpmath.pi)
        assert abs(mpmath.mpf(v.mid().str(40, radius=False)) - ref) <= mpmath.mpf(float(v.rad())) + 1e-30
    assert float(v.rad()) < 1e-15
    # and the same identity from the zeros: isolated zeros (mpmath's own) plus the exact residual
    with mpmath.workdps(20):
        direct = sum(2 / (0.25 + mpmath.zetazero(k).imag ** 2) for k in range(1, 11))
    grp = below10.groups[0]
    assert len(grp.zeros) >= 10
    tail = sum((2 / (arb(1) / 4 + z * z) for z in grp.zeros[10:]), arb(0)) + 2 * grp.residual[0]
    assert abs(float(direct) + float(tail.mid()) - float(ref)) < 1e-12


def test_directions_are_complementary():
    """delta(pi>li) + delta(pi<li) = 1: two separate races whose enclosures must agree."""
    d = random.Random().choice([8, 11, 14])
    a = certify_li_race("pi>li", digits=d, store=STORE)
    b = certify_li_race("pi<li", digits=d, store=STORE)
    assert a.density.lower + b.density.lower <= 1 <= a.density.upper + b.density.upper
    assert a.small_name == "delta" and b.small_name == "1 - delta"
    assert a.small_lower <= b.small_upper and b.small_lower <= a.small_upper
    assert a.density.width <= Fraction(1, 10**d) and b.density.width <= Fraction(1, 10**d)


def test_significant_digit_planning_random_target():
    S = random.Random().randrange(3, 16)
    r = certify_li_race(random.Random().choice(["pi<li", "pi>li"]), sig_digits=S, store=STORE)
    k, text = r.significant
    assert k >= S and r.sig_target_met
    assert Fraction(text.split("e")[0]) * Fraction(10) ** int(text.split("e")[1]) <= r.small_lower
    assert r.rounds[0][0] == 10 and len(r.rounds) <= 4


@pytest.mark.parametrize("bad", [dict(direction="pi=li"), dict(direction=""),
                                 dict(sig_digits=0), dict(sig_digits=MAX_SIG_DIGITS + 1),
                                 dict(sig_digits="ten"), dict(sig_digits=2.5),
                                 dict(sig_digits=True), dict(digits=0), dict(digits=61)])
def test_bad_input(bad):
    kw = {"direction": "pi<li"} | bad
    with pytest.raises(BadInput):
        certify_li_race(**kw)


def test_certified_significant_and_sci():
    assert certified_significant(Fraction("2.6299673276408e-7"), Fraction("2.6299673276430e-7")) \
        == (12, "2.62996732764e-7")
    assert certified_significant(Fraction(1, 10), Fraction(2, 10)) == (0, "")
    assert certified_significant(Fraction(-1), Fraction(1)) == (0, "")
    assert certified_significant(Fraction("9.99e-8"), Fraction("1.01e-7")) == (0, "")
    assert sci(Fraction(1, 3), 3, up=True) == "3.34e-1"
    assert sci(Fraction(1, 3), 3, up=False) == "3.33e-1"


# -- a second, independent way: Gil-Pelaez quadrature in floating point ----------

def _spectrum(height=400.0):
    sp = STORE.get(1, 1, 0, height, 1e-12, 6, 200)
    with workprec(200):
        R = [float(r.mid()) for r in residual_sums([s / 2 for s in sp.power_sums[:6]], sp.zeros.zeros)]
    return sp, R


def _quadrature_density(mu: float, gammas: np.ndarray, R: list, X: float = 60.0) -> float:
    """P(mu + sum 2/|rho| cos > 0) = 1/2 + (1/pi) int_0^X sin(mu t) Phi(t) / t dt (Gil-Pelaez).

    Phi is the product of J_0 over the zeros given (scipy) times the Rayleigh
    expansion of the residual product (Rayleigh sums of J_0 from mpmath's series
    of log J_0); Gauss-Legendre on 30 pieces.  Floating point: agreement to
    about 1e-14 is expected.
    """
    w = 2 / np.hypot(0.5, gammas)
    with mpmath.workdps(30):
        lj = mpmath.taylor(lambda z: mpmath.log(mpmath.besselj(0, mpmath.sqrt(z))) if z else 0, 0, 6)
    sigma = [-k * float(lj[k]) for k in range(1, 7)]
    x, wt = np.polynomial.legendre.leggauss(300)
    total = 0.0
    edges = np.linspace(0.0, X, 31)
    for a, b in zip(edges[:-1], edges[1:]):
        t = (b - a) / 2 * x + (a + b) / 2
        J = j0(np.outer(t, w))
        log_res = -sum(sigma[k] / (k + 1) * (2 * t) ** (2 * k + 2) * R[k] for k in range(len(R)))
        phi = np.prod(J, axis=1) * np.exp(log_res)
        total += np.sum(wt * (b - a) / 2 * np.sin(mu * t) * phi / t)
    return 0.5 + total / np.pi


@pytest.mark.slow
def test_against_independent_quadrature():
    sp, R = _spectrum()
    g = np.array([float(z.mid()) for z in sp.zeros.zeros])
    r = certify_li_race("pi>li", sig_digits=12, store=STORE)
    q = _quadrature_density(-1.0, g, R)
    assert abs(q - float(r.small_lower)) < 5e-14  # 7 significant digits of 2.63e-7
    q2 = 1 - _quadrature_density(1.0, g, R)
    assert abs(q2 - float(r.small_lower)) < 5e-14


@pytest.mark.slow
def test_engine_against_quadrature_random_means():
    """The engine on zeta's race variable with random means mu, against the quadrature."""
    sp, R = _spectrum()
    g = np.array([float(z.mid()) for z in sp.zeros.zeros])
    rng = random.Random()
    with workprec(200):
        weights = tuple(2 / (arb(1) / 4 + z * z).sqrt() for z in sp.zeros.zeros)
        Rb = residual_sums([s / 2 for s in sp.power_sums], sp.zeros.zeros)
        res = (ResidualGroup(arb(2), tuple(Rb), "zeta"),)
    for _ in range(3):
        mu = Fraction(rng.randrange(-150, 151), 100)
        var = BesselVariable(arb(mu.numerator) / mu.denominator, weights, res)
        d = density_enclosure(var, 1e-12, prec=200)
        q = _quadrature_density(float(mu), g, R)
        assert float(d.enclosure.lower) - 1e-13 <= q <= float(d.enclosure.upper) + 1e-13
        assert d.enclosure.width < Fraction(1, 10**12)


def test_notebook_api():
    from certify import li_race

    r = li_race("pi>li", sig_digits=4, store=STORE)
    assert r.small_name == "delta" and r.significant[0] >= 4
    assert Fraction("2.6299e-7") <= r.small_lower <= r.small_upper <= Fraction("2.6300e-7")
