"""L(E, s) of an elliptic curve over Q in ball arithmetic.

Arithmetic normalisation: Lambda(s) = N^(s/2) (2 pi)^(-s) Gamma(s) L(E, s),
Lambda(s) = eps Lambda(2 - s), centre s = 1.  With A = sqrt(N)/(2 pi) and any
t0 > 0 the smoothed approximate functional equation (docs/elliptic_curves_q.md,
section 3) is

    Lambda(s) = sum_n a_n [ (n/A)^(-s) Gamma(s, n t0/A) + eps (n/A)^(s-2) Gamma(2-s, n/(A t0)) ],

proved from the Mellin transform of f(iy/sqrt N) and the Fricke involution
(modularity).  Every truncation after M terms is bounded using
|a_n| <= d(n) sqrt(n) <= 2n and |Gamma(s, x)| <= Gamma(sigma, x) <=
x^(sigma-1) e^(-x) K (K = 1 for sigma <= 1, K = 1/(1 - (sigma-1)/x) for
sigma > 1): the tail is at most

    2 A K [ t0^(sigma-1) e^(-(M+1) t0/A) / (1 - e^(-t0/A))
            + t0^(1-sigma') e^(-(M+1)/(A t0)) / (1 - e^(-1/(A t0))) ],  sigma' = 2 - sigma,

added to the ball as an error term.  Two values of t0 must agree: this is the
check of the functional equation and of the root number (the wrong sign
gives a residual whose ball excludes 0).

:class:`EllipticL` is the curve's :class:`certify.spectrum.lfunction.AnalyticL`
(analytic normalisation: analytic s = arithmetic s - 1/2), so zeros, power
sums and residual checks run through the shared spectrum layer.
"""

from __future__ import annotations

import math

from ..arith import acb, acb_series, arb, series_cap, workprec
from ..errors import BadInput, Inconsistent, PrecisionExhausted
from ..spectrum.lfunction import AnalyticL, mean_spacing_of
from .ectraces import an_list, traces_upto
from .ellcurve import EllipticCurveQ

LOG2E = 1 / math.log(2)


def tail_bound(N: int, M: int, sigma: float, t0: float = 1.0, sigma_lo: float | None = None) -> float:
    """Upper bound (float, rounded up generously) of the AFE tail after M terms.

    Valid for every s with sigma_lo <= Re s <= sigma (sigma_lo defaults to
    sigma): the first half uses Re s, the second Re(2 - s), each at its worst
    end (the factor K grows with the real part; t0^(Re s - 1) is monotone).
    """
    lo = sigma if sigma_lo is None else sigma_lo
    A = math.sqrt(N) / (2 * math.pi)
    b1, b2 = t0 / A, 1 / (A * t0)
    x1, x2 = (M + 1) * b1, (M + 1) * b2

    def K(s, x):
        if s <= 1:
            return 1.0
        if x <= 2 * (s - 1):
            return math.inf
        return 1 / (1 - (s - 1) / x)

    # first half: Re s in [lo, sigma]; second half: Re(2 - s) in [2 - sigma, 2 - lo]
    p1 = max(t0 ** (lo - 1), t0 ** (sigma - 1))
    p2 = max(t0 ** (1 - (2 - sigma)), t0 ** (1 - (2 - lo)))
    t1 = p1 * K(sigma, x1) * math.exp(-x1) / (-math.expm1(-b1))
    t2 = p2 * K(2 - lo, x2) * math.exp(-x2) / (-math.expm1(-b2))
    return 2 * A * (t1 + t2) * (1 + 1e-9) + 1e-300


def terms_for(N: int, bits: float, sigma_max: float = 2.0, t0: float = 1.0,
              sigma_lo: float | None = None) -> int:
    """Smallest M (roughly) with tail_bound < 2^-bits."""
    lo = 1
    hi = 16
    while tail_bound(N, hi, sigma_max, t0, sigma_lo) > 2.0 ** (-bits):
        hi *= 2
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if tail_bound(N, mid, sigma_max, t0, sigma_lo) <= 2.0 ** (-bits):
            hi = mid
        else:
            lo = mid
    return hi


def _upper_gamma_series(s: acb_series, z: arb, gamma_s: acb_series | None = None) -> acb_series:
    """Gamma(s, z) for a power series s and z > 0, as Gamma(s) - gamma(s, z).

    gamma(s, z) = z^s e^(-z) / s * 1F1(1; s + 1; z) (positive terms; Arb's
    rigorous hypergeometric series with series parameters).  ``gamma_s`` is the
    series Gamma(s) when the caller has it already (it does not depend on z).
    """
    zc = acb(z)
    one = acb_series([acb(1)])
    h = acb_series.hypgeom([one], [s + 1], acb_series([zc]))
    lower = (s * zc.log()).exp() * (-zc).exp() / s * h
    return (s.gamma() if gamma_s is None else gamma_s) - lower


def _upper_gamma_series_asym(s: acb_series, c: acb, x: arb, length: int, bits: float,
                             radius: float = 0.5):
    """Gamma(s, x) for s = c + h (a series in h, |h| <= radius) by the expansion at x = oo.

    Integrating by parts K times gives, exactly for every complex s and x > 0,

        Gamma(s, x) = x^(s-1) e^(-x) sum_{k<K} (s-1)(s-2)...(s-k) x^(-k)
                      + (s-1)...(s-K) Gamma(s-K, x),

    and for Re s - K - 1 <= 0, |Gamma(s-K, x)| <= x^(Re s-K-1) e^(-x) (the integrand
    u^(Re s-K-1) e^(-u) has u^(...) <= x^(...) on [x, oo)).  On the disc |h| <= radius the
    remainder is at most P_K x^(sigma_max-K-1) e^(-x), P_K = prod_j (|c - j| + radius),
    and Cauchy's inequality bounds the k-th Taylor coefficient of the remainder by that
    bound over radius^k.  Returns None when no K brings the remainder below 2^-bits (small
    x); the caller then uses the hypergeometric series.  No cancellation: for large x this
    needs far fewer terms than 1F1(1; s+1; x).
    """
    xf = float(x.mid())
    if xf < 8:
        return None
    cr, ci = float(c.real.mid()), float(c.imag.mid())
    sig_max = cr + radius
    lx = math.log2(xf)
    base = (sig_max - 1) * lx - xf * LOG2E + length * math.log2(1 / radius) + 4
    logP, best = 0.0, None
    for K in range(1, int(4 * xf) + 60):
        logP += math.log2(math.hypot(cr - K, ci) + radius)
        if sig_max - K - 1 > 0:
            continue
        bound = logP + base - K * lx
        if bound <= -bits:
            best = K
            break
        if math.hypot(cr - K, ci) + radius > xf:  # the terms grow from here on
            return None
    if best is None:
        return None
    K = best
    term = acb_series([acb(1)])
    total = acb_series([acb(1)])
    for k in range(1, K):
        term = term * (s - k) / x
        total += term
    pref = ((s - 1) * acb(x.log()) - acb(x)).exp()
    # the remainder bound, rigorously (upper bounds in arb)
    P = arb(1)
    for j in range(1, K + 1):
        P *= abs(c - j) + arb(radius)
    R = P * (arb(sig_max - K - 1) * x.log()).exp() * (-x).exp()
    out = (pref * total).coeffs()
    res = []
    for k in range(length):
        ck = out[k] if k < len(out) else acb(0)
        e = arb((R / arb(radius) ** k).upper())
        res.append(ck + acb(arb(0, e), arb(0, e)))
    return acb_series(res)


class EllipticL(AnalyticL):
    """L(E, s) with its root number; an AnalyticL for the spectrum layer.

    Parameters
    ----------
    E : EllipticCurveQ
    eps : int, optional
        The root number; by default from the local data, and if that is
        incomplete (additive reduction at 2 or 3) decided by the functional
        equation (:meth:`decide_root_number`).
    """

    degree = 2
    self_dual = True

    def __init__(self, E: EllipticCurveQ, eps: int | None = None, central_order: int = 0):
        self.E = E
        self.conductor = E.conductor
        self.key = ("E", tuple(E.minimal))
        self.label = 0
        self.name = f"L(E, s), E = {list(E.minimal)} (conductor {E.conductor})"
        self.central_order = central_order
        self.A_float = math.sqrt(E.conductor) / (2 * math.pi)
        self._an: list[int] = [0, 1]
        self._z_memo: dict = {}
        self.z_computed = 0  # Hardy Z values computed (memo hits excluded)
        self._traces = None
        self.eps = eps if eps is not None else E.root_number_local
        self.eps_source = "local root numbers" if eps is None and self.eps is not None else "given"
        if self.eps is None:
            self.eps = self.decide_root_number()
            self.eps_source = "functional equation (no local formula at an additive prime 2 or 3)"

    # -- coefficients ---------------------------------------------------------

    def an(self, M: int) -> list[int]:
        """a_0..a_M (a_0 = 0)."""
        if len(self._an) <= M:
            size = max(M, 2 * len(self._an))
            self._traces = traces_upto(self.E, max(size, 2))
            self._an = an_list(self.E, size, self._traces)
        return self._an

    # -- values ---------------------------------------------------------------

    def lambda_value(self, s: acb, prec: int, t0: float = 1.0, eps: int | None = None,
                     extra_bits: int = 0) -> acb:
        """Enclosure of Lambda(E, s) (arithmetic normalisation) by the smoothed AFE."""
        eps = self.eps if eps is None else eps
        N = self.conductor
        sig_hi = float(s.real.upper())
        sig_lo = float(s.real.lower())
        im = abs(float(s.imag.mid()))
        # the terms cancel to about exp(-pi |t| / 2): that much more precision and terms
        cancel = math.pi * im / 2 * LOG2E
        bits = prec + cancel + 10
        M = terms_for(N, bits, sig_hi, t0, sig_lo)
        a = self.an(M)
        wp = int(prec + cancel + math.log2(M + 2) + 14 + extra_bits)
        with workprec(wp):
            A = arb(N).sqrt() / (2 * arb.pi())
            T0 = arb(t0)
            s2 = 2 - s
            # on the line with t0 = 1 the second half is the conjugate of the first
            on_line = t0 == 1.0 and s.real.mid() == 1 and s.real.rad() == 0
            total = acb(0)
            for n in range(1, M + 1):
                if a[n] == 0:
                    continue
                xf = n / self.A_float
                # |term| is about e^-x: it needs only enough relative precision
                # for an absolute error 2^-wp (never below prec + guard bits)
                wpn = max(int(prec + math.log2(M + 2) + 14 + extra_bits),
                          wp - int(max(xf - 2, 0) * LOG2E))
                with workprec(wpn):
                    x = arb(n) / A
                    lx = x.log()
                    t1 = (-s * lx).exp() * acb(x * T0).gamma_upper(s)
                    if on_line:
                        t2 = t1.conjugate()
                    else:
                        t2 = ((s - 2) * lx).exp() * acb(x / T0).gamma_upper(s2)
                    total += a[n] * (t1 + eps * t2)
            tb = tail_bound(N, M, sig_hi, t0, sig_lo)
            err = arb(0, arb(tb).upper())
            return total + acb(err, err)

    def fe_residual(self, s: acb, prec: int, eps: int) -> acb:
        """Lambda(s) computed with t0 = 1 minus with t0 = 1.1, assuming root number eps."""
        return self.lambda_value(s, prec, 1.0, eps) - self.lambda_value(s, prec, 1.1, eps)

    def decide_root_number(self, prec: int = 80) -> int:
        """The root number proven by the functional equation: the other sign's residual excludes 0."""
        s = acb(arb(6) / 5, arb(1) / 7)
        good = []
        for e in (1, -1):
            r = self.fe_residual(s, prec, e)
            if not (r.real.contains(0) and r.imag.contains(0)):
                continue
            good.append(e)
        if len(good) != 1:
            raise PrecisionExhausted(
                f"not certified: the functional equation does not single out the root number of {self.name}")
        return good[0]

    def hardy_z(self, t: arb, prec: int) -> arb:
        """Z(t) real with |Z(t)| = |L(E, 1 + i t)| (analytic: s = 1/2 + i t).

        Values at exact points are remembered per (t, prec): the zero search asks
        again for the ends of each bracket it found (same point, same precision).
        """
        key = None
        if t.rad() == 0:
            m, e = t.mid().man_exp()
            key = (int(m), int(e), int(prec))
            hit = self._z_memo.get(key)
            if hit is not None:
                return hit
        v = self._hardy_z(t, prec)
        self.z_computed += 1
        if key is not None:
            if len(self._z_memo) > 20000:
                self._z_memo.clear()
            self._z_memo[key] = v
        return v

    def _hardy_z(self, t: arb, prec: int) -> arb:
        with workprec(prec + 20):
            tt = arb(t)
            s = acb(1, tt)
            lam = self.lambda_value(s, prec)
            with workprec(int(prec + math.pi * abs(float(tt.mid())) / 2 * LOG2E + 40)):
                pt = arb.pi() * tt
                if tt.contains(0) and tt.rad() == 0:
                    g = arb(1)
                else:
                    g = (pt / pt.sinh()).sqrt()  # |Gamma(1 + i t)|
                scale = 2 * arb.pi() / (arb(self.conductor).sqrt() * g)
                val = lam.real if self.eps == 1 else lam.imag
                return val * scale

    def mean_spacing(self, t: float) -> float:
        return mean_spacing_of(self.conductor, 2, t)

    def prec_scale(self, t: float) -> float:
        return 2 + math.sqrt(self.conductor) * (t + 2)

    # -- jets -------------------------------------------------------------------

    def lambda_series(self, center, length: int, prec: int) -> acb_series:
        """The Taylor series of Lambda(center + x) (arithmetic normalisation) to x^(length-1).

        center is 1 (derivatives at the centre), 3/2 (the edge point) or any
        complex point (zero counting); the tail is bounded on the disc
        |x| <= 1/2 by the same estimate (uniform in Im s) and turned into
        coefficient bounds by Cauchy's inequality (2^k).  Away from the real
        axis the terms cancel to about e^(-pi |Im s|/2): that many more bits.
        """
        N = self.conductor
        c = acb(center)
        sc = float(c.real.mid())
        cancel = math.pi * abs(float(c.imag.mid())) / 2 * LOG2E
        sig_hi, sig_lo = sc + 0.5, sc - 0.5
        bits = prec + length + 10 + cancel
        M = terms_for(N, bits, sig_hi, 1.0, sig_lo)
        a = self.an(M)
        wp = int(prec + length * 2 + 2 * math.log2(M + 2) + 40 + cancel)
        with workprec(wp), series_cap(length):
            A = arb(N).sqrt() / (2 * arb.pi())
            s = acb_series([c, acb(1)])
            s2 = acb_series([2 - c, acb(-1)])
            total = acb_series([acb(0)])
            g1, g2 = s.gamma(), s2.gamma()  # Gamma(s), Gamma(2 - s): the same for every n
            for n in range(1, M + 1):
                if a[n] == 0:
                    continue
                x = arb(n) / A
                # Gamma(s, x) = Gamma(s) - gamma(s, x) is needed to an absolute
                # accuracy only, so the cancellation costs no extra bits
                with workprec(wp):
                    lx = acb(x.log())
                    u1 = _upper_gamma_series_asym(s, c, x, length, wp)
                    u2 = _upper_gamma_series_asym(s2, 2 - c, x, length, wp)
                    if u1 is None:
                        u1 = _upper_gamma_series(s, x, g1)
                    if u2 is None:
                        u2 = _upper_gamma_series(s2, x, g2)
                    t1 = (-s * lx).exp() * u1
                    t2 = ((s - 2) * lx).exp() * u2
                    total += (t1 + self.eps * t2) * a[n]
            tb = arb(tail_bound(N, M, sig_hi, 1.0, sig_lo)).upper()
            coeffs = total.coeffs()
            out = []
            for k in range(length):
                ck = coeffs[k] if k < len(coeffs) else acb(0)
                r = arb(tb) * arb(2) ** k
                out.append(ck + acb(arb(0, r.upper()), arb(0, r.upper())))
            return acb_series(out)

    def log_lambda_jet(self, count: int, prec: int) -> list:
        """c_1..c_count of log Lambda(E, 3/2 + x) (analytic edge point s = 1)."""
        ser = self.lambda_series(arb(3) / 2, count + 1, prec)
        c0 = ser.coeffs()[0]
        if c0.real.contains(0):
            raise PrecisionExhausted(f"not certified: Lambda(3/2) of {self.name} not separated from 0")
        with workprec(prec + 2 * count + 40), series_cap(count + 1):
            lg = ser.log().coeffs()
        return [lg[k] if k < len(lg) else acb(0) for k in range(1, count + 1)]

    def central_jet(self, length: int, prec: int) -> list:
        """Lambda^(k)(1)/k! for k < length (enclosures)."""
        return list(self.lambda_series(arb(1), length, prec).coeffs())


def check_conductor_for_l(N: int, limit: int = 10**7) -> None:
    if N > limit:
        raise BadInput(f"conductor {N} is beyond the range of the L-function sums here (<= {limit})")


__all__ = ["EllipticL", "tail_bound", "terms_for", "check_conductor_for_l", "Inconsistent"]
