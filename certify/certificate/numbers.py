"""Decimal and scientific-notation strings rounded outward, from exact rationals."""

from __future__ import annotations

from fractions import Fraction

from ..arith import arb, upper_fraction


def _floor_log10(v: Fraction) -> int:
    """floor(log10 v) for v > 0, exactly."""
    e = len(str(v.numerator)) - len(str(v.denominator))
    while Fraction(10) ** e > v:
        e -= 1
    while Fraction(10) ** (e + 1) <= v:
        e += 1
    return e


def sci(v: Fraction, sig: int = 4, up: bool = True) -> str:
    """``v`` in scientific notation with ``sig`` significant digits, rounded up or down.

    ``sci(Fraction(1, 3), 3, up=True) == "3.34e-1"``; rounding is toward
    +infinity when ``up`` and toward -infinity otherwise, also for negatives.
    """
    v = Fraction(v)
    if v == 0:
        return "0"
    neg = v < 0
    a = -v if neg else v
    e = _floor_log10(a)
    scale = Fraction(10) ** (sig - 1 - e)
    n = a * scale
    # magnitude rounding: away from zero when the signed direction asks for it
    away = up != neg
    k = -((-n.numerator) // n.denominator) if away else n.numerator // n.denominator
    if k >= 10**sig:  # 9.999 -> 10.00: renormalise
        k //= 10
        e += 1
        if away and Fraction(k) * Fraction(10) ** (e - sig + 1) < a:
            k += 1
    digits = str(k)
    body = digits[0] + ("." + digits[1:] if len(digits) > 1 else "")
    return f"{'-' if neg else ''}{body}e{e}"


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
