"""Whole-field tables: arithmetic and exact traces against plain python-flint point counts."""

import numpy as np
import pytest
from flint import fmpz_mod_poly_ctx, fq_default_ctx, nmod

from certify.curves.fieldtable import FieldTable, primitive_modulus
from certify.ffield.poly import finite_field, irreducible_count


def _flint_field(T):
    if T.M == 1:
        return None
    return fq_default_ctx(modulus=fmpz_mod_poly_ctx(T.p)(T.modulus))


def _elem(T, K, code):
    d = [(code // T.p**i) % T.p for i in range(T.M)]
    return K(d) if K is not None else nmod(d[0], T.p)


def _is_sq(K, v, p):
    return v.is_square() if K is not None else pow(int(v), (p - 1) // 2, p) == 1


@pytest.mark.parametrize("p,M", [(5, 1), (7, 1), (5, 2), (7, 2), (5, 3), (11, 1)])
def test_traces_match_plain_point_counts(p, M):
    # independent path: loop over the points with python-flint's own field arithmetic
    T = FieldTable(p, M)
    K = _flint_field(T)
    rng = np.random.default_rng(p * 10 + M)
    a = rng.integers(0, T.Q, 12)
    b = rng.integers(0, T.Q, 12)
    a[:3] = 0
    got = T.traces(a, b)
    xs = [_elem(T, K, c) for c in range(T.Q)]
    for ai, bi, ti in zip(a, b, got):
        A, B = _elem(T, K, int(ai)), _elem(T, K, int(bi))
        s = 0
        for x in xs:
            v = x**3 + A * x + B
            if v != 0:
                s += 1 if _is_sq(K, v, p) else -1
        assert ti == -s


@pytest.mark.parametrize("p,M", [(5, 2), (7, 3), (5, 4)])
def test_arithmetic_matches_flint(p, M):
    T = FieldTable(p, M)
    K = _flint_field(T)
    rng = np.random.default_rng(0)
    x = rng.integers(0, T.Q, 200)
    y = rng.integers(0, T.Q, 200)
    s, m = T.add(x, y), T.mul(x, y)
    for i in range(200):
        ex, ey = _elem(T, K, int(x[i])), _elem(T, K, int(y[i]))
        assert _elem(T, K, int(s[i])) == ex + ey
        assert _elem(T, K, int(m[i])) == ex * ey
    # exp is a bijection onto the non-zero elements (the modulus is primitive)
    assert sorted(T.exp.tolist()) == list(range(1, T.Q))


def test_same_modulus_convention_as_ffield():
    # codes of F_{p^k} in the tables and in certify.ffield.poly must agree
    for q, (p, k) in [(25, (5, 2)), (49, (7, 2)), (125, (5, 3))]:
        assert tuple(primitive_modulus(p, k)) == tuple(finite_field(q).modulus)


@pytest.mark.parametrize("q,n", [(5, 1), (5, 2), (5, 4), (7, 3)])
def test_orbit_count_is_gauss_count(q, n):
    # orbits of Frobenius on F_{q^n} <-> monic irreducibles of degree dividing n (t itself included)
    T = FieldTable(q, n)
    codes, sizes = T.orbit_representatives(q, n)
    expected = sum(irreducible_count(q, d) for d in range(1, n + 1) if n % d == 0)
    assert len(codes) == expected
    assert int(sizes.sum()) == T.Q
    for d in range(1, n + 1):
        if n % d == 0:
            assert int((sizes == d).sum()) == irreducible_count(q, d)
