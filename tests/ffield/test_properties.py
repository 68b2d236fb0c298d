"""Property tests (hypothesis): Weil shape and explicit formula on random small moduli."""

from hypothesis import given, settings, strategies as st

from certify.ffield.characters import CharacterGroup
from certify.ffield.counts import prime_counts, prime_counts_by_enumeration
from certify.ffield.lpoly import l_polynomial, weil_check
from certify.ffield.poly import finite_field, poly_from_index


@st.composite
def modulus(draw):
    q = draw(st.sampled_from([2, 3, 4, 5, 7, 9]))
    M = draw(st.integers(1, 3 if q <= 5 else 2))
    F = finite_field(q)
    low = draw(st.integers(0, q**M - 1))
    return F, poly_from_index(q**M + low, F)  # monic of degree M


@settings(max_examples=12, deadline=None)
@given(modulus())
def test_weil_shape_every_character(Fm):
    F, m = Fm
    G = CharacterGroup(F, m)
    for chi in G.characters():
        if not chi.is_trivial():
            assert weil_check(l_polynomial(chi)).ok


@settings(max_examples=8, deadline=None)
@given(modulus(), st.integers(0, 10**6))
def test_explicit_formula_random_class(Fm, k):
    F, m = Fm
    G = CharacterGroup(F, m)
    p = k % G.order
    N = 4
    assert prime_counts(G, p, N) == [int(prime_counts_by_enumeration(G, n)[p]) for n in range(1, N + 1)]
