"""Density of a race variable whose centred part is a sum of independent cosines.

The race variable is

    X = mu + sum_j w_j cos(Theta_j)  +  (residual sums, see ResidualGroup)

with independent uniform phases; its characteristic function is
exp(i mu xi) * prod_j J_0(w_j xi).  The engine returns an enclosure of
P(X > 0) with an itemised error budget; docs/method.md derives every term.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..arith import arb


@dataclass(frozen=True)
class ResidualGroup:
    """Weights known only through their exact power sums.

    The group stands for the cosines with weights ``scale / |rho|`` over a
    multiset of zeros rho = 1/2 + i gamma that were not isolated; its
    residual power sums ``power_sums[k-1] = sum (1/4 + gamma^2)^(-k)``
    (k = 1..K) are exact balls.
    """

    scale: arb
    power_sums: tuple[arb, ...]
    label: str = ""


@dataclass(frozen=True)
class BesselVariable:
    """X = mu + sum_j weights[j] cos(Theta_j) + residual groups, Theta_j independent uniform."""

    mu: arb
    weights: tuple[arb, ...]
    residuals: tuple[ResidualGroup, ...] = field(default_factory=tuple)


# ---------------------------------------------------------------------------
# The engine
# ---------------------------------------------------------------------------

import math
from fractions import Fraction

from ..errors import Inconsistent, PrecisionExhausted
from ..result import DensityEnclosure, Enclosure, ErrorTerm
from .besselj import check_j01, rayleigh_sigma, tail_constant


class ResidualTooLarge(PrecisionExhausted):
    """The residual weights are too large for the Rayleigh expansion at some frequency."""


def _arb_q(x: Fraction) -> arb:
    return arb(x.numerator) / x.denominator


def variance(var: BesselVariable) -> arb:
    """Var X = sum w_j^2 / 2 + sum_g scale_g^2 R_{g,1} / 2 (exact, as a ball)."""
    v = sum((w * w for w in var.weights), arb(0)) / 2
    for g in var.residuals:
        v += g.scale * g.scale * g.power_sums[0] / 2
    return v


def truncation_bound(weights, xi: arb) -> tuple[arb, int]:
    """Bound for sum_{n odd > N} (2/(pi n)) |Phi_0(n eps)| when N eps = xi.

    Uses |J_0(x)| <= sqrt(2/(pi x)) on the J weights with w xi >= 2/pi and
    |J_0| <= 1 on the others (docs/method.md, section 4):
        (2 / (pi J)) prod_j sqrt(2 / (pi w_j xi)).
    Returns (bound, J); an infinite bound if J = 0.
    """
    two_over_pi = 2 / arb.pi()
    logp = arb(0)
    J = 0
    for w in weights:
        f = two_over_pi / (w * xi)
        if f < 1:
            logp += f.log() / 2
            J += 1
    if J == 0:
        return arb("inf"), 0
    return (2 / (arb.pi() * J)) * logp.exp(), J


# ---------------------------------------------------------------------------
# Truncation with the residual groups (docs/method.md, section 4c)
# ---------------------------------------------------------------------------

_BLOCK_RATIO = 1.25  # consecutive blocks of odd indices grow by this factor
_MAX_BLOCKS = 400


@dataclass
class _TailData:
    """What the truncation bound of section 4c reads: floats to choose, balls to prove.

    ``iso`` are the isolated weights; per residual group: scale c, lower end of
    R_1, upper ends of R_2..R_K, and m^2, a lower bound for the largest residual
    (1/4 + gamma^2)^(-1) (so c m bounds the largest residual weight from below).
    """

    iso: list  # arb
    groups: list  # (c, R1_lo, [R_k_up for k = 2..K], m2_lo or None), arb
    iso_f: object = None  # numpy arrays of the same data (mid points), for choosing only
    c_f: object = None
    r1_f: object = None
    logrk_f: object = None  # shape (groups, K - 1), log R_k (k = 2..K); -inf if absent
    m_f: object = None  # c m (pseudo weight), 0 if absent


def _tail_data(weights, residuals) -> _TailData:
    import numpy as np

    groups = []
    for g in residuals:
        sums = list(g.power_sums)
        r1_lo = arb(sums[0].lower())
        rk_up = [arb(r.upper()) for r in sums[1:]]
        m2 = None
        for k in range(1, len(sums)):
            # max a >= R_k / R_{k-1} (a over the residual multiset): R_k <= (max a) R_{k-1}
            lo, up = sums[k].lower(), sums[k - 1].upper()
            if lo > 0 and up > 0:
                cand = arb(lo) / arb(up)
                cand = arb(cand.lower())
                if m2 is None or cand > m2:
                    m2 = cand
        groups.append((g.scale, r1_lo, rk_up, m2))
    K1 = max((len(rk) for _, _, rk, _ in groups), default=0)
    logrk = np.full((len(groups), max(K1, 1)), -np.inf)
    for i, (_, _, rk, _) in enumerate(groups):
        for j, r in enumerate(rk):
            v = float(r.mid())
            if v > 0:
                logrk[i, j] = math.log(v)
    c_f = np.array([float(c.mid()) for c, _, _, _ in groups])
    return _TailData(
        list(weights), groups,
        np.array([float(w.mid()) for w in weights]), c_f,
        np.array([max(float(r1.mid()), 0.0) for _, r1, _, _ in groups]), logrk,
        np.array([float(c.mid()) * math.sqrt(float(m2.mid())) if m2 is not None else 0.0
                  for c, _, _, m2 in groups]))


def tail_data_from_floats(iso, scales, R) -> _TailData:
    """Float-only tail data (planning): ``iso`` weights, group ``scales`` and residual sums
    ``R`` (array: one row R_1..R_K per group, all positive)."""
    import numpy as np

    R = np.asarray(R, dtype=float).reshape(len(scales), -1)
    scales = np.asarray(scales, dtype=float)
    logrk = np.log(R[:, 1:]) if R.shape[1] > 1 else np.full((len(scales), 1), -np.inf)
    if R.shape[1] > 1:
        m = scales * np.sqrt((R[:, 1:] / R[:, :-1]).max(axis=1))
    else:
        m = np.zeros(len(scales))
    return _TailData([], [], np.asarray(iso, dtype=float), scales, np.maximum(R[:, 0], 0.0),
                     logrk, m)


def _odd_blocks(N: int):
    """Blocks [n_a, n_b] of odd indices > N, each about _BLOCK_RATIO times the previous."""
    n_a = N + 2
    while True:
        n_b = max(n_a, int(n_a * _BLOCK_RATIO))
        if n_b % 2 == 0:
            n_b -= 1
        n_b = max(n_a, n_b)
        yield n_a, n_b
        n_a = n_b + 2


def _far_tail_float(r, xi: float) -> float:
    """Float twin of the section-4 bound (2/(pi J)) prod sqrt(2/(pi r xi)) over r xi >= 2/pi."""
    import numpy as np

    sel = r[r * xi >= 2 / math.pi]
    if sel.size == 0:
        return math.inf
    return 2 / (math.pi * sel.size) * math.exp(0.5 * np.log(2 / (math.pi * sel * xi)).sum())


def _group_logs_float(d: _TailData, xa: float, xb: float):
    """Per group, the log of the section-4c bound on [xa, xb] (floats) and the chosen k index."""
    import numpy as np

    j01 = 2.4048255576
    c = d.c_f
    if c.size == 0:
        return np.zeros(0), np.zeros(0, dtype=int)
    A = (c * xa) ** 2 * d.r1_f
    ks = np.arange(2, d.logrk_f.shape[1] + 2)
    with np.errstate(divide="ignore", invalid="ignore"):
        sub = (2 - 2 * ks)[None, :] * math.log(j01) + d.logrk_f \
            + (2 * ks)[None, :] * np.log(np.maximum(c * xb, 1e-300))[:, None]
        best = np.argmin(sub, axis=1)
        G = A - np.exp(sub[np.arange(c.size), best])
        gauss = np.where(G > 0, -G / 4, 0.0)
        pseudo = np.where(d.m_f > 0, 0.5 * np.log(2 / (math.pi * np.maximum(d.m_f, 1e-300) * xa)), 0.0)
    return np.minimum(0.0, np.minimum(gauss, pseudo)), best


def tail_float(d: _TailData, eps: float, N: int, goal: float) -> float:
    """Float estimate of the section-4c tail bound (planning and the choice of N only)."""
    import numpy as np

    allr = np.concatenate([d.iso_f, d.m_f[d.m_f > 0]])
    total = 0.0
    for i, (n_a, n_b) in enumerate(_odd_blocks(N)):
        far = _far_tail_float(allr, (n_a - 2) * eps)
        if total + far <= goal or total > goal or i >= _MAX_BLOCKS:
            return total + far
        xa, xb = n_a * eps, n_b * eps
        iso = d.iso_f[d.iso_f * xa >= 2 / math.pi]
        lg = 0.5 * np.log(2 / (math.pi * iso * xa)).sum() if iso.size else 0.0
        glog, _ = _group_logs_float(d, xa, xb)
        lg += glog.sum()
        count = (n_b - n_a) // 2 + 1
        total += 2 / math.pi * count / n_a * math.exp(lg)
    return math.inf


def residual_truncation_bound(d: _TailData, eps: arb, N: int, goal: float) -> tuple[arb, int]:
    """(bound, J): a proven bound for sum_{n odd > N} (2/(pi n)) |Phi_0(n eps)| (docs/method.md, section 4c).

    Blocks of odd indices [n_a, n_b] are bounded by the number of their terms times
    (2/(pi n_a)) times a bound for |Phi_0| on [n_a eps, n_b eps]: isolated weights by
    sqrt(2/(pi r xi)), each residual group by the smaller of its Gaussian factor
    exp(-(1/4)[(c xi_a)^2 R_1 - j01^(2-2k) (c xi_b)^(2k) R_k]) and sqrt(2/(pi c m xi_a))
    (m the proven lower bound of its largest residual weight over c); the indices past
    the last block by the section-4 power law over the isolated and these pseudo weights.
    Factors the floats find negligible are bounded by 1 (always valid).  J is the
    number of weights in the power law past the last block.
    """
    import numpy as np

    j01_lo_q, _ = check_j01()
    j01_lo = _arb_q(j01_lo_q)
    pi = arb.pi()
    two_over_pi = 2 / pi
    allr_arb = list(d.iso) + [c * m2.sqrt() for (c, _, _, m2) in d.groups if m2 is not None and m2 > 0]
    allr_f = np.array([float(r.mid()) for r in allr_arb])
    eps_f = float(eps.mid())

    def far(M: int) -> arb:
        xi = eps * M
        logp = arb(0)
        J = 0
        for r, rf in zip(allr_arb, allr_f):
            if rf * eps_f * M < 0.7:  # keep only factors that are clearly below 1
                continue
            f = two_over_pi / (r * xi)
            if f < 1:
                logp += f.log() / 2
                J += 1
        if J == 0:
            return arb("inf"), 0
        return arb(((2 / (pi * J)) * logp.exp()).upper()), J

    total = arb(0)
    for i, (n_a, n_b) in enumerate(_odd_blocks(N)):
        xi_f = (n_a - 2) * eps_f
        far_f = _far_tail_float(allr_f, xi_f)
        if (far_f < math.inf and float(total.upper()) + far_f <= goal) or i >= _MAX_BLOCKS \
                or float(total.upper()) > goal:
            fb, J = far(n_a - 2)
            return arb((total + fb).upper()), J
        xa, xb = eps * n_a, eps * n_b
        xa_f, xb_f = n_a * eps_f, n_b * eps_f
        lg = arb(0)
        for w, wf in zip(d.iso, d.iso_f):
            if wf * xa_f < 0.7:
                continue
            f = two_over_pi / (w * xa)
            if f < 1:
                lg += f.log() / 2
        glog, best = _group_logs_float(d, xa_f, xb_f)
        for gi in np.nonzero(glog < -1e-6)[0]:
            c, r1, rk, m2 = d.groups[gi]
            cand = arb(0)
            if rk:
                k = int(best[gi]) + 2
                G = (c * xa) ** 2 * r1 - j01_lo ** (2 - 2 * k) * (c * xb) ** (2 * k) * rk[k - 2]
                if G > 0:
                    cand = arb((-G / 4).upper())
            if m2 is not None and m2 > 0:
                f = two_over_pi / (c * m2.sqrt() * xa)
                if f < 1:
                    ps = arb((f.log() / 2).upper())
                    if ps < cand:
                        cand = ps
            lg += cand
        count = (n_b - n_a) // 2 + 1
        total += arb((two_over_pi * count / n_a * lg.exp()).upper())
    return arb("inf"), 0


def _residual_log_factor(group: ResidualGroup, xi: arb, need: float, j01_lo: arb, C: arb):
    """(log of prod_res J_0, bound on the series tail) for one residual group.

    Raises ResidualTooLarge if the largest residual weight times xi is not
    provably below j_{0,1}.
    """
    x = group.scale * xi
    # y_max = (x / j01) * min_k R_k^(1/(2k)) bounds x |rho|^-1 / j01 for every residual zero.
    best = None
    for k, R in enumerate(group.power_sums, start=1):
        up = arb(R.upper())
        if up <= 0:
            # infinitely many zeros are never isolated, so every R_k is a sum of positive
            # terms: R_k <= 0 is impossible data, not a neutral factor (fail closed)
            raise Inconsistent(
                f"{group.label or 'residual group'}: residual power sum R_{k} = {R.str(5)} is "
                "not positive, but infinitely many zeros remain after the isolated ones: a "
                "moment or an isolated zero is wrong; not certified")
        r = up.root(2 * k)
        best = r if best is None or r < best else best
    y = x / j01_lo * best
    if not (y < 1):
        raise ResidualTooLarge("residual weights too large for the Rayleigh expansion")
    y2 = y * y
    geom = y2 / (1 - y2)
    xj2 = (x / j01_lo) ** 2
    total = arb(0)
    xk = arb(1)
    for k, R in enumerate(group.power_sums, start=1):
        xk *= x * x
        total -= _arb_q(rayleigh_sigma(k)) / k * xk * R
        # tail after k terms
        tail = C / (k + 1) * (xj2**k) * arb(R.upper()).nonnegative_part() * geom
        if k >= 1 and tail.upper() < need:
            return total, arb(tail.upper())
    K = len(group.power_sums)
    tail = C / (K + 1) * (xj2**K) * arb(group.power_sums[-1].upper()) * geom
    return total, arb(tail.upper())


def _clamp_unit(x: arb) -> arb:
    """The intersection of the ball x with [0, 1] (as a ball); x must meet [0, 1]."""
    lo = x.lower() if x.lower() > 0 else arb(0)
    hi = x.upper() if x.upper() < 1 else arb(1)
    if not (lo <= hi):
        raise PrecisionExhausted("not certified: a residual factor left [0, 1]")
    return arb(lo).union(arb(hi))


def _smallest_n(bound, goal: float, max_terms: int, exact: bool = True):
    """Smallest odd N (doubling, then bisection) with bound(N) < goal; None past max_terms.

    ``bound`` returns an arb (``exact``: compared by its upper end) or a float.
    """
    def ok(n):
        b = bound(n)
        if exact:
            return b.is_finite() and b.upper() < goal
        return b < goal

    n_hi = 1
    while not ok(n_hi):
        n_hi *= 2
        if n_hi > max_terms:
            return None
    n_lo = max(1, n_hi // 2)
    while n_hi - n_lo > 2:
        mid = (n_lo + n_hi) // 2
        if ok(mid):
            n_hi = mid
        else:
            n_lo = mid
    return n_hi if n_hi % 2 == 1 else n_hi + 1


TRUNCATION_ISOLATED = "isolated weights (section 4)"
TRUNCATION_RESIDUAL = "isolated weights and residual groups (section 4c)"


def density_enclosure(var: BesselVariable, target_width: float, prec: int | None = None,
                      max_terms: int = 200000, truncation: str = "auto") -> DensityEnclosure:
    """An enclosure of P(X > 0) for X = mu + sum_j w_j cos Theta_j (+ residual groups).

    Parameters
    ----------
    var : BesselVariable
        Mean, direct weights (balls, all > 0) and residual groups.
    target_width : float
        Desired width of the enclosure; the error budget is split so that the
        width comes out below it when the inputs are precise enough.
    prec : int, optional
        Working precision in bits (default: from the target).
    truncation : str
        "auto": the bound of section 4 or of section 4c, whichever needs fewer terms;
        ``TRUNCATION_ISOLATED``: section 4 only (how certificates written before
        section 4c existed are re-derived).

    Returns
    -------
    DensityEnclosure
        The enclosure, the itemised budget (aliasing, frequency truncation,
        residual zeros, rounding) and the parameters chosen.

    References
    ----------
    docs/method.md, sections 3-5 (square-wave series, tail and truncation bounds,
    Rayleigh expansion of the residual product).
    """
    tau = float(target_width)
    if not (tau > 0):
        raise ValueError("target width must be positive")
    if prec is None:
        prec = max(64, int(-math.log2(tau)) + 40)
    from ..arith import workprec

    if not var.residuals and 1 <= len(var.weights) <= 2:
        with workprec(prec):
            return _few_weights_density(var, tau, prec)
    with workprec(prec):
        j01_lo_q, _ = check_j01()
        j01_lo = _arb_q(j01_lo_q)
        C = _arb_q(tail_constant())
        mu = var.mu
        weights = [w for w in var.weights]
        V = variance(var)
        if not (V > 0):
            raise PrecisionExhausted("not certified: the race variable has no random part")
        # --- aliasing (docs/method.md, section 4, Lemma A): with h = L/2 and mu in
        # [mu_lo, mu_hi] inside (-h, h), V <= V_hi:
        #   P(|X| >= h) <= exp(-(h - mu_hi)^2 / (2 V_hi)) + exp(-(h + mu_lo)^2 / (2 V_hi)),
        # each term bounded at the end of the mean's ball that makes it largest (no
        # monotonicity in |mu| is needed)
        budget_alias = tau / 8
        vf = float(V.upper())
        t = math.sqrt(2 * vf * math.log(2 / budget_alias))
        half_L = Fraction(math.ceil((abs(float(mu.mid())) + float(mu.rad()) + t) * 64) / 64)
        L = 2 * _arb_q(half_L)
        h = _arb_q(half_L)
        mu_lo, mu_hi, V_hi = arb(mu.lower()), arb(mu.upper()), arb(V.upper())
        gap_up, gap_down = h - mu_hi, h + mu_lo
        if not (gap_up > 0 and gap_down > 0):
            raise PrecisionExhausted("not certified: period too short for the mean")
        alias = (-(gap_up**2) / (2 * V_hi)).exp() + (-(gap_down**2) / (2 * V_hi)).exp()
        alias = arb(alias.upper())
        eps = 2 * arb.pi() / L
        # --- truncation: smallest odd N with bound <= tau/8, by the isolated weights alone
        # (section 4) or with the residual groups too (section 4c), whichever needs fewer terms
        budget_trunc = tau / 8
        N_old = _smallest_n(lambda n: truncation_bound(weights, eps * n)[0], budget_trunc, max_terms)
        N, trunc, J = None, None, 0
        method = TRUNCATION_ISOLATED
        if var.residuals and truncation != TRUNCATION_ISOLATED:
            data = _tail_data(weights, var.residuals)
            eps_f = float(eps.mid())
            N_new = _smallest_n(lambda n: tail_float(data, eps_f, n, budget_trunc / 2),
                                budget_trunc / 2, max_terms, exact=False)
            while N_new is not None and (N_old is None or N_new < N_old):
                b, J_new = residual_truncation_bound(data, eps, N_new, budget_trunc / 2)
                if b.is_finite() and b.upper() < budget_trunc:
                    N, trunc, J = N_new, b, J_new
                    method = TRUNCATION_RESIDUAL
                    break
                N_new = N_new + 2 * max(1, N_new // 8)  # the floats were optimistic: a little further
                if N_new > max_terms:
                    N_new = None
        if N is None:
            if N_old is None:
                raise PrecisionExhausted(
                    "not certified: the characteristic function does not decay fast enough "
                    f"with {len(weights)} isolated weights (need more zeros)")
            N = N_old
            trunc, J = truncation_bound(weights, eps * N)
            trunc = arb(trunc.upper())
        # --- main sum
        n_terms = (N + 1) // 2
        need_per_term = tau / 16 / n_terms
        total = arb(0)
        rayleigh = arb(0)
        k_used = 0
        fallback = 0
        two_over_pi = 2 / arb.pi()
        for n in range(1, N + 1, 2):
            xi = eps * n
            P = arb(1)
            for w in weights:
                P *= (w * xi).bessel_j(0)
            absP = arb(abs(P).upper())
            coef = two_over_pi / n * (eps * n * mu).sin()
            log_res = arb(0)
            tail_sum = arb(0)
            try:
                for g in var.residuals:
                    ell, tl = _residual_log_factor(g, xi, need_per_term / max(float(absP.upper()), 1e-300) / 4, j01_lo, C)
                    log_res += ell
                    tail_sum += tl
                k_used = max(k_used, len(var.residuals[0].power_sums) if var.residuals else 0)
                # e^l with l = -sum (sigma_k/k) x^(2k) R_k <= 0 (every R_k >= 0), so e^l lies in
                # [0, 1]; intersecting keeps a wide ball of l from inflating the enclosure
                factor = _clamp_unit(log_res.exp())
                phi = P * factor
                # the true factor is e^(l - t) with 0 <= t <= tail_sum, and
                # |e^(l-t) - e^l| = e^l (1 - e^-t) <= e^l (1 - e^-tail_sum) <= e^l
                ray = abs(coef) * absP * arb(factor.upper()) * (1 - (-tail_sum).exp())
                ray = arb(ray.upper())
            except ResidualTooLarge:
                # fall back on |prod_res J_0| <= 1: Phi_0 in P * [-1, 1]
                fallback += 1
                phi = arb(0)
                ray = arb((abs(coef) * absP).upper())
            total += coef * phi
            rayleigh += ray
        main = 1 / arb(2) + total
        rounding = arb(main.rad())
        err = alias + trunc + rayleigh
        ball = main + arb(0, err.upper())
        ball = arb(ball.upper()).union(arb(ball.lower()))
        budget = (
            ErrorTerm("aliasing", alias,
                      "P(|X| >= L/2): square-wave period L; Chernoff bound with the exact variance"),
            ErrorTerm("frequency truncation", trunc,
                      "terms n > N: |J_0(x)| <= sqrt(2/(pi x)) on the isolated weights"
                      if method == TRUNCATION_ISOLATED else
                      "terms n > N: |J_0(x)| <= sqrt(2/(pi x)) on isolated weights; residual "
                      "groups by power sums (4c)"),
            ErrorTerm("residual zeros", rayleigh,
                      "tail of the Rayleigh expansion of the product over zeros not isolated"),
            ErrorTerm("rounding and zero enclosures", rounding,
                      "radius of the interval sum (ball arithmetic, widths of the zero enclosures)"),
        )
        params = {
            "period_L": str(Fraction(2) * half_L),
            "terms": n_terms,
            "last_odd_index": N,
            "xi_max": float(eps.mid()) * N,
            "direct_weights": len(weights),
            "truncation_weights_used": J,
            "truncation": method,
            "residual_groups": len(var.residuals),
            "moments_available": max((len(g.power_sums) for g in var.residuals), default=0),
            "working_precision_bits": prec,
            "variance": float(V.mid()),
            "fallback_frequencies": fallback,
        }
        return DensityEnclosure(Enclosure.from_arb(ball), budget, params, ball)


def _few_weights_density(var: BesselVariable, tau: float, prec: int) -> DensityEnclosure:
    """P(X > 0) for one or two cosines, by closed form or rigorous quadrature.

    With one weight w, P(mu + w cos T > 0) = arccos(clip(-mu/w)) / pi.  With two,
    integrating out the first phase leaves

        P = (1/pi) int_0^pi G(t) dt,   G(t) = arccos(clip(c(t))) / pi,
        c(t) = -(mu + w_2 cos t) / w_1,

    computed by Arb's rigorous integration (docs/method.md, section 4b).  The
    Fourier series would need about 1/tau terms here (|Phi_0| decays only like
    1/xi), so this path replaces it.
    """
    from flint import acb

    mu = var.mu
    ws = list(var.weights)
    one = arb(1)

    def acos_clipped(x: arb) -> arb:
        """arccos(clip(x, -1, 1)) over the whole ball x (arccos decreases)."""
        lo = x.lower() if x.lower() > -1 else -one
        hi = x.upper() if x.upper() < 1 else one
        lo = lo if lo < 1 else one
        hi = hi if hi > -1 else -one
        # endpoints are exact points of [-1, 1]; acos of each is a tight ball
        return arb(hi).acos().union(arb(lo).acos())

    if len(ws) == 1:
        ball = acos_clipped(-mu / ws[0]) / arb.pi()
        method = "closed form arccos(-mu/w)/pi"
    else:
        w1, w2 = ws

        def integrand(t, analytic):
            c = -(acb(mu) + acb(w2) * t.cos()) / acb(w1)
            re = c.real
            if analytic:
                if re.upper() < -1:
                    return acb(1)
                if re.lower() > 1:
                    return acb(0)
                if re.lower() > -1 and re.upper() < 1:
                    return c.acos() / arb.pi()
                return acb("nan")
            # plain evaluation on a real segment: G is monotone in c, so clip and take acos
            return acb(acos_clipped(re) / arb.pi())

        tol = arb(tau) / 64
        val = acb.integral(integrand, 0, arb.pi(), abs_tol=tol, eval_limit=2_000_000)
        ball = val.real / arb.pi()
        if not val.imag.contains(0) or not ball.is_finite():
            raise PrecisionExhausted("not certified: the two-cosine quadrature did not converge")
        method = "rigorous quadrature of arccos(clip(c(t)))/pi (Arb)"
    if not ball.is_finite():
        raise PrecisionExhausted("not certified: few-weight density is not finite")
    budget = (
        ErrorTerm("quadrature and rounding", arb(arb(ball.rad()).upper()),
                  "radius of the closed form or of Arb's rigorous integral"),
    )
    params = {"method": method, "direct_weights": len(ws), "working_precision_bits": prec,
              "residual_groups": 0, "fallback_frequencies": 0, "xi_max": 0.0}
    return DensityEnclosure(Enclosure.from_arb(ball), budget, params, ball)
