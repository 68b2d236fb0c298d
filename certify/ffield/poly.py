"""Arithmetic in F_q[t] for prime powers q, on python-flint's ``fq_default`` types.

One code path serves prime and prime-power q: the field F_q is an
``fq_default_ctx`` (of degree 1 when q is prime) and polynomials are
``fq_default_poly``.  Text input and output use ``t`` for the polynomial
variable and ``z`` for the generator of F_q over its prime field.

Conventions
-----------
* **The field.**  ``F_q = F_p[z]/(g(z))`` where ``g`` is the *primitive*
  monic polynomial of degree k (q = p^k) with the smallest index (see below);
  so ``z`` generates the cyclic group F_q^x.  For prime q, ``z`` is not
  used (F_q = Z/p) and writing ``z`` in a polynomial is an error.
* **Codes.**  An element ``b_0 + b_1 z + ... + b_{k-1} z^{k-1}`` (0 <= b_j < p)
  has the integer code ``sum b_j p^j`` in [0, q); 0 -> 0 and 1 -> 1.
* **Indices.**  A polynomial ``c_0 + c_1 t + ... + c_n t^n`` has the index
  ``sum code(c_i) q^i``; the monic polynomials of degree n are exactly the
  indices ``q^n .. 2 q^n - 1``.  A residue class modulo a monic m of degree M
  is the index of its reduced representative, in [0, q^M).

Public functions
----------------
``parse_field_order(q)``            int or text -> q, BadInput unless a prime power >= 2.
``finite_field(q)``                 the cached :class:`FiniteField` of order q.
``parse_poly(text, F)``             text such as ``t^3 + 2*t + 1`` or ``(z+1)*t^2 + z`` -> poly.
``parse_monic(text, F, what)``      as parse_poly, but must be monic of degree >= 1.
``poly_str(f, F)``                  the inverse of parse_poly (``t`` and ``z``).
``poly_index(f, F)`` / ``poly_from_index(i, F)``   polynomial <-> integer index.
``poly_from_codes(codes, F)`` / ``poly_codes(f, F)``  coefficient codes, constant term first.
``monic_indices(F, n)``             numpy array of the indices of all monic polys of degree n.
``monic_polys(F, n)``               iterator over the monic polynomials of degree n.
``is_irreducible(f)``, ``factor(f, F)``  (monic irreducible factors with exponents, sorted).
``irreducible_count(q, n)``         Gauss's count (1/n) sum_{d|n} mu(d) q^(n/d), exact.
``monic_irreducibles(F, n)``        list of all monic irreducibles of degree n (by a sieve).
``gauss_count_check(q, n_max)``     Gauss's count against enumeration for n = 1..n_max.
``ResidueRing(F, m)``               F_p-linear model of F_q[t]/m for vectorised products.

Everything raises :class:`certify.errors.BadInput` with a one-line message
on malformed input.
"""

from __future__ import annotations

import functools
import re
from dataclasses import dataclass, field
from typing import Iterator

import numpy as np
from flint import fmpz, fmpz_mod_poly_ctx, fq_default_ctx, fq_default_poly_ctx, nmod_poly

from ..errors import BadInput

__all__ = [
    "FiniteField", "parse_field_order", "finite_field", "parse_poly", "parse_monic",
    "poly_str", "poly_index", "poly_from_index", "poly_codes", "poly_from_codes",
    "monic_indices", "monic_polys", "is_irreducible", "factor", "irreducible_count",
    "monic_irreducibles", "gauss_count_check", "ResidueRing", "mobius", "divisors",
    "prime_factors", "MAX_TABLE",
]

#: Largest q^deg m for which residue tables (characters, discrete logarithms) are built.
MAX_TABLE = 1 << 24

POLY_VAR = "t"
FIELD_GEN = "z"


# ---------------------------------------------------------------- integers
def prime_factors(n: int) -> list[tuple[int, int]]:
    """Prime factorisation of a positive integer as [(p, e), ...] increasing."""
    if n < 1:
        raise ValueError("need n >= 1")
    if n == 1:
        return []
    return sorted((int(p), int(e)) for p, e in fmpz(n).factor())


def divisors(n: int) -> list[int]:
    """All positive divisors of n, increasing."""
    ds = [1]
    for p, e in prime_factors(n):
        ds = [d * p**i for d in ds for i in range(e + 1)]
    return sorted(ds)


def mobius(n: int) -> int:
    """The Moebius function."""
    f = prime_factors(n)
    if any(e > 1 for _, e in f):
        return 0
    return -1 if len(f) % 2 else 1


def parse_field_order(q) -> int:
    """Return q as an int if it is a prime power >= 2 (``9``, ``3^2`` or ``3**2``), else raise BadInput."""
    text = str(q).strip().replace("**", "^")
    try:
        if "^" in text:
            base, _, ex = text.partition("^")
            b, e = int(base), int(ex)
            if not (1 <= e <= 64):
                raise ValueError
            qi = b**e
        else:
            qi = int(text)
    except (TypeError, ValueError):
        raise BadInput(f"q must be a prime power, got {q!r}") from None
    if qi < 2:
        raise BadInput(f"q must be a prime power >= 2, got {qi}")
    f = prime_factors(qi)
    if len(f) != 1:
        raise BadInput(f"q must be a prime power, got {qi} = "
                       + " * ".join(f"{p}^{e}" if e > 1 else str(p) for p, e in f))
    if qi > 1 << 40:
        raise BadInput(f"q = {qi} is too large (at most 2^40)")
    return qi


# ---------------------------------------------------------------- the field
@dataclass(frozen=True, eq=False)
class FiniteField:
    """F_q = F_p[z]/(g(z)) with g primitive; see the module docstring."""

    q: int
    p: int
    k: int
    modulus: tuple[int, ...]  # coefficients of g over F_p, constant term first, monic
    ctx: object = field(repr=False)
    pctx: object = field(repr=False)

    def elem(self, code: int):
        """The element with integer code ``code``."""
        c = int(code)
        if self.k == 1:
            return self.ctx(c)
        digs = []
        for _ in range(self.k):
            c, r = divmod(c, self.p)
            digs.append(r)
        return self.ctx(digs)

    def code(self, x) -> int:
        """The integer code of an element."""
        v = 0
        for b in reversed(x.to_list()):
            v = v * self.p + int(b)
        return v

    def elem_str(self, x) -> str:
        """Text of an element: an integer for prime q, a polynomial in z otherwise."""
        digs = [int(b) for b in x.to_list()]
        if self.k == 1:
            return str(digs[0] if digs else 0)
        terms = []
        for j in range(len(digs) - 1, -1, -1):
            b = digs[j]
            if b == 0:
                continue
            if j == 0:
                terms.append(str(b))
            else:
                mono = FIELD_GEN if j == 1 else f"{FIELD_GEN}^{j}"
                terms.append(mono if b == 1 else f"{b}*{mono}")
        return " + ".join(terms) if terms else "0"

    def describe(self) -> str:
        if self.k == 1:
            return f"F_{self.q}"
        g = " + ".join(
            (f"z^{j}" if j > 1 else ("z" if j == 1 else "1")) if c == 1 else
            (f"{c}*z^{j}" if j > 1 else (f"{c}*z" if j == 1 else str(c)))
            for j, c in reversed(list(enumerate(self.modulus))) if c
        )
        return f"F_{self.q} = F_{self.p}[z]/({g})"

    def poly(self, coeffs):
        """A polynomial from a list of field elements (constant term first)."""
        return self.pctx(list(coeffs))

    def one_poly(self):
        return self.pctx([1])

    def gen_poly(self):
        """The polynomial t."""
        return self.pctx([0, 1])


def _primitive_modulus(p: int, k: int) -> tuple[int, ...]:
    """The monic primitive polynomial of degree k over F_p of smallest index."""
    if k == 1:
        return (0, 1)
    order = p**k - 1
    cofactors = [order // r for r, _ in prime_factors(order)]
    x = nmod_poly([0, 1], p)
    for i in range(p**k):
        digs = []
        c = i
        for _ in range(k):
            c, r = divmod(c, p)
            digs.append(r)
        if digs[0] == 0:
            continue
        g = nmod_poly(digs + [1], p)
        if not _nmod_irreducible(g):
            continue
        if all(_powmod(x, e, g) != nmod_poly([1], p) for e in cofactors):
            return tuple(digs + [1])
    raise AssertionError("no primitive polynomial found")  # pragma: no cover


def _nmod_irreducible(g) -> bool:
    _, facs = g.factor()
    return len(facs) == 1 and facs[0][1] == 1 and facs[0][0].degree() == g.degree()


def _powmod(x, e: int, g):
    return x.pow_mod(e, g) if hasattr(x, "pow_mod") else (x**e) % g


@functools.lru_cache(maxsize=None)
def finite_field(q) -> FiniteField:
    """The finite field of order q with the conventions of the module docstring."""
    q = parse_field_order(q)
    (p, k), = prime_factors(q)
    if k == 1:
        ctx = fq_default_ctx(p, 1, FIELD_GEN)
        mod = (0, 1)
    else:
        mod = _primitive_modulus(p, k)
        ctx = fq_default_ctx(modulus=fmpz_mod_poly_ctx(p)(list(mod)), var=FIELD_GEN)
    F = FiniteField(q, p, k, mod, ctx, fq_default_poly_ctx(ctx))
    _keep_forever(F)
    return F


def _keep_forever(obj) -> None:
    """Never free a field's flint contexts.

    python-flint 0.9 polynomials do not keep their context alive: when an object
    holding both a FiniteField and polynomials is torn down (its attributes are
    released in arbitrary order, e.g. at interpreter exit), the context could be
    freed first and the polynomial's destructor would then crash.  One extra
    reference per field (at most one per field order, by the cache) avoids it.
    """
    import ctypes
    ctypes.pythonapi.Py_IncRef(ctypes.py_object(obj))


# ---------------------------------------------------------------- parsing
_TOKEN = re.compile(r"\s*(?:(\d+)|([A-Za-z_][A-Za-z_0-9]*)|(\*\*|[-+*^()]))")
_MAX_EXPONENT = 10**6


class _Parser:
    """Recursive descent over + - * ^ ( ), integers, ``t`` and (prime-power q) ``z``.

    Grammar::

        expr   := ['+'|'-'] term (('+'|'-') term)*
        term   := power (['*'] power)*          (juxtaposition multiplies: 2t, 3z t)
        power  := atom (('^'|'**') integer)?
        atom   := integer | 't' | 'z' | '(' expr ')'
    """

    def __init__(self, text: str, F: FiniteField, var: str):
        self.text, self.F, self.var = text, F, var
        self.toks: list[tuple[str, str, int]] = []
        pos = 0
        s = text.rstrip()
        while pos < len(s):
            mt = _TOKEN.match(s, pos)
            if not mt:
                self.fail(f"unexpected character {s[pos:].lstrip()[:1]!r}", pos)
            if mt.group(1) is not None:
                self.toks.append(("num", mt.group(1), mt.start(1)))
            elif mt.group(2) is not None:
                self.toks.append(("id", mt.group(2), mt.start(2)))
            else:
                self.toks.append(("op", "^" if mt.group(3) == "**" else mt.group(3), mt.start(3)))
            pos = mt.end()
        self.i = 0

    def fail(self, why: str, pos: int | None = None):
        where = f" at position {pos + 1}" if pos is not None else ""
        raise BadInput(f"cannot parse polynomial {self.text.strip()!r}: {why}{where}")

    def peek(self):
        return self.toks[self.i] if self.i < len(self.toks) else ("end", "", len(self.text))

    def take(self):
        tok = self.peek()
        self.i += 1
        return tok

    def parse(self):
        if not self.toks:
            self.fail("empty input")
        val = self.expr()
        kind, v, pos = self.peek()
        if kind != "end":
            self.fail(f"unexpected {v!r}", pos)
        return val

    def expr(self):
        kind, v, _ = self.peek()
        sign = 1
        if kind == "op" and v in "+-":
            self.take()
            sign = -1 if v == "-" else 1
        val = self.term()
        if sign < 0:
            val = -val
        while True:
            kind, v, _ = self.peek()
            if kind == "op" and v in "+-":
                self.take()
                rhs = self.term()
                val = val + rhs if v == "+" else val - rhs
            else:
                return val

    def term(self):
        val = self.power()
        while True:
            kind, v, _ = self.peek()
            if kind == "op" and v == "*":
                self.take()
                val = val * self.power()
            elif kind in ("num", "id") or (kind == "op" and v == "("):
                val = val * self.power()
            else:
                return val

    def power(self):
        base = self.atom()
        kind, v, pos = self.peek()
        if kind == "op" and v == "^":
            self.take()
            kind, e, epos = self.take()
            if kind != "num":
                self.fail("exponent must be a non-negative integer", epos if kind != "end" else None)
            n = int(e)
            if n > _MAX_EXPONENT:
                self.fail(f"exponent {n} too large", epos)
            return base**n
        return base

    def atom(self):
        kind, v, pos = self.take()
        F = self.F
        if kind == "num":
            return F.pctx([F.ctx(int(v) % F.p)])
        if kind == "id":
            if v == self.var:
                return F.gen_poly()
            if v == FIELD_GEN and F.k > 1:
                return F.pctx([F.ctx.gen()])
            if v == FIELD_GEN:
                self.fail(f"'{FIELD_GEN}' names the generator of F_q only for prime powers q "
                          f"(q = {F.q} is prime)", pos)
            self.fail(f"unknown name {v!r} (use {self.var!r}"
                      + (f" and {FIELD_GEN!r})" if F.k > 1 else ")"), pos)
        if kind == "op" and v == "(":
            val = self.expr()
            k2, v2, p2 = self.take()
            if not (k2 == "op" and v2 == ")"):
                self.fail("missing ')'", p2 if k2 != "end" else None)
            return val
        if kind == "end":
            self.fail("unexpected end of input")
        self.fail(f"unexpected {v!r}", pos)


def parse_poly(text: str, F: FiniteField, var: str = POLY_VAR):
    """Parse text such as ``t^3 + 2*t + 1`` (or ``(z+1)*t^2 + z`` for prime-power q).

    Integers are read modulo p.  ``^`` and ``**`` are powers, ``*`` or
    juxtaposition multiplies.  Raises BadInput (one line) if malformed.
    """
    if not isinstance(text, str):
        raise BadInput(f"polynomial must be given as text, got {type(text).__name__}")
    if len(text) > 100_000:
        raise BadInput("polynomial text too long")
    return _Parser(text, F, var).parse()


def parse_monic(text: str, F: FiniteField, what: str = "modulus", var: str = POLY_VAR):
    """Parse a polynomial that must be monic of degree >= 1."""
    f = parse_poly(text, F, var)
    if f.degree() < 1:
        raise BadInput(f"{what} must have degree >= 1, got {poly_str(f, F)!r} over F_{F.q}")
    if not f.is_monic():
        raise BadInput(f"{what} must be monic, got {poly_str(f, F)!r} over F_{F.q}")
    return f


def poly_str(f, F: FiniteField, var: str = POLY_VAR) -> str:
    """Text of a polynomial, readable back by :func:`parse_poly`."""
    cs = f.coeffs()
    terms = []
    for i in range(len(cs) - 1, -1, -1):
        c = cs[i]
        if c.is_zero():
            continue
        cstr = F.elem_str(c)
        mono = "" if i == 0 else (var if i == 1 else f"{var}^{i}")
        if not mono:
            terms.append(cstr if (F.k == 1 or "+" not in cstr) else f"({cstr})")
        elif c.is_one():
            terms.append(mono)
        else:
            cc = cstr if (F.k == 1 or ("+" not in cstr)) else f"({cstr})"
            terms.append(f"{cc}*{mono}")
    return " + ".join(terms) if terms else "0"


# ---------------------------------------------------------------- indices
def poly_codes(f, F: FiniteField) -> tuple[int, ...]:
    """Coefficient codes, constant term first (empty for the zero polynomial)."""
    return tuple(F.code(c) for c in f.coeffs())


def poly_from_codes(codes, F: FiniteField):
    return F.pctx([F.elem(int(c)) for c in codes])


def poly_index(f, F: FiniteField) -> int:
    v = 0
    for c in reversed(f.coeffs()):
        v = v * F.q + F.code(c)
    return v


def poly_from_index(i: int, F: FiniteField):
    codes = []
    i = int(i)
    while i:
        i, r = divmod(i, F.q)
        codes.append(r)
    return poly_from_codes(codes, F)


def monic_indices(F: FiniteField, n: int) -> np.ndarray:
    """Indices of all monic polynomials of degree n (int64), increasing."""
    if F.q**n > MAX_TABLE * 4:
        raise BadInput(f"q^n = {F.q}^{n} is too large to enumerate")
    return np.arange(F.q**n, 2 * F.q**n, dtype=np.int64)


def monic_polys(F: FiniteField, n: int) -> Iterator:
    """Iterate over the monic polynomials of degree n in index order."""
    for i in range(F.q**n, 2 * F.q**n):
        yield poly_from_index(i, F)


# ---------------------------------------------------------------- factoring
def is_irreducible(f) -> bool:
    """Irreducibility over F_q (degree >= 1)."""
    return f.degree() >= 1 and bool(f.is_irreducible())


def factor(f, F: FiniteField) -> list[tuple[object, int]]:
    """Monic irreducible factors with exponents, sorted by (degree, index).

    The leading coefficient is dropped (it is 1 for monic input).
    """
    if f.is_zero():
        raise BadInput("cannot factor the zero polynomial")
    _, facs = f.factor()
    out = [(g.monic(), int(e)) for g, e in facs]
    out.sort(key=lambda ge: (ge[0].degree(), poly_index(ge[0], F)))
    return out


def irreducible_count(q: int, n: int) -> int:
    """Number of monic irreducibles of degree n over F_q: (1/n) sum_{d|n} mu(d) q^(n/d)."""
    if n < 1:
        raise ValueError("degree must be >= 1")
    s = sum(mobius(d) * q ** (n // d) for d in divisors(n))
    if s % n:
        raise AssertionError("Gauss's count is not an integer")  # pragma: no cover
    return s // n


# ---------------------------------------------------------------- F_p-linear model
class ResidueRing:
    """F_q[t]/m viewed as an F_p-vector space of dimension k*M, for vectorised products.

    A residue with index ``i`` (see module docstring) has F_p-digits
    ``(i // p^s) % p`` for s = 0 .. kM-1 in the basis ``z^j t^i``
    (s = i*k + j).  Multiplication by a fixed residue g is the F_p-linear map
    :meth:`mul_matrix`; applying it to many indices at once is :meth:`mul_many`.
    """

    def __init__(self, F: FiniteField, m, max_size: int = MAX_TABLE):
        self.F, self.m = F, m
        self.M = m.degree()
        self.dim = F.k * self.M
        self.size = F.q**self.M
        if self.size > max_size:
            raise BadInput(f"q^deg m = {F.q}^{self.M} exceeds the table limit {max_size}")
        self.pows = np.array([F.p**s for s in range(self.dim)], dtype=np.int64)

    def residue(self, i: int):
        return poly_from_index(i, self.F)

    def index(self, f) -> int:
        return poly_index(f % self.m, self.F)

    def digits(self, idx: np.ndarray) -> np.ndarray:
        return (idx[:, None] // self.pows[None, :]) % self.F.p

    def undigits(self, d: np.ndarray) -> np.ndarray:
        return (d.astype(np.int64) * self.pows[None, :]).sum(axis=1)

    def mul_matrix(self, g) -> np.ndarray:
        """Matrix A over F_p with digits(x*g mod m) = digits(x) @ A mod p."""
        F = self.F
        A = np.zeros((self.dim, self.dim), dtype=np.int64)
        zj = [F.pctx([F.ctx.gen() ** j]) if F.k > 1 else F.one_poly() for j in range(F.k)]
        tt = F.gen_poly()
        for i in range(self.M):
            ti = tt**i
            for j in range(F.k):
                prod = (zj[j] * ti * g) % self.m
                idx = poly_index(prod, F)
                A[i * F.k + j] = [(idx // int(pw)) % F.p for pw in self.pows]
        return A

    def mul_many(self, idx: np.ndarray, g, A: np.ndarray | None = None) -> np.ndarray:
        """Indices of x*g mod m for every index x in ``idx``."""
        if A is None:
            A = self.mul_matrix(g)
        p = self.F.p
        out = np.empty_like(idx)
        # chunks keep memory bounded; float64 products are exact while p^2*dim < 2^53
        exact_float = p * p * self.dim < 2**52
        step = 1 << 18
        for s in range(0, len(idx), step):
            d = self.digits(idx[s:s + step])
            if exact_float:
                r = np.rint(d.astype(np.float64) @ A.astype(np.float64)).astype(np.int64) % p
            else:
                r = (d @ A) % p
            out[s:s + step] = self.undigits(r)
        return out


def monic_irreducibles(F: FiniteField, n: int) -> list:
    """All monic irreducibles of degree n, by a sieve over products (index order)."""
    return [poly_from_index(int(i), F) for i in monic_irreducible_indices(F, n)]


@functools.lru_cache(maxsize=256)
def _irreducible_indices_cached(q: int, n: int) -> np.ndarray:
    F = finite_field(q)
    base = F.q**n
    if base > MAX_TABLE:
        raise BadInput(f"q^n = {F.q}^{n} is too large to enumerate")
    composite = np.zeros(base, dtype=bool)
    # multiples P*g of each irreducible P of degree d <= n/2 by every monic g of degree n-d;
    # the product map g -> P*g is F_p-linear on the low coefficients, so apply it to all g at once
    tn = F.pctx([0] * n + [1])
    ring_mod = tn  # products of degree n: reduce modulo t^n after removing the leading t^n
    for d in range(1, n // 2 + 1):
        irr = _irreducible_indices_cached(q, d)
        e = n - d
        ge = np.arange(F.q**e, dtype=np.int64)  # low parts of monic g of degree e
        R = ResidueRing(F, ring_mod, max_size=MAX_TABLE * 4)
        for Pi in irr:
            P = poly_from_index(int(Pi), F)
            # P*(t^e + h) = t^e P + P h ; keep the part below t^n
            low = P * F.pctx([0] * e + [1])
            low_idx = poly_index(low % tn, F)
            A = R.mul_matrix(P)
            idx_h = R.mul_many(ge, P, A)
            # add the fixed part t^e*P (mod t^n) digitwise over F_p
            dsum = (R.digits(idx_h) + R.digits(np.array([low_idx], dtype=np.int64))) % F.p
            composite[R.undigits(dsum)] = True
    out = np.nonzero(~composite)[0].astype(np.int64) + base
    out.setflags(write=False)
    return out


def monic_irreducible_indices(F: FiniteField, n: int) -> np.ndarray:
    """Indices of the monic irreducibles of degree n (read-only int64 array)."""
    if n < 1:
        raise ValueError("degree must be >= 1")
    return _irreducible_indices_cached(F.q, n)


def gauss_count_check(q: int, n_max: int) -> list[tuple[int, int, int]]:
    """[(n, Gauss's count, enumerated count)] for n = 1..n_max; equal when all is well."""
    F = finite_field(q)
    return [(n, irreducible_count(F.q, n), len(monic_irreducible_indices(F, n)))
            for n in range(1, n_max + 1)]
