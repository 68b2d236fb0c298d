"""Exact prime counts pi(n; m, a) by the explicit formula.

Notation: for a unit class c mod m, psi(k; c) = sum of Lambda(f) over monic f
of degree k in class c (Lambda(P^j) = deg P); for a character chi,
psi(k; chi) = sum_{deg f = k} Lambda(f) chi(f).  Then, exactly,

    psi(k; chi) = -sum_j alpha_j(chi)^k           (chi non-trivial; L = prod (1 - alpha_j u))
    psi(k; chi_0) = q^k - sum_{P | m, deg P | k} deg P,
    psi(k; c) = (1/phi(m)) sum_chi conj(chi(c)) psi(k; chi),
    n pi(n; c) = sum_{d | n} mu(d) sum_{b : b^d = c} psi(n/d; b)        (Moebius over prime powers).

The power sums p_k = sum alpha_j^k come from the L-polynomial's exact
coefficients in Z[zeta_e] (e the group exponent) by Newton's identities,
p_k = -(k c_k + sum_{i=1}^{k-1} c_i p_{k-i}), and for k > deg L the
linear recurrence p_k = -sum_{i=1}^{D} c_i p_{k-i}: no roots are used, so
every count is an exact integer.  A weighted sum R(n) = sum_a w_a pi(n; a)
is computed without forming every class count:

    phi(m) n R(n) = sum_{d | n} mu(d) V_d(n/d),
    V_d(k) = sum_chi What_d(chi) psi(k; chi),
    What_d(chi) = sum_c w(c^d) conj(chi(c)),

where What_d depends on d only modulo e.  Each V_d(k) must be a rational
integer and phi(m) n must divide the sum: both are checked, and a failure
raises :class:`certify.errors.Inconsistent`.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np
from flint import fmpz, fmpz_poly

from ..errors import BadInput, Inconsistent
from .characters import Character, CharacterGroup
from .cyclo import CycloRing, cyclo_ring
from .lpoly import l_polynomial
from .poly import irreducible_count, mobius, monic_irreducible_indices, poly_index

__all__ = ["RaceCounter", "prime_counts", "prime_counts_by_enumeration", "class_position"]


def _lift(ring_e: CycloRing, x: fmpz_poly, o: int) -> fmpz_poly:
    """x in Z[zeta_o] as an element of Z[zeta_e] (zeta_o = zeta_e^(e/o))."""
    if o == ring_e.o:
        return x
    step = ring_e.o // o
    cs = x.coeffs()
    out = [0] * ((len(cs) - 1) * step + 1) if cs else [0]
    for j, c in enumerate(cs):
        out[j * step] = int(c)
    return ring_e.reduce(fmpz_poly(out))


def class_position(G: CharacterGroup, f) -> int:
    """Position (index into G.elements) of the class of a polynomial; BadInput unless a unit."""
    return int(G.pos[G.class_index(f)])


class _PowerSums:
    """Streaming exact power sums p_k(chi) in Z[zeta_e], k = 1, 2, ..."""

    def __init__(self, chi: Character, ring_e: CycloRing):
        L = l_polynomial(chi)
        self.c = [_lift(ring_e, x, chi.order) for x in L.coeffs]  # c[0] = 1
        self.D = len(self.c) - 1
        self.ring = ring_e
        self.hist: list[fmpz_poly] = []  # p_1, p_2, ... (only the last D kept)
        self.k = 0

    def next(self) -> fmpz_poly:
        self.k += 1
        k, D, R = self.k, self.D, self.ring
        acc = fmpz_poly([])
        if k <= D:
            acc = self.c[k] * k
        for i in range(1, min(k - 1, D) + 1):
            acc += self.c[i] * self.hist[-i]
        p = R.reduce(-acc)
        self.hist.append(p)
        if len(self.hist) > D:
            self.hist.pop(0)
        return p


class RaceCounter:
    """Exact R(n) = sum_a w_a pi(n; m, a), n = 1, 2, ..., streamed by the explicit formula.

    Parameters
    ----------
    G : CharacterGroup
    weights : dict {position: int}
        Integer weights on unit classes (positions in ``G.elements``).
    """

    def __init__(self, G: CharacterGroup, weights: dict[int, int],
                 characters: list[Character] | None = None, period: int | None = None):
        """``characters``: restrict to these (the caller guarantees What_r(chi) = 0 for the
        others); ``period``: What_r depends on r only modulo this divisor of e (the caller
        guarantees w(c^r) = w(c^(r mod period)) for every unit c)."""
        if not weights:
            raise BadInput("a race needs at least one class")
        self.G = G
        self.phi = G.order
        e = G.exponent
        self.e = e
        self.ring = cyclo_ring(e)
        R = self.ring
        w = np.zeros(G.order, dtype=np.int64)
        for p, v in weights.items():
            w[int(p)] += int(v)
        self.w = w
        self.q = G.F.q
        self.bad_degrees = [P.degree() for P, _ in G.factors]
        # What_r(chi) for r = 0..e-1 as elements of Z[zeta_e]; keep characters used by some r
        self.period = period or e
        if e % self.period:
            raise ValueError("period must divide the group exponent")
        pw = [G.power_map(r) for r in range(self.period)]
        wr = [w[pw[r]] for r in range(self.period)]
        self.chars: list[Character] = []
        self.what: list[list[fmpz_poly]] = []  # what[r][i]
        what_cols = []
        for chi in (characters if characters is not None else G.characters()):
            ex = chi.position_exponents * (e // chi.order)
            neg = (-ex) % e
            col = []
            for r in range(self.period):
                cnt = np.bincount(neg, weights=wr[r], minlength=e)
                col.append(R.from_counts(np.rint(cnt).astype(np.int64)))
            if any(not x.is_zero() for x in col):
                self.chars.append(chi)
                what_cols.append(col)
        self.what = [[col[r] for col in what_cols] for r in range(self.period)]
        self.streams = [None if chi.is_trivial() else _PowerSums(chi, R) for chi in self.chars]
        self.k = 0
        self.acc: dict[int, fmpz] = {}
        self.checked_rational = 0

    def _psi_chi(self) -> list[fmpz_poly]:
        k = self.k
        out = []
        for chi, s in zip(self.chars, self.streams):
            if s is None:
                v = fmpz(self.q) ** k - sum(d for d in self.bad_degrees if k % d == 0)
                out.append(fmpz_poly([v]))
            else:
                out.append(-s.next())
        return out

    def _v(self, r: int, psis: list[fmpz_poly]) -> fmpz:
        R = self.ring
        tot = fmpz_poly([])
        for wh, ps in zip(self.what[r], psis):
            if not wh.is_zero():
                tot += wh * ps
        tot = R.reduce(tot)
        val = R.as_integer(tot)
        if val is None:
            raise Inconsistent(f"explicit formula: V_{r}({self.k}) is not a rational integer")
        return fmpz(val)

    def run(self, n_max: int):
        """Yield (n, R(n)) for n = k+1 .. n_max, exact integers."""
        while self.k < n_max:
            self.k += 1
            k = self.k
            psis = self._psi_chi()
            cache: dict[int, fmpz] = {}
            for d in range(1, n_max // k + 1):
                mu = mobius(d)
                if mu == 0:
                    continue
                r = d % self.period
                if r not in cache:
                    cache[r] = self._v(r, psis)
                if cache[r] == 0:
                    continue
                n = d * k
                self.acc[n] = self.acc.get(n, fmpz(0)) + mu * cache[r]
            tot = self.acc.pop(k, fmpz(0))
            den = self.phi * k
            if tot % den != 0:
                raise Inconsistent(f"explicit formula: degree {k} count is not an integer")
            yield k, int(tot // den)


def prime_counts(G: CharacterGroup, position: int, n_max: int) -> list[int]:
    """[pi(n; m, a) for n = 1..n_max] by the explicit formula (exact integers)."""
    rc = RaceCounter(G, {position: 1})
    return [v for _, v in rc.run(n_max)]


def prime_counts_by_enumeration(G: CharacterGroup, n: int) -> np.ndarray:
    """Counts of monic irreducibles of degree n in every unit class (by position), by a sieve."""
    F = G.F
    idx = monic_irreducible_indices(F, n)
    # reduce each irreducible mod m: index arithmetic via the F_p-linear model is for
    # residues only, so reduce polynomial by polynomial (fine for test sizes)
    out = np.zeros(G.order, dtype=np.int64)
    if n < G.M:
        pos = G.pos[idx]
        pos = pos[pos >= 0]
        np.add.at(out, pos, 1)
        return out
    from .poly import poly_from_index
    m = G.m
    for i in idx:
        r = poly_index(poly_from_index(int(i), F) % m, F)
        p = G.pos[r]
        if p >= 0:
            out[p] += 1
    return out


@functools.lru_cache(maxsize=None)
def _gauss(q: int, n: int) -> int:
    return irreducible_count(q, n)
