"""Counting zeros in the critical strip by the argument principle (GRH to a height).

For a primitive character chi mod q of parity kappa, the completed function
Lambda(s) = (q/pi)^((s+kappa)/2) Gamma((s+kappa)/2) L(s, chi) is entire, its zeros
are the non-trivial zeros of L, and Lambda(1 - conj s, chi) = conj(Lambda(s, chi)/eps)
with |eps| = 1.  Reflecting the left half of the rectangle
[-1, 2] x [0, T] onto the right half gives (docs/certificates.md)

    N(T) = #{rho : 0 < gamma < T} = (1/pi) Delta_C arg Lambda(s),
    C : 1/2 -> 2 -> 2 + iT -> 1/2 + iT,

when Lambda has no zero on C.  Along C:

* the factors (q/pi)^(...) and Gamma(...) have continuous logarithms
  ((s + kappa)/2 stays in Re > 0), so their argument change is the change of
  Im((s+kappa)/2 log(q/pi)) + Im log Gamma((s+kappa)/2) between the ends;
* on the edge Re s = 2, |L - 1| <= zeta(2) - 1 < 0.65, so Re L > 0 and
  the argument change is the difference of principal arguments;
* on the two horizontal edges the change is summed over pieces whose image
  (an Arb box of L over the piece) excludes 0: a convex set missing 0 lies in an
  open half-plane, so on each piece the change is the principal argument of
  L(end) / L(start).  Pieces are halved until that holds.

For zeta (conductor 1) Lambda has poles at s = 0 and 1; the count uses the entire
xi(s) = s(s-1)/2 Lambda(s) instead (docs/method.md, section 2b): xi is real and
positive on the real segment [1/2, 2], so the bottom edge adds nothing, and the
factor s(s-1) adds exactly pi along 2 -> 2 + iT -> 1/2 + iT (arg s goes from 0
to arctan 2T, arg(s-1) from 0 to pi - arctan 2T, both continuously in the
closed upper half-plane).

If N(T) equals the number of zeros found on the critical line below T (each a
sign change of Z, in disjoint intervals), every zero with 0 < gamma < T lies on
the critical line and is simple: GRH holds for L(s, chi) up to height T.
"""

from __future__ import annotations

from fractions import Fraction

from flint import dirichlet_char

from ..arith import acb, arb, workprec
from ..errors import PrecisionExhausted

RIGHT_EDGE = Fraction(2)

# Arb's L(s, chi) on the boxes of the contour costs ~ q per box (Hurwitz sums): above
# this conductor the count is not attempted, and the certificate records the evidence
# as not established (GRH stays a hypothesis either way; the residual power sums
# still check that no zero is missing, docs/method.md section 2)
MAX_COUNT_CONDUCTOR = 3000


def _q(x: Fraction) -> arb:
    return arb(x.numerator) / x.denominator


class _NearOne:
    """Enclosures of L(s, chi) on boxes around s = 1, where Arb's formula has a removable pole.

    L is entire (chi non-principal).  With M >= |L| on the circle |s - 1| = R
    (covered by boxes that avoid s = 1) and the Taylor coefficients c_k at 1,
    for |h| <= r < R:  |L(1 + h) - sum_{k<K} c_k h^k| <= M (r/R)^K / (1 - r/R)
    (Cauchy's estimate |c_k| <= M / R^k).
    """

    R = Fraction(1)
    K = 40

    def __init__(self, chi):
        from flint import acb_series

        from ..arith import series_cap

        R = _q(self.R)
        m = 24
        chord = 2 * R * (arb.pi() / m).sin()
        M = arb(0)
        for j in range(m):
            w = (acb(2 * j) / m).exp_pi_i() * R + 1  # (acb.exp_pi_i on an arb crashes python-flint)
            box = acb(arb(w.real.mid(), chord.upper()), arb(w.imag.mid(), chord.upper()))
            M = max(M, arb(abs(chi.l(box)).upper()), key=lambda x: float(x.upper()))
        self.M = arb(M.upper())
        with series_cap(self.K):
            ser = acb_series.dirichlet_l(acb_series([acb(1), acb(1)]), chi)
            self.c = [ser.coeffs()[k] if k < len(ser.coeffs()) else acb(0) for k in range(self.K)]

    def box(self, h: acb) -> acb | None:
        """An enclosure of L(1 + h) over the box h, or None if h is too wide."""
        r = abs(h).upper()
        ratio = arb(r) / _q(self.R)
        if not (ratio < arb(1) / 2):
            return None  # also when h is far from 0: the caller evaluates L directly
        v = acb(0)
        for c in reversed(self.c):
            v = v * h + c
        err = self.M * ratio ** self.K / (1 - ratio)
        return v + acb(arb(0, err.upper()), arb(0, err.upper()))


def _l_box(chi, near_one, z: acb) -> acb:
    """L(s, chi) over the box z; through the series at 1 when z is close to s = 1.

    (Near s = 1 Arb's formula, a sum of Hurwitz zeta values with poles that
    cancel, gives wide boxes; the Taylor series does not.)
    """
    if near_one is not None:
        v = near_one.box(z - 1)
        if v is not None:
            return v
    return chi.l(z)


def _horizontal_arg_change(chi, t: Fraction, x0: Fraction, x1: Fraction, max_pieces: int) -> arb:
    """Continuous change of arg L(x + i t) for x from x0 to x1 (t exact)."""
    T = _q(t)
    near_one = _NearOne(chi) if t == 0 and min(x0, x1) <= 1 <= max(x0, x1) else None

    def point(x: Fraction) -> acb:
        return _l_box(chi, near_one, acb(_q(x), T))

    total = arb(0)
    # an initial partition finer near the critical line, where L turns fastest
    lo, hi = min(x0, x1), max(x0, x1)
    cuts = [lo + (hi - lo) * Fraction(k, 16) for k in (0, 1, 2, 3, 4, 6, 8, 12, 16)]
    if x0 > x1:
        cuts.reverse()
    values = [point(x) for x in cuts]
    stack = [(cuts[i], cuts[i + 1], values[i], values[i + 1]) for i in range(len(cuts) - 1)][::-1]
    pieces = 0
    _horizontal_arg_change.pieces = 0
    # process left to right so the pieces tile [x0, x1] in order (order is irrelevant to the sum)
    while stack:
        a, b, fa, fb = stack.pop()
        mid, rad = (a + b) / 2, abs(b - a) / 2
        box = _l_box(chi, near_one, acb(arb(_q(mid), _q(rad)), T))
        if not box.contains(0) and not fa.contains(0) and not fb.contains(0):
            ratio = fb / fa
            if ratio.real > 0 or not (ratio.imag.contains(0)):
                total += ratio.arg()
                pieces += 1
                continue
        if pieces + len(stack) > max_pieces or rad < Fraction(1, 2**40):
            raise PrecisionExhausted(
                f"not certified: L(s, chi) is too close to 0 near {float(mid):.6g} + {float(t):.6g}i "
                "for the argument count")
        m = point(mid)
        stack.append((mid, b, m, fb))
        stack.append((a, mid, fa, m))
    _horizontal_arg_change.pieces = pieces
    return total


def count_height(zero_ends: list) -> Fraction:
    """The counting height for sorted zero enclosures [(lo, hi), ...]: midway between the last two."""
    return (zero_ends[-2][1] + zero_ends[-1][0]) / 2


def count_zeros(conductor: int, label: int, parity: int, height: Fraction, prec: int = 64,
                max_pieces: int = 20000) -> tuple[int, int]:
    """(N, pieces): the number of zeros of L(s, chi) with 0 < gamma < height, rigorously.

    ``pieces`` is the number of pieces of the horizontal edges.

    Raises PrecisionExhausted if a zero lies on the path or the count is not
    an integer to within the enclosure.
    """
    chi = dirichlet_char(conductor, label)
    with workprec(prec):
        T = _q(height)
        a = Fraction(1, 2)
        # bottom edge 1/2 -> 2 and top edge 2 + iT -> 1/2 + iT
        if conductor == 1:
            # xi > 0 on [1/2, 2]: no change on the bottom edge; s(s-1) adds pi on the rest
            d_bottom = arb.pi()
            pieces = 0
        else:
            d_bottom = _horizontal_arg_change(chi, Fraction(0), a, RIGHT_EDGE, max_pieces)
            pieces = _horizontal_arg_change.pieces
        d_top = _horizontal_arg_change(chi, height, RIGHT_EDGE, a, max_pieces)
        pieces += _horizontal_arg_change.pieces
        # right edge: Re L > 0 there, principal arguments
        l0 = chi.l(acb(_q(RIGHT_EDGE), 0))
        l1 = chi.l(acb(_q(RIGHT_EDGE), T))
        if not (l0.real > 0 and l1.real > 0):  # guaranteed by |L - 1| < 0.65; checked anyway
            raise PrecisionExhausted("not certified: Re L(2 + it) > 0 failed")
        d_right = l1.arg() - l0.arg()
        # gamma and exponential factors between s = 1/2 and s = 1/2 + iT
        k = arb(parity)
        s0 = acb(arb(1) / 2 + k, 0) / 2
        s1 = acb(arb(1) / 2 + k, T) / 2
        d_gamma = s1.lgamma().imag - s0.lgamma().imag
        d_exp = T / 2 * (arb(conductor) / arb.pi()).log()
        total = (d_bottom + d_right + d_top + d_gamma + d_exp) / arb.pi()
        n = round(float(total.mid()))
        if not (abs(total - n) < arb(1) / 4):
            raise PrecisionExhausted(f"not certified: the argument count {total.str(8)} is not "
                                     "an integer within its enclosure")
    return n, pieces
