"""Whole-field tables of a finite field F_Q (Q = p^M) for vectorised point counts.

An element of F_Q = F_p[z]/(m(z)) is stored as the integer ``sum_i d_i p^i``
of its coefficient vector ``(d_0, ..., d_{M-1})`` in the basis 1, z, ..., z^{M-1};
``m`` is chosen *primitive*, so z generates the multiplicative group and the
tables ``exp[i] = z^i`` and ``log`` turn multiplication into addition of
exponents.  Addition is digit-wise modulo p.  Everything below acts on numpy
arrays of such integers; there is no Python loop over the elements of F_Q.

The character sums that give point counts are computed *exactly*: the
additive convolution over (Z/p)^M is done with a number-theoretic transform
modulo a prime l = 1 (mod p), l > 2Q + 1, so the integer result in [-Q, Q] is
recovered without rounding.
"""

from __future__ import annotations

from functools import lru_cache
from math import gcd

import numpy as np
from flint import fmpz, nmod_poly

from ..errors import BadInput

__all__ = ["FieldTable", "field_table", "primitive_modulus"]

# Fields beyond this size would need tables of several GiB.
MAX_FIELD_SIZE = 10_000_000


def _is_prime(n: int) -> bool:
    return n >= 2 and fmpz(n).is_prime()


def primitive_modulus(p: int, m: int) -> list[int]:
    """The first monic primitive polynomial of degree ``m`` over F_p (coefficients low first).

    Candidates are taken in a fixed order (constant term first varying), so the
    choice is deterministic; primitivity is checked exactly: irreducible and
    z^((p^m-1)/r) != 1 mod m for every prime r | p^m - 1.
    """
    order = p**m - 1
    primes = [int(r) for r, _ in fmpz(order).factor()] if order > 1 else []
    for code in range(p**m):
        digits = [(code // p**i) % p for i in range(m)]
        if digits[0] == 0:
            continue
        poly = nmod_poly(digits + [1], p)
        if m > 1:
            fac = poly.factor()[1]
            if len(fac) != 1 or fac[0][1] != 1:
                continue
        z = nmod_poly([0, 1], p) if m > 1 else nmod_poly([(-digits[0]) % p], p)
        if m == 1:
            # F_p: the root -c0 must be a primitive root modulo p
            g = (-digits[0]) % p
            if all(pow(g, order // r, p) != 1 for r in primes):
                return digits + [1]
            continue
        if all(z.pow_mod(order // r, poly) != 1 for r in primes):
            return digits + [1]
    raise BadInput(f"no primitive polynomial of degree {m} over F_{p}")  # pragma: no cover


def _ntt_prime(p: int, Q: int) -> tuple[int, int]:
    """A prime l = 1 mod p with 2Q + 1 < l, and a primitive p-th root of unity mod l."""
    l = ((2 * Q + 2) // p + 1) * p + 1
    while not _is_prime(l):
        l += p
    # a primitive p-th root of unity: g^((l-1)/p) != 1 for some g
    for g in range(2, l):
        w = pow(g, (l - 1) // p, l)
        if w != 1:
            return l, w
    raise AssertionError("unreachable")  # pragma: no cover


class FieldTable:
    """Tables of F_Q, Q = p^M, for vectorised arithmetic on integer-coded elements.

    Parameters
    ----------
    p : int
        The characteristic (a prime >= 5 for curves, any odd prime here).
    M : int
        The degree of F_Q over F_p.
    """

    def __init__(self, p: int, M: int):
        if not _is_prime(p) or p == 2:
            raise BadInput(f"field tables need an odd prime characteristic, not {p}")
        Q = p**M
        if Q > MAX_FIELD_SIZE:
            raise BadInput(
                f"F_{p}^{M} has {Q} elements, beyond the table limit {MAX_FIELD_SIZE}; "
                "lower the degree of the places used"
            )
        self.p, self.M, self.Q = p, M, Q
        self.modulus = primitive_modulus(p, M)
        self.powers = p ** np.arange(M, dtype=np.int64)
        self.exp = self._exp_table()
        log = np.zeros(Q, dtype=np.int64)
        log[self.exp] = np.arange(Q - 1, dtype=np.int64)
        log[0] = -1
        self.log = log
        chi = np.where(log % 2 == 0, 1, -1).astype(np.int64)
        chi[0] = 0
        self.chi = chi
        self._trace_cache: dict[int, np.ndarray] = {}
        self._ntt = None

    # -- construction ---------------------------------------------------------------
    def _exp_table(self) -> np.ndarray:
        p, M, Q = self.p, self.M, self.Q
        if M == 1:
            g = (-self.modulus[0]) % p
            out = np.empty(Q - 1, dtype=np.int64)
            out[0] = 1
            # powers of g by doubling blocks: out[k:2k] = out[:k] * g^k
            k = 1
            gk = g
            while k < Q - 1:
                n = min(k, Q - 1 - k)
                out[k : k + n] = (out[:n] * gk) % p
                gk = gk * gk % p
                k += n
            return out
        # companion matrix of multiplication by z on coefficient vectors
        C = np.zeros((M, M), dtype=np.int64)
        for i in range(M - 1):
            C[i + 1, i] = 1
        C[:, M - 1] = [(-c) % p for c in self.modulus[:M]]
        B = max(M, int(np.sqrt(Q - 1)) + 1)
        block = np.zeros((M, B), dtype=np.int64)
        v = np.zeros(M, dtype=np.int64)
        v[0] = 1
        for j in range(B):
            block[:, j] = v
            v = (C @ v) % p
        # v is now z^B; the matrix of multiplication by z^B has columns z^B * z^i
        G = np.zeros((M, M), dtype=np.int64)
        w = v.copy()
        for i in range(M):
            G[:, i] = w
            w = (C @ w) % p
        n_blocks = -(-(Q - 1) // B)
        cols = np.empty((M, n_blocks * B), dtype=np.int64)
        cur = block
        for b in range(n_blocks):
            cols[:, b * B : (b + 1) * B] = cur
            cur = (G @ cur) % p
        codes = self.powers @ cols[:, : Q - 1]
        return codes.astype(np.int64)

    # -- arithmetic on integer codes ----------------------------------------------------
    def digits(self, x: np.ndarray) -> list[np.ndarray]:
        x = np.asarray(x, dtype=np.int64)
        return [(x // int(self.powers[i])) % self.p for i in range(self.M)]

    def add(self, x, y) -> np.ndarray:
        x = np.asarray(x, dtype=np.int64)
        y = np.asarray(y, dtype=np.int64)
        if self.M == 1:
            return (x + y) % self.p
        out = np.zeros(np.broadcast(x, y).shape, dtype=np.int64)
        for i in range(self.M):
            pw = int(self.powers[i])
            out += (((x // pw) + (y // pw)) % self.p) * pw
        return out

    def neg(self, x) -> np.ndarray:
        x = np.asarray(x, dtype=np.int64)
        if self.M == 1:
            return (-x) % self.p
        out = np.zeros(x.shape, dtype=np.int64)
        for i in range(self.M):
            pw = int(self.powers[i])
            out += ((-(x // pw)) % self.p) * pw
        return out

    def mul(self, x, y) -> np.ndarray:
        x = np.asarray(x, dtype=np.int64)
        y = np.asarray(y, dtype=np.int64)
        lx, ly = self.log[x], self.log[y]
        r = self.exp[(lx + ly) % (self.Q - 1)]
        return np.where((lx < 0) | (ly < 0), 0, r)

    def power(self, x, k: int) -> np.ndarray:
        x = np.asarray(x, dtype=np.int64)
        lx = self.log[x]
        r = self.exp[(lx * k) % (self.Q - 1)]
        if k == 0:
            return np.ones_like(x)
        return np.where(lx < 0, 0, r)

    def evaluate(self, coeffs: list[int], x: np.ndarray) -> np.ndarray:
        """Evaluate a polynomial with coded coefficients (low degree first) at every x.

        Each term a_i x^i is one table look-up (logarithms); the terms are summed
        digit-wise in a small integer array and reduced modulo p once.
        """
        x = np.asarray(x, dtype=np.int64)
        lx = self.log[x]
        n = self.Q - 1
        acc = np.zeros(x.shape + (self.M,), dtype=np.int32)
        dig = self._digit_table()
        for i, a in enumerate(coeffs):
            if a == 0:
                continue
            la = int(self.log[a])
            if i == 0:
                acc += dig[a]
                continue
            term = self.exp[(la + i * lx) % n]
            term = np.where(lx < 0, 0, term)
            acc += dig[term]
        acc %= self.p
        return acc.astype(np.int64) @ self.powers

    def _digit_table(self) -> np.ndarray:
        if getattr(self, "_dig", None) is None:
            codes = np.arange(self.Q, dtype=np.int64)
            self._dig = np.stack([(codes // int(pw)) % self.p for pw in self.powers], axis=1).astype(np.int8)
        return self._dig

    def subfield(self, k: int) -> np.ndarray:
        """Codes of the subfield with p^k elements (k | M), 0 first."""
        if self.M % k:
            raise ValueError("not a subfield degree")
        step = (self.Q - 1) // (self.p**k - 1)
        return np.concatenate(([0], self.exp[:: step][: self.p**k - 1]))

    def orbit_representatives(self, base_order: int, d: int) -> tuple[np.ndarray, np.ndarray]:
        """One element per orbit of theta -> theta^base_order on F_Q (Q = base_order^d).

        Returns (codes, orbit sizes): the representative is the element of least
        exponent in its orbit; the orbit size is the exact degree of theta over
        F_base.  0 is its own orbit.
        """
        n = self.Q - 1
        L = np.arange(n, dtype=np.int64)  # exponents of all non-zero elements
        mn = L.copy()
        size = np.zeros(n, dtype=np.int64)
        cur = L.copy()
        for j in range(1, d + 1):
            cur = (cur * base_order) % n
            mn = np.minimum(mn, cur)
            size = np.where((size == 0) & (cur == L), j, size)
        rep = mn == L
        codes = np.concatenate(([0], self.exp[rep]))
        sizes = np.concatenate(([1], size[rep]))
        return codes, sizes

    def exact_degree_mask(self, base_order: int, d: int) -> np.ndarray:
        """Mask of the elements of F_Q (Q = base_order^d) of exact degree d over F_base.

        theta lies in the subfield F_{base^e} iff theta^(base^e) = theta, i.e. its
        exponent is divisible by (Q-1)/(base^e - 1).
        """
        mask = np.ones(self.Q, dtype=bool)
        lg = self.log
        for e in range(1, d):
            if d % e == 0:
                step = (self.Q - 1) // (base_order**e - 1)
                mask &= ~((lg >= 0) & (lg % step == 0))
        if d > 1:
            mask[0] = False
        return mask

    # -- exact character sums -------------------------------------------------------------
    def _ntt_setup(self):
        if self._ntt is None:
            l, w = _ntt_prime(self.p, self.Q)
            W = np.array([[pow(w, j * k, l) for k in range(self.p)] for j in range(self.p)], dtype=np.int64)
            wi = pow(w, l - 2, l)
            Wi = np.array([[pow(wi, j * k, l) for k in range(self.p)] for j in range(self.p)], dtype=np.int64)
            self._ntt = (l, W, Wi, pow(self.Q % l, l - 2, l))
        return self._ntt

    def _transform(self, a: np.ndarray, inverse: bool) -> np.ndarray:
        l, W, Wi, Qinv = self._ntt_setup()
        Wm = Wi if inverse else W
        p, M = self.p, self.M
        arr = a.reshape((p,) * M) % l
        # axis M-1-i of the C-ordered array carries digit i
        for ax in range(M):
            arr = np.moveaxis(arr, ax, -1)
            shape = arr.shape
            flat = arr.reshape(-1, p)
            if p * l * l < 2**63:
                res = (flat @ Wm) % l
            else:
                res = np.zeros_like(flat)
                for k in range(p):
                    res = (res + np.outer(flat[:, k], Wm[k, :]) % l) % l
            arr = np.moveaxis(res.reshape(shape), -1, ax)
        out = arr.reshape(-1)
        if inverse:
            out = (out * Qinv) % l
        return out

    def trace_row(self, a0: int) -> np.ndarray:
        """T(a0, b) = -sum_x chi(x^3 + a0 x + b) for every b in F_Q, exactly.

        With N(c) = #{x : x^3 + a0 x = c}, T(a0, b) = -sum_c N(c) chi(b + c), an
        additive convolution, computed by an exact transform modulo a prime.
        """
        if a0 in self._trace_cache:
            return self._trace_cache[a0]
        Q = self.Q
        x = np.arange(Q, dtype=np.int64)
        g = self.add(self.power(x, 3), self.mul(a0, x))
        N = np.bincount(self.neg(g), minlength=Q).astype(np.int64)  # N'(c) = N(-c)
        l = self._ntt_setup()[0]
        if getattr(self, "_chi_hat", None) is None:
            self._chi_hat = self._transform(self.chi % l, False)
        conv = self._transform(self._transform(N, False) * self._chi_hat % l, True)
        conv = np.where(conv > l // 2, conv - l, conv)
        row = -conv
        self._trace_cache[a0] = row
        return row

    def traces(self, a: np.ndarray, b: np.ndarray) -> np.ndarray:
        """Frobenius traces -sum_x chi(x^3 + a x + b) over F_Q for coded arrays a, b.

        Uses the isomorphism (a, b) ~ (a u^-4, b u^-6): every a != 0 is moved to
        one of the gcd(4, Q-1) representatives z^r, so only a few exact rows
        :meth:`trace_row` are needed.
        """
        a = np.asarray(a, dtype=np.int64)
        b = np.asarray(b, dtype=np.int64)
        Q = self.Q
        n = Q - 1
        e = gcd(4, n)
        inv = pow(4 // e, -1, n // e) if n // e > 1 else 0
        out = np.zeros(a.shape, dtype=np.int64)
        zero = a == 0
        if zero.any():
            out[zero] = self.trace_row(0)[b[zero]]
        la = self.log[a]
        lb = self.log[b]
        for r in range(e):
            sel = (~zero) & (la % e == r)
            if not sel.any():
                continue
            k = (((la[sel] - r) // e) * inv) % (n // e) if n // e > 1 else np.zeros(int(sel.sum()), dtype=np.int64)
            b0 = np.where(lb[sel] < 0, 0, self.exp[(lb[sel] - 6 * k) % n])
            out[sel] = self.trace_row(int(self.exp[r]))[b0]
        return out


@lru_cache(maxsize=24)
def field_table(p: int, M: int) -> FieldTable:
    """A cached :class:`FieldTable` for F_{p^M}."""
    return FieldTable(p, M)
