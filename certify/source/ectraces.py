"""Frobenius traces a_p of an elliptic curve over Q, for every prime up to a bound.

* Small p (below ``COUNT_LIMIT``): exact point counts, vectorised with numpy.
  For odd p, completing the square turns the minimal model into
  (2y + a1 x + a3)^2 = g(x) = 4x^3 + b2 x^2 + 2 b4 x + b6, so
  #E(F_p) = p + 1 + sum_x chi(g(x)) and a_p = -sum_x chi(g(x)), with chi the
  quadratic character read from a table of squares (no Python loop per point).
* Larger p: baby-step giant-step on the group of points, vectorised across
  many primes at once (cost about p^(1/4) group operations per prime).  For
  each prime a random x0 gives d = f(x0) != 0 on the short model
  y^2 = f(x) = x^3 + A x + B (A = -27 c4, B = -54 c6, isomorphic for p >= 5);
  the point (d x0, d^2) lies on Y^2 = X^3 + A d^2 X + B d^3, which is E if d
  is a square and its quadratic twist (order p + 1 + a_p) if not.  Every
  multiple n P = O with n in the Hasse window [p+1-c, p+1+c], c = isqrt(4p),
  is found (baby steps jP, j <= m, with distinct x-coordinates; giant steps of
  2m + 1); the group order is a multiple of ord(P) lying in the window, so if
  exactly one such n exists it *is* the group order.  Otherwise another point
  is tried, and finally the prime is counted exactly.
* Bad primes: a_p = 1 (split), -1 (non-split), 0 (additive) from Tate's algorithm.

Every a_p returned satisfies Hasse's bound a_p^2 <= 4p; this is asserted
(fail closed) before returning.
"""

from __future__ import annotations

import math

import numpy as np

from ..errors import BadInput
from .ellcurve import EllipticCurveQ, b_invariants, c_invariants

COUNT_LIMIT = 2000
MAX_TRACE_BOUND = 2**31 - 1  # int64 products of residues stay exact
BATCH = 20000


def primes_upto(n: int) -> np.ndarray:
    """All primes <= n (sieve of Eratosthenes, numpy)."""
    if n < 2:
        return np.zeros(0, dtype=np.int64)
    sieve = np.ones(n + 1, dtype=bool)
    sieve[:2] = False
    for q in range(2, math.isqrt(n) + 1):
        if sieve[q]:
            sieve[q * q::q] = False
    return np.nonzero(sieve)[0].astype(np.int64)


def count_trace(model, p: int) -> int:
    """a_p of a model with good reduction at p, by an exact vectorised point count."""
    a1, a2, a3, a4, a6 = model
    if p == 2:
        n = 0
        for x in range(2):
            for y in range(2):
                if (y * y + a1 * x * y + a3 * y - x**3 - a2 * x * x - a4 * x - a6) % 2 == 0:
                    n += 1
        return 2 - n
    b2, b4, b6, _ = b_invariants(model)
    x = np.arange(p, dtype=np.int64)
    g = (4 * x) % p
    g = (g + b2 % p) % p * x % p
    g = (g + (2 * b4) % p) % p * x % p
    g = (g + b6 % p) % p
    chi = -np.ones(p, dtype=np.int64)
    chi[(x * x) % p] = 1
    chi[0] = 0
    return int(-chi[g].sum())


# ---------------------------------------------------------------------------
# vectorised group law (affine, complete: handles O, P = Q and P = -Q)
# ---------------------------------------------------------------------------

def _vpow(base, exp, p):
    r = np.ones_like(base)
    b = base % p
    e = exp.copy()
    while True:
        m = (e & 1).astype(bool)
        r = np.where(m, r * b % p, r)
        e >>= 1
        if not e.any():
            return r
        b = b * b % p


def _add(P1, P2, A, p):
    x1, y1, i1 = P1
    x2, y2, i2 = P2
    same_x = x1 == x2
    opp = same_x & ((y1 + y2) % p == 0)
    dbl = same_x & ~opp
    num = np.where(dbl, (3 * (x1 * x1 % p) + A) % p, (y2 - y1) % p)
    den = np.where(dbl, 2 * y1 % p, (x2 - x1) % p)
    lam = num * _vpow(den, p - 2, p) % p
    x3 = (lam * lam - x1 - x2) % p
    y3 = (lam * (x1 - x3) - y1) % p
    inf3 = opp.copy()
    # identities
    x3 = np.where(i1, x2, np.where(i2, x1, x3))
    y3 = np.where(i1, y2, np.where(i2, y1, y3))
    inf3 = np.where(i1, i2, np.where(i2, i1, inf3))
    return x3, y3, inf3


def _mul(n, P, A, p):
    """n P for per-row non-negative integers n (double and add)."""
    x, y, _ = P
    R = (np.zeros_like(x), np.zeros_like(x), np.ones(x.shape, dtype=bool))
    Q = P
    e = n.copy()
    while e.any():
        m = (e & 1).astype(bool)
        S = _add(R, Q, A, p)
        R = tuple(np.where(m, s, r) for s, r in zip(S, R))
        e >>= 1
        if e.any():
            Q = _add(Q, Q, A, p)
    return R


def _bsgs_batch(ps: np.ndarray, Ar: np.ndarray, Br: np.ndarray, rng) -> np.ndarray:
    """a_p for a batch of good primes >= 5 (short model y^2 = x^3 + A x + B mod p).

    Returns an int64 array with a sentinel (2^40) where no unique answer was found.
    """
    B_ = ps.size
    bad = np.int64(2**40)
    x0 = rng.integers(0, 2**62, size=B_, dtype=np.int64) % ps
    d = (x0 * x0 % ps * x0 % ps + Ar * x0 % ps + Br) % ps
    for _ in range(8):
        z = d == 0
        if not z.any():
            break
        x0 = np.where(z, (x0 + 1) % ps, x0)
        d = (x0 * x0 % ps * x0 % ps + Ar * x0 % ps + Br) % ps
    ok = d != 0
    d2 = d * d % ps
    A2 = Ar * d2 % ps
    Px, Py = d * x0 % ps, d2
    P = (Px, Py, np.zeros(B_, dtype=bool))
    square = _vpow(d, (ps - 1) // 2, ps) == 1
    c = np.array([math.isqrt(int(4 * q)) for q in ps], dtype=np.int64)
    cmax = int(c.max())
    m = math.isqrt(cmax) + 1
    g = 2 * m + 1
    # baby steps jP, j = 1..m
    Xs = np.empty((B_, m), dtype=np.int64)
    Ys = np.empty((B_, m), dtype=np.int64)
    infb = np.zeros(B_, dtype=bool)
    J = P
    for j in range(m):
        Xs[:, j], Ys[:, j] = J[0], J[1]
        infb |= J[2]
        if j + 1 < m:
            J = _add(J, P, A2, ps)
    pbig = np.int64(int(ps.max()) + 1)
    rows = np.arange(B_, dtype=np.int64)
    keys = (rows[:, None] * pbig + Xs).ravel()
    order = np.argsort(keys, kind="stable")
    skeys = keys[order]
    dup = np.zeros(B_, dtype=bool)
    same = skeys[1:] == skeys[:-1]
    dup[(skeys[1:][same] // pbig)] = True
    ok &= ~dup & ~infb
    jidx = (order % m) + 1  # j of each sorted key
    base = ps + 1 - c
    G = _mul(base + m, P, A2, ps)
    S = _mul(np.full(B_, g, dtype=np.int64), P, A2, ps)
    I = (2 * cmax + 1) // g + 2
    found = np.zeros(B_, dtype=np.int64)
    nsol = np.zeros(B_, dtype=np.int64)
    lo, hi = ps + 1 - c, ps + 1 + c
    for i in range(I):
        gx, gy, ginf = G
        center = base + m + i * g
        # G = O: n = center
        cand = ginf & (center >= lo) & (center <= hi)
        nsol += cand
        found = np.where(cand, center, found)
        k = rows * pbig + gx
        pos = np.searchsorted(skeys, k)
        pos = np.minimum(pos, skeys.size - 1)
        hit = (skeys[pos] == k) & ~ginf
        j = jidx[pos]
        yj = Ys[rows, j - 1]
        plus = hit & (gy == yj)
        minus = hit & (gy != yj)
        if (minus & ((gy + yj) % ps != 0)).any():
            ok &= ~(minus & ((gy + yj) % ps != 0))
        for sel, n in ((plus, center - j), (minus, center + j)):
            good = sel & (n >= lo) & (n <= hi)
            nsol += good
            found = np.where(good, n, found)
        G = _add(G, S, A2, ps)
    ok &= nsol == 1
    ap = np.where(square, ps + 1 - found, found - ps - 1)
    return np.where(ok, ap, bad)


def traces_upto(E: EllipticCurveQ, bound: int, seed: int = 1,
                count_limit: int = COUNT_LIMIT) -> tuple[np.ndarray, np.ndarray]:
    """(primes p <= bound, a_p) for every prime, bad primes from the local data.

    Raises BadInput for a bound beyond ``MAX_TRACE_BOUND``.
    """
    if isinstance(bound, bool) or not isinstance(bound, (int, np.integer)):
        raise BadInput(f"trace bound must be an integer, got {bound!r}")
    bound = int(bound)
    if bound < 2:
        return np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64)
    if bound > MAX_TRACE_BOUND:
        raise BadInput(f"trace bound {bound} is beyond the supported range (<= {MAX_TRACE_BOUND})")
    ps = primes_upto(bound)
    ap = np.zeros(ps.size, dtype=np.int64)
    bad = {ld.p: ld.a_p for ld in E.local}
    model = E.minimal
    c4, c6 = c_invariants(model)  # the short model below is isomorphic to it at p >= 5
    small = ps <= max(count_limit, 3)
    for i in np.nonzero(small)[0]:
        p = int(ps[i])
        ap[i] = bad[p] if p in bad else count_trace(model, p)
    rest = np.nonzero(~small)[0]
    rng = np.random.default_rng(seed)
    for start in range(0, rest.size, BATCH):
        idx = rest[start:start + BATCH]
        pb = ps[idx]
        Ar = (-27 * c4) % pb
        Br = (-54 * c6) % pb
        vals = np.full(idx.size, np.int64(2**40))
        todo = np.ones(idx.size, dtype=bool)
        # primes dividing the given model's discriminant are handled below
        for _ in range(3):
            sel = np.nonzero(todo)[0]
            if sel.size == 0:
                break
            out = _bsgs_batch(pb[sel], Ar[sel], Br[sel], rng)
            vals[sel] = out
            todo[sel] = out == 2**40
        ap[idx] = vals
        for k in np.nonzero(todo)[0]:
            p = int(pb[k])
            ap[idx[k]] = bad[p] if p in bad else count_trace(model, p)
    # bad primes and primes dividing the given model's discriminant
    for p, v in bad.items():
        if p <= bound:
            ap[np.searchsorted(ps, p)] = v
    D = E.discriminant
    for i in np.nonzero(~small)[0]:
        p = int(ps[i])
        if D % p == 0 and p not in bad:
            ap[i] = count_trace(model, p)
    if np.any(ap * ap > 4 * ps):
        raise ArithmeticError("a trace violates Hasse's bound: internal error")
    return ps, ap


def an_list(E: EllipticCurveQ, nmax: int, traces=None) -> list[int]:
    """a_1..a_nmax (index 0 unused) of L(E, s) = sum a_n n^-s, from the a_p."""
    if traces is None:
        traces = traces_upto(E, max(nmax, 2))
    ps, ap = traces
    a = [0] * (nmax + 1)
    if nmax >= 1:
        a[1] = 1
    spf = list(range(nmax + 1))
    for q in range(2, math.isqrt(nmax) + 1):
        if spf[q] == q:
            for k in range(q * q, nmax + 1, q):
                if spf[k] == k:
                    spf[k] = q
    bad = {ld.p for ld in E.local}
    tr = {int(p): int(v) for p, v in zip(ps, ap) if p <= nmax}
    for n in range(2, nmax + 1):
        p = spf[n]
        m, k = n, 0
        while m % p == 0:
            m //= p
            k += 1
        if m > 1:
            a[n] = a[p**k] * a[m]
            continue
        # n = p^k
        if k == 1:
            a[n] = tr[p]
        elif p in bad:
            a[n] = a[n // p] * tr[p]
        else:
            a[n] = tr[p] * a[n // p] - p * a[n // (p * p)]
    return a
