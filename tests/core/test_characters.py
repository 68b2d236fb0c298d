import cmath
import math

import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st

from certify.race.question import mean_of, residue_race, two_way, weight_sum_is_zero
from certify.source.dirichlet import c_value, characters, reduced_residues


@settings(max_examples=25, deadline=None)
@given(st.integers(min_value=3, max_value=60))
def test_orthogonality_and_conjugates(q):
    chars = characters(q)
    assert len(chars) == sympy.totient(q)
    res = reduced_residues(q)
    for chi in chars:
        vals = [complex(chi.value(a).mid()) for a in res]
        s = sum(vals)
        assert abs(s - (len(res) if chi.is_principal else 0)) < 1e-9
        conj = next(c for c in chars if c.label == chi.conjugate_label)
        assert all(abs(complex(conj.value(a).mid()) - v.conjugate()) < 1e-12 for a, v in zip(res, vals))
        # parity: chi(-1) = (-1)^parity
        assert abs(complex(chi.value(q - 1).mid()) - (-1) ** chi.parity) < 1e-12
        # the primitive character agrees with chi on classes coprime to q
        prim = next(c for c in characters(chi.conductor) if c.label == chi.primitive_label) \
            if chi.conductor > 2 else None
        if prim is not None:
            assert all(abs(complex(prim.value(a % chi.conductor).mid()) - v) < 1e-12
                       for a, v in zip(res, vals))


@pytest.mark.parametrize("q", [3, 4, 5, 8, 12, 15, 16, 24, 27, 35, 64, 97, 100])
def test_c_counts_square_roots_like_sympy(q):
    for a in reduced_residues(q):
        roots = sympy.sqrt_mod(a, q, all_roots=True) or []
        assert c_value(q, a) == -1 + len(roots)


def test_means_of_classical_races():
    # mu = -sum w_a c(q,a): non-residue 3 against residue 1 mod 4 gives c(4,1) - c(4,3) = 2
    assert mean_of(two_way(4, 3, 1)) == 2
    assert mean_of(two_way(8, 3, 5)) == 0
    assert mean_of(two_way(4, 1, 3)) == -2


def test_vanishing_character_sums_are_exact():
    q = two_way(8, 3, 5)
    # chi_{8,5} takes the same value at 3 and 5? W = chi(3) - chi(5) vanishes iff they agree
    for chi in characters(8):
        w = complex(chi.value(3).mid()) - complex(chi.value(5).mid())
        assert weight_sum_is_zero(q, chi) == (abs(w) < 1e-12)
    r = residue_race(5)
    assert [c.label for c in characters(5) if not weight_sum_is_zero(r, c)] == [4]


@pytest.mark.parametrize("seed", range(3))
def test_unit_generators_generate_and_primitive_labels_agree_everywhere(seed):
    """unit_generators(m) generate (Z/m)^* (closure by brute force), and for random moduli the
    primitive character found from the generators agrees with chi on every class (sympy's
    totient and exact exponents as the independent side)."""
    import random

    from certify.source.dirichlet import unit_generators

    rng = random.Random(seed)
    for m in rng.sample(range(3, 3000), 25):
        seen, frontier = {1}, [1]
        gens = unit_generators(m)
        while frontier:
            x = frontier.pop()
            for g in gens:
                y = x * g % m
                if y not in seen:
                    seen.add(y)
                    frontier.append(y)
        assert len(seen) == sympy.totient(m)
    for q in rng.sample([360, 420, 500, 720, 998, 1000, 1024, 729], 2):
        res = reduced_residues(q)
        for chi in rng.sample(characters(q), 12):
            if chi.conductor <= 2:
                continue
            prim = next(c for c in characters(chi.conductor) if c.label == chi.primitive_label)
            assert all(prim.exponent(a % chi.conductor) * chi.order
                       == chi.exponent(a) * prim.order for a in res)
