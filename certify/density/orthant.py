"""Probability of an orthant for a vector of sums of independent planar rotations.

The random vector (docs/method.md, section 10) is

    Y = mu + sum_g sum_j 2 Re(v_g U_{g,j}) w_{g,j}    in R^d,

with mu in R^d, one complex vector v_g in C^d per group, weights
w_{g,j} = 1/|rho| > 0 (the isolated zeros of the group) and independent
uniform U on the unit circle; a group may also hold zeros known only through
their exact power sums R_k = sum |rho|^(-2k) (the residual zeros).  Its
characteristic function is

    E e^{i <xi, Y>} = e^{i <xi, mu>} Phi_0(xi),
    Phi_0(xi) = prod_g prod_j J_0(2 |<xi, v_g>| w_{g,j})   (residual zeros likewise).

:func:`orthant_enclosure` returns enclosures of P(s_i Y_i > 0 for every i) for
the sign patterns s asked for, from the product of square-wave series, with
an itemised budget: aliasing (per coordinate, exact variances), truncation
(a tail bound that holds in every direction of R^d, from a cover of the unit
sphere of the max-norm), residual zeros (Rayleigh expansion along each
frequency vector) and rounding.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np

from ..arith import acb, arb, workprec
from ..errors import PrecisionExhausted
from ..result import DensityEnclosure, Enclosure, ErrorTerm
from .bessel import ResidualTooLarge, _arb_q, _clamp_unit
from .besselj import check_j01, rayleigh_sigma, tail_constant
from ..errors import Inconsistent


#: zeros with x w <= EXPAND * j_{0,1} at a frequency vector go into the Rayleigh expansion
EXPAND = 0.3


@dataclass(frozen=True)
class VectorGroup:
    """Zeros sharing one direction vector v in C^d.

    Each isolated zero contributes 2 Re(v U) w with w = ``weights[j]``; the
    residual zeros contribute likewise with power sums
    ``residual[k-1] = sum_res w^(2k)`` (exact balls, possibly empty).
    """

    vector: tuple  # acb, length d
    weights: tuple  # arb > 0
    residual: tuple = ()  # arb R_1..R_K
    label: str = ""


@dataclass(frozen=True)
class VectorVariable:
    """Y = mu + sum over groups and zeros of 2 Re(v_g U) w."""

    mu: tuple  # arb, length d
    groups: tuple = field(default_factory=tuple)

    @property
    def dimension(self) -> int:
        return len(self.mu)


# ---------------------------------------------------------------------------
# exact second moments
# ---------------------------------------------------------------------------

def group_mass(g: VectorGroup) -> arb:
    """sum over the group's zeros of w^2 (isolated ones plus R_1)."""
    m = sum((w * w for w in g.weights), arb(0))
    if g.residual:
        m += g.residual[0]
    return m


def covariance(var: VectorVariable) -> list[list[arb]]:
    """Cov(Y_i, Y_j) = sum_g 2 Re(v_gi conj(v_gj)) sum_zeros w^2 (docs/method.md, 10.1)."""
    d = var.dimension
    cov = [[arb(0)] * d for _ in range(d)]
    for g in var.groups:
        m = group_mass(g)
        for i in range(d):
            for j in range(d):
                cov[i][j] += 2 * (g.vector[i] * g.vector[j].conjugate()).real * m
    return cov


# ---------------------------------------------------------------------------
# the truncation tail: a bound on |Phi_0| along every direction
# ---------------------------------------------------------------------------

def _patches(d: int, per_side: int):
    """Boxes covering the faces {eta_i = +1} of the unit max-norm sphere.

    Returns (centres, half_width): the face i is {eta_i = 1, |eta_j| <= 1};
    together with their mirror images -P (|Phi_0| is even) they cover the sphere.
    """
    h = 1.0 / per_side  # half-width; centres -1 + h, -1 + 3h, ...
    grid = [-1 + h * (2 * m + 1) for m in range(per_side)]
    out = []
    for i in range(d):
        for rest in itertools.product(grid, repeat=d - 1):
            eta = list(rest[:i]) + [None] + list(rest[i:])
            out.append((i, tuple(eta)))
    return out, h


class DirectionalTail:
    """Upper bounds for |Phi_0(xi)| on the max-norm sphere ||xi||_inf = s, and the tail sum.

    For each patch P of the cover and each group g, t_{g,P} <= |<eta, v_g>| for every
    eta in P (an interval evaluation).  Then for ||xi||_inf = s with xi/s in P,

        |Phi_0(xi)| <= prod_g prod_{j in S_g} (pi s t_{g,P} w_{g,j})^(-1/2)

    for any subsets S_g (|J_0(x)| <= min(1, sqrt(2/(pi x))), docs/method.md 10.4).
    Floating point picks the subsets; the bound is evaluated in arb.
    """

    def __init__(self, var: VectorVariable, per_side: int):
        d = var.dimension
        self.d = d
        patches, h = _patches(d, per_side)
        self.n_patches = 2 * len(patches)  # with the mirror images
        G = len(var.groups)
        t_lo = np.zeros((len(patches), G))
        self.t_arb = [[None] * G for _ in patches]
        # the centres -1 + h(2m+1) are floats (rounded): a radius h (1 + 2^-20) makes the
        # boxes overlap, so that no direction falls between two of them
        rad = arb(0, h * (1 + 2.0**-20))
        for p, (face, eta) in enumerate(patches):
            coords = [arb(1) if i == face else arb(eta[i]) + rad for i in range(d)]
            for gi, g in enumerate(var.groups):
                z = acb(0)
                for i in range(d):
                    z += coords[i] * g.vector[i]
                lo = abs(z).lower()
                if lo > 0:
                    t = arb(lo)
                    self.t_arb[p][gi] = t
                    t_lo[p, gi] = float(lo) * (1 - 1e-12)  # float used only to choose subsets
        self.t_lo = t_lo
        # weights sorted in decreasing order; prefix sums of log w (arb) per group
        self.w_float = []
        self.log_prefix = []
        for g in var.groups:
            ws = sorted(g.weights, key=lambda w: -float(w.mid()))
            self.w_float.append(np.array([float(w.lower()) for w in ws]))
            pref = [arb(0)]
            for w in ws:
                pref.append(pref[-1] + arb(w.lower()).log())
            self.log_prefix.append(pref)
        self.log_prefix_float = [np.concatenate([[0.0], np.cumsum(np.log(w))]) if w.size else
                                 np.zeros(1) for w in self.w_float]
        self.log_pi = arb.pi().log()

    def _counts(self, s: float) -> np.ndarray:
        """n[p, g] = #{j : pi s t_{g,p} w_j > 1} (float choice of the subsets)."""
        n = np.zeros(self.t_lo.shape, dtype=int)
        for gi, w in enumerate(self.w_float):
            if w.size == 0:
                continue
            u = np.pi * s * self.t_lo[:, gi]
            # w sorted decreasing: count of w > 1/(pi u)
            with np.errstate(divide="ignore"):
                thr = np.where(u > 0, 1.0 / np.where(u > 0, u, 1.0), np.inf)
            n[:, gi] = np.searchsorted(-w, -thr, side="left")
        return n

    def log_bound_float(self, s: float) -> tuple[float, int]:
        """(max over patches of the log bound, min over patches of the exponent count); planning.

        With w sorted decreasingly, sum_j max(0, log(pi s t w_j)) = n log(pi s t) + sum_{j<n} log w_j,
        n = #{j : w_j > 1/(pi s t)}.
        """
        n = self._counts(s)
        tot = np.zeros(self.t_lo.shape[0])
        for gi, w in enumerate(self.w_float):
            if w.size == 0:
                continue
            u = np.pi * s * self.t_lo[:, gi]
            with np.errstate(divide="ignore"):
                lu = np.where(u > 0, np.log(np.where(u > 0, u, 1.0)), 0.0)
            tot -= 0.5 * (n[:, gi] * lu + self.log_prefix_float[gi][n[:, gi]])
        best = float(tot.max()) if tot.size else 0.0
        jmin = int(n.sum(axis=1).min()) if n.size else 0
        return best, jmin

    def bound(self, s: arb, s_float: float) -> tuple[arb, int]:
        """(beta, J): |Phi_0(xi)| <= beta (s'/s)^(-J/2) for every ||xi||_inf = s' >= s (arb).

        For each patch the subsets S_g are the zeros with pi s t w > 1 (chosen in
        floating point; any choice gives a valid bound); beta is the largest of the
        patch bounds and J the smallest total size of the subsets.
        """
        n = self._counts(s_float)
        log_s = s.log()
        best = None
        jmin = None
        for p in range(n.shape[0]):
            tot = arb(0)
            J = 0
            for gi in range(n.shape[1]):
                k = int(n[p, gi])
                t = self.t_arb[p][gi]
                if k == 0 or t is None:
                    continue
                tot -= (k * (self.log_pi + log_s + t.log()) + self.log_prefix[gi][k]) / 2
                J += k
            up = arb(tot.upper())  # exact dyadic: comparisons below are exact
            if best is None or up > best:
                best = up
            jmin = J if jmin is None else min(jmin, J)
        return arb(best.exp().upper()), (jmin or 0)


def _odd_harmonic_box(K: int) -> arb:
    """S(K) = 1/2 + (2/pi) sum_{n odd, 1 <= n <= K} 1/n: the mass prod |h(k)| of one axis."""
    m = (max(K, 0) + 1) // 2  # number of odd n <= K
    if m == 0:
        return arb(1) / 2
    # sum_{j<m} 1/(2j+1) = (psi(m + 1/2) - psi(1/2)) / 2
    half = arb(1) / 2
    h = ((arb(m) + half).digamma() - half.digamma()) / 2
    return half + 2 / arb.pi() * h


def _floor_below(X: arb, e: arb) -> int:
    """An integer K >= 0 with K e < X proven (the largest such found near X/e)."""
    K = max(0, int(math.floor(float((X / e).mid()))) + 1)
    while K > 0 and not (arb(K) * e < X):
        K -= 1
    return K


def _floor_above(X: arb, e: arb) -> int:
    """An integer K with every k, |k| e < X, satisfying |k| <= K."""
    return int(math.floor(float((X / e).upper()))) + 1


def _mass(Ks) -> arb:
    out = arb(1)
    for K in Ks:
        out *= _odd_harmonic_box(K)
    return out


def truncation_tail(tail: DirectionalTail, K: list, eps: list, shells: int = 10):
    """Rigorous bound of the sum over k outside the box |k_i| <= K_i of prod |h(k_i)| |Phi_0(eps k)|.

    Every such k has ||eps k||_inf >= X_0 = min_i (K_i + 1) eps_i.  The shells
    [X_0 2^m, X_0 2^(m+1)), m < ``shells``, contribute at most beta(X_0 2^m) times
    their mass (an upper box mass minus a lower one); beyond, beta decays like
    2^(-m J/2) against masses growing like (log)^d, a geometric series
    (docs/method.md, section 10.4).  Returns (bound, J at the last shell).
    """
    d = len(eps)
    X0 = min((arb(K[i] + 1) * eps[i] for i in range(d)), key=lambda a: float(a.mid()))
    X0 = arb(X0.lower())
    total = arb(0)
    inner = _mass(K)  # the box itself
    for m in range(shells):
        s = X0 * 2**m
        beta, J = tail.bound(s, float(s.mid()))
        outer = _mass([_floor_above(s * 2, e) for e in eps])
        total += beta * (outer - inner)
        inner = _mass([_floor_below(s * 2, e) for e in eps])
    s_M = X0 * 2**shells
    beta, J = tail.bound(s_M, float(s_M.mid()))
    if J == 0:
        return arb("inf"), 0
    # mass below X_0 2^(m+1) (m >= shells) <= prod_i (a_i + (m + 1 - shells) b),
    # a_i = 1/2 + 2/pi + log(1 + s_M/eps_i)/pi: sum over odd n <= K of 1/n <= 1 + log(K)/2
    b = arb(2).log() / arb.pi()
    A = None
    for e in eps:
        a = arb(1) / 2 + 2 / arb.pi() + (1 + s_M / e).log() / arb.pi()
        a = arb(a.upper())
        A = a if A is None or a > A else A
    x = arb(2) ** (-arb(J) / 2)
    r = x * ((A + 2 * b) / (A + b)) ** d
    if not (r < 1):
        return arb("inf"), J
    total += beta * (A + b) ** d / (1 - r)
    return arb(total.upper()), J


# ---------------------------------------------------------------------------
# the engine
# ---------------------------------------------------------------------------

def _half_lattice(K: list[int]):
    """k with k_i in {0} or odd, |k_i| <= K_i, k != 0 and first non-zero coordinate positive."""
    axes = [[0] + [n for n in range(-Ki, Ki + 1) if n % 2] for Ki in K]
    for k in itertools.product(*axes):
        for c in k:
            if c:
                if c > 0:
                    yield k
                break


def orthant_enclosure(var: VectorVariable, target_width: float, signs=None,
                      prec: int | None = None, per_side: int | None = None,
                      max_points: int = 4_000_000) -> dict:
    """Enclosures of P(s_i Y_i > 0 for all i) for each sign pattern s in ``signs``.

    Parameters
    ----------
    var : VectorVariable
    target_width : float
        Width aimed at for each enclosure (the budget is split as in one dimension).
    signs : sequence of tuples of +1/-1, default all +1 and all -1
    prec : int, optional
        Working precision in bits.
    per_side : int, optional
        Patches per side of each face of the max-norm sphere (tail bound).

    Returns
    -------
    dict
        {sign pattern: DensityEnclosure}; the budgets share the aliasing,
        truncation and residual terms (the same lattice serves every pattern).

    References
    ----------
    docs/method.md, section 10.
    """
    d = var.dimension
    if d < 1:
        raise ValueError("dimension must be at least 1")
    if signs is None:
        signs = [tuple([1] * d), tuple([-1] * d)]
    signs = [tuple(int(x) for x in s) for s in signs]
    tau = float(target_width)
    if not (tau > 0):
        raise ValueError("target width must be positive")
    if prec is None:
        prec = max(64, int(-math.log2(tau)) + 40)
    if per_side is None:
        per_side = {1: 1, 2: 96, 3: 20}.get(d, 8)
    with workprec(prec):
        return _orthant(var, tau, signs, prec, per_side, max_points)


def _orthant(var, tau, signs, prec, per_side, max_points):
    d = var.dimension
    j01_lo = _arb_q(check_j01()[0])
    Cj = _arb_q(tail_constant())
    # --- aliasing: sum_i P(|Y_i| >= L_i/2), each by Chernoff with the exact variance
    half_L, alias, cov = periods(var, tau)
    V = [cov[i][i] for i in range(d)]
    eps = [arb.pi() / _arb_q(hl) for hl in half_L]  # 2 pi / L_i
    eps_f = [float(e.mid()) for e in eps]
    # --- truncation: the smallest Xi (on a 1/64 grid) whose tail bound is below tau/8
    tail = DirectionalTail(var, per_side)
    budget_trunc = tau / 8

    Xi = search_box(tail, eps_f, budget_trunc)

    def K_of(Xi: float) -> list:
        return [int(math.floor(Xi / e)) for e in eps_f]

    for _ in range(20):
        K = K_of(Xi)
        trunc, J = truncation_tail(tail, K, eps)
        if trunc.is_finite() and trunc.upper() < budget_trunc:
            break
        Xi *= 1.125
    else:
        raise PrecisionExhausted("not certified: the truncation bound could not be met")
    pts = np.array(list(_half_lattice(K)), dtype=np.int64).reshape(-1, d)
    n_box = pts.shape[0]
    if n_box > max_points:
        raise PrecisionExhausted(f"not certified: {n_box} frequency vectors needed (limit {max_points})")
    # --- pruning: frequency vectors whose pointwise bound |c(k)| prod |J_0| bounds is tiny
    #     are not evaluated; their bound (in arb) is booked instead (docs/method.md, 10.5)
    keep, skip = _prune(pts, eps_f, var, tail, tau / 32)
    pi = arb.pi()
    half = arb(1) / 2
    skipped = arb(0)
    for k in skip:
        skipped += _pointwise_bound(k, eps, var, tail)
    skipped = arb(skipped.upper())
    # --- main sum over the kept half lattice
    G = len(var.groups)
    n_points = len(keep)
    # Each group's isolated zeros, largest weight first.  At a frequency vector the zeros with
    # x w > EXPAND j_{0,1} (x = 2|<xi, v>|) get J_0 evaluated; the others are folded into the
    # Rayleigh expansion with the residual zeros: their power sums w^(2k) are added to R_k
    # (suffix sums below).  The expansion checks its own radius (docs/method.md, 10.6).
    sorted_w, suffix = [], []
    for g in var.groups:
        ws = sorted(g.weights, key=lambda w: -float(w.mid()))
        sorted_w.append((ws, np.array([float(w.mid()) for w in ws])))
        K_g = len(g.residual)
        suf = [[arb(0)] * K_g for _ in range(len(ws) + 1)]
        if K_g:
            for j in range(len(ws) - 1, -1, -1):
                w2 = ws[j] * ws[j]
                p_ = w2
                row = []
                for kk in range(K_g):
                    row.append(suf[j + 1][kk] + p_)
                    p_ = p_ * w2
                suf[j] = row
        suffix.append(suf)
    thr = EXPAND * float(j01_lo.lower())
    res_cache = {}
    K_max = max((len(g.residual) for g in var.groups), default=0)
    sigmas = [_arb_q(rayleigh_sigma(k)) / k for k in range(1, K_max + 1)]
    need_each = tau / 16 / max(n_points, 1)
    sums = {s: arb(0) for s in signs}
    rayleigh = arb(0)
    fallback = 0
    bessel_calls = 0
    for k in keep:
        xi = [eps[i] * k[i] for i in range(d)]
        theta = sum((xi[i] * var.mu[i] for i in range(d)), arb(0))
        nz = [i for i in range(d) if k[i]]
        m = len(nz)
        mag = half ** (d - m) / pi ** m
        for i in nz:
            mag = mag / k[i]  # carries the sign of k_i
        trig = (theta - m * pi / 2).cos()
        P = arb(1)
        res_parts = []
        for gi, g in enumerate(var.groups):
            z = acb(0)
            for i in nz:
                z += xi[i] * g.vector[i]
            x = (2 * abs(z)).nonnegative_part()  # |z| is >= 0: a ball straddling 0 is clipped
            ws, wf = sorted_w[gi]
            if g.residual:
                xf = float(x.upper())
                n_dir = int(np.searchsorted(-wf * xf, -thr, side="left")) if xf > 0 else 0
            else:
                n_dir = len(ws)
            for w in ws[:n_dir]:
                P *= (x * w).bessel_j(0)
            bessel_calls += n_dir
            if g.residual:
                key = (gi, n_dir)
                if key not in res_cache:
                    R = tuple(r + e for r, e in zip(g.residual, suffix[gi][n_dir]))
                    res_cache[key] = (R, _largest_weight_bound(R, g.label))
                R, root = res_cache[key]
                res_parts.append((x, R, root))
        absP = arb(abs(P).upper())
        coef_abs = 2 * abs(mag)  # the pair k, -k
        log_res = arb(0)
        tail_sum = arb(0)
        try:
            for x, R, root in res_parts:
                share_k = need_each / max(float((coef_abs * absP).upper()), 1e-300) / (4 * G)
                ell, tl = _rayleigh(x, R, root, share_k, j01_lo, Cj, sigmas)
                log_res += ell
                tail_sum += tl
            factor = _clamp_unit(log_res.exp())
            phi = P * factor
            ray = coef_abs * absP * arb(factor.upper()) * (1 - (-tail_sum).exp())
            ray = arb(ray.upper())
        except ResidualTooLarge:
            fallback += 1
            phi = arb(0)
            ray = arb((coef_abs * absP).upper())
        base = 2 * mag * trig * phi
        for s in signs:
            sg = 1
            for i in nz:
                sg *= s[i]
            sums[s] += base if sg > 0 else -base
        rayleigh += ray
    err = alias + trunc + skipped + rayleigh
    out = {}
    for s in signs:
        main = half ** d + sums[s]
        rounding = arb(main.rad())
        ball = main + arb(0, err.upper())
        ball = arb(ball.upper()).union(arb(ball.lower()))
        # a probability lies in [0, 1]: the exact enclosure is intersected with it (tiny
        # densities would otherwise show a negative lower end); the ball is kept as computed
        enc = Enclosure.from_arb(ball)
        enc = Enclosure(max(enc.lower, Fraction(0)), min(enc.upper, Fraction(1)))
        budget = (
            ErrorTerm("aliasing", alias,
                      "sum_i P(|Y_i| >= L_i/2): periods L_i; Chernoff bounds with the exact variances"),
            ErrorTerm("frequency truncation", trunc,
                      "frequency vectors outside the box ||xi||_inf <= Xi: |J_0(x)| <= sqrt(2/(pi x)) "
                      "along a cover of every direction"),
            ErrorTerm("skipped frequency vectors", skipped,
                      "vectors inside the box not evaluated: the same bound at each vector"),
            ErrorTerm("residual zeros", rayleigh,
                      "tail of the Rayleigh expansion of the product over zeros not isolated"),
            ErrorTerm("rounding and zero enclosures", rounding,
                      "radius of the interval sum (ball arithmetic, widths of the zero enclosures)"),
        )
        params = {
            "dimension": d,
            "half_periods": [str(h) for h in half_L],
            "box_radius_Xi": Xi,
            "box_half_widths_K": K,
            "frequency_vectors": n_points,
            "frequency_vectors_in_box": n_box,
            "direction_patches": tail.n_patches,
            "tail_exponent_J": J,
            "groups": G,
            "direct_weights": sum(len(g.weights) for g in var.groups),
            "moments_available": max((len(g.residual) for g in var.groups), default=0),
            "working_precision_bits": prec,
            "variances": [float(v.mid()) for v in V],
            "covariance": [[float(c.mid()) for c in row] for row in cov],
            "fallback_frequencies": fallback,
            "bessel_evaluations": bessel_calls,
            "xi_max": Xi,
        }
        out[s] = DensityEnclosure(enc, budget, params, ball)
    return out


def _mass_float(Ks) -> float:
    """Planning version of the box mass prod_i S(K_i)."""
    out = 1.0
    for K in Ks:
        m = (max(K, 0) + 1) // 2
        if m <= 64:
            h = sum(1 / (2 * j + 1) for j in range(m))
        else:
            h = 0.5 * (math.log(4 * m) + 0.5772156649015329)
        out *= 0.5 + 2 / math.pi * h
    return out


def _log_bounds_float(pts: np.ndarray, eps_f: list, var: VectorVariable, tail) -> np.ndarray:
    """log of |c(k)| prod |J_0| bounds at each frequency vector, pair k, -k included (planning)."""
    d = pts.shape[1]
    xi = pts * np.asarray(eps_f)[None, :]
    nz = (pts != 0)
    m = nz.sum(axis=1)
    logc = np.log(2.0) - (d - m) * np.log(2.0) - m * np.log(np.pi)
    with np.errstate(divide="ignore"):
        logc -= np.where(nz, np.log(np.abs(np.where(nz, pts, 1))), 0.0).sum(axis=1)
    out = logc
    for gi, g in enumerate(var.groups):
        w = tail.w_float[gi]
        if w.size == 0:
            continue
        v = np.array([complex(float(c.real.mid()), float(c.imag.mid())) for c in g.vector])
        t = np.abs(xi @ v) * (1 - 1e-9)
        with np.errstate(divide="ignore"):
            lt = np.log(np.pi * t)
        lg = lt[:, None] + np.log(w)[None, :]
        out = out - 0.5 * np.maximum(lg, 0.0).sum(axis=1)
    return out


def _prune(pts: np.ndarray, eps_f: list, var: VectorVariable, tail, budget: float):
    """Split the half lattice into vectors to evaluate and vectors whose bounds sum below budget."""
    if pts.shape[0] == 0:
        return [], []
    lb = _log_bounds_float(pts, eps_f, var, tail)
    order = np.argsort(lb)
    cum = np.cumsum(np.exp(lb[order]))
    n_skip = int(np.searchsorted(cum, budget * 0.9, side="right"))
    skip = [tuple(int(c) for c in pts[i]) for i in order[:n_skip]]
    keep = [tuple(int(c) for c in pts[i]) for i in sorted(order[n_skip:])]
    return keep, skip


def _pointwise_bound(k, eps, var: VectorVariable, tail) -> arb:
    """|c(k)| + |c(-k)| times prod_g prod_{j in S_g} (pi |<xi, v_g>| w_j)^(-1/2) (arb, upper end)."""
    d = len(k)
    nz = [i for i in range(d) if k[i]]
    m = len(nz)
    log_b = arb(2).log() - (d - m) * arb(2).log() - m * tail.log_pi
    for i in nz:
        log_b -= arb(abs(k[i])).log()
    xi = [eps[i] * k[i] for i in range(d)]
    for gi, g in enumerate(var.groups):
        w = tail.w_float[gi]
        if w.size == 0:
            continue
        z = acb(0)
        for i in nz:
            z += xi[i] * g.vector[i]
        t = abs(z).lower()
        if not (t > 0):
            continue
        t = arb(t)
        n = int(np.searchsorted(-w, -1.0 / (np.pi * float(t)), side="left"))
        if n == 0:
            continue
        log_b -= (n * (tail.log_pi + t.log()) + tail.log_prefix[gi][n]) / 2
    return arb(log_b.exp().upper())


def _tail_float(tail, eps_f: list, Xi: float) -> float:
    """The tail bound of :func:`truncation_tail` in floating point (planning only)."""
    d = len(eps_f)
    K = [int(math.floor(Xi / e)) for e in eps_f]
    X0 = min((K[i] + 1) * eps_f[i] for i in range(d))
    tot = 0.0
    inner = _mass_float(K)
    M = 5  # planning: fewer explicit shells than the rigorous bound (which uses 10)
    for m in range(M):
        s = X0 * 2**m
        lb, _ = tail.log_bound_float(s)
        outer = _mass_float([int(2 * s / e) + 1 for e in eps_f])
        tot += math.exp(lb) * max(outer - inner, 0.0)
        inner = _mass_float([int(2 * s / e) for e in eps_f])
    lb, J = tail.log_bound_float(X0 * 2**M)
    if J == 0:
        return math.inf
    A = max(0.5 + 2 / math.pi + math.log(1 + X0 * 2**M / e) / math.pi for e in eps_f)
    b = math.log(2) / math.pi
    r = 2 ** (-J / 2) * ((A + 2 * b) / (A + b)) ** d
    if r >= 1:
        return math.inf
    return tot + math.exp(lb) * (A + b) ** d / (1 - r)


def search_box(tail, eps_f: list, budget: float, limit: float = 1e4) -> float:
    """A box radius Xi (within 4% of the smallest) whose planned tail bound is below budget."""
    Xi = min(eps_f)
    step = 2.0
    while _tail_float(tail, eps_f, Xi) > budget * 0.9:
        Xi *= step
        if Xi > limit:
            raise PrecisionExhausted("not certified: the characteristic function does not decay "
                                     "fast enough in some direction (need more zeros)")
    lo, hi = Xi / step, Xi
    while hi / lo > 1.04:
        mid = math.sqrt(lo * hi)
        if _tail_float(tail, eps_f, mid) > budget * 0.9:
            lo = mid
        else:
            hi = mid
    return hi


def periods(var: VectorVariable, tau: float):
    """Half-periods L_i/2 (exact) and the aliasing bound sum_i P(|Y_i| >= L_i/2) (docs/method.md, 10.3)."""
    d = var.dimension
    cov = covariance(var)
    V = [cov[i][i] for i in range(d)]
    for i in range(d):
        if not (V[i] > 0):
            raise PrecisionExhausted(f"not certified: coordinate {i + 1} has no random part")
    share = tau / (8 * d)
    half_L, alias = [], arb(0)
    for i in range(d):
        mu = var.mu[i]
        t = math.sqrt(2 * float(V[i].upper()) * math.log(2 / share))
        hl = Fraction(math.ceil((abs(float(mu.mid())) + float(mu.rad()) + t) * 64), 64)
        gap = _arb_q(hl) - arb(abs(mu).upper())
        if not (gap > 0):
            raise PrecisionExhausted("not certified: period too short for the mean")
        a = (-(gap ** 2) / (2 * V[i])).exp() + (-((_arb_q(hl) + arb(abs(mu).upper())) ** 2) / (2 * V[i])).exp()
        alias += arb(a.upper())
        half_L.append(hl)
    return half_L, arb(alias.upper()), cov


def plan_box(var: VectorVariable, tau: float, per_side: int | None = None) -> float:
    """Planning: the box radius Xi the engine would choose for ``var`` (floating point)."""
    d = var.dimension
    if per_side is None:
        per_side = {1: 1, 2: 16, 3: 8}.get(d, 6)
    with workprec(64):
        half_L, _, _ = periods(var, tau)
        eps_f = [math.pi / float(h) for h in half_L]
        tail = DirectionalTail(var, per_side)
    return search_box(tail, eps_f, tau / 8)


def _largest_weight_bound(R, label: str) -> arb:
    """min_k R_k^(1/(2k)): at least every weight w of the multiset whose power sums are R_k.

    R_k <= 0 cannot happen for infinitely many zeros: refuse (docs/method.md, section 5).
    """
    best = None
    for k, r in enumerate(R, start=1):
        up = arb(r.upper())
        if up <= 0:
            raise Inconsistent(f"{label or 'residual group'}: residual power sum R_{k} = {r.str(5)} "
                               "is not positive: a moment or an isolated zero is wrong; not certified")
        root = up.root(2 * k)
        best = root if best is None or root < best else best
    return best


def _rayleigh(x: arb, R, root: arb, need: float, j01_lo: arb, C: arb, sigmas):
    """(log prod_res J_0(x w), tail bound): the expansion of docs/method.md section 5 at scale x.

    ``root`` bounds every weight (``_largest_weight_bound``); raises ResidualTooLarge
    unless y = x root / j_{0,1} < 1 is proven.  Identical to the one-dimensional engine's
    residual factor with scale x at frequency 1, with the weight bound computed once.
    """
    y = x / j01_lo * root
    if not (y < 1):
        raise ResidualTooLarge("residual weights too large for the Rayleigh expansion")
    y2 = y * y
    geom = y2 / (1 - y2)
    xj2 = (x / j01_lo) ** 2
    total = arb(0)
    xk = arb(1)
    x2 = x * x
    pw = arb(1)
    for k, r in enumerate(R, start=1):
        xk *= x2
        total -= sigmas[k - 1] * xk * r
        pw *= xj2
        tail = C / (k + 1) * pw * arb(r.upper()).nonnegative_part() * geom
        if tail.upper() < need:
            return total, arb(tail.upper())
    return total, arb(tail.upper())
