"""Residue races of large moduli: the question from the factorisation of q, and the
jets at s = 1 and central values of real characters by the smoothed sum.

Independent second ways: the class-by-class question (weights listed, every
character of the group tried, the mean from square-root counts), Arb's
Hurwitz-sum jets, mpmath's L-values.
"""

import math
from fractions import Fraction
import random

import mpmath
import pytest
from flint import dirichlet_char

from certify.arith import acb, arb, workprec
from certify.race.question import mean_of, residue_race, residue_structure, spectral_groups
from certify.spectrum.afe import RealJet, SmoothedL
from certify.spectrum.moments import central_value, log_lambda_coefficients


def _same_question(q):
    a = residue_race(q, "classes")
    b = residue_race(q, "structure")
    ga, gb = spectral_groups(a), spectral_groups(b)
    assert mean_of(a) == mean_of(b), q
    assert [(g.characters[0].label, g.primitive_keys, g.parity, g.is_real) for g in ga] == \
        [(g.characters[0].label, g.primitive_keys, g.parity, g.is_real) for g in gb], q
    for x, y in zip(ga, gb):
        assert x.scale.overlaps(y.scale) and y.scale.rad() < 1e-15 and x.scale.rad() < 1e-10
    return a, b


@pytest.mark.parametrize("q", [3, 4, 8, 16, 24, 40, 105, 120, 165, 480, 576, 1155])
def test_structure_gives_the_question_of_the_classes(q):
    """Mean, characters with W != 0 (labels, conductors, primitive labels, parities) and
    |W| agree with the path that lists every class and every character."""
    _same_question(q)


def test_structure_on_random_smooth_moduli():
    rng = random.Random(14)
    primes = [2, 3, 5, 7, 11, 13]
    for _ in range(4):
        q = 1
        while q < 30 or q > 1500:
            q = 1
            for p in primes:
                q *= p ** rng.choice([0, 0, 1, 1, 2])
        _same_question(q)


def test_structure_characters_are_flint_characters():
    """For mod 4849845 the structure's labels are real characters of the stated conductors
    and parities (flint), and the primitive label induces them (value check)."""
    q = 4849845
    st = residue_structure(q)
    assert st.real_count == 128 and len(st.characters) == 127 and st.mean == 128
    assert st.phi == 1658880 and st.residues == 12960
    rng = random.Random(5)
    for chi in rng.sample(st.characters, 12):
        f = dirichlet_char(q, chi.label)
        assert int(f.order()) == 2 and int(f.conductor()) == chi.conductor
        assert int(f.parity()) == chi.parity
        g = dirichlet_char(chi.conductor, chi.primitive_label)
        assert g.is_primitive()
        for _ in range(20):
            a = rng.randrange(1, q)
            if math.gcd(a, q) == 1:
                assert f(a).overlaps(g(a % chi.conductor))


def _random_real_primitive(rng, lo, hi):
    while True:
        d = rng.randrange(lo, hi)
        n = d - 1
        chi = dirichlet_char(d, n)
        if chi.is_primitive() and int(chi.order()) == 2:
            return d, n, int(chi.parity())
        # also even moduli: try the labels of order 2
        for m in (d // 2 - 1, d // 2 + 1, d // 4 - 1, d // 4 + 1):
            if m > 1 and math.gcd(m, d) == 1:
                c = dirichlet_char(d, m)
                if c.is_primitive() and int(c.order()) == 2:
                    return d, m, int(c.parity())


@pytest.mark.parametrize("seed", range(3))
def test_smoothed_jets_agree_with_hurwitz_jets(seed):
    """c_1..c_12 of log Lambda(1 + x): the smoothed sum against Arb's Hurwitz series."""
    rng = random.Random(1400 + seed)
    for _ in range(3):
        d, n, k = _random_real_primitive(rng, 5, 1500)
        a = RealJet(d, n, k).log_lambda_jet(12, 160)
        b = log_lambda_coefficients(d, n, k, 12, 160)
        for j, (x, y) in enumerate(zip(a, b), start=1):
            assert x.real.overlaps(y.real), (d, n, j)
            assert float(x.real.rad()) < 1e-35, (d, n, j)


def test_smoothed_central_values_against_mpmath():
    """L(1/2, chi) of real characters by the smoothed sum with root number 1 (no Gauss
    sum) against mpmath (Hurwitz zeta sums, independent)."""
    for d in (401, 1019, 1753):
        chi = dirichlet_char(d, d - 1)  # the Legendre symbol mod the prime d
        vals = [int(chi(a).real.unique_fmpz()) if a % d else 0 for a in range(d)]
        with mpmath.workdps(25):
            ref = mpmath.dirichlet(mpmath.mpf(1) / 2, vals)
        cv = SmoothedL(d, d - 1, int(chi.parity()), root_number=acb(1)).central_value(80)
        with workprec(120):
            assert cv.real.overlaps(arb(mpmath.nstr(ref, 22)) + arb(0, 1e-20)), d
        assert float(cv.real.rad()) < 1e-15 and abs(cv.imag) < 1e-15


def test_central_value_dispatch_above_the_threshold():
    """Above JET_AFE_MIN_CONDUCTOR central_value takes the smoothed sum; it overlaps Arb's."""
    d = 3001
    cv = central_value(d, d - 1, 80)
    with workprec(80):
        ref = dirichlet_char(d, d - 1).l(acb(1) / 2)
        assert cv.overlaps(ref) and float(cv.real.rad()) < 1e-15


def test_jet_tail_bound_contains_longer_sums():
    """At a lower precision (fewer terms) the jet's balls contain the longer sum's."""
    d, n = 3001, 3000
    k = int(dirichlet_char(d, n).parity())
    short = RealJet(d, n, k).lambda_series(6, 60)
    long = RealJet(d, n, k).lambda_series(6, 160)
    for x, y in zip(short, long):
        assert x.overlaps(y) and y.rad() < x.rad()


def _race_both_ways(q, digits, monkeypatch):
    """The race from the classes with Arb's Hurwitz jets, and from the factorisation with
    the smoothed jets for every conductor (threshold lowered to 5): two independent ways."""
    from certify.races import certify_race
    from certify.spectrum import afe
    from certify.spectrum.spectrum import SpectrumStore

    general = certify_race(residue_race(q, "classes"), digits, store=SpectrumStore())
    monkeypatch.setattr(afe, "JET_AFE_MIN_CONDUCTOR", 5)
    new = certify_race(residue_race(q, "structure"), digits, store=SpectrumStore())
    monkeypatch.undo()
    tau = Fraction(1, 10**digits)
    for r in (general, new):
        assert r.target_met and r.density.width <= tau
    assert general.mean == new.mean
    assert new.density.lower <= general.density.upper and general.density.lower <= new.density.upper
    return general, new


def test_race_from_structure_and_smoothed_jets_matches_general_path(monkeypatch):
    _race_both_ways(105, 5, monkeypatch)


@pytest.mark.slow
def test_race_1155_from_structure_matches_general_path(monkeypatch):
    """3*5*7*11: 15 real characters, conductors up to 1155, width 1e-8."""
    _race_both_ways(1155, 8, monkeypatch)


def test_zero_count_above_the_old_cap_is_established_and_catches_an_empty_list():
    """Above MAX_COUNT_CONDUCTOR the argument-principle count is made by the smoothed sum
    (cost ~ sqrt q): for conductor 4849845 it is established in seconds, and against an
    empty zero list (no sign changes stored) the evidence says GRH is NOT verified."""
    import time

    from certify.certificate.build import _zero_count_evidence
    from certify.certificate.zerocount import MAX_COUNT_CONDUCTOR

    t0 = time.process_time()
    item = _zero_count_evidence({"conductor": 4849845, "label": 4849844, "parity": 0}, [], "1.5")
    assert time.process_time() - t0 < 30
    assert 4849845 > MAX_COUNT_CONDUCTOR
    d = item["data"]
    assert d["established"] and d["height"] == "1.5" and d["sign_changes"] == 0
    assert d["count"] >= 1 and not d["verified"]
    assert "NOT verified" in item["text"] and "not established" not in item["text"]
