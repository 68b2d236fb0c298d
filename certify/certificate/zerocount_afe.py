"""The argument-principle zero count by the smoothed functional equation (cost ~ sqrt q).

The contour and its bookkeeping are those of :mod:`zerocount` (docs/certificates.md):

    N(T) = (1/pi) Delta_C arg Lambda(s),   C : 1/2 -> 2 -> 2 + iT -> 1/2 + iT,

with Lambda(s) = (q/pi)^w Gamma(w) L(s, chi), w = (s + kappa)/2.  Here Lambda itself is
enclosed, not L: each horizontal edge is split into a few parts, and on the disc around
each part's midpoint Lambda is a polynomial plus a proven uniform error
(:meth:`SmoothedL.disc`, docs/method.md section 3e).  The pieces of a part are then
enclosed by evaluating that polynomial on boxes (no further L-function evaluation), and
halved until the enclosure excludes 0, exactly as in :mod:`zerocount`.  So:

* bottom edge (t = 0): the continuous change of arg Lambda, summed over pieces.  For a
  real character Lambda is real on the real axis and positive on (1, 2] (Euler product),
  so only [1/2, 1] is walked (the pieces then prove Lambda != 0 there, i.e. no real zero);
* right edge Re s = 2: Re L > 0 (|L - 1| <= zeta(2) - 1), so the change of arg L is the
  difference of principal arguments, L(2 + iT) = Lambda / ((q/pi)^w Gamma(w)) from the
  top edge's disc; the factor adds Im[w log(q/pi) + log Gamma(w)] between the ends
  (continuous logarithm, Re w > 0);
* top edge: the change of arg Lambda from 2 + iT to 1/2 + iT, summed over pieces.

Any piece that cannot be decided within the budget raises PrecisionExhausted: the caller
retries with more bits and otherwise records the count as not established.
"""

from __future__ import annotations

import math
from fractions import Fraction

from flint import dirichlet_char

from ..arith import acb, arb, workprec
from ..errors import PrecisionExhausted

LEFT = Fraction(1, 2)
RIGHT = Fraction(2)
TOP_PARTS = 1  # parts of the top edge (each its own disc); 1 measured fastest (bench/bench_zerocount_afe.py)


def _q(x: Fraction) -> arb:
    return arb(x.numerator) / x.denominator


def _log_lambda_floor(q: int, k: int, t: float) -> float:
    """log |(q/pi)^w Gamma(w)| at s = 1/2 + it (planning only: the size Lambda has where
    L is of size 1 on the top edge's left end, its smallest region)."""
    w = complex((0.5 + k) / 2, t / 2)
    return w.real * math.log(q / math.pi) + _lgamma_re(w)


def _lgamma_re(w: complex) -> float:
    """Re log Gamma(w), Re w > 0 (Stirling with a shift; planning only)."""
    shift = 0.0
    while w.real < 8:
        shift -= math.log(abs(w))
        w += 1
    z = w
    return (shift + ((z - 0.5) * complex(math.log(abs(z)), math.atan2(z.imag, z.real))).real
            - z.real + 0.5 * math.log(2 * math.pi) + (1 / (12 * z)).real)


def _log_majorant(q: int, a: float) -> float:
    """log of sum_n x_n^-a Gamma(a, x_n) n^k, roughly (planning only)."""
    if a <= 0.5:
        return 0.5 * math.log(q) + 2
    return a * math.log(q / math.pi) + math.lgamma(max(a, 0.5)) + math.log(3.0)


def plan_disc(q: int, k: int, centre_re: float, radius: float, target: float) -> tuple[int, float]:
    """(order K, rho0) with the estimated disc error below e^target (planning only: the
    error actually proven is computed by :meth:`SmoothedL.disc` and checked by the pieces)."""
    a_re = (centre_re + k) / 2
    b_re = (1 - centre_re + k) / 2
    for K in range(6, 200):
        for f in (1.5, 2, 3, 4, 6, 8, 12, 16, 24, 32):
            rho0 = f * radius
            ratio = radius / rho0
            est = (K * math.log(ratio) - math.log(1 - ratio) + math.log(2)
                   + max(_log_majorant(q, a_re + rho0 / 2), _log_majorant(q, b_re + rho0 / 2)))
            if est <= target:
                return K, rho0
    raise PrecisionExhausted("not certified: no disc order reaches the accuracy asked")


class _Part:
    """One part [lo, hi] of a horizontal edge at height t, with its disc polynomial."""

    def __init__(self, sm, lo: Fraction, hi: Fraction, t: Fraction, bits: int, real: bool):
        q, k = sm.q, sm.parity
        self.lo, self.hi, self.t = lo, hi, t
        self.c = (lo + hi) / 2
        radius = (hi - lo) / 2
        floor = _log_lambda_floor(q, k, float(t))
        target = floor - bits * math.log(2)
        K, rho0 = plan_disc(q, k, float(self.c), float(radius), target)
        top = max(_log_majorant(q, (float(self.c) + k) / 2 + rho0 / 2),
                  _log_majorant(q, (1 - float(self.c) + k) / 2 + rho0 / 2))
        self.prec = int((top - target) / math.log(2)) + 40
        with workprec(self.prec):
            # rho0 is any number above the radius (a binary float, exact as an arb)
            self.coeffs, self.E = sm.disc(acb(_q(self.c), _q(t)), _q(radius), K, arb(rho0),
                                          self.prec, -target / math.log(2) + 4, real=real)
        self.order = K

    def at(self, e: acb) -> acb:
        v = acb(0)
        for c in reversed(self.coeffs):
            v = v * e + c
        E = self.E
        return v + acb(arb(0, E), arb(0, E))

    def point(self, x: Fraction) -> acb:
        return self.at(acb(_q(x - self.c)))

    def box(self, mid: Fraction, rad: Fraction) -> acb:
        return self.at(acb(arb(_q(mid - self.c), _q(rad))))

    def arg_change(self, x0: Fraction, x1: Fraction, max_pieces: int) -> tuple[arb, int]:
        """Continuous change of arg Lambda(x + it) for x from x0 to x1 (inside the part)."""
        total = arb(0)
        lo, hi = min(x0, x1), max(x0, x1)
        cuts = [lo + (hi - lo) * Fraction(j, 4) for j in range(5)]
        if x0 > x1:
            cuts.reverse()
        values = [self.point(x) for x in cuts]
        stack = [(cuts[i], cuts[i + 1], values[i], values[i + 1]) for i in range(len(cuts) - 1)][::-1]
        pieces = 0
        while stack:
            a, b, fa, fb = stack.pop()
            mid, rad = (a + b) / 2, abs(b - a) / 2
            box = self.box(mid, rad)
            if not box.contains(0) and not fa.contains(0) and not fb.contains(0):
                ratio = fb / fa
                if ratio.real > 0 or not (ratio.imag.contains(0)):
                    total += ratio.arg()
                    pieces += 1
                    continue
            if pieces + len(stack) > max_pieces or rad < Fraction(1, 2**40):
                raise PrecisionExhausted(
                    f"not certified: Lambda(s, chi) is too close to 0 near {float(mid):.6g} + "
                    f"{float(self.t):.6g}i for the argument count")
            m = self.point(mid)
            stack.append((mid, b, m, fb))
            stack.append((a, mid, fa, m))
        return total, pieces


def _parts(lo: Fraction, hi: Fraction, count: int) -> list:
    return [(lo + (hi - lo) * Fraction(j, count), lo + (hi - lo) * Fraction(j + 1, count))
            for j in range(count)]


def count_zeros_smoothed(conductor: int, label: int, parity: int, height: Fraction,
                         bits: int = 24, max_pieces: int = 4000,
                         top_parts: int | None = None) -> tuple[int, int]:
    """(N, pieces): the number of zeros of L(s, chi) with 0 < gamma < height, rigorously, for
    a primitive character chi mod ``conductor`` (Conrey label), by the smoothed sum.

    ``bits``: the accuracy asked of each disc relative to the size of Lambda near
    1/2 + i height.  Raises PrecisionExhausted if a piece cannot be decided or the count is
    not an integer within its enclosure.
    """
    from ..spectrum.afe import SmoothedL

    q, k = int(conductor), int(parity)
    T = Fraction(height)
    if T <= 0:
        raise ValueError("the counting height must be positive")
    chi = dirichlet_char(q, label)
    real = bool(chi.is_real())
    sm = SmoothedL(q, label, k)
    D = top_parts or TOP_PARTS
    pieces = 0
    top = [_Part(sm, a, b, T, bits, real) for a, b in _parts(LEFT, RIGHT, D)]
    bottom_hi = Fraction(1) if real else RIGHT
    bottom = [_Part(sm, a, b, Fraction(0), bits, real)
              for a, b in _parts(LEFT, bottom_hi, 1 if real else D)]
    prec = max(p.prec for p in top + bottom)
    with workprec(prec):
        d_bottom = arb(0)
        for p in bottom:
            d, n = p.arg_change(p.lo, p.hi, max_pieces)
            d_bottom += d
            pieces += n
        if real:
            # Lambda is real on [1/2, 1] and the pieces exclude 0 there: the change is 0 in
            # truth; the sum of principal arguments must show it (a sign change would be a zero)
            if not (abs(d_bottom) < 1):
                raise PrecisionExhausted("not certified: Lambda(sigma) is not proved non-zero on [1/2, 1]")
            d_bottom = arb(0)
        d_top = arb(0)
        for p in reversed(top):
            d, n = p.arg_change(p.hi, p.lo, max_pieces)
            d_top += d
            pieces += n
        # right edge: principal arguments of L(2) and L(2 + iT), Re L > 0 there
        Tb = _q(T)
        lqp = (arb(q) / arb.pi()).log()

        def log_factor(s: acb) -> acb:
            w = (s + k) / 2
            return w * lqp + w.lgamma()

        s1 = acb(_q(RIGHT), Tb)
        l1 = top[-1].point(RIGHT) / log_factor(s1).exp()
        if real:
            l0 = acb(1)  # L(2, chi) > 0 for real chi (Euler product)
        else:
            l0 = bottom[-1].point(RIGHT) / log_factor(acb(_q(RIGHT))).exp()
        if not (l0.real > 0 and l1.real > 0):
            raise PrecisionExhausted("not certified: Re L(2 + it) > 0 failed")
        d_right = l1.arg() - l0.arg() + log_factor(s1).imag - log_factor(acb(_q(RIGHT))).imag
        total = (d_bottom + d_right + d_top) / arb.pi()
        if not total.is_finite():
            raise PrecisionExhausted("not certified: the argument count is not finite")
        n = round(float(total.mid()))
        if not (abs(total - n) < arb(1) / 4):
            raise PrecisionExhausted(f"not certified: the argument count {total.str(8)} is not "
                                     "an integer within its enclosure")
    return n, pieces


def count_zeros_smoothed_retry(conductor: int, label: int, parity: int, height: Fraction):
    """N, or None where neither 24 nor 48 bits per disc established the count."""
    if Fraction(height) == 0:
        return 0
    if Fraction(height) < 0:
        return None
    for bits in (24, 48):
        try:
            return count_zeros_smoothed(conductor, label, parity, Fraction(height), bits=bits)[0]
        except (PrecisionExhausted, ValueError):  # undecided: not established, never a guess
            continue
    return None
