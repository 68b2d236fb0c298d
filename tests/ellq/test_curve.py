"""Curves over Q: invariants, Tate's algorithm, minimal models, bad input."""

import random

import pytest

from certify.errors import BadInput
from certify.source.ellcurve import (CM_J, curve_from_ainvs, discriminant, transform)

# a-invariants and conductors from memory (standard examples; not looked up):
# the curves of conductor 11, 37, 389, 5077 of the issue, and the classical
# CM curves y^2 = x^3 - x (32), y^2 = x^3 + 1 (36), y^2 + y = x^3 (27),
# y^2 = x^3 + x (64), y^2 = x^3 - 2 (1728 = 2^6 3^3).
KNOWN = [
    ([0, -1, 1, -10, -20], 11), ([0, 0, 1, -1, 0], 37), ([0, 1, 1, -2, 0], 389),
    ([0, 0, 1, -7, 6], 5077), ([0, 0, 0, -1, 0], 32), ([0, 0, 0, 0, 1], 36),
    ([0, 0, 1, 0, 0], 27), ([0, 0, 0, 1, 0], 64), ([0, 0, 0, 0, -2], 1728),
]


@pytest.mark.parametrize("a,N", KNOWN)
def test_known_conductors(a, N):
    E = curve_from_ainvs(a)
    assert E.conductor == N
    assert E.minimal_discriminant == discriminant(E.minimal)


def test_semistable_examples_local_data():
    # 11a: I5 split at 11 (a_11 = 1), root number +1; 37a: I1 non-split, root number -1
    E = curve_from_ainvs([0, -1, 1, -10, -20])
    ld = E.local_at(11)
    assert (ld.kodaira, ld.reduction, ld.tamagawa, E.root_number_local) == ("I5", "split", 5, 1)
    E = curve_from_ainvs([0, 0, 1, -1, 0])
    assert (E.local_at(37).reduction, E.root_number_local) == ("nonsplit", -1)
    assert curve_from_ainvs([0, 1, 1, -2, 0]).root_number_local == 1
    assert curve_from_ainvs([0, 0, 1, -7, 6]).root_number_local == -1


def test_cm_flag():
    assert curve_from_ainvs([0, 0, 0, -1, 0]).cm_discriminant == -4
    assert curve_from_ainvs([0, 0, 1, 0, 0]).cm_discriminant == -3
    assert curve_from_ainvs([0, -1, 1, -10, -20]).cm_discriminant is None
    assert len(CM_J) == 13


def _random_change(a, rng):
    u = rng.choice([1, 1, 2, 3, 5, 6])
    r, s, t = (rng.randint(-20, 20) for _ in range(3))
    # inverse direction: the curve whose model changes *to* a under (u, r, s, t)
    # is obtained by scaling up: a_i -> u^i a_i after an integral translation
    b = transform(a, r, s, t)
    return tuple(c * u**k for c, k in zip(b, (1, 2, 3, 4, 6)))


@pytest.mark.parametrize("seed", range(6))
def test_invariance_under_changes_of_coordinates(seed):
    """Conductor, minimal discriminant, j and local data do not depend on the model."""
    rng = random.Random(seed)
    while True:
        a = tuple(rng.randint(-30, 30) for _ in range(5))
        if discriminant(a) != 0:
            break
    E = curve_from_ainvs(a)
    F = curve_from_ainvs(_random_change(a, rng))
    assert F.j == E.j and F.conductor == E.conductor
    assert F.minimal_discriminant == E.minimal_discriminant
    assert [(l.p, l.kodaira, l.conductor_exponent, l.tamagawa, l.reduction) for l in F.local] == \
        [(l.p, l.kodaira, l.conductor_exponent, l.tamagawa, l.reduction) for l in E.local]
    for ld in E.local:
        assert 1 <= ld.conductor_exponent <= {2: 8, 3: 5}.get(ld.p, 2)
        assert ld.conductor_exponent <= ld.disc_valuation


@pytest.mark.parametrize("bad", [[0, 0, 0, 0, 0], [0, 0, 0, -3, 2], [1, 2, 3], ["x", 0, 0, 0, 0],
                                 [0.5, 0, 0, 0, 1], [10**45, 0, 0, 0, 1], "1,2", True])
def test_bad_input_one_line(bad):
    with pytest.raises(BadInput) as exc:
        curve_from_ainvs(bad)
    assert "\n" not in str(exc.value)
