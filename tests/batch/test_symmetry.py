"""Exact symmetries of races: orbits, table rows read from the race they equal, and
spot checks that recompute a derived race directly."""

import csv
import os
import random
from fractions import Fraction

import pytest

from certify.batch.plan import races_for, table_equivalences
from certify.batch.run import run_batch
from certify.batch.symmetry import base_modulus, canonical_two_way, distinct_two_way
from certify.race.question import mean_of, spectral_groups, two_way
from certify.races import certify_race
from certify.source.dirichlet import reduced_residues
from certify.spectrum.spectrum import SpectrumStore
from certify.arith import workprec

DIGITS = 6


def _law(q, a, b):
    """(mu, sorted |W| over spectral groups with their primitive keys): what the law depends on."""
    qn = two_way(q, a, b)
    with workprec(80):
        groups = spectral_groups(qn)
        ws = sorted((g.primitive_keys, round(float(g.scale.mid()), 12)) for g in groups)
    return mean_of(qn), ws


@pytest.mark.parametrize("q", [5, 7, 8, 12, 13, 15, 21])
def test_equivalent_pairs_have_the_same_law(q):
    """Every pair's mean and weight multiset equal its representative's (reversed: -mu)."""
    rng = random.Random(q)
    units = reduced_residues(q)
    pairs = [(a, b) for a in units for b in units if a != b]
    for a, b in rng.sample(pairs, min(8, len(pairs))):
        e = canonical_two_way(q, a, b)
        mu, ws = _law(q, a, b)
        mu0, ws0 = _law(e.target_q, e.target_a, e.target_b)
        assert mu == (-mu0 if e.flip else mu0), e
        # primitive keys of a pair {chi, conj chi} may be listed in either order
        norm = lambda w: sorted((tuple(sorted(k)), s) for k, s in w)  # noqa: E731
        assert norm(ws) == norm(ws0), e


def test_orbits_partition_the_pairs():
    for q in (7, 12, 13, 20):
        units = reduced_residues(q)
        reps = distinct_two_way(q)
        n = len(units) * (len(units) - 1)
        # every ordered pair maps to exactly one representative, which maps to itself
        for a0, b0 in reps:
            e = canonical_two_way(q, a0, b0)
            assert (e.target_a, e.target_b, e.flip) == (a0, b0, False)
        assert len({(canonical_two_way(q, a, b).target_a, canonical_two_way(q, a, b).target_b)
                    for a in units for b in units if a != b}) == len(reps) <= n // 2


def test_double_of_odd_modulus_reads_the_half():
    e = canonical_two_way(26, 3, 1)
    assert e.target_q == 13 and base_modulus(26) == 13 and "2*13" in e.reason
    assert base_modulus(12) == 12 and base_modulus(6) == 3


@pytest.mark.slow
def test_batch_with_symmetries_rows_equal_their_sources(tmp_path):
    """A row obtained by symmetry carries exactly the enclosure it names (or 1 minus it);
    spot checks recompute derived rows directly and find intersecting enclosures."""
    moduli = [5, 10]
    out = str(tmp_path / "t")
    s = run_batch(moduli, DIGITS, out, workers=1, cache_path=str(tmp_path / "c.sqlite"),
                  progress=False, symmetries=True)
    assert s["races"] == len(races_for(moduli, symmetries=True)) < len(races_for(moduli))
    with open(os.path.join(out, "table.csv"), encoding="utf-8") as fh:
        rows = list(csv.DictReader(ln for ln in fh if not ln.startswith("#")))
    assert len(rows) == len(table_equivalences(moduli))
    by_race = {r["race"]: r for r in rows}
    derived = [r for r in rows if r["derived"] == "yes" and r["kind"] == "two-way"]
    assert derived and all(r["equals"] and r["relation"] for r in derived)
    for r in derived:
        src = by_race[r["equals"]] if r["equals"] in by_race else None
        if src is None:
            continue
        lo, hi = Fraction(r["lower"]), Fraction(r["upper"])
        slo, shi = Fraction(src["lower"]), Fraction(src["upper"])
        flipped = "reverse race" in r["relation"]
        assert (lo, hi) == ((1 - shi, 1 - slo) if flipped else (slo, shi)), r
    # the 10-rows read mod 5
    assert by_race["delta(10;3,1)"]["equals"].startswith("delta(5;")
    # spot checks: recompute two derived races directly
    rng = random.Random(7)
    for r in rng.sample([r for r in derived if r["q"] != "10"], 2):
        q, a, b = int(r["q"]), int(r["a"]), int(r["b"])
        direct = certify_race(two_way(q, a, b), DIGITS, store=SpectrumStore())
        assert direct.density.lower <= Fraction(r["upper"])
        assert Fraction(r["lower"]) <= direct.density.upper
    # ranking: each law once
    with open(os.path.join(out, "ranking.csv"), encoding="utf-8") as fh:
        rk = list(csv.DictReader(ln for ln in fh if not ln.startswith("#")))
    keys = [(x["result_file"], x["lower"]) for x in rk]
    assert len(keys) == len(set(keys))
