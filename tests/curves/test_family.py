"""Quadratic-twist families: the fast twisted counts, populations, samples, statistics."""

import json
from fractions import Fraction

import pytest

from certify.curves.family import base_change, family_c_source, twist, twist_family, twist_members
from certify.curves.lpoly import l_polynomial
from certify.curves.model import make_curve
from certify.errors import BadInput


@pytest.mark.parametrize("q,A,B,d", [(5, "t", "t^2 + 1", 2), (7, "t", "t^2 + 3", 1), (5, "t^2 + 1", "t^3 + t + 2", 1)])
def test_twisted_counts_match_the_generic_path(q, A, B, d):
    # chi(f(theta)) T_E(theta) against the twisted curve's own point counts
    E = make_curve(q, A, B)
    fs, _ = twist_members(E, d)
    for f in fs[:5]:
        Ef = twist(E, f)
        fast = family_c_source(E, Ef, f)
        L1 = l_polynomial(Ef)
        L2 = l_polynomial(Ef, c_source=fast)
        assert L1.coeffs == L2.coeffs
        for n in range(1, 4):
            assert fast(n) == __import__("certify.curves.traces", fromlist=["x"]).frobenius_sum(Ef, n)


def test_population_is_monic_squarefree_coprime():
    E = make_curve(5, "t", "t^2 + 1")  # discriminant: an irreducible quartic
    for d, expected in [(1, 5), (2, 20), (3, 100)]:
        # square-free monic count q^d - q^(d-1) (d >= 2); coprime to an irreducible quartic: all for d < 4
        fs, pop = twist_members(E, d)
        assert pop == expected == len(fs)


def test_sample_is_seeded_and_of_stated_size():
    E = make_curve(5, "t", "t^2 + 1")
    a, pop = twist_members(E, 3, sample=7, seed=11)
    b, _ = twist_members(E, 3, sample=7, seed=11)
    c, _ = twist_members(E, 3, sample=7, seed=12)
    assert len(a) == 7 and pop == 100
    assert [str(f) for f in a] == [str(f) for f in b] != [str(f) for f in c]


def test_family_statistics_are_consistent():
    R = twist_family(5, "t", "t^2 + 1", 2, target_width=1e-3, c=0.2)
    cert = R.certified
    assert len(R.members) == 20 and len(cert) == 20
    lo = sum((m.density.lower for m in cert), Fraction(0)) / len(cert)
    assert R.mean.lower == lo
    inside = sum(1 for m in cert if m.density.lower >= Fraction(4, 10) and m.density.upper <= Fraction(6, 10))
    assert R.within[0] == Fraction(inside, 20)
    assert sum(R.histogram[1]) == 20
    d = R.to_dict()
    assert len(d["members"]) == 20 and all("density" in m for m in d["members"])
    json.dumps(d, default=str)
    # in this family the mean density falls with the rank (certified intervals of the means)
    by_rank = {}
    for m in cert:
        by_rank.setdefault(m.rank, []).append(m.density)
    assert set(by_rank) == {0, 1, 2}
    lo = {r: sum(e.lower for e in v) / len(v) for r, v in by_rank.items()}
    hi = {r: sum(e.upper for e in v) / len(v) for r, v in by_rank.items()}
    assert lo[0] > 0.5 > hi[1] and lo[1] > hi[2]


def test_family_over_an_extension_field():
    E = make_curve(5, "t", "t^2 + 1")
    E2 = base_change(E, 2)
    assert E2.q == 25
    # over F_25 the inverse roots are squared: L_2(u^2) = L(u) L(-u) (exact identity)
    from flint import fmpz_poly
    L1 = l_polynomial(E)
    P = fmpz_poly(list(L1.coeffs)) * fmpz_poly([c * (-1) ** i for i, c in enumerate(L1.coeffs)])
    L = l_polynomial(E2)
    assert list(L.coeffs) == [int(c) for c in P.coeffs()[::2]]
    R = twist_family(5, "t", "t^2 + 1", 1, n=2, sample=6, seed=1, target_width=1e-3)
    assert len(R.members) == 6 and R.population == 25 - 0


def test_bad_family_input():
    with pytest.raises(BadInput):
        twist_family(5, "t", "t^2 + 1", 0)
    with pytest.raises(BadInput):
        twist_family(5, "t", "t^2 + 1", 2, sample=0)
