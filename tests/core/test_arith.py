from fractions import Fraction

import pytest

from certify.arith import (Verdict, arb, ball_from_strings, ball_strings, certified_digits,
                           decimal_down, decimal_up, less_verdict, sign_verdict, workprec)


def test_outward_rounding_contains_the_ball():
    with workprec(200):
        x = arb(2).sqrt()
        lo, hi = decimal_down(x, 30), decimal_up(x, 30)
        assert Fraction(lo) < Fraction(hi)
        assert arb(lo) <= x.lower() if False else Fraction(lo) <= Fraction(x.lower().mid().str(80, radius=False)) + Fraction(1, 10**70)
    # exact dyadic endpoints: 1/3 at 53 bits rounds outward on both sides
    y = arb(1) / 3
    assert decimal_down(y, 5) == "0.33333" and decimal_up(y, 5) == "0.33334"
    assert decimal_down(-y, 5) == "-0.33334" and decimal_up(-y, 5) == "-0.33333"


def test_ball_strings_round_trip_exactly():
    with workprec(300):
        x = arb.pi() / 7
        mid, rad = ball_strings(x)
        y = ball_from_strings(mid, rad)
        assert y.contains(x)
        assert ball_strings(y)[0] == mid


def test_certified_digits_are_common_to_the_interval():
    assert certified_digits(Fraction("0.99592791"), Fraction("0.99592799")) == "0.9959279"
    assert certified_digits(Fraction("0.4999"), Fraction("0.5001")) == "0"


def test_verdicts_are_three_valued():
    assert sign_verdict(arb(1)) is Verdict.PROVED
    assert sign_verdict(arb(-1)) is Verdict.DISPROVED
    assert sign_verdict(arb(0, 1)) is Verdict.UNDECIDED
    assert less_verdict(arb(1), arb(2)) is Verdict.PROVED
    with pytest.raises(TypeError):
        bool(Verdict.PROVED)
