"""Traces at every place and L-polynomials: brute force, Hasse, functional equation, degree formula."""

import pytest
from flint import fmpz_mod_poly_ctx, fmpz_poly, fq_default_ctx

from certify.curves.lpoly import exact_multiplicity, l_polynomial, newton_coefficients, power_sums
from certify.curves.model import make_curve
from certify.curves.traces import degree_data, frobenius_sum, hasse_check
from certify.ffield.poly import finite_field, monic_irreducibles

CURVES = [
    (5, "t", "t^2 + 1"),
    (5, "t^2 + 1", "t^3 + t + 2"),
    (7, "t^3 + 2", "t^4 + t + 3"),
    (7, "t^4 + 3", "t^6 + t + 1"),
    (5, "2 + 2*t + 2*t^2 + 4*t^5", "4 + 4*t + t^7 + t^8"),
    (25, "z*t + 1", "t^2 + z"),
    (11, "t^2 + 3", "t^3 + 5*t + 1"),
]


def _residue_trace(E, P):
    """a_v at the place P (q prime) by a plain loop over F_p[t]/P with python-flint."""
    p = E.q
    d = P.degree()
    K = fq_default_ctx(modulus=fmpz_mod_poly_ctx(p)([int(c.to_list()[0]) if c.to_list() else 0
                                                  for c in P.coeffs()]))
    g = K.gen() if d > 1 else K(-int(P.coeffs()[0].to_list()[0] if P.coeffs()[0].to_list() else 0))

    def ev(f):
        s = K(0)
        for c in reversed(f.coeffs()):
            s = s * g + K(int(c.to_list()[0]) if c.to_list() else 0)
        return s

    a, b = ev(E.A), ev(E.B)
    s = 0
    # enumerate F_{p^d} as polynomials in g of degree < d
    import itertools
    for digs in itertools.product(range(p), repeat=d):
        x = K(0)
        for c in reversed(digs):
            x = x * g + K(c)
        v = x**3 + a * x + b
        if v != 0:
            s += 1 if v.is_square() else -1
    return -s


@pytest.mark.parametrize("q,A,B", [c for c in CURVES if c[0] in (5, 7)][:4])
def test_place_traces_by_brute_force(q, A, B):
    # every place of degree <= 2 (and three of degree 3): the vectorised per-degree sums
    # against plain point counts over the residue field
    E = make_curve(q, A, B)
    F = E.field
    bad = {b.place for b in E.bad_places}
    for d in (1, 2, 3):
        Ps = monic_irreducibles(F, d)
        if d == 3:
            Ps = Ps[:3]
        total = 0
        for P in Ps:
            a = _residue_trace(E, P)
            assert a * a <= 4 * q**d  # Hasse at this place
            from certify.ffield.poly import poly_str
            if poly_str(P, F) not in bad:
                total += a
        if d == 1 and "infinity" not in bad:
            # the place at infinity: y^2 = x^3 + a x + b with a, b the coefficients of t^(4k), t^(6k)
            cA, cB = E.A.coeffs(), E.B.coeffs()
            k = E.k_inf
            ai = int(cA[4 * k].to_list()[0]) if 4 * k < len(cA) and cA[4 * k].to_list() else 0
            bi = int(cB[6 * k].to_list()[0]) if 6 * k < len(cB) and cB[6 * k].to_list() else 0
            total += -sum(0 if (x**3 + ai * x + bi) % q == 0 else
                          (1 if pow((x**3 + ai * x + bi) % q, (q - 1) // 2, q) == 1 else -1) for x in range(q))
        if d < 3:
            assert degree_data(E, d).good_place_sum == total


@pytest.mark.parametrize("q,A,B", CURVES)
def test_hasse_bound_at_every_place(q, A, B):
    E = make_curve(q, A, B)
    for n in range(1, 5 if q < 20 else 3):
        assert hasse_check(E, n) > 0


@pytest.mark.parametrize("q,A,B", CURVES)
def test_functional_equation_degree_and_confirmation(q, A, B):
    E = make_curve(q, A, B)
    L = l_polynomial(E, confirm=2 if q < 20 else 1)
    N = L.degree
    assert N == E.conductor_degree - 4
    l = L.coeffs
    for i in range(N // 2 + 1):  # the identity for i and for N - i are the same
        assert l[N - i] == L.sign * q ** (N - 2 * i) * l[i]
    assert len(L.degrees_confirmed) >= 1
    c = power_sums(list(l), max(L.degrees_confirmed))
    for n in range(1, max(L.degrees_confirmed) + 1):
        assert c[n] == frobenius_sum(E, n)
    # inverse roots of modulus q (Arb enclosures)
    assert L.max_modulus_error < 1e-20


@pytest.mark.parametrize("q,A,B", [(5, "t", "t^2 + 1"), (5, "t^2 + 1", "t^3 + t + 2"), (7, "t^2", "t^3 + 1"),
                                   (7, "t", "t^2 + 3")])
def test_degree_formula_from_the_euler_product_alone(q, A, B):
    # without the functional equation: the Euler product truncated beyond deg N - 4 has
    # zero coefficients above deg N - 4 and a non-zero top one (Grothendieck-Ogg-Shafarevich)
    E = make_curve(q, A, B)
    N = E.conductor_degree - 4
    c = [0] + [frobenius_sum(E, n) for n in range(1, N + 3)]
    l = newton_coefficients(c)
    assert l[N] != 0 and l[N + 1] == 0 and l[N + 2] == 0


def test_rank_is_an_exact_factor():
    # L = (1 - 5u)^2 (1 + 5u)^2 for y^2 = x^3 + t x + 2 t^3 + 3 over F_5
    E = make_curve(5, "t", "2*t^3 + 3")
    L = l_polynomial(E)
    assert L.rank == exact_multiplicity(list(L.coeffs), [1, -5])
    P = fmpz_poly(list(L.coeffs))
    for _ in range(L.rank):
        P, r = divmod(P, fmpz_poly([1, -5]))
        assert r == 0
    assert int(P.coeffs()[0]) == 1
    # 1/q is not a root of the quotient
    assert sum(int(a) * 5 ** (P.degree() - i) for i, a in enumerate(P.coeffs())) != 0


def test_prime_power_field():
    E = make_curve(25, "z*t + 1", "t^2 + z")
    L = l_polynomial(E, confirm=1)
    assert L.degree == 2 and L.degrees_confirmed
    # c_1 from a direct sum over F_25 and infinity (plain flint loop)
    F = finite_field(25)
    K = F.ctx
    els = [F.elem(i) for i in range(25)]
    tot = 0
    for th in els:
        a = K.gen() * th + 1
        b = th * th + K.gen()
        s = 0
        for x in els:
            v = x**3 + a * x + b
            if not v.is_zero():
                s += 1 if v.is_square() else -1
        tot += -s
    tot += degree_data(E, 1).trace_inf
    assert L.coeffs[1] == tot
