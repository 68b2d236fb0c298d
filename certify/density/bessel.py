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


def density_enclosure(var: BesselVariable, target_width: float, prec: int | None = None,
                      max_terms: int = 200000) -> DensityEnclosure:
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
        # --- truncation: smallest odd N with bound <= tau/8
        budget_trunc = tau / 8
        n_hi = 1
        while True:
            b, _ = truncation_bound(weights, eps * n_hi)
            if b.is_finite() and b.upper() < budget_trunc:
                break
            n_hi *= 2
            if n_hi > max_terms:
                raise PrecisionExhausted(
                    "not certified: the characteristic function does not decay fast enough "
                    f"with {len(weights)} isolated weights (need more zeros)")
        n_lo = max(1, n_hi // 2)
        while n_hi - n_lo > 2:
            mid = (n_lo + n_hi) // 2
            b, _ = truncation_bound(weights, eps * mid)
            if b.is_finite() and b.upper() < budget_trunc:
                n_hi = mid
            else:
                n_lo = mid
        N = n_hi if n_hi % 2 == 1 else n_hi + 1
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
                      "terms n > N: |J_0(x)| <= sqrt(2/(pi x)) on the isolated weights"),
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
