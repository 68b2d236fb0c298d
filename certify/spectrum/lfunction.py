"""The one interface every analytic L-function offers to the spectrum layer.

The spectrum layer (zeros by sign changes, exact power sums, residual sums
and the missed-zero detector) is written once, against :class:`AnalyticL`.
A source (Dirichlet characters, zeta, elliptic curves over Q, ...) provides
an object with the following small interface; nothing else is needed.

Normalisation
-------------
Everything is in the *analytic* normalisation: the completed function
Lambda(s) is entire of order 1, its zeros are exactly the non-trivial zeros
of L, the functional equation reads Lambda(1 - s) = eps * conj(Lambda(conj s))
with |eps| = 1, and GRH puts every zero on Re s = 1/2.  (For L(E, s), whose
arithmetic centre is s = 1, the analytic s is the arithmetic s minus 1/2; for
zeta, Lambda is xi(s) = s (s - 1) pi^(-s/2) Gamma(s/2) zeta(s) / 2.)

Interface (duck-typed; :class:`AnalyticL` is the documented base)
----------------------------------------------------------------
``name`` : str
    For messages, e.g. ``"L(s, chi_{5,2})"`` or ``"L(E, s), E = 11a"``.
``key`` : tuple
    Hashable identity (caches).
``conductor`` : int and ``degree`` : int
    Conductor data: zeros near height t have density
    (1/2 pi) log(conductor (t / 2 pi)^degree); used for the search grid, the
    precision and the (refusal-only) counting check of the residual sums.
``self_dual`` : bool
    True if Lambda(s) = eps Lambda(1 - s) with real coefficients: the
    ordinates are then symmetric, and the positive ones carry half of every
    power sum of the non-central zeros.
``central_order`` : int
    The order r of the zero at s = 1/2 that the caller removes from the power
    sums (0 for Dirichlet L-functions, the analytic rank for a curve).
``hardy_z(t, prec) -> arb``
    The Hardy Z-function at the real ball t: a real-valued function with
    |Z(t)| = |L(1/2 + i t)|, so that a certified sign change proves a zero of
    odd order on the critical line.
``log_lambda_jet(count, prec) -> list[acb]``
    The Taylor coefficients c_1..c_count of log Lambda(1 + x) at the edge
    point s = 1 (analytic normalisation).  The source checks that its
    enclosure of Lambda(1) excludes 0 (so the logarithm is defined) and
    raises PrecisionExhausted otherwise.

From the jet, :func:`power_sums` gives the exact S_m = sum_rho (rho(1 -
rho))^(-m) over *all* zeros with multiplicity (docs/method.md, section 2:
the proof there uses only that Lambda is entire of order 1 with the
functional equation above, so it holds for every such Lambda);
:func:`noncentral_power_sums` removes the r central zeros (each has
rho (1 - rho) = 1/4 and contributes 4^m).  Zeros come from
:func:`certify.spectrum.zeros.find_zeros_of`, residual checks from
:func:`certify.spectrum.spectrum.residual_checks` (pass ``degree``).
"""

from __future__ import annotations

import math

from ..arith import acb, arb, workprec
from ..errors import PrecisionExhausted


class AnalyticL:
    """Documented base of the interface; sources subclass or duck-type it."""

    name: str = "L(s)"
    key: tuple = ()
    conductor: int = 1
    degree: int = 1
    self_dual: bool = False
    central_order: int = 0

    def hardy_z(self, t: arb, prec: int) -> arb:  # pragma: no cover - interface
        raise NotImplementedError

    def log_lambda_jet(self, count: int, prec: int) -> list:  # pragma: no cover - interface
        raise NotImplementedError

    # -- defaults derived from the conductor data ----------------------------

    def mean_spacing(self, t: float) -> float:
        """Mean gap between ordinates near height t: 2 pi / log(Q (t/2pi)^d) (at least ~1 unit)."""
        return mean_spacing_of(self.conductor, self.degree, t)

    def prec_scale(self, t: float) -> float:
        """Size whose log2 is added to the working precision at height t."""
        return 2 + self.conductor * (t + 2) ** self.degree


def mean_spacing_of(conductor: int, degree: int, t: float) -> float:
    """2 pi / log(Q (t/2pi)^(d-1) t / 2pi), floored so the grid step stays >= ~ one unit."""
    tt = max(t, 1.0)
    x = conductor * tt / (2 * math.pi) * (tt / (2 * math.pi)) ** (degree - 1)
    return 2 * math.pi / max(math.log(max(x, 1.0)), 1.0)


def power_sums(re_c: list, count: int) -> list:
    """S_1..S_count from Re c_1..Re c_count (docs/method.md, section 2)."""
    from math import comb

    out = []
    for m in range(1, count + 1):
        s = arb(0)
        for j in range(1, m + 1):
            term = comb(2 * m - j - 1, m - 1) * 2 * j * re_c[j - 1]
            s += term if j % 2 == 1 else -term
        out.append(s)
    return out


def zero_power_sums_of(L, count: int, abs_accuracy_bits: int = 100,
                       max_prec: int = 20000) -> list:
    """Enclosures of S_1..S_count over all zeros of ``L`` (central ones included).

    Precision rises until every S_m has radius below 2^-abs_accuracy_bits, or
    PrecisionExhausted is raised.
    """
    need = abs_accuracy_bits
    prec = need + 3 * count + 64
    while prec <= max_prec:
        with workprec(prec):
            cs = L.log_lambda_jet(count, prec)
            sums = power_sums([c.real for c in cs], count)
            if all(s.is_finite() and s.rad() < arb(2) ** (-need) for s in sums):
                return sums
        prec *= 2
    raise PrecisionExhausted(
        f"not certified: zero power sums of {L.name} could not be enclosed to 2^-{need} "
        f"below {max_prec} bits")


def noncentral_power_sums(S: list, central_order: int) -> list:
    """S_m - r 4^m: the power sums over the zeros off s = 1/2 (r = central order)."""
    return [s - central_order * arb(4) ** m for m, s in enumerate(S, start=1)]


def positive_ordinate_sums(L, S: list) -> list:
    """Power sums over the positive ordinates, from the non-central sums of a self-dual L."""
    if not L.self_dual:
        raise ValueError(f"{L.name} is not self-dual: its positive ordinates are not half its zeros")
    T = noncentral_power_sums(S, L.central_order)
    return [t / 2 for t in T]


__all__ = ["AnalyticL", "mean_spacing_of", "power_sums", "zero_power_sums_of",
           "noncentral_power_sums", "positive_ordinate_sums", "acb"]
