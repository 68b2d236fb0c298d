"""Frobenius traces a_v of a curve over F_q(t) at every place of degree <= D.

A place v of degree d (a monic irreducible P, or infinity) is a Frobenius orbit
of d roots theta in F_{q^d}; the residue curve at v is y^2 = x^3 + A(theta) x + B(theta)
on the minimal model, and

    a_v = q^d + 1 - #E_v(F_v) = - sum_{x in F_{q^d}} chi(x^3 + A(theta) x + B(theta)),

chi the quadratic character of F_{q^d}.  The same formula gives +1 / -1 at split /
non-split multiplicative places (a nodal cubic) and 0 at additive places (a cusp),
so one vectorised pass over all theta in F_{q^n} gives the exact sums

    c_n = sum_{theta in F_{q^n}} T_n(theta) + T_n(infinity),

T_n the trace over F_{q^n}, which are the coefficients of log L(E, u) = sum c_n u^n / n.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from ..errors import Inconsistent
from ..ffield.poly import FiniteField
from .fieldtable import FieldTable, field_table
from .model import EllipticCurve

__all__ = ["DegreeData", "embedding", "degree_data", "frobenius_sum", "hasse_check", "brute_force_trace"]


@lru_cache(maxsize=64)
def _embedding_cached(p: int, k: int, modulus: tuple, M: int) -> np.ndarray:
    T = field_table(p, M)
    if k == 1:
        return np.arange(p, dtype=np.int64)
    if M == k and tuple(T.modulus) == tuple(modulus):
        return np.arange(p**k, dtype=np.int64)
    cand = T.subfield(k)
    vals = T.evaluate([int(c) for c in modulus], cand)
    roots = cand[vals == 0]
    if len(roots) == 0:
        raise Inconsistent("the generator of F_q has no root in the extension table")  # pragma: no cover
    rho = np.int64(roots[0])
    # the element sum b_j z^j (code sum b_j p^j) maps to sum b_j rho^j
    codes = np.arange(p**k, dtype=np.int64)
    out = np.zeros(p**k, dtype=np.int64)
    rp = np.int64(1)
    for j in range(k):
        digit = (codes // p**j) % p
        out = T.add(out, T.mul(digit, np.full_like(codes, rp)))
        rp = T.mul(rp, rho)
    return out


def embedding(F: FiniteField, M: int) -> np.ndarray:
    """Codes in F_{p^M}'s table of the elements of F (indexed by F's codes); k | M."""
    return _embedding_cached(F.p, F.k, tuple(F.modulus), M)


def poly_codes_in(f, F: FiniteField, M: int) -> list[int]:
    emb = embedding(F, M)
    return [int(emb[F.code(c)]) for c in f.coeffs()]


@dataclass(frozen=True, eq=False)
class DegreeData:
    """Everything one pass over F_{q^n} gives.

    ``theta`` holds one element per Frobenius orbit of F_{q^n} over F_q (table
    codes), ``orbit`` the orbit's size (the exact degree of theta over F_q, a
    divisor of n), ``traces`` T_n(theta), ``good`` whether theta is not a root of
    the discriminant; ``trace_inf`` is T_n at infinity.
    """

    n: int
    table: FieldTable
    theta: np.ndarray
    orbit: np.ndarray
    traces: np.ndarray
    good: np.ndarray
    trace_inf: int
    inf_good: bool = True

    @property
    def c_n(self) -> int:
        """sum over all places of degree d | n of deg(v) * (alpha_v^(n/d) + beta_v^(n/d)) (bad: a_v^(n/d))."""
        return int((self.orbit * self.traces).sum()) + self.trace_inf

    @property
    def exact(self) -> np.ndarray:
        return self.orbit == self.n

    @property
    def good_place_sum(self) -> int:
        """sum of a_v over the good places of degree exactly n (infinity, of degree 1, included)."""
        s = int(self.traces[self.good & self.exact].sum())
        return s + (self.trace_inf if (self.n == 1 and self.inf_good) else 0)

    @property
    def good_place_count(self) -> int:
        return int((self.good & self.exact).sum()) + (1 if (self.n == 1 and self.inf_good) else 0)


_DEGREE_CACHE: dict = {}


def degree_data(E: EllipticCurve, n: int) -> DegreeData:
    """Exact traces of E at one theta per place of degree dividing n, and at infinity (cached)."""
    key = (id(E), n)
    hit = _DEGREE_CACHE.get(key)
    if hit is not None and hit[0] is E:
        return hit[1]
    F = E.field
    M = F.k * n
    T = field_table(F.p, M)
    theta, orbit = T.orbit_representatives(F.q, n)
    a = T.evaluate(poly_codes_in(E.A, F, M), theta)
    b = T.evaluate(poly_codes_in(E.B, F, M), theta)
    tr = T.traces(a, b)
    disc = T.evaluate(poly_codes_in(E.disc_poly, F, M), theta)
    emb = embedding(F, M)
    ai = np.array([emb[F.code(E.a_inf)]]), np.array([emb[F.code(E.b_inf)]])
    t_inf = int(T.traces(*ai)[0])
    inf_good = not any(b.place == "infinity" for b in E.bad_places)
    data = DegreeData(n, T, theta, orbit, tr, disc != 0, t_inf, inf_good)
    if len(_DEGREE_CACHE) > 64:
        _DEGREE_CACHE.clear()
    _DEGREE_CACHE[key] = (E, data)
    return data


def frobenius_sum(E: EllipticCurve, n: int) -> int:
    """c_n, the n-th coefficient of log L(E, u) times n."""
    return degree_data(E, n).c_n


def hasse_check(E: EllipticCurve, n: int) -> int:
    """Check |T_n(theta)| <= 2 q^(n/2) at every good theta in F_{q^n} and at infinity.

    Returns the number of good finite places of degree dividing n checked.
    Raises Inconsistent on failure.
    """
    d = degree_data(E, n)
    Qn = E.q**n
    t = d.traces[d.good]
    if np.any(t.astype(object) ** 2 > 4 * Qn) or (d.trace_inf**2 > 4 * Qn):
        raise Inconsistent(f"a trace over F_{E.q}^{n} breaks the bound |a| <= 2 q^(n/2)")
    return int(d.good.sum())


def brute_force_trace(E: EllipticCurve, theta_code: int, n: int) -> int:
    """-sum_x chi(x^3 + A(theta) x + B(theta)) by a plain loop over F_{q^n} (tests only)."""
    d = degree_data(E, n)
    T = d.table
    F = E.field
    M = F.k * n
    a = int(T.evaluate(poly_codes_in(E.A, F, M), np.array([theta_code]))[0])
    b = int(T.evaluate(poly_codes_in(E.B, F, M), np.array([theta_code]))[0])
    s = 0
    for x in range(T.Q):
        xa = np.array([x])
        v = T.add(T.add(T.power(xa, 3), T.mul(a, xa)), b)[0]
        s += int(T.chi[v])
    return -s
