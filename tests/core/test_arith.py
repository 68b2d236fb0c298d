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


def test_certified_digits_against_string_truncation_on_random_intervals():
    """certified_digits (memoised, one decimal built) against an independent rule: the
    longest prefix common to the two ends' decimal expansions truncated at every length,
    checked on random intervals of many widths and signs."""
    import random
    from decimal import ROUND_FLOOR, Decimal, localcontext

    def truncated(x: Fraction, d: int) -> str:
        with localcontext() as ctx:
            ctx.prec = 200
            v = (Decimal(abs(x.numerator)) / Decimal(x.denominator)).quantize(
                Decimal(1).scaleb(-d), rounding=ROUND_FLOOR)
        # a truncation that is zero carries no sign ("0", "0.00"), as certify prints it
        return ("-" if x < 0 and v != 0 else "") + (f"{v:.{d}f}")

    def reference(lo: Fraction, hi: Fraction) -> str:
        if (lo < 0) != (hi < 0) and lo != 0:
            return ""
        best = ""
        for d in range(0, 61):
            a, b = truncated(lo, d), truncated(hi, d)
            if a != b:
                break
            best = a
        return best

    rng = random.Random(7)
    for _ in range(400):
        lo = Fraction(rng.randrange(-10**12, 10**12), 10**rng.randrange(0, 13))
        width = Fraction(rng.randrange(0, 10**6), 10**rng.randrange(0, 20))
        hi = lo + width
        assert certified_digits(lo, hi) == reference(lo, hi), (lo, hi)
