"""Exact prime counts by the explicit formula against direct enumeration of irreducibles."""

import pytest

from certify.ffield.characters import CharacterGroup
from certify.ffield.counts import RaceCounter, prime_counts, prime_counts_by_enumeration
from certify.ffield.poly import finite_field, irreducible_count, parse_monic

CASES = [(3, "t^2+1", 7), (2, "t^5", 12), (3, "t^2*(t+1)^2", 6), (9, "t^2+z", 3),
         (4, "t^3+t+z", 4), (5, "t^2", 5), (7, "t^2+t", 4), (8, "t^2+z*t+1", 3)]


@pytest.mark.parametrize("q,mt,N", CASES)
def test_explicit_formula_equals_enumeration(q, mt, N):
    F = finite_field(q)
    G = CharacterGroup(F, parse_monic(mt, F))
    enum = {n: prime_counts_by_enumeration(G, n) for n in range(1, N + 1)}
    for p in range(min(G.order, 5)):
        exact = prime_counts(G, p, N)
        assert all(isinstance(v, int) for v in exact)
        assert exact == [int(enum[n][p]) for n in range(1, N + 1)]
    # every irreducible not dividing m is in exactly one class (Gauss's count)
    bad = {P.degree() for P, _ in G.factors}
    for n in range(1, N + 1):
        n_div = sum(1 for P, _ in G.factors if P.degree() == n)
        assert int(enum[n].sum()) == irreducible_count(q, n) - n_div


def test_weighted_race_counts_are_differences():
    F = finite_field(3)
    G = CharacterGroup(F, parse_monic("t^2+1", F))
    a, b = 1, 3
    diff = [v for _, v in RaceCounter(G, {a: 2, b: -2}).run(8)]
    pa, pb = prime_counts(G, a, 8), prime_counts(G, b, 8)
    assert diff == [2 * (x - y) for x, y in zip(pa, pb)]
