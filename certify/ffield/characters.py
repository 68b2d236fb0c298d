"""Characters of (F_q[t]/m)^x for monic m: structure, discrete logarithms, parity, conductors.

The unit group is built as an abstract finite abelian group from exact
arithmetic, with vectorised products on the F_p-linear model of F_q[t]/m
(:class:`certify.ffield.poly.ResidueRing`):

1. Units are the residues not divisible by any prime factor P of m
   (multiples of P are P*h with deg h < deg m - deg P).
2. A subgroup H (list of residue indices, with ``pos[index] = position``)
   grows by one element g at a time: k = order of gH in G/H (from the
   factorisation of [G:H], exact ``pow_mod``), then H' = H + gH + ... + g^(k-1)H,
   built by doubling so the work is O(|G|) vectorised products.  The position
   of an element is then a mixed-radix number whose digits l_i are its
   exponents on g_1, g_2, ...; the relations g_i^(k_i) in H_(i-1) form a
   triangular integer matrix R.
3. The Smith normal form U R V = diag(d_1 | d_2 | ...) turns the mixed-radix
   exponents l into coordinates y = l V (mod d_i) of (F_q[t]/m)^x = sum Z/d_i.

A character is a vector c (c_i mod d_i): chi_c(y) = exp(2 pi i sum c_i y_i / d_i).
Values are stored exactly as exponents of zeta_e, e = lcm(d_i) = d_r (the
group exponent); a character of order o takes values in the o-th roots of unity.

Parity: chi is *even* if it is trivial on F_q^x (the constants), odd otherwise.
Conductor: the least divisor f of m such that chi is trivial on the units
congruent to 1 modulo f, found place by place (the exponent at P is the least
j with chi trivial on {a = 1 mod P^j, a = 1 mod m/P^e}).
Primitive reduction: :meth:`Character.primitive_reduction` gives chi* mod f with
chi*(a) = chi(a~), a~ = a mod f and a~ = 1 mod the part of m prime to f.
:func:`character_table` does order, parity and conductor of every character at once.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from ..errors import BadInput
from .poly import (
    FiniteField, ResidueRing, factor, poly_from_index, poly_index, poly_str, prime_factors,
)

__all__ = ["CharacterGroup", "Character", "smith_normal_form", "character_group", "CharacterTable",
           "character_table", "galois_orbit_representatives"]


# ---------------------------------------------------------------- Smith normal form
def smith_normal_form(A: list[list[int]]):
    """(U, D, V) with U A V = D diagonal, d_i | d_(i+1), d_i >= 0, U and V unimodular."""
    A = [list(map(int, row)) for row in A]
    n = len(A)
    m = len(A[0]) if n else 0
    U = [[int(i == j) for j in range(n)] for i in range(n)]
    V = [[int(i == j) for j in range(m)] for i in range(m)]

    def swap_rows(i, j):
        A[i], A[j] = A[j], A[i]
        U[i], U[j] = U[j], U[i]

    def swap_cols(i, j):
        for row in A:
            row[i], row[j] = row[j], row[i]
        for row in V:
            row[i], row[j] = row[j], row[i]

    def add_row(dst, src, f):  # row dst += f * row src
        if f:
            A[dst] = [a + f * b for a, b in zip(A[dst], A[src])]
            U[dst] = [a + f * b for a, b in zip(U[dst], U[src])]

    def add_col(dst, src, f):
        if f:
            for row in A:
                row[dst] += f * row[src]
            for row in V:
                row[dst] += f * row[src]

    t = 0
    while t < min(n, m):
        nz = [(abs(A[i][j]), i, j) for i in range(t, n) for j in range(t, m) if A[i][j]]
        if not nz:
            break
        _, i0, j0 = min(nz)
        swap_rows(t, i0)
        swap_cols(t, j0)
        while True:
            changed = False
            for i in range(t + 1, n):
                if A[i][t]:
                    add_row(i, t, -(A[i][t] // A[t][t]))
                    changed = changed or A[i][t] != 0
            for j in range(t + 1, m):
                if A[t][j]:
                    add_col(j, t, -(A[t][j] // A[t][t]))
                    changed = changed or A[t][j] != 0
            if changed:
                cand = [(abs(A[i][t]), i, t) for i in range(t, n) if A[i][t]]
                cand += [(abs(A[t][j]), t, j) for j in range(t, m) if A[t][j]]
                _, i0, j0 = min(cand)
                swap_rows(t, i0)
                swap_cols(t, j0)
                continue
            bad = next(((i, j) for i in range(t + 1, n) for j in range(t + 1, m)
                        if A[i][j] % A[t][t]), None)
            if bad is None:
                break
            add_row(t, bad[0], 1)
        if A[t][t] < 0:
            A[t] = [-a for a in A[t]]
            U[t] = [-a for a in U[t]]
        t += 1
    return U, A, V


# ---------------------------------------------------------------- the group
class CharacterGroup:
    """(F_q[t]/m)^x with exact discrete logarithms and its character group.

    Parameters
    ----------
    F : FiniteField
    m : fq_default_poly, monic of degree >= 1.

    Attributes
    ----------
    invariants : tuple of int
        d_1 | d_2 | ... | d_r (all > 1): the group is the sum of Z/d_i.
    exponent : int
        e = d_r (1 for the trivial group).
    order : int
        phi(m), the number of units.
    """

    def __init__(self, F: FiniteField, m, seed: int = 20261201):
        if m.degree() < 1 or not m.is_monic():
            raise BadInput("modulus must be monic of degree >= 1")
        self.F, self.m = F, m
        self.M = m.degree()
        self.ring = ResidueRing(F, m)
        self.size = self.ring.size
        self.factors = factor(m, F)
        q = F.q
        self.order = 1
        for P, e in self.factors:
            d = P.degree()
            self.order *= q ** (d * e) - q ** (d * (e - 1))
        self._build(seed)

    # -- structure
    def _unit_mask(self) -> np.ndarray:
        mask = np.ones(self.size, dtype=bool)
        mask[0] = False
        for P, _ in self.factors:
            h = np.arange(self.F.q ** (self.M - P.degree()), dtype=np.int64)
            mask[self.ring.mul_many(h, P)] = False
        if int(mask.sum()) != self.order:
            raise AssertionError("unit count disagrees with phi(m)")  # pragma: no cover
        return mask

    def _index(self, f) -> int:
        return poly_index(f % self.m, self.F)

    def _build(self, seed: int) -> None:
        ring, m = self.ring, self.m
        self.is_unit = self._unit_mask()
        pos = np.full(self.size, -1, dtype=np.int64)
        elems = np.array([1 if self.M >= 1 else 0], dtype=np.int64)
        pos[elems] = 0
        gens, radices, rel_pos = [], [], []
        rng = np.random.default_rng(seed)
        unit_idx = None
        while len(elems) < self.order:
            n_quot = self.order // len(elems)
            best = None
            for attempt in range(6):
                if unit_idx is None or attempt % 3 == 0:
                    cand_idx = np.nonzero(self.is_unit & (pos < 0))[0]
                    unit_idx = cand_idx
                g_i = int(unit_idx[rng.integers(len(unit_idx))])
                g = poly_from_index(g_i, self.F)
                k = n_quot
                for ell, _ in prime_factors(n_quot):
                    while k % ell == 0 and pos[self._index(g.pow_mod(k // ell, m))] >= 0:
                        k //= ell
                if best is None or k > best[1]:
                    best = (g, k)
                if k == n_quot:
                    break
            g, k = best
            H = len(elems)
            T = elems
            n = 1
            while 2 * n <= k:
                T = np.concatenate([T, ring.mul_many(T, g.pow_mod(n, m))])
                n *= 2
            if n < k:
                T = np.concatenate([T, ring.mul_many(T[: (k - n) * H], g.pow_mod(n, m))])
            if len(T) != k * H or np.any(pos[T[H:]] >= 0):
                raise AssertionError("coset construction failed")  # pragma: no cover
            pos[T] = np.arange(len(T), dtype=np.int64)
            rel_pos.append(int(pos[self._index(g.pow_mod(k, m))]))
            if rel_pos[-1] < 0 or rel_pos[-1] >= H:
                raise AssertionError("relation outside the subgroup")  # pragma: no cover
            gens.append(g)
            radices.append(k)
            elems = T
        self.pos = pos
        self.elements = elems
        self.gens = tuple(gens)
        self.radices = tuple(radices)
        r = len(gens)
        R = [[0] * r for _ in range(r)]
        for i in range(r):
            R[i][i] = radices[i]
            for j, lj in enumerate(self._mixed_digits(rel_pos[i])[:i]):
                R[i][j] -= lj
        if r:
            U, D, V = smith_normal_form(R)
            diag = [D[i][i] for i in range(r)]
        else:
            diag, V = [], []
        keep = [i for i in range(r) if diag[i] > 1]
        self.invariants = tuple(diag[i] for i in keep)
        self.exponent = self.invariants[-1] if self.invariants else 1
        # V reduced column-wise modulo d_i keeps products small and exact in int64
        self._V = np.array([[V[j][i] % diag[i] for i in keep] for j in range(r)],
                           dtype=np.int64).reshape(r, len(keep))
        prod = 1
        for d in self.invariants:
            prod *= d
        if prod != self.order:
            raise AssertionError("Smith form disagrees with phi(m)")  # pragma: no cover
        # W = V^(-1): row i gives the exponents on g_j of the basis element for y = e_i
        if r:
            from flint import fmpz_mat
            Vi = fmpz_mat(V).inv()  # V is unimodular, so the inverse is integral
            self._W = [[int(str(Vi[i, j])) for j in range(r)] for i in keep]
        else:
            self._W = []
        self._gamma = self._constant_generator()

    def _mixed_digits(self, p: int) -> list[int]:
        out = []
        for k in self.radices:
            p, r = divmod(int(p), k)
            out.append(r)
        return out

    def _constant_generator(self) -> int:
        """Index of a generator of F_q^x (as a constant residue)."""
        F = self.F
        if F.q == 2:
            return 1
        if F.k > 1:
            return F.p  # the code of z, primitive by construction
        p = F.p
        cof = [(p - 1) // ell for ell, _ in prime_factors(p - 1)]
        for g in range(2, p):
            if all(pow(g, c, p) != 1 for c in cof):
                return g
        raise AssertionError("no primitive root")  # pragma: no cover

    # -- logarithms
    def logs(self, idx) -> np.ndarray:
        """Coordinates y (mod d_i) of the residues with the given indices (units only)."""
        idx = np.atleast_1d(np.asarray(idx, dtype=np.int64))
        p = self.pos[idx]
        if np.any(p < 0):
            raise BadInput("discrete logarithm of a non-unit")
        L = np.empty((len(idx), len(self.radices)), dtype=np.int64)
        for j, k in enumerate(self.radices):
            p, L[:, j] = np.divmod(p, k)
        d = np.array(self.invariants, dtype=np.int64)
        return (L @ self._V) % d if len(d) else np.zeros((len(idx), 0), dtype=np.int64)

    def log(self, f) -> tuple[int, ...]:
        """Coordinates of a polynomial coprime to m."""
        return tuple(int(v) for v in self.logs([self._index(f)])[0])

    def basis_element(self, i: int):
        """The residue with coordinates e_i."""
        def g_pow(x, w):
            return x.pow_mod(w % self.order, self.m)

        g = self.F.one_poly()
        for j, w in enumerate(self._W[i]):
            g = (g * g_pow(self.gens[j], w)) % self.m
        return g

    # -- characters
    def character(self, c) -> "Character":
        c = tuple(int(ci) % di for ci, di in zip(c, self.invariants))
        if len(c) != len(self.invariants):
            raise BadInput(f"a character needs {len(self.invariants)} exponents")
        return Character(self, c)

    def characters(self):
        """All characters, in mixed-radix order of c (c_1 fastest)."""
        for n in range(self.order):
            c = []
            for d in self.invariants:
                n, r = divmod(n, d)
                c.append(r)
            yield Character(self, tuple(c))

    def trivial(self) -> "Character":
        return Character(self, (0,) * len(self.invariants))

    def class_index(self, f) -> int:
        """Residue index of a class given as a polynomial; BadInput unless a unit."""
        i = self._index(f)
        if not self.is_unit[i]:
            raise BadInput(f"class {poly_str(f, self.F)!r} is not coprime to the modulus "
                           f"{poly_str(self.m, self.F)!r}")
        return i

    def power_map(self, k: int) -> np.ndarray:
        """For each position p (element elements[p]) the position of its k-th power."""
        d = np.array(self.invariants, dtype=np.int64)
        Y = self.logs(self.elements)
        Yk = (Y * k) % d
        return self.positions_of_logs(Yk)

    def positions_of_logs(self, Y: np.ndarray) -> np.ndarray:
        """Positions of the elements with coordinates Y (rows), via a lookup on all logs."""
        key_all = self._log_keys(self.logs(self.elements))
        order = np.argsort(key_all)
        key = self._log_keys(Y)
        return order[np.searchsorted(key_all, key, sorter=order)]

    def _log_keys(self, Y: np.ndarray) -> np.ndarray:
        k = np.zeros(len(Y), dtype=np.int64)
        for j, d in enumerate(self.invariants):
            k = k * d + Y[:, j]
        return k

    @functools.lru_cache(maxsize=None)
    def kernel_indices(self, fi: int, j: int) -> np.ndarray:
        """Residue indices of K_j = {a unit : a = 1 mod P^j, a = 1 mod m/P^e} for factor fi."""
        F, ring = self.F, self.ring
        P, _ = self.factors[fi]
        cof = F.one_poly()
        for Q, eq in self.factors:
            if Q != P:
                cof *= Q**eq
        base = cof * P**j
        h = np.arange(F.q ** (self.M - base.degree()), dtype=np.int64)
        idx = ring.mul_many(h, base)
        b0 = idx % F.p
        idx = idx - b0 + (b0 + 1) % F.p
        out = idx[self.is_unit[idx]]
        out.setflags(write=False)
        return out

    def describe(self) -> str:
        inv = " x ".join(f"Z/{d}" for d in self.invariants) or "trivial"
        return f"(F_{self.F.q}[t]/({poly_str(self.m, self.F)}))^x = {inv}, order {self.order}"


@functools.lru_cache(maxsize=32)
def _group_cached(q: int, m_index: int) -> CharacterGroup:
    from .poly import finite_field
    F = finite_field(q)
    return CharacterGroup(F, poly_from_index(m_index, F))


def character_group(F: FiniteField, m) -> CharacterGroup:
    """A cached :class:`CharacterGroup` for (F, m)."""
    if m.degree() < 1 or not m.is_monic():
        raise BadInput("modulus must be monic of degree >= 1")
    return _group_cached(F.q, poly_index(m, F))


@dataclass(frozen=True, eq=False)
class Character:
    """chi_c on (F_q[t]/m)^x; values are zeta_order^(exponent)."""

    group: CharacterGroup
    c: tuple[int, ...]

    @functools.cached_property
    def order(self) -> int:
        from math import gcd, lcm
        o = 1
        for ci, di in zip(self.c, self.group.invariants):
            o = lcm(o, di // gcd(ci, di))
        return o

    @functools.cached_property
    def _weights(self) -> np.ndarray:
        G = self.group
        e = G.exponent
        w = np.array([ci * (e // di) for ci, di in zip(self.c, G.invariants)], dtype=np.int64)
        return (G._V @ w) % e if len(w) else np.zeros(len(G.radices), dtype=np.int64)

    @functools.cached_property
    def position_exponents(self) -> np.ndarray:
        """Exponents (mod order) of chi on every unit, indexed by position."""
        G = self.group
        e = G.exponent
        ex = np.zeros(1, dtype=np.int64)
        for k, a in zip(G.radices, self._weights):
            ex = (np.add.outer(np.arange(k, dtype=np.int64) * int(a), ex) % e).ravel()
        return ex // (e // self.order)

    @functools.cached_property
    def table(self) -> np.ndarray:
        """Exponent of chi(f) mod order for every residue index; -1 where chi(f) = 0."""
        G = self.group
        out = np.full(G.size, -1, dtype=np.int64)
        out[G.elements] = self.position_exponents
        return out

    def exponent_at(self, f) -> int:
        """chi(f) = zeta_order^result, or -1 if f is not coprime to m."""
        return int(self.table[self.group._index(f)])

    def is_trivial(self) -> bool:
        return all(ci == 0 for ci in self.c)

    @property
    def is_even(self) -> bool:
        """Trivial on the constants F_q^x."""
        return int(self.table[self.group._gamma]) == 0

    def conjugate(self) -> "Character":
        return Character(self.group, tuple((-ci) % di for ci, di in zip(self.c, self.group.invariants)))

    def power(self, k: int) -> "Character":
        return Character(self.group, tuple((k * ci) % di for ci, di in zip(self.c, self.group.invariants)))

    @functools.cached_property
    def conductor_exponents(self) -> tuple[int, ...]:
        """For each prime power P^e || m (in group.factors order) the exponent of P in the conductor."""
        G = self.group
        out = []
        for fi, (P, e) in enumerate(G.factors):
            fexp = e
            for j in range(0, e):
                if np.all(self.table[G.kernel_indices(fi, j)] == 0):
                    fexp = j
                    break
            out.append(fexp)
        return tuple(out)

    @property
    def conductor(self):
        f = self.group.F.one_poly()
        for (P, _), fe in zip(self.group.factors, self.conductor_exponents):
            f *= P**fe
        return f

    @property
    def is_primitive(self) -> bool:
        return self.conductor == self.group.m

    def lift(self, a):
        """A unit mod m congruent to a mod the conductor f and to 1 mod the part of m prime to f."""
        G = self.group
        F = G.F
        f = self.conductor
        m0 = F.one_poly()
        for (P, e), fe in zip(G.factors, self.conductor_exponents):
            if fe == 0:
                m0 *= P**e
        a = a % f if f.degree() > 0 else F.one_poly()
        if m0.degree() == 0:
            return a
        finv = f.inverse_mod(m0)
        s = ((F.one_poly() - a) * finv) % m0
        return (a + f * s) % G.m

    def primitive_reduction(self) -> "Character":
        """The primitive character chi* mod the conductor f with chi*(a) = chi(lift(a)).

        Its exponents are read off the basis elements of (F_q[t]/f)^x; the map is checked
        on random units (``Inconsistent`` otherwise).
        """
        from ..errors import Inconsistent
        G = self.group
        f = self.conductor
        if f.degree() == 0:
            raise BadInput("the trivial character has no primitive reduction of positive degree")
        H = character_group(G.F, f)
        c = []
        o = self.order
        for i, d in enumerate(H.invariants):
            x = self.exponent_at(self.lift(H.basis_element(i)))
            if (x * d) % o:
                raise Inconsistent("primitive reduction: a basis value has the wrong order")
            c.append((x * d) // o % d)
        star = H.character(c)
        rng = np.random.default_rng(3)
        units = np.nonzero(H.is_unit)[0]
        for i in rng.choice(units, size=min(20, len(units)), replace=False):
            a = poly_from_index(int(i), G.F)
            e1 = star.exponent_at(a) * (o // star.order) if star.order else 0
            if (e1 - self.exponent_at(self.lift(a))) % o:
                raise Inconsistent("primitive reduction disagrees with chi")
        return star

    def label(self) -> str:
        # one label style for characters everywhere (screen, JSON, documents): chi_{...}
        return "chi_{" + ",".join(map(str, self.c)) + "}"

    def describe(self) -> str:
        F = self.group.F
        return (f"{self.label()} of order {self.order}, "
                f"{'even' if self.is_even else 'odd'}, conductor {poly_str(self.conductor, F)}")


# ---------------------------------------------------------------- all characters at once
@dataclass(frozen=True, eq=False)
class CharacterTable:
    """Order, parity and conductor degree of every character, in mixed-radix label order."""

    group: CharacterGroup
    labels: np.ndarray  # (phi, r) exponent vectors c
    orders: np.ndarray
    even: np.ndarray  # bool
    conductor_exponents: np.ndarray  # (phi, number of prime factors of m)

    def conductor_degrees(self) -> np.ndarray:
        degs = np.array([P.degree() for P, _ in self.group.factors], dtype=np.int64)
        return self.conductor_exponents @ degs


def _subgroup_generators(G: CharacterGroup, sample, order: int, seed: int = 1) -> np.ndarray:
    """Logs of random elements (from ``sample(rng, k)``, returning residue indices) of a
    subgroup of known order, until they provably generate it: the subgroup they generate
    has order |G| / (product of the Smith invariants of [rows; diag(d)]).
    """
    d = list(G.invariants)
    r = len(d)
    if order == 1 or r == 0:
        return np.zeros((0, r), dtype=np.int64)
    rng = np.random.default_rng(seed)
    chosen: list = []
    while True:
        chosen.extend(G.logs(sample(rng, r + 4)))
        rows = [list(map(int, y)) for y in chosen] + [[d[i] if i == j else 0 for j in range(r)]
                                                     for i in range(r)]
        _, D, _ = smith_normal_form(rows)
        index = 1
        for i in range(r):
            index *= D[i][i]
        if G.order // index == order:
            return np.array(chosen, dtype=np.int64)
        if len(chosen) > 40 * (r + 4):
            raise AssertionError("subgroup generators not found")  # pragma: no cover


def _all_character_exponents(d: np.ndarray, e: int, a: np.ndarray) -> np.ndarray:
    """sum_i c_i a_i mod e for every label c in mixed-radix order (c_1 fastest), by outer sums."""
    ex = np.zeros(1, dtype=np.int64)
    for di, ai in zip(d, a):
        ex = (np.add.outer(np.arange(di, dtype=np.int64) * (int(ai) % e), ex) % e).ravel()
    return ex


def character_table(G: CharacterGroup) -> CharacterTable:
    """Exact order, parity and conductor of all phi(m) characters, vectorised over characters.

    A character c is trivial on a subgroup K iff sum_i c_i y_i e/d_i = 0 mod e for every
    generator y of K; K_j = {a = 1 mod P^j, a = 1 mod m/P^e} gives the conductor exponent
    at P as the least j with chi trivial on K_j.
    """
    d = np.array(G.invariants, dtype=np.int64)
    e = G.exponent
    n = G.order
    r = len(d)
    C = np.zeros((n, r), dtype=np.int64)
    k = np.arange(n, dtype=np.int64)
    for j, dj in enumerate(d):
        k, C[:, j] = np.divmod(k, dj)
    if r:
        orders = np.lcm.reduce(d[None, :] // np.gcd(C, d[None, :]), axis=1)
    else:
        orders = np.ones(n, dtype=np.int64)
    scale = e // d if r else d
    yg = G.logs([G._gamma])[0] if r else np.zeros(0, dtype=np.int64)
    even = _all_character_exponents(d, e, yg * scale) == 0 if r else np.ones(n, dtype=bool)
    F, ring = G.F, G.ring
    cond = np.zeros((n, len(G.factors)), dtype=np.int64)
    for fi, (P, ee) in enumerate(G.factors):
        cof = F.one_poly()
        for Q, eq in G.factors:
            if Q != P:
                cof *= Q**eq
        decided = np.zeros(n, dtype=bool)
        cond[:, fi] = ee
        for j in range(ee):
            base = cof * P**j
            n_h = F.q ** (G.M - base.degree())
            A = ring.mul_matrix(base)

            def sample(rng, k, A=A, base=base, n_h=n_h):
                # elements 1 + base*h of K_j for random h (units only)
                out = []
                while len(out) < k:
                    h = rng.integers(0, n_h, size=4 * k, dtype=np.int64)
                    idx = ring.mul_many(h, base, A)
                    b0 = idx % F.p
                    idx = idx - b0 + (b0 + 1) % F.p
                    out.extend(int(i) for i in idx[G.is_unit[idx]])
                return np.array(out[:k], dtype=np.int64)

            dP = P.degree()
            size = (F.q**dP - 1) * F.q ** (dP * (ee - 1)) if j == 0 else F.q ** (dP * (ee - j))
            gens = _subgroup_generators(G, sample, size)
            triv = np.ones(n, dtype=bool)
            for y in gens:
                triv &= _all_character_exponents(d, e, y * scale) == 0
            newly = triv & ~decided
            cond[newly, fi] = j
            decided |= triv
    return CharacterTable(G, C, orders, even, cond)


def galois_orbit_representatives(G: CharacterGroup, labels: np.ndarray | None = None) -> list[tuple[int, list[int]]]:
    """[(representative label index, [k coprime to the order])] for the orbits chi -> chi^k.

    The L-polynomial of chi^k is obtained from chi's exact coefficient counts by the
    permutation j -> k j of the exponents.
    """
    from math import gcd
    d = np.array(G.invariants, dtype=np.int64)
    n = G.order
    if labels is None:
        labels = character_table(G).labels
    mult = np.ones(len(d), dtype=np.int64)
    for j in range(1, len(d)):
        mult[j] = mult[j - 1] * d[j - 1]
    seen = np.zeros(n, dtype=bool)
    out = []
    for i in range(n):
        if seen[i]:
            continue
        c = labels[i]
        o = 1
        for ci, di in zip(c, d):
            o = o * (di // gcd(int(ci), int(di))) // gcd(o, di // gcd(int(ci), int(di)))
        ks = [k for k in range(1, o + 1) if gcd(k, o) == 1] if o > 1 else [1]
        kk = np.array(ks, dtype=np.int64)
        orbit = ((kk[:, None] * c[None, :]) % d[None, :]) @ mult
        seen[orbit] = True
        out.append((i, ks))
    return out
