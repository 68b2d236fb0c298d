"""Orderings of three or more classes: exact symmetries and consistency with two-way races.

Independent values here are exact identities of the limit law (under LI it depends only
on the means and the moduli |<xi, v_chi>|), the two-way densities of certify.races
(a different engine: the one-dimensional square-wave series), and the identity that the
r! orderings exhaust the probability space.
"""

from fractions import Fraction

import pytest

from certify.cli import main
from certify.errors import BadInput
from certify.orders import certify_chain, certify_order, certify_orderings
from certify.race.order import all_orderings, chains, mean_vector, order_groups, ordering, parse_order
from certify.race.question import quadratic_residues, two_way
from certify.races import certify_race
from certify.source.dirichlet import c_value
from certify.spectrum.spectrum import SpectrumStore

STORE = SpectrumStore()


def _meet(a, b) -> bool:
    return a.lower <= b.upper and b.lower <= a.upper


def test_two_classes_agree_with_the_two_way_race():
    # r = 2 is the one-dimensional case: the orthant engine against the line engine
    for q, a, b in [(5, 2, 1), (8, 3, 1)]:
        mine = certify_order(ordering(q, a, b), 6, store=STORE)
        two = certify_race(two_way(q, a, b), 8, store=STORE)
        assert mine.target_met and mine.density.width <= Fraction(1, 10**6)
        assert _meet(mine.density, two.density)


@pytest.mark.parametrize("digits", [4, pytest.param(7, marks=pytest.mark.slow)])
def test_mod8_orderings_sum_to_one_and_match_marginals(digits):
    fam = certify_orderings(8, (3, 5, 7), digits, store=STORE)
    assert len(fam.results) == 6 and fam.ok
    assert all(r.target_met for r in fam.results)
    names = [c.name for c in fam.checks]
    assert names[0].startswith("sum of the 6 orderings") and len(names) == 4
    # equal c(8,a) = -1 for a = 3, 5, 7: reversal gives equal densities (mu = 0, law symmetric)
    for r in fam.results:
        rev = fam.result(tuple(reversed(r.question.classes)))
        assert _meet(r.density, rev.density)
    d = {r.question.classes: r.density for r in fam.results}
    # not all equal: the race among 3, 5, 7 mod 8 is not symmetric under every permutation
    assert not _meet(d[(3, 5, 7)], d[(5, 3, 7)])


@pytest.mark.parametrize("q, cl, digits", [(7, (1, 3, 5), 4),
                                           pytest.param(13, (1, 2, 5), 6, marks=pytest.mark.slow),
                                           pytest.param(11, (2, 6, 7), 6, marks=pytest.mark.slow)])
def test_multiplying_by_a_square_changes_nothing(q, cl, digits):
    # the squares mod q keep c(q, a); multiplying every class by a square s multiplies
    # each v_chi by conj chi(s), a unit: the law is the same
    a, ar = certify_chain(ordering(q, *cl), digits, store=STORE)
    squares = [s for s in quadratic_residues(q) if s != 1]
    for s in (squares if digits > 4 else squares[:1]):
        moved = tuple(s * c % q for c in cl)
        b, br = certify_chain(ordering(q, *moved), digits, store=STORE)
        assert _meet(a.density, b.density) and _meet(ar.density, br.density)
        assert a.density.width < Fraction(1, 10**digits)
    # inversion a -> a^-1 conjugates every chi(a): also the same law
    inv = tuple(pow(c, -1, q) for c in cl)
    b, _ = certify_chain(ordering(q, *inv), digits, store=STORE)
    assert _meet(a.density, b.density)


def test_reversal_with_unequal_means_is_not_a_symmetry():
    # mod 8, class 1 is a square (c = 3): delta(8;1,3,5) is tiny, its reverse near 1/2
    a, ar = certify_chain(ordering(8, 1, 3, 5), 5, store=STORE)
    assert a.density.upper < Fraction(1, 1000) and ar.density.lower > Fraction(2, 5)
    assert mean_vector(a.question) == (Fraction(c_value(8, 3) - c_value(8, 1)), Fraction(0))


def test_questions_and_bad_input():
    assert len(all_orderings(8, (3, 5, 7))) == 6 and len(chains(8, (3, 5, 7))) == 3
    assert len(chains(5, (1, 2, 3, 4))) == 12
    assert parse_order("delta(8;3,5,7)") == ordering(8, 3, 5, 7)
    assert ordering(8, 11, 5, 7).classes == (3, 5, 7)
    for bad in [(8, 3, 3, 5), (8, 2, 3, 5), (8, 3), (2, 1, 1, 1)]:
        with pytest.raises(BadInput):
            ordering(*bad)
    # a character constant on the classes drops out exactly: mod 8 with classes 3, 5, 7 all
    # three non-principal characters separate them
    assert len(order_groups(ordering(8, 3, 5, 7))) == 3
    assert len(order_groups(ordering(5, 1, 4, 2))) == 2


def test_cli_order(tmp_path, capsys):
    out = tmp_path / "o.json"
    assert main(["order", "8", "3", "5", "7", "--digits", "4", "--json", str(out)]) == 0
    import json

    data = json.loads(out.read_text())
    assert data["kind"] == "order-race" and data["question"]["label"] == "delta(8;3,5,7)"
    assert [h["name"] for h in data["hypotheses"]] == ["GRH", "LI"]
    assert [e["name"] for e in data["error_budget"]][:2] == ["aliasing", "frequency truncation"]
    lo = Fraction(data["answer"]["enclosure"]["lower"])
    hi = Fraction(data["answer"]["enclosure"]["upper"])
    assert hi - lo <= Fraction(1, 10**4)
    from certify.certificate.model import read_document

    read_document(str(out))  # validates against the schema
    assert "Conditional result" in capsys.readouterr().out
    for argv in (["order", "8", "3", "3", "5"], ["order", "8", "2", "3", "5"], ["order", "x", "1", "3", "5"],
                 ["order", "8", "3", "5"]):
        assert main(argv) == 2


@pytest.mark.slow
def test_four_classes_mod5_all_orderings():
    # d = 3: every ordering of 1, 2, 3, 4 mod 5; sum to 1, marginals against two-way races,
    # and the exact symmetries (multiply by the square 4; invert) between orderings
    fam = certify_orderings(5, (1, 2, 3, 4), 3, store=STORE)
    assert len(fam.results) == 24 and fam.ok
    assert all(r.density.width <= Fraction(1, 1000) for r in fam.results)
    for r in fam.results:
        cl = r.question.classes
        for image in (tuple(4 * c % 5 for c in cl), tuple(pow(c, -1, 5) for c in cl)):
            assert _meet(r.density, fam.result(image).density)
