"""F_q[t] arithmetic: parsing, indices, factorisation, Gauss's count."""

import pytest

from certify.errors import BadInput
from certify.ffield.poly import (
    factor, finite_field, gauss_count_check, irreducible_count, is_irreducible,
    monic_irreducible_indices, monic_polys, parse_field_order, parse_monic, parse_poly,
    poly_from_index, poly_index, poly_str,
)


@pytest.mark.parametrize("q,nmax", [(2, 10), (3, 7), (4, 5), (5, 5), (7, 4), (8, 4), (9, 4), (25, 3)])
def test_gauss_count_against_enumeration(q, nmax):
    # Gauss's formula (1/n) sum_{d|n} mu(d) q^(n/d) against a sieve of products
    for n, gauss, enum in gauss_count_check(q, nmax):
        assert gauss == enum, (q, n)


@pytest.mark.parametrize("q,n", [(2, 6), (3, 4), (4, 3), (9, 2)])
def test_sieve_agrees_with_flint_irreducibility(q, n):
    F = finite_field(q)
    irr = set(int(i) for i in monic_irreducible_indices(F, n))
    by_flint = {poly_index(f, F) for f in monic_polys(F, n) if is_irreducible(f)}
    assert irr == by_flint and len(irr) == irreducible_count(q, n)


def test_gauss_count_small_values():
    # known by hand: over F_2 there are 1, 2, 3, 6 monic irreducibles of degrees 2..5
    assert [irreducible_count(2, n) for n in range(2, 6)] == [1, 2, 3, 6]
    assert irreducible_count(3, 2) == 3


@pytest.mark.parametrize("q,text", [
    (7, "t^3 + 2*t + 1"), (5, "3t^4 - t + 4"), (2, "t^5+t^2+1"),
    (9, "z*t^2 + (z+1)*t + 2*z"), (8, "(z^2+1) t^3 + z t + 1"), (4, "t^2 + z*t + z^2"),
])
def test_parse_roundtrip(q, text):
    F = finite_field(q)
    f = parse_poly(text, F)
    assert parse_poly(poly_str(f, F), F) == f
    assert poly_from_index(poly_index(f, F), F) == f


def test_parse_values():
    F = finite_field(7)
    f = parse_poly("(t+1)^2 - 9", F)
    assert f == F.pctx([F.ctx(-8 % 7), 2, 1])
    G = finite_field(9)
    z = G.ctx.gen()
    # z satisfies the field modulus, which is primitive: z has order 8
    assert z**8 == G.ctx.one() and z**4 != G.ctx.one()


def test_factor_product():
    F = finite_field(3)
    f = parse_poly("(t^2+1)^2*(t+2)^3*t", F)
    fac = factor(f, F)
    prod = F.one_poly()
    for g, e in fac:
        assert g.is_monic() and is_irreducible(g)
        prod *= g**e
    assert prod == f and sorted(e for _, e in fac) == [1, 2, 3]


@pytest.mark.parametrize("text", ["t^", "t +", "x+1", "t^3 +* 1", "(t+1", "", "t$", "2^t", "t^-1"])
def test_parse_errors_are_one_line(text):
    F = finite_field(7)
    with pytest.raises(BadInput) as e:
        parse_poly(text, F)
    assert "\n" not in str(e.value)


def test_z_only_for_prime_powers():
    with pytest.raises(BadInput):
        parse_poly("t + z", finite_field(5))
    parse_poly("t + z", finite_field(25))


@pytest.mark.parametrize("q", ["6", "1", "0", "-4", "abc", "12", "6^2", "2^"])
def test_bad_field_order(q):
    with pytest.raises(BadInput):
        parse_field_order(q)


@pytest.mark.parametrize("text", ["2*t^2 + 1", "5", "0"])
def test_modulus_must_be_monic_positive_degree(text):
    with pytest.raises(BadInput):
        parse_monic(text, finite_field(3))


def test_field_order_power_notation():
    assert parse_field_order("3^2") == 9 and parse_field_order("2**3") == 8
