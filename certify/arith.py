"""Interval arithmetic and precision: the one module that owns them.

Everything else in certify imports ball types and precision control from here,
never from ``flint.ctx`` directly.  Precision is changed only in scoped blocks
(:func:`workprec`), so a computation cannot leak a changed precision.

Comparisons of balls are three-valued (:class:`Verdict`): a ball comparison
is *proved* only when every point of the balls satisfies it.

Decimal output is rounded *outward*: a lower end is rounded down and an upper
end up, from the exact dyadic endpoints, so a printed interval always contains
the ball it prints.
"""

from __future__ import annotations

import contextlib
import enum
import functools
from fractions import Fraction

import flint
from flint import acb, acb_series, arb, arb_series, ctx, fmpq, fmpz

__all__ = [
    "arb", "acb", "arb_series", "acb_series", "fmpq", "fmpz",
    "workprec", "current_prec", "Verdict", "sign_verdict", "less_verdict",
    "arb_to_fraction", "lower_fraction", "upper_fraction",
    "decimal_down", "decimal_up", "certified_digits", "certified_significant", "ball_strings",
    "ball_from_strings", "flint_version", "hull", "rad_float",
    "sci_text", "sci_up", "sci_down", "bound_text", "interval_text", "sci_interval_text",
    "places_for_width", "fraction_text", "upper_float",
]

flint_version = flint.__version__


def current_prec() -> int:
    """The working precision in bits."""
    return ctx.prec


@contextlib.contextmanager
def workprec(bits: int):
    """Run a block at ``bits`` bits of working precision, restoring it after.

    Also sets the power-series cap high enough for the series certify uses.
    """
    if bits < 2:
        raise ValueError("precision must be at least 2 bits")
    old_prec, old_cap = ctx.prec, ctx.cap
    ctx.prec = int(bits)
    try:
        yield
    finally:
        ctx.prec, ctx.cap = old_prec, old_cap


def at_prec(bits_arg: str = "prec"):
    """Decorator: run the function at the precision given by its keyword ``prec``."""

    def deco(fn):
        @functools.wraps(fn)
        def wrapper(*args, **kwargs):
            with workprec(kwargs[bits_arg]):
                return fn(*args, **kwargs)

        return wrapper

    return deco


@contextlib.contextmanager
def series_cap(length: int):
    """Scoped power-series truncation length."""
    old = ctx.cap
    ctx.cap = int(length)
    try:
        yield
    finally:
        ctx.cap = old


class Verdict(enum.Enum):
    """Three-valued outcome of a ball comparison."""

    PROVED = "proved"
    DISPROVED = "disproved"
    UNDECIDED = "undecided"

    def __bool__(self):  # a verdict must never be used as a bare bool
        raise TypeError("a Verdict is three-valued; compare with Verdict.PROVED")


def sign_verdict(x: arb) -> Verdict:
    """PROVED if x > 0 for every point of the ball, DISPROVED if x <= 0 everywhere."""
    if x > 0:
        return Verdict.PROVED
    if x <= 0:
        return Verdict.DISPROVED
    return Verdict.UNDECIDED


def less_verdict(x: arb, y: arb) -> Verdict:
    """PROVED if x < y everywhere, DISPROVED if x >= y everywhere."""
    if x < y:
        return Verdict.PROVED
    if x >= y:
        return Verdict.DISPROVED
    return Verdict.UNDECIDED


def _exact_to_fraction(x: arb) -> Fraction:
    m, e = x.mid().man_exp()
    m, e = int(m), int(e)
    return Fraction(m * 2**e) if e >= 0 else Fraction(m, 2 ** (-e))


def arb_to_fraction(x: arb) -> Fraction:
    """The midpoint of ``x`` as an exact rational."""
    if not x.is_finite():
        raise ValueError("ball is not finite")
    return _exact_to_fraction(x.mid())


def _radius_fraction(x: arb) -> Fraction:
    return _exact_to_fraction(arb(x.rad()))


def lower_fraction(x: arb) -> Fraction:
    """The exact lower endpoint mid - rad of ``x`` (independent of the working precision)."""
    if not x.is_finite():
        raise ValueError("ball is not finite")
    return _exact_to_fraction(x.mid()) - _radius_fraction(x)


def upper_fraction(x: arb) -> Fraction:
    """The exact upper endpoint mid + rad of ``x`` (independent of the working precision)."""
    if not x.is_finite():
        raise ValueError("ball is not finite")
    return _exact_to_fraction(x.mid()) + _radius_fraction(x)


def _fraction_decimal(v: Fraction, digits: int, up: bool) -> str:
    scale = 10**digits
    n = v * scale
    k = -((-n.numerator) // n.denominator) if up else n.numerator // n.denominator
    sign = "-" if k < 0 else ""
    k = abs(k)
    s = str(k).rjust(digits + 1, "0")
    return f"{sign}{s[:-digits]}.{s[-digits:]}" if digits > 0 else f"{sign}{s}"


def decimal_down(x: arb | Fraction, digits: int) -> str:
    """A decimal string with ``digits`` places that is <= every point of ``x``."""
    v = lower_fraction(x) if isinstance(x, arb) else Fraction(x)
    return _fraction_decimal(v, digits, up=False)


def decimal_up(x: arb | Fraction, digits: int) -> str:
    """A decimal string with ``digits`` places that is >= every point of ``x``."""
    v = upper_fraction(x) if isinstance(x, arb) else Fraction(x)
    return _fraction_decimal(v, digits, up=True)


def certified_digits(lo: Fraction, hi: Fraction, max_digits: int = 60) -> str:
    """The longest decimal ``d`` such that every number of [lo, hi] begins with ``d``.

    Returned as a string such as ``"0.99592"``; a truncated decimal, so each
    printed digit is the same for every point of the interval.  Returns "" if
    not even the integer part is common.
    """
    if lo > hi:
        raise ValueError("empty interval")
    if type(lo) is not Fraction:
        lo = Fraction(lo)
    if type(hi) is not Fraction:
        hi = Fraction(hi)
    return _certified_digits(lo, hi, max_digits)


@functools.lru_cache(maxsize=1 << 16)
def _certified_digits(lo: Fraction, hi: Fraction, max_digits: int) -> str:
    # memoised: a table prints the same enclosure on every row read from one race
    if (lo < 0) != (hi < 0) and lo != 0:
        return ""
    last = None  # (d, floor(|lo| 10^d)) for the longest common truncation so far
    alo, ahi = abs(lo), abs(hi)
    for d in range(0, max_digits + 1):
        scale = 10**d
        a = (alo * scale).__floor__()
        # a truncation boundary inside the interval would change the digit
        if a != (ahi * scale).__floor__():
            break
        last = (d, a)
    if last is None:
        return ""
    d, a = last
    return _fraction_decimal(Fraction(a, 10**d) * (1 if lo >= 0 else -1), d, up=False)


def certified_significant(lo: Fraction, hi: Fraction, max_digits: int = 80) -> tuple[int, str]:
    """(k, text): the k leading significant digits common to every number of [lo, hi].

    For 0 < lo <= hi with the same decimal exponent, ``text`` is those digits
    in scientific notation, truncated (each printed digit is the same for every
    point of the interval), e.g. ``(10, "2.629967327e-7")``.  Returns (0, "")
    if the interval contains 0, is not positive, or spans a power of ten.
    """
    lo, hi = Fraction(lo), Fraction(hi)
    if lo > hi:
        raise ValueError("empty interval")
    if not lo > 0:
        return 0, ""
    e = _floor_log10(lo)
    if _floor_log10(hi) != e:
        return 0, ""
    k = 0
    lead = ""
    for d in range(1, max_digits + 1):
        scale = Fraction(10) ** (d - 1 - e)
        a = (lo * scale).__floor__()
        b = (hi * scale).__floor__()
        if a != b:
            break
        k, lead = d, str(a)
    if not k:
        return 0, ""
    return k, f"{lead[0]}{'.' + lead[1:] if k > 1 else ''}e{e}"


_BALL_STRINGS: dict = {}  # exact (mantissa, exponent) of mid and radius -> strings, per process
_BALL_STRINGS_MAX = 200000


def ball_strings(x: arb) -> tuple[str, str]:
    """Exact decimal strings (midpoint, radius) of a ball; :func:`ball_from_strings` inverts.

    Memoised on the exact dyadic midpoint and radius (a table writes the same zero balls
    into many certificates); the strings are a function of those integers alone."""
    if not x.is_finite():
        raise ValueError("ball is not finite")
    r = arb(x.rad())
    (mm, me), (rm, re_) = x.mid().man_exp(), r.mid().man_exp()
    key = (int(mm), int(me), int(rm), int(re_))
    got = _BALL_STRINGS.get(key)
    if got is None:
        got = (_exact_decimal(arb_to_fraction(x)), _exact_decimal(_exact_to_fraction(r)))
        if len(_BALL_STRINGS) >= _BALL_STRINGS_MAX:
            _BALL_STRINGS.clear()
        _BALL_STRINGS[key] = got
    return got


def _exact_decimal(v: Fraction) -> str:
    """The exact decimal expansion of a dyadic rational."""
    den = v.denominator
    k = 0
    while den % 2 == 0:
        den //= 2
        k += 1
    if den != 1:
        raise ValueError("not a dyadic rational")
    num = abs(v.numerator) * 5**k
    s = str(num).rjust(k + 1, "0")
    body = f"{s[:-k]}.{s[-k:]}" if k else s
    return ("-" if v < 0 else "") + body


def ball_from_strings(mid: str, rad: str) -> arb:
    """Rebuild a ball from exact decimal strings; the result contains the original."""
    fm, fr = Fraction(mid), Fraction(rad)
    bits = max(64, fm.denominator.bit_length() + abs(fm.numerator).bit_length() + 8)
    with workprec(bits):
        m = arb(fmpq(fm.numerator, fm.denominator))
        r = arb(fmpq(fr.numerator, fr.denominator))
        # adding a ball [0 +/- r] keeps the midpoint and covers the radius outward
        return m + arb(0, r.upper()) if fr != 0 else m


def hull(a: arb, b: arb) -> arb:
    """The smallest ball containing both a and b."""
    return a.union(b)


def rad_float(x: arb) -> float:
    """The radius of a ball as a float (upper bound), for reporting only."""
    return float(arb(x.rad()).upper())


# ---------------------------------------------------------------------------
# Printing numbers: the one formatter every command, JSON writer, table and
# renderer uses.  Every function here works on exact rationals (the exact
# dyadic ends of a ball) and rounds *outward*: a lower end down, an upper end
# and an error bound up.  Nothing is ever formatted "to nearest".
# ---------------------------------------------------------------------------


def _end(x, up: bool) -> Fraction:
    """The exact upper (``up``) or lower end of a ball, or a rational/int/float as is."""
    if isinstance(x, arb):
        return upper_fraction(x) if up else lower_fraction(x)
    if isinstance(x, fmpq):
        return Fraction(int(x.p), int(x.q))
    if isinstance(x, float):
        if x != x or x in (float("inf"), float("-inf")):
            raise ValueError(f"not a finite number: {x!r}")
        return Fraction(x)  # exact value of the double
    return Fraction(x)


def _floor_log10(v: Fraction) -> int:
    """floor(log10 v) for v > 0, exactly."""
    e = len(str(v.numerator)) - len(str(v.denominator))
    while Fraction(10) ** e > v:
        e -= 1
    while Fraction(10) ** (e + 1) <= v:
        e += 1
    return e


def sci_text(v, sig: int = 3, up: bool = True) -> str:
    """``v`` in scientific notation with ``sig`` significant digits, rounded up or down.

    Rounding is toward +infinity when ``up`` and toward -infinity otherwise (also
    for negatives), so ``sci_text(v, up=True) >= v`` always.

    Examples
    --------
    >>> sci_text(Fraction(1, 3), 3, up=True)
    '3.34e-1'
    >>> sci_text(Fraction(-1, 3), 3, up=True)
    '-3.33e-1'
    """
    v = Fraction(v)
    if sig < 1:
        raise ValueError("sig must be at least 1")
    if v == 0:
        return "0"
    neg = v < 0
    a = -v if neg else v
    e = _floor_log10(a)
    n = a * Fraction(10) ** (sig - 1 - e)
    away = up != neg  # round the magnitude away from zero when the signed direction asks
    k = -((-n.numerator) // n.denominator) if away else n.numerator // n.denominator
    if k >= 10**sig:  # 9.99.. -> 10.0: one more digit, renormalise (k = 10^sig exactly here)
        k //= 10
        e += 1
    digits = str(k)
    body = digits[0] + ("." + digits[1:] if len(digits) > 1 else "")
    return f"{'-' if neg else ''}{body}e{e}"


def sci_up(x, sig: int = 3) -> str:
    """A number in scientific notation that is >= every point of ``x`` (ball or rational)."""
    return sci_text(_end(x, True), sig, up=True)


def sci_down(x, sig: int = 3) -> str:
    """A number in scientific notation that is <= every point of ``x`` (ball or rational)."""
    return sci_text(_end(x, False), sig, up=False)


def bound_text(x, sig: int = 3) -> str:
    """An error bound as printed everywhere: the upper end of ``x``, rounded up.

    >>> bound_text(Fraction(9368085, 10**10), 3)
    '9.37e-4'
    """
    return sci_up(x, sig)


def upper_float(x) -> float:
    """A float that is >= every point of ``x`` (for reporting and planning only)."""
    import math

    v = _end(x, True)
    f = float(v)
    if Fraction(f) < v:
        f = math.nextafter(f, math.inf)
    return f


def places_for_width(width, extra: int = 2, lo: int = 4, hi: int = 80) -> int:
    """Decimal places that show ``width``: ``extra`` digits past its leading digit (lo..hi)."""
    w = Fraction(width)
    p = lo
    while p < hi and Fraction(1, 10**p) > w / 10**extra:
        p += 1
    return p


def interval_text(lo, hi, places: int | None = None) -> str:
    """``[lo, hi]`` in fixed point, rounded outward (lo down, hi up).

    ``lo`` and ``hi`` may be balls (their lower and upper ends are used),
    rationals or ints; ``places`` defaults to enough to show the width.
    """
    a, b = _end(lo, False), _end(hi, True)
    if a > b:
        raise ValueError("empty interval")
    if places is None:
        places = places_for_width(b - a)
    return f"[{_fraction_decimal(a, places, up=False)}, {_fraction_decimal(b, places, up=True)}]"


def sci_interval_text(lo, hi, sig: int | None = None) -> str:
    """``[lo, hi]`` in scientific notation, each end rounded outward.

    ``sig`` defaults to enough significant digits that the printed ends
    differ by at most a few times the width (at least 3).

    >>> sci_interval_text(Fraction('9.3680846740e-4'), Fraction('9.3680849046e-4'))
    '[9.36808467e-4, 9.36808491e-4]'
    """
    a, b = _end(lo, False), _end(hi, True)
    if a > b:
        raise ValueError("empty interval")
    if sig is None:
        big = max(abs(a), abs(b))
        w = b - a
        if big == 0 or w == 0:
            sig = 3
        else:
            sig = max(3, min(60, _floor_log10(big) - _floor_log10(w) + 2))
    return f"[{sci_text(a, sig, up=False)}, {sci_text(b, sig, up=True)}]"


def fraction_text(v) -> str:
    """An exact rational as ``p/q`` (or ``p``): for values known exactly."""
    v = Fraction(v)
    return str(v.numerator) if v.denominator == 1 else f"{v.numerator}/{v.denominator}"
