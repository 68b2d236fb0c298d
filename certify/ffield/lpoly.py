"""L-polynomials L(u, chi) = sum_{f monic} chi(f) u^(deg f) with exact coefficients.

For chi non-trivial modulo m (degree M), the sum over monic f of degree n
vanishes for n >= M (each residue class is hit q^(n-M) times and the
character sums to 0), so L(u, chi) = sum_{n < M} c_n u^n with

    c_n = sum_{f monic, deg f = n} chi(f) = sum_j N_{n,j} zeta_o^j,

N_{n,j} the number of monic f of degree n with chi(f) = zeta_o^j (an exact
integer count; o the order of chi).  The coefficients are elements of
Z[zeta_o] (:mod:`certify.ffield.cyclo`).

Inverse roots.  L(u, chi) = prod_j (1 - alpha_j u), so the alpha_j are the
roots of the reversed polynomial u^D L(1/u).  They are isolated by Arb's
polynomial root finder on ball coefficients (every returned ball holds
exactly one root); when that fails (a repeated root) the roots are
located among the roots of the norm N(u) = prod_sigma L^sigma(u) in Z[u],
factored exactly, with multiplicities bounded by derivatives (see
:func:`_roots_via_norm`).

Weil's theorem (the Riemann hypothesis for curves) says |alpha| = sqrt(q) or
1; the count of each kind is known from the conductor f and the parity:
deg L = deg f - 1 + sum_{P | m, P not | f} deg P, and the number of roots of
modulus 1 is [chi even] + sum_{P | m, P not | f} deg P.  :func:`weil_check`
compares the certified balls with this (a consistency check; the race uses
the theorem itself).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, field

import numpy as np
from flint import acb, acb_poly, fmpz_mpoly_ctx, fmpz_poly

from ..arith import arb, workprec
from ..errors import Inconsistent, PrecisionExhausted
from .characters import Character
from .cyclo import CycloRing, cyclo_ring
from .poly import poly_str

__all__ = ["LPolynomial", "l_polynomial", "weil_check", "WeilReport", "induced_identity_check",
           "expected_shape"]


def _coefficient_counts(chi: Character) -> np.ndarray:
    """N[n, j] = #{f monic, deg f = n, chi(f) = zeta_o^j} for n = 0..M-1."""
    G = chi.group
    q, M, o = G.F.q, G.M, chi.order
    tab = chi.table
    out = np.zeros((M, o), dtype=np.int64)
    for n in range(M):
        vals = tab[q**n: 2 * q**n]
        vals = vals[vals >= 0]
        out[n] = np.bincount(vals, minlength=o)
    return out


@dataclass(frozen=True, eq=False)
class WeilReport:
    """Outcome of comparing the root balls with Weil's theorem and the degree formula."""

    degree: int
    expected_degree: int
    n_sqrt_q: int
    n_unit: int
    expected_unit: int
    undecided: int

    @property
    def ok(self) -> bool:
        return (self.degree == self.expected_degree and self.undecided == 0
                and self.n_unit == self.expected_unit
                and self.n_sqrt_q == self.degree - self.expected_unit)

    def describe(self) -> str:
        return (f"degree {self.degree} (expected {self.expected_degree}); "
                f"{self.n_sqrt_q} roots of modulus sqrt(q), {self.n_unit} of modulus 1 "
                f"(expected {self.expected_unit}); {self.undecided} undecided")


@dataclass(frozen=True, eq=False)
class LPolynomial:
    """L(u, chi) with exact coefficients in Z[zeta_o] and certified inverse roots."""

    chi: Character
    ring: CycloRing
    counts: np.ndarray = field(repr=False)  # counts[n, j], rows n = 0..degree (exact)

    @property
    def degree(self) -> int:
        return self.counts.shape[0] - 1

    @property
    def q(self) -> int:
        return self.chi.group.F.q

    @functools.cached_property
    def coeffs(self) -> tuple:
        """The coefficients as reduced elements of Z[zeta_o] (fmpz_poly modulo Phi_o)."""
        return tuple(self.ring.from_counts(row) for row in self.counts)

    def coefficient_balls(self, prec: int) -> list[acb]:
        return [_sparse_ball(row, self.ring.o, prec) for row in self.counts]

    def coefficient_strings(self) -> list[str]:
        """Each coefficient as a polynomial in zeta_o (exact; reduced when Phi_o is small,
        otherwise as the unreduced count form sum_j N_j zeta^j)."""
        if self.ring.phi.degree() > 256:
            out = []
            for row in self.counts:
                nz = np.nonzero(row)[0]
                out.append(" + ".join(f"{int(row[j])}*zeta^{int(j)}" for j in nz) or "0")
            return out
        out = []
        for c in self.coeffs:
            cs = [int(x) for x in c.coeffs()]
            terms = [f"{v}" if j == 0 else (f"{v}*zeta^{j}" if j > 1 else f"{v}*zeta")
                     for j, v in enumerate(cs) if v]
            out.append(" + ".join(terms) if terms else "0")
        return out

    @functools.lru_cache(maxsize=8)
    def inverse_roots(self, prec: int = 128) -> tuple[acb, ...]:
        """Certified isolating balls of the inverse roots alpha_j (with multiplicity)."""
        D = self.degree
        if D == 0:
            return ()
        p = prec
        while p <= 8 * prec + 1024:
            with workprec(p):
                rev = acb_poly(list(reversed(self.coefficient_balls(p))))
                try:
                    roots = rev.roots(tol=arb(2) ** (-(prec - 16)), maxprec=4 * p)
                    return tuple(roots)
                except (ValueError, ArithmeticError):
                    pass
            p *= 2
        return _roots_via_norm(self, prec)

    @functools.cached_property
    def norm_polynomial(self) -> fmpz_poly:
        """N(u) = prod over Galois conjugates of L(u, chi), in Z[u].

        Computed as the product of the conjugate polynomials L^sigma (zeta -> zeta^a, a prime
        to o) in ball arithmetic, each coefficient then read off as the unique integer in its
        ball (radius < 1/2): exact, and much faster than the resultant in zeta for large o.
        The precision is chosen from |N_k| <= C(deg, k) q^(k/2) (all roots have modulus <= sqrt q);
        the resultant is the fallback when a ball does not isolate an integer.
        """
        N = self._norm_by_balls()
        return N if N is not None else self._norm_by_resultant()

    def _norm_by_balls(self) -> fmpz_poly | None:
        o = self.ring.o
        if o <= 2:
            return None
        rows = [[int(v) for v in c.coeffs()] for c in self.coeffs]
        units = [a for a in range(1, o) if math.gcd(a, o) == 1]
        deg = self.degree * len(units)
        bits = int(deg + deg * math.log2(max(self.q, 2)) / 2) + 96
        for prec in (bits, 2 * bits):
            with workprec(prec):
                tau = 2 * arb.pi() / o
                zeta = [acb(0, tau * j).exp() for j in range(o)]
                P = acb_poly([1])
                for a in units:
                    P = P * acb_poly([sum((v * zeta[(a * j) % o] for j, v in enumerate(row) if v), acb(0))
                                      for row in rows])
                cs = []
                ok = True
                for k in range(deg + 1):
                    c = P[k]
                    if not (c.imag.contains(0) and c.real.rad() < 0.25 and c.imag.rad() < 0.25):
                        ok = False
                        break
                    r = (c.real + arb(1) / 2).floor()
                    if not r.is_exact() or not c.real.contains(r):
                        ok = False
                        break
                    cs.append(int(r.unique_fmpz()))
                if ok:
                    N = fmpz_poly(cs)
                    if N.coeffs() and int(N.coeffs()[0]) == -1:
                        N = -N
                    return N
        return None

    def _norm_by_resultant(self) -> fmpz_poly:
        """N(u) as the resultant in zeta of Phi_o(zeta) and L(u, zeta)."""
        ring = self.ring
        o = ring.o
        ctx = fmpz_mpoly_ctx.get(("u", "z"), "lex") if hasattr(fmpz_mpoly_ctx, "get") else \
            fmpz_mpoly_ctx(2, "lex", ["u", "z"])
        u, z = ctx.gens()
        L = ctx.from_dict({}) if hasattr(ctx, "from_dict") else 0 * u
        for n, c in enumerate(self.coeffs):
            for j, v in enumerate(c.coeffs()):
                if int(v):
                    L += int(v) * u**n * z**j
        phi = 0 * u
        for j, v in enumerate(ring.phi.coeffs()):
            if int(v):
                phi += int(v) * z**j
        if ring.phi.degree() == 1 and o <= 2:
            # Z[zeta_1] = Z[zeta_2] = Z: substitute zeta = 1 or -1 directly
            zval = 1 if o == 1 else -1
            cs = [sum(int(v) * zval**j for j, v in enumerate(c.coeffs())) for c in self.coeffs]
            return fmpz_poly(cs)
        res = phi.resultant(L, "z")
        d = res.to_dict() if hasattr(res, "to_dict") else dict(res.terms())
        deg = max((k[0] for k in d), default=0)
        cs = [0] * (deg + 1)
        for k, v in d.items():
            cs[k[0]] += int(v)
        N = fmpz_poly(cs)
        # the resultant is N up to sign (Phi_o is monic); normalise so that N(0) = 1
        if N.coeffs() and int(N.coeffs()[0]) == -1:
            N = -N
        return N

    def label(self) -> str:
        return self.chi.label()

    def describe(self) -> str:
        F = self.chi.group.F
        return (f"L(u, {self.chi.label()}) of degree {self.degree} over F_{F.q}, "
                f"modulus {poly_str(self.chi.group.m, F)}")


def _roots_via_norm(L: LPolynomial, prec: int) -> tuple[acb, ...]:
    """Roots of u^D L(1/u) among the exact roots of the reversed norm polynomial.

    Each irreducible factor of the reversed norm has simple, certified
    isolated roots (``fmpz_poly.complex_roots``).  A candidate beta is
    discarded when the ball of L's reversed polynomial at beta excludes 0; for
    the others an upper bound on the multiplicity is the least k with the
    k-th derivative nonzero on the ball.  If the bounds add up to D, each bound
    is the true multiplicity (the D roots are among the candidates).
    """
    D = L.degree
    N = L.norm_polynomial
    rev_n = fmpz_poly(list(reversed(N.coeffs())))
    _, facs = rev_n.factor()
    cands = []
    for g, _ in facs:
        if g.degree() < 1:
            continue
        for r, _m in g.complex_roots():
            cands.append(r)
    p = prec
    while p <= 16 * prec:
        with workprec(p):
            rev = acb_poly(list(reversed(L.coefficient_balls(p))))
            out = []
            total = 0
            for r0 in cands:
                r = acb(r0)
                if not rev(r).contains(0):
                    continue
                k = 1
                der = rev.derivative()
                while k < D and der(r).contains(0):
                    der = der.derivative()
                    k += 1
                out.extend([r] * k)
                total += k
            if total == D:
                return tuple(out)
        p *= 2
    raise PrecisionExhausted(f"not certified: could not isolate the inverse roots of {L.label()}")


def _sparse_ball(row: np.ndarray, o: int, prec: int) -> acb:
    """sum_j row[j] zeta_o^j as a ball, over the non-zero counts only.

    zeta^j = zeta^(j mod B) * zeta^(B (j div B)) from two tables of about sqrt(o) powers.
    """
    nz = np.nonzero(row)[0]
    with workprec(prec + 16):
        if len(nz) == 0:
            return acb(0)
        B = max(1, int(math.isqrt(o)) + 1)
        base = acb(arb(2) / o).exp_pi_i()
        small = [acb(1)]
        for _ in range(B - 1):
            small.append(small[-1] * base)
        step = small[-1] * base
        big = [acb(1)]
        for _ in range(o // B + 1):
            big.append(big[-1] * step)
        s = acb(0)
        for j in nz:
            j = int(j)
            s += int(row[j]) * (small[j % B] * big[j // B])
        return s


def _row_is_zero(row: np.ndarray, ring: CycloRing) -> bool:
    """Exactly: is sum_j row[j] zeta^j = 0 ?  A ball excluding 0 settles most rows cheaply."""
    if not row.any():
        return True
    if not _sparse_ball(row, ring.o, 64).contains(0):
        return False
    return ring.from_counts(row).is_zero()


def l_polynomial(chi: Character) -> LPolynomial:
    """The L-polynomial of a non-trivial character, from exact character sums."""
    if chi.is_trivial():
        raise ValueError("L(u, chi_0) is not a polynomial; the trivial character is handled apart")
    counts = _coefficient_counts(chi)
    ring = cyclo_ring(chi.order)
    if counts[0, 0] != 1 or counts[0, 1:].any():
        raise Inconsistent("L(0, chi) is not 1")
    top = counts.shape[0]
    while top > 1 and _row_is_zero(counts[top - 1], ring):
        top -= 1
    return LPolynomial(chi, ring, counts[:top].copy())


def induced_identity_check(chi: Character) -> bool:
    """Exactly: L(u, chi) = L(u, chi*) prod_{P | m, P not | f} (1 - chi*(P) u^(deg P)).

    chi* is the primitive reduction (conductor f); the identity is checked as
    polynomials in u with coefficients in Z[zeta_o], o the order of chi.
    """
    from flint import fmpz_poly as _fp
    G = chi.group
    star = chi.primitive_reduction()
    o = chi.order
    ring = cyclo_ring(o)
    if star.group.M == 1 or star.is_trivial():
        prod = [ring.one]
    else:
        Ls = l_polynomial(star)
        step = o // star.order
        prod = []
        for c in Ls.coeffs:
            cs = c.coeffs()
            lifted = [0] * ((len(cs) - 1) * step + 1) if cs else [0]
            for j, v in enumerate(cs):
                lifted[j * step] = int(v)
            prod.append(ring.reduce(_fp(lifted)))
    for (P, _), fe in zip(G.factors, chi.conductor_exponents):
        if fe:
            continue
        x = star.exponent_at(P) * (o // star.order)
        d = P.degree()
        fac = {0: ring.one, d: -ring.zeta_power(x)}
        new = [ring.zero] * (len(prod) + d)
        for i, c in enumerate(prod):
            for k, v in fac.items():
                new[i + k] = new[i + k] + ring.reduce(c * v)
        prod = [ring.reduce(c) for c in new]
    L = l_polynomial(chi)
    mine = [ring.reduce(c) for c in L.coeffs]
    while len(prod) > 1 and prod[-1].is_zero():
        prod.pop()
    return mine == prod


def expected_shape(chi: Character) -> tuple[int, int]:
    """(degree of L, number of inverse roots of modulus 1) from the conductor and parity."""
    G = chi.group
    fexp = chi.conductor_exponents
    fdeg = sum(P.degree() * fe for (P, _), fe in zip(G.factors, fexp))
    extra = sum(P.degree() for (P, _), fe in zip(G.factors, fexp) if fe == 0)
    return fdeg - 1 + extra, int(chi.is_even) + extra


def weil_check(L: LPolynomial, prec: int = 128) -> WeilReport:
    """Classify each root exactly (:func:`certify.ffield.torus.root_kind`: modulus 1 iff its
    minimal polynomial is cyclotomic), check that its ball's |alpha|^2 contains 1 or q
    accordingly (a root failing this is counted undecided), and compare with the expected shape."""
    from .torus import identify_root, root_kind

    deg_exp, unit_exp = expected_shape(L.chi)
    q = L.q
    n_q = n_1 = und = 0
    if L.degree:
        norm_rev = fmpz_poly(list(reversed(L.norm_polynomial.coeffs())))
    with workprec(prec):
        for a in L.inverse_roots(prec):
            a2 = (a * a.conjugate()).real
            try:
                unit = root_kind(identify_root(a, norm_rev, prec), q) == "unit"
            except (PrecisionExhausted, Inconsistent):
                und += 1
                continue
            if unit and a2.contains(1) and not a2.contains(q):
                n_1 += 1
            elif not unit and a2.contains(q) and not a2.contains(1):
                n_q += 1
            else:
                und += 1
    return WeilReport(L.degree, deg_exp, n_q, n_1, unit_exp, und)
