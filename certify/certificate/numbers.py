"""Decimal and scientific-notation strings rounded outward, from exact rationals."""

from __future__ import annotations

from fractions import Fraction

from ..arith import _floor_log10 as _arith_floor_log10
from ..arith import arb, sci_text, upper_fraction


def _floor_log10(v: Fraction) -> int:
    """floor(log10 v) for v > 0, exactly."""
    return _arith_floor_log10(Fraction(v))


def sci(v: Fraction, sig: int = 4, up: bool = True) -> str:
    """``v`` in scientific notation with ``sig`` significant digits, rounded up or down.

    ``sci(Fraction(1, 3), 3, up=True) == "3.34e-1"``; the one implementation is
    :func:`certify.arith.sci_text` (every printed number goes through arith).
    """
    return sci_text(v, sig, up)


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
    from ..arith import interval_text, places_for_width

    return interval_text(Fraction(lo), Fraction(hi), places_for_width(Fraction(hi) - Fraction(lo), 1))


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
