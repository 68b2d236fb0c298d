"""Batch planning (which races, which spectra) and the table formatting rules."""

import math
from fractions import Fraction

import pytest

from certify.batch.plan import parse_moduli, parse_race, races_for, spectrum_requests
from certify.batch.tables import Row, density_text, leader_first, one_minus_text, ranking, sci_parts
from certify.errors import BadInput
from certify.race.question import residue_race, two_way
from certify.batch.plan import first_round_requests
from certify.races import certify_race
from certify.spectrum.spectrum import SpectrumStore


def test_parse_moduli_and_races():
    assert parse_moduli("3-6,9, 11-12") == [3, 4, 5, 6, 9, 11, 12]
    for bad in ["", "2-5", "x", "9-3", "3-a"]:
        with pytest.raises(BadInput):
            parse_moduli(bad)
    assert parse_race("4:3,1").classes == (3, 1)
    assert parse_race("8:N,R").kind == "residues"
    w = parse_race("12:1=1,5=-1/2,7=-1/2")
    assert w.kind == "weighted" and sum(x for _, x in w.weights) == 0
    for bad in ["4", "4:3", "4:3,3", "4:2,1", "x:1,3", "12:1=1,5=1", "4:1=1,1=-1"]:
        with pytest.raises(BadInput):
            parse_race(bad)


def test_races_for_counts_every_pair_once():
    for q in [3, 8, 13, 15]:
        phi = sum(1 for a in range(1, q) if math.gcd(a, q) == 1)
        items = races_for([q])
        assert len(items) == math.comb(phi, 2) + 1
        assert len({it.slug for it in items}) == len(items)
        assert all(it.question.classes[0] < it.question.classes[1]
                   for it in items if it.question.kind == "two-way")
    # a reversed extra race is the same computation as the listed one
    items = races_for([5], extra=[two_way(5, 4, 1), two_way(7, 3, 2)])
    assert len(items) == math.comb(4, 2) + 1 + 1


def test_primitive_spectra_shared_across_multiples():
    """chi mod q* serves every multiple of q*: moduli 5 and 10 need only the characters mod 5."""
    store = SpectrumStore()
    r5 = spectrum_requests(races_for([5]), 6, store)
    r510 = spectrum_requests(races_for([5, 10]), 6, store)
    assert set(r5) == set(r510) == {(5, 2), (5, 3), (5, 4)}
    assert all(r510[k].races > r5[k].races for k in r5)
    r15 = spectrum_requests(races_for([15]), 6, store)
    assert {c for c, _ in r15} == {3, 5, 15}


class _Recorder(SpectrumStore):
    def __init__(self):
        super().__init__()
        self.calls = []

    def get(self, *args):
        self.calls.append(tuple(args[:7]))
        return super().get(*args)


@pytest.mark.parametrize("question", [two_way(7, 3, 1), residue_race(8)])
def test_plan_mirrors_the_drivers_first_round(question):
    """The batch plan asks exactly what the driver's first round will ask for."""
    rec = _Recorder()
    certify_race(question, 6, store=rec)
    asked = [c for c in rec.calls if c[3] > 0]
    planned = first_round_requests(question, 6, SpectrumStore())
    assert planned and asked[:len(planned)] == planned


def _row(lo, hi, met=True, kind="two-way"):
    return Row(7, kind, 1, 2, "delta(7;1,2)", Fraction(lo), Fraction(hi), met, "0", "r.json", "ab")


def test_certified_digits_only():
    assert density_text(Fraction("0.9959279231"), Fraction("0.9959279238"), 8) == "0.995927923"
    # delta = 1/2 exactly (mean 0): no digit is common, the enclosure is shown rounded outward
    t = density_text(Fraction("0.4999999995"), Fraction("0.5000000004"), 8)
    assert t == "[0.49999999, 0.50000001]"


def test_scientific_one_minus_delta():
    r = _row("0.99906319024", "0.9990631928")
    # 1 - delta in [9.368072e-4, 9.3680976e-4]: the common digits are 9.3680 x 10^-4
    assert one_minus_text(r, latex=False) == "9.3680e-4"
    assert one_minus_text(r, latex=True) == r"$9.3680 \times 10^{-4}$"
    assert one_minus_text(_row("0.9", "0.91"), latex=False) == ""
    assert sci_parts(Fraction("0.00099"), Fraction("0.0011")) is None  # straddles 10^-3
    wide = _row("0.9989", "0.99901")  # 1 - delta in [9.9e-4, 1.1e-3]: shown as an interval
    assert one_minus_text(wide, latex=False) == "[0.990, 1.100]e-3"


def test_leader_first_and_ranking():
    rows = [_row("0.2", "0.21"), _row("0.79", "0.8"), _row("0.4999", "0.5001"),
            _row("0.4999", "0.5001")]
    rows[1].derived = True
    rows[3].derived = True
    shown = leader_first(rows)
    assert [(r.lower, r.derived) for r in shown] == [(Fraction("0.79"), True),
                                                     (Fraction("0.4999"), False)]
    top = ranking(rows, 2)
    assert [r.lower for r in top] == [Fraction("0.79"), Fraction("0.4999")]


def test_a_shipped_plan_gives_the_race_it_would_have_planned():
    """A table plans each race once, in the coordinator, and ships the plan (as JSON-able
    data) to the worker.  On random races the shipped plan must give exactly the result
    of a race that plans itself: the same enclosure, ball, variance and parameters."""
    import json
    import random

    from certify.race.question import two_way
    from certify.races import RacePlan, certify_race, plan_race, shipped_plan

    def strip(d):
        d = dict(d)
        d.pop("timings_seconds", None)
        d["provenance"] = {k: v for k, v in d["provenance"].items() if k != "date"}
        return d

    rng = random.Random(3)
    for _ in range(4):
        q = rng.choice([7, 9, 11, 13, 15])
        units = [a for a in range(1, q) if math.gcd(a, q) == 1]
        a, b = rng.sample(units, 2)
        question = two_way(q, a, b)
        wire = json.loads(json.dumps(plan_race(question, 6, SpectrumStore()).to_wire()))
        store = SpectrumStore()
        shipped = certify_race(question, 6, store=store,
                               plan=shipped_plan(question, 6, store, wire))
        itself = certify_race(question, 6, store=SpectrumStore())
        assert strip(shipped.to_dict()) == strip(itself.to_dict())
        assert shipped.density.lower == itself.density.lower
        # a plan made for another race is refused
        other = json.loads(json.dumps(plan_race(two_way(q, b, a), 6, SpectrumStore()).to_wire()))
        if other["mean"] != wire["mean"]:
            with pytest.raises(BadInput):
                shipped_plan(question, 6, SpectrumStore(), other)
    assert isinstance(RacePlan.from_wire(wire, shipped.variance), RacePlan)


def test_ranking_equals_sort_then_first_of_each_law_on_random_rows():
    """ranking() picks one row per law before sorting; on random rows (many sharing a
    result file and enclosure, ties in the lower bound, uncertified rows) it must list
    exactly what sorting every row by (-lower, q, label) and keeping the first row of each
    (file, lower, upper) lists."""
    import random

    rng = random.Random(11)
    for _ in range(30):
        laws = []
        for j in range(rng.randrange(1, 12)):
            lo = Fraction(rng.randrange(1, 50), 50)
            laws.append((f"results/r{j}.json", lo, lo + Fraction(1, 10**rng.randrange(3, 9))))
        rows = []
        for _ in range(rng.randrange(1, 60)):
            src, lo, hi = rng.choice(laws)
            q = rng.randrange(3, 40)
            lab = f"delta({q};{rng.randrange(1, q)},{rng.randrange(1, q)})"
            if rng.random() < 0.1:
                rows.append(Row(q, "two-way", 1, 2, lab, None, None, False, "", src, ""))
            else:
                rows.append(Row(q, "two-way", 1, 2, lab, lo, hi, True, "", src, ""))
        ok = sorted((r for r in rows if r.certified), key=lambda r: (-r.lower, r.q, r.label))
        seen, expected = set(), []
        for r in ok:
            if (r.source, r.lower, r.upper) not in seen:
                seen.add((r.source, r.lower, r.upper))
                expected.append(r)
        top = rng.randrange(1, 15)
        assert ranking(rows, top) == expected[:top]
