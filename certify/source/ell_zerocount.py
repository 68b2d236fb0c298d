"""Counting the zeros of L(E, s) to a height by the argument principle (GRH to a height).

Arithmetic normalisation: Lambda(s) = A^s Gamma(s) L(E, s), A = sqrt(N)/2pi, is
entire, Lambda(2 - s) = eps Lambda(s) and Lambda(conj s) = conj Lambda(s).  Its
zeros are the non-trivial zeros, in 1/2 < Re s < 3/2, symmetric under
s -> 2 - conj s.  Let 0 < rho0 < 1/2 and T > 0 with Lambda != 0 on the path

    C : 1 + i rho0 --(quarter circle |s - 1| = rho0, clockwise)--> 1 + rho0
          --> 5/2 --> 5/2 + i T --> 1 + i T.

The region bounded by C, its mirror image under s -> 2 - conj s, the
segment [1/2 - ..., ] of the real axis outside the disc and the top edge
is a symmetric domain; the argument change of Lambda along the mirror path
equals that along C (Lambda(2 - conj s) = eps conj Lambda(s): the mirror is
traversed in the opposite direction and conjugation flips the sign).  Hence
(docs/elliptic_curves_q.md, section 10)

    #{rho : Im rho in (0, T), |rho - 1| > rho0} = (1/pi) Delta_C arg Lambda

(on the real axis Lambda is real and, checked below, non-zero on
[1 + rho0, 5/2], so the real segments add nothing).  Along C:

* on the right edge Re s = 5/2, |arg L(E, s)| <= 2 log zeta(2) < pi/2 (Euler
  product, |alpha_p^k + beta_p^k| <= 2 p^(k/2)), so the change of arg L is the
  difference of principal arguments; A^s and Gamma(s) contribute
  T log A + Im log Gamma(5/2 + i T) (principal log Gamma, continuous on Re s > 0);
* on the arc, the real segment and the top edge, pieces are halved until the
  Arb box of Lambda over the piece excludes 0: a box missing 0 lies in an
  open half-plane through 0, so the change on the piece is the principal
  argument of Lambda(end) / Lambda(start).

The zeros inside the disc |s - 1| < rho0 are counted the same way on the full
circle.  If the count outside the disc equals the number of certified sign
changes of Z in (rho0, T) (each in its own interval), every zero with
0 < Im rho < T outside the disc is on the critical line and simple; inside
the disc there are exactly as many zeros as the central order when the
circle count equals it (for r <= 1 that places them at s = 1, by symmetry).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..arith import acb, arb, workprec
from ..errors import PrecisionExhausted


@dataclass(frozen=True)
class ZeroCount:
    height: float
    rho0: float
    outside_disc: int  # zeros with 0 < Im rho < T and |rho - 1| > rho0
    inside_disc: int  # zeros with |rho - 1| < rho0
    models: int  # Taylor models used


R_MODEL = 0.5  # Cauchy radius of every Taylor model (the tail bound's disc)


def disc_bound(L, c: acb, R: float = R_MODEL, pieces: int = 8) -> arb:
    """An upper bound for |Lambda(z)| on |z - c| <= R (no cancellation used: crude, rigorous).

    The exact a_n for n <= M and the proven tail bound beyond, with
    |(n/A)^-z Gamma(z, x)| <= (n/A)^-sigma Gamma(sigma, x) termwise, sigma = Re z
    running over a few sub-intervals of [Re c - R, Re c + R].
    """
    from .ell_l import tail_bound, terms_for

    N = L.conductor
    sc = float(c.real.mid())
    lo, hi = sc - R, sc + R
    M = terms_for(N, 60, hi, 1.0, lo)
    a = L.an(M)
    best = arb(0)
    with workprec(64):
        A = arb(N).sqrt() / (2 * arb.pi())
        for j in range(pieces):
            s0 = lo + (hi - lo) * j / pieces
            s1 = lo + (hi - lo) * (j + 1) / pieces
            sig = arb((s0 + s1) / 2, (s1 - s0) / 2)
            tot = arb(0)
            for n in range(1, M + 1):
                if a[n] == 0:
                    continue
                x = arb(n) / A
                g1 = acb(x).gamma_upper(acb(sig)).real
                g2 = acb(x).gamma_upper(acb(2 - sig)).real
                f1 = (-sig * x.log()).exp() * g1
                f2 = ((sig - 2) * x.log()).exp() * g2
                tot += abs(a[n]) * (f1 + f2)
            tot += arb(tail_bound(N, M, hi, 1.0, lo))
            u = arb(tot.upper())
            best = u if u > best else best
        if not best.is_finite():
            raise PrecisionExhausted("not certified: no bound for |Lambda| on a disc")
    return best


@dataclass
class TaylorModel:
    """Lambda(c + h) = sum_k coeffs[k] h^k + err for |h| <= r (err <= B (r/R)^K / (1 - r/R))."""

    center: acb
    coeffs: list
    r: float
    err: arb

    def value(self, h: acb) -> acb:
        v = acb(0)
        for ck in reversed(self.coeffs):
            v = v * h + ck
        e = arb(0, self.err.upper())
        return v + acb(e, e)


def taylor_model(L, c: acb, r: float, need_bits: float, prec: int, counter: list) -> TaylorModel:
    """A Taylor model of Lambda at c valid on |h| <= r < R_MODEL, remainder below 2^-need_bits."""
    B = disc_bound(L, c)
    q = r / R_MODEL
    logB = max(float(B.upper().log()) / math.log(2), 0.0) if B > 0 else 0.0
    K = int(math.ceil((need_bits + logB + 2) / -math.log2(q))) + 2
    counter[0] += 1
    ser = L.lambda_series(c, K, prec)
    with workprec(prec):
        err = B * arb(q) ** K / (1 - arb(q))
    return TaylorModel(c, list(ser.coeffs()), r, arb(err.upper()))


def _arg_change_model(model: TaylorModel, h_of_u, prec: int, max_depth: int = 20) -> arb:
    """Change of arg Lambda along h(u), u in [0, 1], |h| <= r, from a Taylor model."""
    total = arb(0)
    n0 = 8
    stack = [(k / n0, (k + 1) / n0, 0) for k in reversed(range(n0))]
    with workprec(prec):
        while stack:
            u0, u1, depth = stack.pop()
            box = model.value(h_of_u(arb((u0 + u1) / 2, (u1 - u0) / 2)))
            if box.real.contains(0) and box.imag.contains(0):
                if depth >= max_depth:
                    raise PrecisionExhausted(
                        "not certified: Lambda(E, s) cannot be separated from 0 on the counting "
                        f"contour near {(model.center + h_of_u(arb(u0))).str(8)}")
                m = (u0 + u1) / 2
                stack.append((m, u1, depth + 1))
                stack.append((u0, m, depth + 1))
                continue
            v0 = model.value(h_of_u(arb(u0)))
            v1 = model.value(h_of_u(arb(u1)))
            total += (v1 / v0).arg()
    return total


def count_zeros(L, T: float, rho0: float = 0.1, prec: int = 64) -> ZeroCount:
    """Zeros of Lambda(E, s) with 0 < Im s < T outside |s - 1| <= rho0, and inside it.

    Every piece of the contour is covered by a Taylor model at a centre on
    the contour (coefficients from the series of section 3 at that point,
    remainder from a crude bound of |Lambda| on a disc of radius 1/2 and
    Cauchy's inequality), so the enclosures see the cancellation of the
    terms only at the centres.
    """
    if not (0 < rho0 <= 0.125):
        raise ValueError("rho0 must lie in (0, 1/8]")
    counter = [0]
    cancel = math.pi * T / 2 / math.log(2)
    with workprec(prec):
        r0 = arb(rho0)
        TT = arb(T)
        # around s = 1: the quarter arc and the full circle (zeros inside), rho0 <= 1/8
        m1 = taylor_model(L, acb(1), 0.125, 30, prec, counter)
        d_arc = _arg_change_model(m1, lambda u: acb(r0) * acb(0, arb.pi() / 2 * (1 - u)).exp(), prec)
        d_circ = _arg_change_model(m1, lambda u: acb(r0) * acb(0, 2 * arb.pi() * u).exp(), prec)
        # real segment [1 + rho0, 8/5] by models of radius 1/8; beyond 8/5 the Euler
        # factors are positive, Lambda > 0 and its argument is constant
        d_real = arb(0)
        a = 1 + rho0
        while a < 1.6 - 1e-12:
            b = min(a + 0.2, 1.6)
            c = (a + b) / 2
            m = taylor_model(L, acb(c), 0.125, 30, prec, counter)
            half = (b - a) / 2
            d_real += _arg_change_model(m, lambda u, h=half: acb(arb(-h) + 2 * h * u), prec)
            a = b
        # right edge: principal arg of L plus the explicit factors
        s_top = acb(arb(5) / 2, TT)
        lam_top = L.lambda_value(s_top, prec)
        lam_bot = L.lambda_value(acb(arb(5) / 2), prec)
        A = arb(L.conductor).sqrt() / (2 * arb.pi())
        g_top = s_top.lgamma()
        l_top = lam_top / ((s_top * A.log()).exp() * g_top.exp())
        l_bot = lam_bot / ((arb(5) / 2 * A.log()).exp() * acb(arb(5) / 2).gamma())
        if not (l_top.real > 0 and l_bot.real > 0):
            raise PrecisionExhausted("not certified: L(E, s) on Re s = 5/2 not in the right half-plane")
        d_right = (l_top.arg() - l_bot.arg()) + TT * A.log() + g_top.imag
        # top edge from 5/2 + iT to 1 + iT: models of radius 1/8 at 19/8, 17/8, ..., 9/8
        d_top = arb(0)
        wp_top = prec + int(cancel) + 20
        for k in range(6):
            c = 2.5 - 0.125 - 0.25 * k
            m = taylor_model(L, acb(c, T), 0.125, cancel + 30, prec, counter)
            d_top += _arg_change_model(m, lambda u: acb(arb(0.125) - arb(0.25) * u), wp_top)
        total = (d_arc + d_real + d_right + d_top) / arb.pi()
        inside = d_circ / (2 * arb.pi())
    n_out = _integer(total, "zeros above the disc")
    n_in = _integer(inside, "zeros in the disc")
    return ZeroCount(T, rho0, n_out, n_in, counter[0])


def _integer(x: arb, what: str) -> int:
    k = round(float(x.mid()))
    if not (x.rad() < 0.25 and (x - k).contains(0)):
        raise PrecisionExhausted(f"not certified: the count of {what} is {x.str(5)}, not an integer")
    return k
