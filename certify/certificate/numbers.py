"""Decimal and scientific-notation strings rounded outward, from exact rationals."""

from __future__ import annotations

from fractions import Fraction

from ..arith import arb, sci, upper_fraction

__all__ = ["sci", "sci_bound", "places_for", "interval_str", "exact_decimal"]


def sci_bound(x: arb, sig: int = 3) -> str:
    """An upper bound of the ball ``x`` in scientific notation (rounded up)."""
    return sci(upper_fraction(x), sig, up=True)


def places_for(width: Fraction) -> int:
    """Decimal places p with 10^-p <= width / 1000 (at least 6)."""
    p = 6
    while Fraction(1, 10**p) > width / 1000 and p < 200:
        p += 1
    return p


def interval_str(lo: Fraction, hi: Fraction) -> str:
    """``[lo, hi]`` printed with enough places to show the width, rounded outward."""
    from ..arith import decimal_down, decimal_up

    w = hi - lo
    p = 4
    while p < 80 and Fraction(1, 10**p) > w / 10:
        p += 1
    return f"[{decimal_down(Fraction(lo), p)}, {decimal_up(Fraction(hi), p)}]"


def exact_decimal(v: Fraction) -> str:
    """The exact, finite decimal expansion of a dyadic rational (ValueError otherwise)."""
    v = Fraction(v)
    den, k = v.denominator, 0
    while den % 2 == 0:
        den //= 2
        k += 1
    if den != 1:
        raise ValueError("not a dyadic rational")
    digits = str(abs(v.numerator) * 5**k).rjust(k + 1, "0")
    body = f"{digits[:-k]}.{digits[-k:]}" if k else digits
    return ("-" if v < 0 else "") + body
