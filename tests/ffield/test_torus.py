"""Exact root identities, relation confirmation and the orbit-closure density."""

from fractions import Fraction

import numpy as np
from flint import acb

from certify.arith import arb, workprec
from certify.ffield.characters import CharacterGroup
from certify.ffield.lpoly import LPolynomial, l_polynomial, weil_check
from certify.ffield.poly import finite_field, parse_monic
from certify.ffield.race import parse_race, race_spectrum
from certify.ffield.torus import (
    REFUTED, TrigFunction, confirm_relation, density_on_closure, orbit_closure,
)


def _points(q, m, a, b):
    qn, G, wd = parse_race(q, m, [a, b])
    pts, c2, _ = race_spectrum(G, wd, 160)
    return [p for p in pts if p.kind == "complex"]


def test_true_relation_confirmed_false_one_rejected():
    pts = _points(3, "t^2+1", "t+1", "1")
    roots = [p.root for p in pts]
    # theta_1 + theta_2 = pi: gamma = -1, so k_0 is odd
    assert confirm_relation(roots, [1, 1, 1], 3) == 1
    # theta_1 - theta_2 is not a rational multiple of pi: proved false exactly
    assert confirm_relation(roots, [0, 1, -1], 3) == REFUTED
    assert confirm_relation(roots, [0, 2, 1], 3) == REFUTED
    # a precision budget too small for the separation bound: undecided, never assumed
    assert confirm_relation(roots, [0, 5, 5], 3, max_bits=0, max_resultant_degree=0) is None
    # beyond the bits budget, the minimal polynomial of beta decides (exactly) instead
    assert confirm_relation(roots, [0, 5, 5], 3, max_bits=0) == 1
    assert confirm_relation(roots, [0, 1, -1], 3, max_bits=0) == REFUTED
    assert confirm_relation(roots, [0, 5, 5], 3) == 1


def test_weil_check_detects_a_perturbed_polynomial():
    F = finite_field(5)
    G = CharacterGroup(F, parse_monic("t^3+t+1", F))
    L = l_polynomial(G.character([1]))
    assert weil_check(L).ok
    bad = L.counts.copy()
    bad[1, 0] += 1  # one more monic polynomial of degree 1 with chi = 1
    assert not weil_check(LPolynomial(L.chi, L.ring, bad)).ok


def test_density_on_circle_closed_form():
    # G(x) = c + cos(2 pi x_1) on the closure {0, 1/2} x T: measure of {G > 0} is
    # arccos(-c)/pi for |c| < 1 (independent closed form, evaluated with mpmath)
    import mpmath
    c = Fraction(3, 10)
    with workprec(96):
        Gf = TrigFunction(arb(3) / 10, ((0, acb(0)), (1, acb(1))))
    H = orbit_closure([[2, 0]], 2)
    lo, hi, und, boxes = density_on_closure(Gf, H, 1e-9)
    exact = Fraction(mpmath.nstr(mpmath.acos(-mpmath.mpf(0.3)) / mpmath.pi, 30))
    assert lo <= exact + Fraction(1, 10**25) and exact - Fraction(1, 10**25) <= hi
    assert hi - lo <= Fraction(1, 10**9)


def test_finite_closure_counts_points():
    # x_1 = 1/12 exactly: the closure of X (1/2, 1/12) has 12 points; G = cos(2 pi x_1) - 0.1
    H = orbit_closure([[2, 0], [1, -6]], 2)
    assert H.dim == 0 and H.n_components == 12
    with workprec(96):
        Gf = TrigFunction(arb(-1) / 10, ((0, acb(0)), (1, acb(1))))
    lo, hi, und, _ = density_on_closure(Gf, H, 1e-9)
    pts = sorted({(Fraction(X, 12) % 1) for X in range(12)})
    expect = Fraction(sum(1 for x in pts if np.cos(2 * np.pi * float(x)) > 0.1), 12)
    assert lo == hi == expect
