"""Angles of inverse roots as exact algebraic numbers, their integer relations, and
densities on the closure of the orbit {n (x_0, x_1, ..., x_J) mod 1}.

Exact identity of a root.  Every inverse root alpha of an L-polynomial is a
root of the reversed norm polynomial, which factors exactly over Z; an
irreducible factor g has simple roots, isolated by ``fmpz_poly.complex_roots``.
If alpha's ball meets exactly one of those root balls, alpha *is* that root:
:class:`ExactRoot` = (g, index).  Equality of two roots is then exact, and
:func:`root_kind` reads the kind of root (modulus 1 iff g is cyclotomic, +-sqrt(q)
iff g divides y^2 - q, otherwise non-real of modulus sqrt q) from g exactly.

Relations.  With x_0 = 1/2 (the angle pi) and x_j = theta_j / 2 pi for the
angles theta_j in (0, pi) of distinct roots, a relation is k in Z^(J+1) with
k . x in Z, i.e. prod_j (alpha_j / sqrt q)^(k_j) = (-1)^(k_0).  Candidates come
from LLL on the lattice [I | round(C x)] + [0 | C]; each is confirmed exactly:
beta = prod_{k_j > 0} alpha_j^(2 k_j) prod_{k_j < 0} conj(alpha_j)^(2|k_j|) is an
algebraic integer of degree <= D (the product of the minimal polynomials' degrees)
whose conjugates all have modulus q^S (S = sum |k_j|), so beta != q^S forces
|beta - q^S| >= (2 q^S)^-(D-1); a ball of beta - q^S that excludes 0 refutes the
relation, one inside that radius proves beta = q^S (:func:`confirm_relation`).  Then
gamma = prod (alpha_j / sqrt q)^(k_j) satisfies gamma^2 = 1 exactly, and a ball
decides gamma = 1 or -1, hence k_0 mod 2.

Orbit closure.  For the relation lattice K (rows), the closure of
{n x mod 1 : n in Z} is H = {x : K x in Z^r}.  With the Smith form
U K V = D, x = V y where y_i in (1/d_i) Z / Z (i <= r) and y_i free (i > r): a
finite set of cosets of a torus of dimension J + 1 - r.  The natural density
of {G > 0} along the orbit lies between the Haar measures of {G > 0} and
{G >= 0} on H (Weyl equidistribution on H and the portmanteau theorem, see
docs/function_fields.md); :func:`density_on_closure` encloses both by
interval box subdivision, reporting the undecided volume as an error term.
"""

from __future__ import annotations

import functools
import itertools
import math
from dataclasses import dataclass
from fractions import Fraction

from flint import acb, fmpz, fmpz_mat, fmpz_mpoly_ctx, fmpz_poly

from ..arith import arb, workprec
from ..errors import Inconsistent, PrecisionExhausted
from .characters import smith_normal_form

__all__ = ["ExactRoot", "identify_root", "root_kind", "find_relations", "confirm_relation", "REFUTED", "relation_degree_bound",
           "OrbitClosure", "orbit_closure", "density_on_closure", "TrigFunction", "vanishing_coset"]


# ---------------------------------------------------------------- exact roots
@functools.lru_cache(maxsize=512)
def _factor_roots(coeffs: tuple[int, ...], prec: int):
    """Irreducible factors of a Z-polynomial with their isolated roots at ``prec`` bits."""
    P = fmpz_poly(list(coeffs))
    _, facs = P.factor()
    out = []
    with workprec(prec):
        for g, _ in facs:
            if g.degree() < 1:
                continue
            out.append((tuple(int(c) for c in g.coeffs()), tuple(r for r, _ in g.complex_roots())))
    return tuple(out)


#: Precision (bits) at which the roots of a factor are numbered once and for all.
CANONICAL_PREC = 256


def _roots_of(g: tuple[int, ...], prec: int):
    for h, roots in _factor_roots(g, prec):
        if h == g or h == tuple(-c for c in g):
            return roots
    # g is irreducible: its own factorisation is itself
    return _factor_roots(g, prec)[0][1]


@dataclass(frozen=True)
class ExactRoot:
    """Root number ``index`` (numbering at CANONICAL_PREC bits) of the irreducible Z-polynomial ``g``."""

    g: tuple[int, ...]
    index: int

    def ball(self, prec: int) -> acb:
        ref = _roots_of(self.g, CANONICAL_PREC)[self.index]
        if prec <= CANONICAL_PREC:
            return ref
        hits = [r for r in _roots_of(self.g, prec) if r.overlaps(ref)]
        if len(hits) != 1:
            raise PrecisionExhausted("not certified: root numbering is ambiguous")
        return hits[0]

    def poly(self) -> fmpz_poly:
        return fmpz_poly(list(self.g))


def root_kind(root: ExactRoot, q: int) -> str:
    """Exactly which kind of inverse root of an F_q[t] L-function ``root`` is.

    "unit" (|alpha| = 1): its minimal polynomial g is cyclotomic (Kronecker: an algebraic
    integer all of whose conjugates have modulus 1 is a root of unity; the roots of modulus
    1 of L(u, chi) are roots of unity, from the factors 1 - u and 1 - chi*(P) u^deg P);
    "plus" / "minus" (alpha = +sqrt q / -sqrt q): g divides y^2 - q; when g = y^2 - q itself
    (q not a square), the sign of the real part of the isolated root decides which (a certain
    comparison of a ball of radius << sqrt q, never a width test);
    "complex": anything else, which by Weil's theorem has modulus sqrt q and is not real.
    This is the one place in certify.ffield where a root is classified.
    """
    g = root.poly()
    if g.is_cyclotomic():
        return "unit"
    if not (fmpz_poly([-q, 0, 1]) % g).is_zero():
        return "complex"
    if g.degree() == 1:  # g = g1 y + g0, root -g0/g1
        return "plus" if (int(g[0]) > 0) != (int(g[1]) > 0) else "minus"
    b = root.ball(CANONICAL_PREC).real
    if b > 0:
        return "plus"
    if b < 0:
        return "minus"
    raise PrecisionExhausted("not certified: cannot tell sqrt(q) from -sqrt(q)")  # pragma: no cover


def identify_root(alpha: acb, norm_rev: fmpz_poly, prec: int = 128) -> ExactRoot:
    """The exact root of ``norm_rev`` (a Z-polynomial having alpha as a root) equal to alpha.

    alpha is a root of norm_rev, whose roots are isolated in disjoint balls; if
    alpha's ball meets exactly one of them, alpha is that root.
    """
    key = tuple(int(c) for c in norm_rev.coeffs())
    hits = []
    for g, roots in _factor_roots(key, CANONICAL_PREC):
        for i, r in enumerate(roots):
            if alpha.overlaps(r):
                hits.append((g, i))
    if len(hits) == 1:
        return ExactRoot(*hits[0])
    if not hits:
        raise Inconsistent("an inverse root is not a root of its norm polynomial")
    raise PrecisionExhausted("not certified: could not identify an inverse root exactly "
                             "(raise the working precision)")


# ---------------------------------------------------------------- relations
def find_relations(x: list[arb], coeff_bound: int = 60, prec: int = 256) -> list[list[int]]:
    """Integer vectors k (small) with k . x numerically in Z, by LLL.

    ``x`` are balls (x_0 = 1/2 included by the caller).  Returns candidate
    relations (not yet confirmed): the LLL basis rows whose residual is below
    2^(-prec/3) relative to the scale and whose entries are <= coeff_bound.
    """
    n = len(x)
    if n == 0:
        return []
    C = fmpz(2) ** (prec // 2)
    rows = []
    with workprec(prec + 32):
        for i in range(n):
            r = [0] * (n + 2)
            r[i] = 1
            r[n + 1] = int((x[i] * arb(C)).mid().floor().unique_fmpz())
            rows.append(r)
        r = [0] * (n + 2)
        r[n] = 1
        r[n + 1] = int(C)
        rows.append(r)
    B = fmpz_mat(rows).lll()
    out = []
    for i in range(B.nrows()):
        row = [int(B[i, j]) for j in range(n + 2)]
        k = row[:n]
        if not any(k) or max(abs(v) for v in k) > coeff_bound:
            continue
        if abs(row[n + 1]) > 4 * (n + 2) * (sum(abs(v) for v in k) + 1):
            continue
        # residual check with balls: k . x within 2^(-prec/3) of an integer
        with workprec(prec):
            s = sum((arb(v) * xi for v, xi in zip(k, x)), arb(0))
            frac = s - arb(round(float(s.mid())))
            if abs(frac) < arb(2) ** (-(prec // 3)):
                out.append(k)
    return out


def _power_poly(g: fmpz_poly, k: int) -> fmpz_poly:
    """A Z-polynomial whose roots are the k-th powers of the roots of g (resultant)."""
    if k == 1:
        return g
    ctx = fmpz_mpoly_ctx.get(("x", "y"), "lex")
    X, Y = ctx.gens()
    G = sum((int(c) * X**i for i, c in enumerate(g.coeffs()) if int(c)), 0 * X)
    res = G.resultant(Y - X**k, "x")
    return _to_upoly(res, 1)


def _product_poly(p1: fmpz_poly, p2: fmpz_poly) -> fmpz_poly:
    """A Z-polynomial whose roots are the products of a root of p1 and a root of p2."""
    ctx = fmpz_mpoly_ctx.get(("x", "y"), "lex")
    X, Y = ctx.gens()
    A = sum((int(c) * X**i for i, c in enumerate(p1.coeffs()) if int(c)), 0 * X)
    d2 = p2.degree()
    # x^d2 p2(y/x) = sum c_i y^i x^(d2-i)
    Bp = sum((int(c) * Y**i * X**(d2 - i) for i, c in enumerate(p2.coeffs()) if int(c)), 0 * X)
    res = A.resultant(Bp, "x")
    return _to_upoly(res, 1)


def _to_upoly(mp, var: int) -> fmpz_poly:
    d = mp.to_dict()
    deg = max((k[var] for k in d), default=0)
    cs = [0] * (deg + 1)
    for k, v in d.items():
        cs[k[var]] += int(v)
    return fmpz_poly(cs)


def _minimal_factor(P: fmpz_poly, ball_of, precs=(256, 512, 1024, 2048)) -> fmpz_poly | None:
    """The irreducible factor of P having the number z as a root, where ``ball_of(prec)`` encloses z.

    z is a root of P, hence of exactly one of its distinct irreducible factors; a factor
    whose value on z's ball excludes 0 is not that one.  When exactly one factor's value
    contains 0, it is the minimal polynomial of z (up to sign).  None if the precisions
    tried do not separate the factors.
    """
    _, facs = P.factor()
    gs = [g for g, _ in facs if g.degree() >= 1]
    if len(gs) == 1:
        return gs[0]
    for prec in precs:
        with workprec(prec):
            z = ball_of(prec)
            hits = [g for g in gs if _eval_acb(g, z).contains(0)]
        if len(hits) == 1:
            return hits[0]
        if not hits:
            raise Inconsistent("a number is not a root of the polynomial built for it")
    return None


def _eval_acb(P: fmpz_poly, z: acb) -> acb:
    s = acb(0)
    for c in reversed(P.coeffs()):
        s = s * z + int(c)
    return s


def _minimal_polynomial_of_beta(parts, max_degree: int) -> fmpz_poly | None:
    """The minimal polynomial of beta = prod alpha_j^(2k_j) (conj for k_j < 0), or None.

    Built one factor at a time: the resultant polynomial of the powers, then of the products
    of roots, is factored over Z and only the irreducible factor vanishing on the partial
    product's ball is kept (:func:`_minimal_factor`), so the degrees stay those of minimal
    polynomials.  None when a resultant would exceed ``max_degree`` or a ball does not
    single out a factor.
    """
    def factor_ball(r, kj, p):
        a = r.ball(p)
        a = a if kj > 0 else a.conjugate()
        return a ** (2 * abs(kj))

    cur = None
    done: list = []
    for r, kj in parts:
        g = r.poly()
        if cur is not None and cur.degree() * g.degree() > max_degree:
            return None
        Pj = _minimal_factor(_power_poly(g, 2 * abs(kj)), lambda p, r=r, kj=kj: factor_ball(r, kj, p))
        if Pj is None:
            return None
        done.append((r, kj))
        if cur is None:
            cur = Pj
            continue
        if cur.degree() * Pj.degree() > max_degree:
            return None

        def partial(p, items=tuple(done)):
            z = acb(1)
            for rr, kk in items:
                z *= factor_ball(rr, kk, p)
            return z

        cur = _minimal_factor(_product_poly(cur, Pj), partial)
        if cur is None:
            return None
    return cur


#: ``confirm_relation`` returns this when the candidate is proved false (beta != q^S exactly).
REFUTED = -1

#: Largest working precision (bits) :func:`confirm_relation` uses for the separation bound.
MAX_CONFIRM_BITS = 16_384


def relation_degree_bound(roots: list, k: list[int]) -> int:
    """D = product of the degrees of the minimal polynomials of the roots a relation involves:
    an upper bound on [Q(alpha_j : k_j != 0) : Q], hence on the degree of beta."""
    return math.prod(r.poly().degree() for r, kj in zip(roots, k[1:]) if kj)


def confirm_relation(roots: list, k: list[int], q: int, prec: int = 256,
                     max_bits: int = MAX_CONFIRM_BITS, max_resultant_degree: int = 256) -> int | None:
    """Decide prod_j (alpha_j / sqrt q)^(k_j) = +-1 exactly: k_0 mod 2 if it holds, REFUTED if not,
    None if undecided within ``max_bits``.

    ``roots[j]`` are :class:`ExactRoot` for j = 1..J (index 0 of k is the pi coordinate and is
    ignored here); every root of each minimal polynomial has modulus sqrt(q) (Weil: the
    conjugates of alpha are inverse roots of conjugate L-functions, and a minimal polynomial
    with a root of modulus sqrt q is not cyclotomic, so none of its roots has modulus 1).
    Put beta = prod_{k_j>0} alpha_j^(2k_j) prod_{k_j<0} conj(alpha_j)^(2|k_j|) and S = sum |k_j|;
    the relation holds iff beta = q^S.

    * If a ball of beta - q^S excludes 0, the relation is false (REFUTED).
    * Separation bound: beta is an algebraic integer (conj(alpha) = q / alpha is one too) of
      degree d <= D (:func:`relation_degree_bound`; beta lies in Q(alpha_j : k_j != 0)), and each
      conjugate sigma(beta) is the same product of conjugates of the alpha_j, so |sigma(beta)| = q^S.
      If beta != q^S, its minimal polynomial P (monic, in Z[y]) has P(q^S) a non-zero integer, so
      1 <= |P(q^S)| = prod_sigma |q^S - sigma(beta)| <= |beta - q^S| (2 q^S)^(d-1), i.e.
      |beta - q^S| >= (2 q^S)^-(D-1).  A ball of beta - q^S inside that radius proves beta = q^S.
    * When that precision exceeds ``max_bits``, beta's minimal polynomial is computed instead
      (:func:`_minimal_polynomial_of_beta`, resultants of degree <= ``max_resultant_degree``):
      beta = q^S iff it is y - q^S.  Otherwise None (undecided; the caller refuses).
    Then gamma = prod (alpha_j / sqrt q)^(k_j) has gamma^2 = 1 and a ball decides gamma = +-1.
    """
    parts = [(r, kj) for r, kj in zip(roots, k[1:]) if kj]
    if not parts:
        return k[0] % 2
    S = sum(abs(kj) for _, kj in parts)
    D = relation_degree_bound(roots, k)
    log_sep = (D - 1) * (1 + S * math.log2(q))      # log2 of (2 q^S)^(D-1)
    need = int(log_sep + S * math.log2(q)) + 64

    def beta_minus(p: int) -> acb:
        with workprec(p + 32):
            beta = acb(1)
            for r, kj in parts:
                a = r.ball(p + 32)
                a = a if kj > 0 else a.conjugate()
                beta *= a ** (2 * abs(kj))
            return beta - arb(fmpz(q) ** S)

    p = prec
    while True:
        diff = beta_minus(p)
        if not diff.contains(0):
            return REFUTED
        if p >= need:
            break
        if need > max_bits:
            # the bound is out of reach: compute beta's minimal polynomial instead (exact)
            mp = _minimal_polynomial_of_beta(parts, max_resultant_degree)
            if mp is None:
                return None
            if mp.degree() != 1 or int(mp[0]) != -int(fmpz(q) ** S) * int(mp[1]):
                return REFUTED
            break
        p = min(4 * p, need)
    with workprec(prec + 32):
        if p >= need and not (diff.abs_upper() < arb(2) ** (-int(math.ceil(log_sep)) - 1)):
            return None  # pragma: no cover - the precision was chosen for this
        gamma = acb(1)
        sq = arb(q).sqrt()
        for r, kj in parts:
            a = r.ball(prec)
            a = a if kj > 0 else a.conjugate()
            gamma *= (a / sq) ** abs(kj)
        if (gamma - 1).abs_upper() < 1:
            return 0
        if (gamma + 1).abs_upper() < 1:
            return 1
    return None  # pragma: no cover - gamma^2 = 1 exactly, so a ball decides


# ---------------------------------------------------------------- orbit closure
@dataclass(frozen=True)
class OrbitClosure:
    """H = {x = V y : y_i in (1/d_i) Z/Z for i < r, y_i in R/Z otherwise} in T^(J+1)."""

    relations: tuple[tuple[int, ...], ...]
    V: tuple[tuple[int, ...], ...]
    d: tuple[int, ...]  # finite orders of the first r coordinates
    dim: int  # number of free coordinates

    @property
    def n_components(self) -> int:
        return math.prod(self.d)

    def describe(self) -> str:
        return (f"{self.n_components} coset(s) of a {self.dim}-dimensional subtorus "
                f"of T^{len(self.V)} cut out by {len(self.relations)} relation(s)")


def orbit_closure(relations: list[list[int]], n: int) -> OrbitClosure:
    """The closed subgroup {x in T^n : k . x in Z for every relation k}."""
    rel = [list(map(int, k)) for k in relations if any(k)]
    if not rel:
        I = tuple(tuple(int(i == j) for j in range(n)) for i in range(n))
        return OrbitClosure((), I, (), n)
    U, D, V = smith_normal_form(rel)
    r = sum(1 for i in range(min(len(rel), n)) if D[i][i] != 0)
    d = tuple(D[i][i] for i in range(r))
    return OrbitClosure(tuple(map(tuple, rel)), tuple(map(tuple, V)), d, n - r)


@dataclass(frozen=True)
class TrigFunction:
    """G(x) = const + sum_k Re(B_k exp(2 pi i x_{c_k})), x in T^n (balls)."""

    const: arb
    terms: tuple[tuple[int, acb], ...]  # (coordinate, B)

    def eval_box(self, x_mid: list[arb]) -> arb:
        s = self.const
        for c, B in self.terms:
            e = (2 * arb.pi() * x_mid[c])
            s += B.real * e.cos() - B.imag * e.sin()
        return s


def vanishing_coset(G: TrigFunction, H: OrbitClosure, prec: int = 128):
    """The fixed coordinates of a coset of H on which G is identically 0, or None.

    On the coset y_i = a_i / d_i (i < r), x = V y and G is a trigonometric polynomial in the
    free coordinates: term k has frequency V[c_k][r:] and phase sum_i V[c_k][i] a_i / d_i.
    Terms with frequencies f and -f combine into one Fourier coefficient; G vanishes on the
    coset iff every coefficient (and the constant) is 0.  A coset whose coefficient balls all
    contain 0 is returned (fail closed: the caller refuses), so a coset that is not returned
    certainly carries a non-zero G, whose zero set then has measure 0.
    """
    r = len(H.d)
    with workprec(prec):
        for fin in itertools.product(*[range(di) for di in H.d]):
            coef: dict[tuple, acb] = {}
            const = acb(G.const)
            for c, B in G.terms:
                row = H.V[c]
                freq = tuple(row[r:])
                phase = sum((Fraction(row[i] * a, di) for i, (a, di) in enumerate(zip(fin, H.d))), Fraction(0))
                z = B * (2 * arb.pi() * (arb(phase.numerator) / phase.denominator) * acb(0, 1)).exp()
                if not any(freq):
                    const += z.real
                    continue
                neg = tuple(-v for v in freq)
                key, val = (freq, z) if freq > neg else (neg, z.conjugate())
                coef[key] = coef.get(key, acb(0)) + val
            if const.real.contains(0) and all(v.real.contains(0) and v.imag.contains(0) for v in coef.values()):
                return fin
    return None


def density_on_closure(G: TrigFunction, H: OrbitClosure, target_width: float,
                       max_boxes: int = 200000, prec: int = 96):
    """Enclose the Haar measures of {G > 0} and {G >= 0} on H by box subdivision.

    Boxes (in the free coordinates of each coset) are refined level by level;
    a box counts as positive when the ball of G on it is > 0, is dropped when
    the ball is < 0, and is otherwise split in 2^dim.  Refinement stops when
    the undecided volume is below half the target width or the next level
    would exceed ``max_boxes``.  Returns (lower, upper, undecided, boxes) with
    exact Fractions; upper = lower + undecided.
    """
    n = len(H.V)
    r = len(H.d)
    f = H.dim
    n_comp = H.n_components
    lower = Fraction(0)
    boxes = 0
    pending = []  # (fixed coordinates, lo corner, side)
    for fin in itertools.product(*[range(di) for di in H.d]):
        y_fix = tuple(Fraction(a, di) for a, di in zip(fin, H.d))
        pending.append((y_fix, tuple(Fraction(0) for _ in range(f)), Fraction(1)))
    weight = Fraction(1, n_comp)
    tau = Fraction(target_width)
    with workprec(prec):
        while pending:
            nxt = []
            for y_fix, lo, side in pending:
                boxes += 1
                x = []
                for i in range(n):
                    row = H.V[i]
                    c = sum((row[j] * y_fix[j] for j in range(r)), Fraction(0))
                    c += sum((row[r + j] * (lo[j] + side / 2) for j in range(f)), Fraction(0))
                    rad = sum(abs(row[r + j]) for j in range(f)) * side / 2
                    ball = arb(c.numerator) / c.denominator
                    if rad:
                        ball += arb(0, arb(rad.numerator) / rad.denominator)
                    x.append(ball)
                val = G.eval_box(x)
                if val > 0:
                    lower += side**f * weight
                elif val < 0:
                    pass
                else:
                    nxt.append((y_fix, lo, side))
            und = sum((s**f * weight for _, _, s in nxt), Fraction(0))
            if f == 0 or und <= tau / 2 or boxes + len(nxt) * 2**f > max_boxes:
                return lower, lower + und, und, boxes
            pending = []
            for y_fix, lo, side in nxt:
                half = side / 2
                for corner in itertools.product((0, 1), repeat=f):
                    pending.append((y_fix, tuple(l + c * half for l, c in zip(lo, corner)), half))
    return lower, lower, Fraction(0), boxes
