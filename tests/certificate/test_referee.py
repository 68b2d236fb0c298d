"""The referee check: verdicts, refinement, claims files."""

from fractions import Fraction

import pytest

from certify.certificate.referee import (CONSISTENT, REFUTED, UNDECIDED, parse_claim_line,
                                         parse_race, parse_value, read_claims, referee)
from certify.errors import BadInput
from certify.race.question import two_way
from certify.races import certify_race


def test_published_value_consistent_and_neighbour_refuted():
    # "Chebyshev's bias", Experimental Mathematics 3 (1994): delta(4;3,1) = 0.9959
    v = referee(parse_claim_line("delta(4;3,1) = 0.9959"))
    assert v.verdict == CONSISTENT
    assert Fraction("0.99585") <= v.lower and v.upper <= Fraction("0.99595")
    w = referee(parse_claim_line("delta(4;3,1) = 0.9961"))
    assert w.verdict == REFUTED
    # excluded by the enclosure, and by how much: the claim allows nothing below 0.99605
    assert w.upper < Fraction("0.99605")
    assert w.margin == Fraction("0.99605") - w.upper
    assert Fraction("1.1e-4") < w.margin < Fraction("1.3e-4")
    assert "REFUTED" in w.summary() and "by 1.2" in w.summary()


def test_claim_beyond_default_precision_is_decided_after_refinement():
    # an independent 20-digit enclosure gives the true 14-place rounding
    r = certify_race(two_way(4, 3, 1), 20)
    lo, hi = r.density.lower, r.density.upper
    rounded = round(lo * 10**14)
    assert rounded == round(hi * 10**14)  # the 20-digit enclosure settles the 14th place
    text = f"0.{rounded:014d}"
    v = referee(parse_claim_line(f"delta(4;3,1) = {text}"))
    assert v.verdict == CONSISTENT
    assert v.digits_tried[0] < 14 < v.digits_tried[-1] and len(v.digits_tried) >= 2
    wrong = f"0.{rounded + 1:014d}"
    w = referee(parse_claim_line(f"delta(4;3,1) = {wrong}"))
    assert w.verdict == REFUTED and len(w.digits_tried) >= 2


def test_undecided_at_the_limit():
    v = referee(parse_claim_line("delta(4;3,1) = 0.99592792327922"), start_digits=5, max_digits=8)
    assert v.verdict == UNDECIDED
    assert v.digits_tried[-1] == 8 and "limit" in v.reason


@pytest.mark.parametrize("text,lo,hi", [
    ("0.9959", "0.99585", "0.99595"),
    ("0.9959...", "0.9959", "0.9960"),
    ("[0.99, 0.999]", "0.99", "0.999"),
    ("1", "0.5", "1.5"),
])
def test_claim_values(text, lo, hi):
    a, b, _, _ = parse_value(text)
    assert (a, b) == (Fraction(lo), Fraction(hi))


@pytest.mark.parametrize("text", ["0.99.5", "[0.9, 0.8]", "abc", "", "0.9959 +- 1"])
def test_bad_claim_values(text):
    with pytest.raises(BadInput):
        parse_value(text)


def test_races_in_claims():
    assert parse_race("delta(4;3,1)").label == "delta(4;3,1)"
    assert parse_race(" delta( 8 ; N , R ) ").kind == "residues"
    assert parse_race("weighted(5; 1:1, 4:1, 2:-1, 3:-1)").kind == "weighted"
    for bad in ("delta(4;2,1)", "delta(4;3)", "race(4;3,1)", "weighted(5; 1:1, 2:1)"):
        with pytest.raises(BadInput):
            parse_race(bad)


def test_claims_file_errors_name_file_and_line(tmp_path):
    p = tmp_path / "paper.claims"
    p.write_text("# header\n\ndelta(4;3,1) = 0.9959  # fine\ndelta(4;2,1) = 0.5\n"
                 "delta(3;2,1) 0.999\ndelta(3;2,1) = zero\n")
    claims, errors = read_claims(str(p))
    assert len(claims) == 1 and claims[0].note == "fine"
    assert [e.split(": ", 1)[0] for e in errors] == [f"{p}:4", f"{p}:5", f"{p}:6"]
    assert all("\n" not in e for e in errors)
