"""Characters of (F_q[t]/m)^x and L-polynomials: structure, orthogonality, Weil's bound."""

import numpy as np
import pytest

from certify.ffield.characters import CharacterGroup, smith_normal_form
from certify.ffield.lpoly import expected_shape, l_polynomial, weil_check
from certify.ffield.poly import finite_field, parse_monic, poly_from_index

CASES = [(3, "t^2+1"), (2, "t^5"), (3, "t^2*(t+1)^2"), (9, "t^2+z"), (5, "t^3+t+1"),
         (2, "t^3*(t^2+t+1)"), (4, "(t+z)^3*t"), (7, "t^2"), (8, "t^2+t")]


@pytest.mark.parametrize("q,mt", CASES)
def test_logs_are_a_homomorphism_and_bijective(q, mt):
    F = finite_field(q)
    G = CharacterGroup(F, parse_monic(mt, F))
    d = np.array(G.invariants)
    assert int(np.prod(d)) == G.order == int(G.is_unit.sum())
    Y = G.logs(G.elements)
    keys = set(map(tuple, Y.tolist()))
    assert len(keys) == G.order  # the log map is injective on units
    rng = np.random.default_rng(7)
    units = np.nonzero(G.is_unit)[0]
    for _ in range(40):
        a, b = rng.choice(units, 2)
        ab = G._index(poly_from_index(a, F) * poly_from_index(b, F))
        la, lb, lab = G.logs([a, b, ab])
        assert np.all((la + lb - lab) % d == 0)
    for i in range(len(d)):
        assert G.log(G.basis_element(i)) == tuple(int(j == i) for j in range(len(d)))


@pytest.mark.parametrize("q,mt", CASES[:6])
def test_orthogonality_exact(q, mt):
    # sum over units of chi(a) = 0 unless chi trivial: exponents equidistribute over the order
    F = finite_field(q)
    G = CharacterGroup(F, parse_monic(mt, F))
    for chi in G.characters():
        ex = chi.position_exponents
        counts = np.bincount(ex, minlength=chi.order)
        if chi.is_trivial():
            assert counts[0] == G.order
        else:
            assert np.all(counts == G.order // chi.order)


def test_parity_and_conductor_small_cases():
    F = finite_field(3)
    G = CharacterGroup(F, parse_monic("t^2*(t+1)^2", F))
    n_even = sum(chi.is_even for chi in G.characters())
    # even characters are those of G / F_3^x: |G| / (q - 1)
    assert n_even == G.order // 2
    # characters of conductor dividing t: characters of (F_3[t]/t)^x, 2 of them
    t = parse_monic("t", F)
    assert sum(1 for chi in G.characters() if t % chi.conductor == 0 or chi.conductor.degree() == 0) >= 2
    prim = sum(chi.is_primitive for chi in G.characters())
    # primitive characters mod P^2 over F_3 with deg P = 1: phi(P^2) - phi(P) = 6 - 2 = 4 each
    assert prim == 4 * 4


def test_smith_normal_form():
    U, D, V = smith_normal_form([[2, 4, 4], [-6, 6, 12], [10, -4, -16]])
    assert [D[i][i] for i in range(3)] == [2, 6, 12]


@pytest.mark.parametrize("q,mt", CASES)
def test_weil_bound_and_degree(q, mt):
    # Weil: |alpha| in {1, sqrt q}; degree deg f - 1 + sum_{P | m, P not | f} deg P
    F = finite_field(q)
    G = CharacterGroup(F, parse_monic(mt, F))
    for chi in G.characters():
        if chi.is_trivial():
            continue
        L = l_polynomial(chi)
        rep = weil_check(L)
        assert rep.ok, (chi.describe(), rep.describe())
        with_roots = L.inverse_roots()
        assert len(with_roots) == L.degree == expected_shape(chi)[0]


def test_l_polynomial_product_of_roots():
    # L(u) = prod (1 - alpha u): the constant term of u^D L(1/u) is (-1)^D prod alpha
    F = finite_field(5)
    G = CharacterGroup(F, parse_monic("t^3+t+1", F))
    chi = G.character([1])
    L = l_polynomial(chi)
    roots = L.inverse_roots(200)
    prod = roots[0]
    for r in roots[1:]:
        prod *= r
    top = L.ring.to_acb(L.coeffs[-1], 200)
    assert ((-1) ** L.degree * prod - top).contains(0)
    assert abs(float(abs(prod)) - 5 ** (L.degree / 2)) < 1e-9


@pytest.mark.parametrize("q,mt", [(3, "t^2*(t+1)^2"), (4, "(t+z)^3*t"), (5, "t^3*(t+1)"), (2, "t^4*(t^2+t+1)"),
                                  (9, "t^2+t")])
def test_vectorised_table_matches_each_character(q, mt):
    from certify.ffield.characters import character_table, galois_orbit_representatives
    F = finite_field(q)
    G = CharacterGroup(F, parse_monic(mt, F))
    T = character_table(G)
    for i, chi in enumerate(G.characters()):
        assert chi.order == T.orders[i]
        assert chi.is_even == bool(T.even[i])
        assert chi.conductor_exponents == tuple(int(v) for v in T.conductor_exponents[i])
    orbits = galois_orbit_representatives(G, T.labels)
    # orbits partition the characters; an orbit of chi has phi(order chi) members
    from sympy import totient
    assert sum(int(totient(int(T.orders[i]))) for i, _ in orbits) == G.order


@pytest.mark.parametrize("q,mt", [(3, "t^2*(t+1)^2"), (9, "t^2+t"), (2, "t^3*(t^2+t+1)"),
                                  (4, "(t+z)^3*t"), (5, "t^3*(t+1)"), (7, "t^2")])
def test_primitive_reduction_and_induced_identity(q, mt):
    # L(u, chi) = L(u, chi*) prod_{P | m, P not | f} (1 - chi*(P) u^deg P), exactly in Z[zeta_o]
    from certify.ffield.lpoly import induced_identity_check
    F = finite_field(q)
    G = CharacterGroup(F, parse_monic(mt, F))
    for chi in G.characters():
        if chi.is_trivial():
            continue
        star = chi.primitive_reduction()
        assert star.is_primitive and star.order == chi.order
        assert star.group.m == chi.conductor
        assert induced_identity_check(chi)
