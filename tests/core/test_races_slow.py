"""Slow checks of the race engine (run with `pytest -m slow`)."""

from fractions import Fraction

import pytest

from certify.race.question import residue_race, two_way
from certify.races import certify_race

pytestmark = pytest.mark.slow


@pytest.mark.parametrize("q,a,b", [(4, 3, 1), (3, 2, 1)])
def test_thirty_digits(q, a, b):
    r = certify_race(two_way(q, a, b), 30)
    assert r.target_met and r.density.width <= Fraction(1, 10**30)
    # "Chebyshev's bias", Experimental Mathematics 3 (1994): 0.9959 and 0.9990 (as recalled)
    published = {4: Fraction("0.9959"), 3: Fraction("0.9990")}[q]
    assert abs(r.density.mid - published) < Fraction(1, 10**4)
    # the 12-digit run must overlap the 30-digit one
    s = certify_race(two_way(q, a, b), 12)
    assert s.density.lower <= r.density.lower and r.density.upper <= s.density.upper


def test_large_modulus_two_way_race():
    r = certify_race(two_way(97, 5, 1), 8)
    assert r.target_met and r.density.width <= Fraction(1, 10**8)
    # 5 is a non-residue mod 97 and 1 a residue: the bias favours 5, weakly for large q
    assert Fraction(1, 2) < r.density.lower and r.density.upper < Fraction(6, 10)
    rev = certify_race(two_way(97, 1, 5), 8)
    assert rev.density.lower + r.density.lower <= 1 <= rev.density.upper + r.density.upper


def test_residue_race_mod_24_is_extreme():
    # mod 24 every reduced class but 1 is a non-residue: a strong bias, 1 - delta tiny
    r = certify_race(residue_race(24), 10)
    assert r.target_met and r.density.lower > Fraction("0.99")
