"""Zeros of analytic L-functions on the critical line (one code path for all).

Written against :class:`certify.spectrum.lfunction.AnalyticL` (primitive
Dirichlet L-functions, zeta, L(E, s), ...).  Ordinates are isolated by sign
changes of the Hardy Z-function, e.g.
Z(t, chi) = e^{i theta(t)} L(1/2 + i t, chi), which is real for real t; a
certified sign change between two points proves a zero of odd order on the
critical line between them.  Signs are read from Arb balls only: a sign is
used when the ball excludes zero.  Floating-point secant steps only *locate*;
each zero is then certified by two Arb evaluations of opposite sign at the
ends of its enclosure.

Completeness is not proved here: a zero missed below the isolation height
shows up in the residual power sums (certify.spectrum.spectrum).
"""

from __future__ import annotations

import math
from fractions import Fraction
from dataclasses import dataclass, field

from ..arith import arb, workprec
from ..errors import PrecisionExhausted
from .lfunction import mean_spacing_of


def _dyadic(x: float) -> arb:
    return arb(x)  # a Python float is an exact dyadic rational


@dataclass
class ZCounter:
    """Counts Z evaluations (for benchmarks and certificates)."""

    calls: int = 0


class HardyZ:
    """Rigorous Z(t) of an analytic L-function, with sign decisions.

    ``HardyZ(conductor, label)`` is the primitive Dirichlet L(s, chi_{conductor,label})
    (zeta for conductor 1); ``HardyZ.of(L)`` wraps any :class:`certify.spectrum.lfunction.AnalyticL`.
    """

    def __init__(self, conductor, label: int | None = None):
        if label is None:
            self.lfun = conductor
        else:
            from .moments import analytic_l

            self.lfun = analytic_l(conductor, label)
        self.conductor = self.lfun.conductor
        self.label = getattr(self.lfun, "label", 0)
        self.counter = ZCounter()

    @classmethod
    def of(cls, lfun) -> "HardyZ":
        return cls(lfun)

    def value(self, t: arb, prec: int) -> arb:
        self.counter.calls += 1
        return self.lfun.hardy_z(t, prec)

    def spacing(self, t: float) -> float:
        return self.lfun.mean_spacing(t)

    def prec_for(self, width: float, t: float) -> int:
        return max(64, int(-math.log2(width)) + 24 + int(math.log2(self.lfun.prec_scale(t))))

    def sign(self, t: arb, prec: int, max_prec: int | None = None) -> tuple[int, arb, int]:
        """(sign, value, prec used) of Z(t); sign 0 if undecided up to ``max_prec``.

        Precision doubles from ``prec`` up to ``max_prec`` (default ``2 * prec``).
        """
        max_prec = max_prec or 2 * prec
        p = prec
        while True:
            z = self.value(t, p)
            if z > 0:
                return 1, z, p
            if z < 0:
                return -1, z, p
            if p >= max_prec:
                return 0, z, p
            p = min(2 * p, max_prec)


def mean_spacing(conductor: int, t: float) -> float:
    """2 pi / log(q t / 2 pi): mean gap between ordinates near height t (>= one unit)."""
    return mean_spacing_of(conductor, 1, t)


def locate(z: HardyZ, t_from: float, t_to: float, fraction: float = 0.25,
           prec: int = 64) -> list[tuple[float, float, int]]:
    """Brackets (a, b, sign of Z(a)) with a certified sign change in [t_from, t_to].

    The grid step is ``fraction`` times the mean spacing.  Points where the
    sign is undecided (a zero within rounding) are nudged.
    """
    brackets = []
    t = t_from
    s_prev = 0
    while s_prev == 0:
        s_prev, _, _ = z.sign(_dyadic(t), prec)
        if s_prev == 0:
            t += 1e-6 * z.spacing(t)
    a = t
    while a < t_to:
        b = min(a + fraction * z.spacing(a), t_to)
        if b <= a:
            break
        s, _, _ = z.sign(_dyadic(b), prec)
        while s == 0:
            b += 1e-6 * (b - a)
            s, _, _ = z.sign(_dyadic(b), prec)
        if s != s_prev:
            brackets.append((a, b, s_prev))
        a, s_prev = b, s
    return brackets


def _prec_for(width: float, t: float, conductor: int) -> int:
    return max(64, int(-math.log2(width)) + 24 + int(math.log2(2 + conductor * (t + 2))))


def _refine_bracketed(z: HardyZ, a: float, b: float, sa: int, width: float) -> arb:
    """A ball of radius <= width/2 holding a zero of Z in [a, b] (sign change certified).

    Illinois-modified regula falsi on an exact dyadic bracket, at a precision
    that rises as the bracket shrinks.  Every bracket end has an Arb-certified
    sign, so the final ball is proven to hold a zero of odd order.
    """
    lo, hi = Fraction(a), Fraction(b)
    s_lo = sa
    target = Fraction(width)
    den = 1 << max(8, int(-math.log2(width)) + 12)
    f_lo = f_hi = None
    side = 0
    for _ in range(1000):
        if hi - lo <= target:
            break
        prec = z.prec_for(float(hi - lo) / 64, float(hi))
        if f_lo is None:
            f_lo = _frac(z.sign(_ball(lo), prec)[1])
        if f_hi is None:
            f_hi = _frac(z.sign(_ball(hi), prec)[1])
        span = hi - lo
        if (f_lo > 0) != (f_hi > 0) and f_lo != f_hi:
            c = lo - f_lo * span / (f_hi - f_lo)
        else:
            c = (lo + hi) / 2
        # aim just past the estimate so the far end moves too, and keep off the ends
        guard = max(span / 256, Fraction(1, den))
        c = min(max(c, lo + guard), hi - guard)
        c = Fraction(round(c * den), den)
        if not (lo < c < hi):
            c = (lo + hi) / 2
        s, v, _ = z.sign(_ball(c), prec)
        if s == 0:
            s, v, _ = z.sign(_ball(c), z.prec_for(float(target) / 16, float(hi)))
        if s == 0:
            # |Z(c)| is within rounding: the zero is within a few ulps; close in.
            d = max(target / 4, Fraction(1, den))
            l2, h2 = max(lo, c - d), min(hi, c + d)
            p2 = max(2 * prec, z.prec_for(float(d) / 16, float(hi)))
            sl = z.sign(_ball(l2), p2)[0] if l2 > lo else s_lo
            sh = z.sign(_ball(h2), p2)[0] if h2 < hi else -s_lo
            if sl == s_lo and sh == -s_lo:
                lo, hi, f_lo, f_hi, side = l2, h2, None, None, 0
                continue
            raise PrecisionExhausted(
                f"not certified: cannot decide the sign of Z near t = {float(c):.15g}")
        if s == s_lo:
            lo, f_lo = c, _frac(v)
            if side == -1:
                f_hi /= 2
            side = -1
        else:
            hi, f_hi = c, _frac(v)
            if side == 1:
                f_lo /= 2
            side = 1
    else:
        raise PrecisionExhausted("not certified: zero refinement did not converge")
    m = (lo + hi) / 2
    r = (hi - lo) / 2
    with workprec(max(64, m.denominator.bit_length() + m.numerator.bit_length() + 8)):
        return _ball(m) + arb(0, _ball(r).upper())


def refine(z: HardyZ, a: float, b: float, sa: int, width: float) -> arb:
    """A ball of radius <= width/2 holding a zero of Z in [a, b] (sign change certified).

    Fast path: secant steps (unbracketed, precision rising with the accuracy
    reached, about 1.6 times more digits per step) *locate* the zero; two Arb
    evaluations of opposite certified sign at the ends of the returned ball,
    inside [a, b], *prove* it.  If the fast path fails to prove, the bracketed
    regula falsi (:func:`_refine_bracketed`) is used.
    """
    lo, hi = Fraction(a), Fraction(b)
    target = Fraction(width)
    den = 1 << max(8, int(-math.log2(width)) + 12)
    try:
        x0, x1 = lo, hi
        p0 = z.prec_for(float(hi - lo) / 64, float(hi))
        f0 = _frac(z.value(_ball(x0), p0))
        f1 = _frac(z.value(_ball(x1), p0))
        step = hi - lo
        for _ in range(60):
            if f1 == f0:
                break
            x2 = x1 - f1 * (x1 - x0) / (f1 - f0)
            x2 = Fraction(round(x2 * den), den)
            if not (lo < x2 < hi):
                break
            step = abs(x2 - x1)
            x0, f0 = x1, f1
            x1 = x2
            if step < target / 8:
                break
            # the next step should be accurate to about step^1.6: evaluate to that precision
            acc = max(float(step) ** 1.6 / 64, float(target) / 64)
            f1 = _frac(z.value(_ball(x1), z.prec_for(acc, float(hi))))
        else:
            raise ArithmeticError
        if step >= target / 8:
            raise ArithmeticError
        half = target / 2
        l2, h2 = x1 - half, x1 + half
        if not (lo <= l2 and h2 <= hi):
            raise ArithmeticError
        p2 = z.prec_for(float(half) / 16, float(hi))
        sl = z.sign(_ball(l2), p2)[0] if l2 > lo else sa
        sh = z.sign(_ball(h2), p2)[0] if h2 < hi else -sa
        if not (sl == sa and sh == -sa):
            raise ArithmeticError
        m, r = (l2 + h2) / 2, (h2 - l2) / 2
        with workprec(max(64, m.denominator.bit_length() + m.numerator.bit_length() + 8)):
            return _ball(m) + arb(0, _ball(r).upper())
    except (ArithmeticError, ZeroDivisionError):
        return _refine_bracketed(z, a, b, sa, width)


def _ball(x: Fraction) -> arb:
    """An exact dyadic rational as an arb (denominators here are powers of two)."""
    with workprec(max(64, x.numerator.bit_length() + x.denominator.bit_length() + 8)):
        return arb(x.numerator) / x.denominator


def _frac(v: arb) -> Fraction:
    mm, e = v.mid().man_exp()
    mm, e = int(mm), int(e)
    return Fraction(mm * 2**e) if e >= 0 else Fraction(mm, 2 ** (-e))


@dataclass
class ZeroList:
    """Certified positive ordinates of one primitive L(s, chi) up to ``height``."""

    conductor: int
    label: int
    height: float
    zeros: list = field(default_factory=list)  # arb balls, increasing
    brackets: list = field(default_factory=list)  # (a, b, sign) floats
    width: float = 1e-10
    z_calls: int = 0
    grid_fraction: float = 0.25


def find_zeros(conductor: int, label: int, height: float, width: float,
               fraction: float = 0.25, start: ZeroList | None = None) -> ZeroList:
    """Isolate and refine the positive ordinates of L(s, chi_{conductor,label}) up to height.

    ``start`` reuses a previous list: its zeros are kept (refined further if
    ``width`` is smaller) and the search continues from its height.
    """
    return find_zeros_of(HardyZ(conductor, label), height, width, fraction, start)


def find_zeros_of(lfun, height: float, width: float, fraction: float = 0.25,
                  start: ZeroList | None = None, t_from: float = 0.0) -> ZeroList:
    """Certified positive ordinates up to ``height`` of any AnalyticL (or a HardyZ of one).

    Every returned ball is a certified sign change of the Hardy Z-function;
    completeness is checked afterwards by the residual sums.  ``t_from`` > 0
    starts the search off t = 0 (where Z vanishes at a central zero).
    """
    zf = lfun if isinstance(lfun, HardyZ) else HardyZ.of(lfun)
    if start is not None and start.grid_fraction <= fraction:
        brackets = list(start.brackets)
        zeros = list(start.zeros)
        t0 = start.height
        if start.width > width:
            zeros = [refine(zf, a, b, s, width) for (a, b, s) in brackets]
    else:
        brackets, zeros, t0 = [], [], float(t_from)
    if height > t0:
        new = locate(zf, t0, height, fraction)
        brackets += new
        zeros += [refine(zf, a, b, s, width) for (a, b, s) in new]
    calls = zf.counter.calls + (start.z_calls if start is not None else 0)
    return ZeroList(zf.conductor, zf.label, max(height, t0), zeros, brackets,
                    min(width, start.width) if start is not None and height <= t0 and start.width <= width else width,
                    calls, fraction)
