"""Exact symmetries of two-way and residue races: compute each distinct law once.

Under GRH and LI the limit law of a race depends only on the mean
mu = -sum_a w_a c(q, a) and on the multiset of |W(chi)| (docs/method.md,
section 1).  Hence, exactly:

* delta(q; r a, r b) = delta(q; a, b) when r is a square mod q: c(q, r a) = c(q, a)
  (x -> s x, s^2 = r, maps the square roots of a to those of r a) and
  W_chi(r a, r b) = chi(r) W_chi(a, b) with |chi(r)| = 1;
* delta(q; a^-1, b^-1) = delta(q; a, b): c(q, a^-1) = c(q, a) and
  W_chi(a^-1, b^-1) is the conjugate of W_chi(a, b);
* delta(q; b, a) = 1 - delta(q; a, b): the law of the reverse race is that of -X,
  and X has no atom at 0;
* for m odd, delta(2m; a, b) = delta(m; a mod m, b mod m) and
  delta(2m; N, R) = delta(m; N, R): an odd prime is a mod 2m iff it is a mod m
  (a odd), so the counting functions agree up to the prime 2 -- the same race
  read at two moduli.

The maps x -> r x^(+-1) (r a square) form a group acting on ordered pairs; each
orbit, together with the reversed pairs, is one law.  :func:`canonical_two_way`
names the computed representative of a pair and why it is equal.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from ..source.dirichlet import reduced_residues


@dataclass(frozen=True)
class Equivalence:
    """delta(q; a, b) (or the residue race when a is None) equals a computed race.

    ``value = delta(target) if not flip else 1 - delta(target)``; ``reason`` says why.
    """

    q: int
    a: int | None
    b: int | None
    target_q: int
    target_a: int | None
    target_b: int | None
    flip: bool
    reason: str

    @property
    def is_identity(self) -> bool:
        return (self.q, self.a, self.b) == (self.target_q, self.target_a, self.target_b)

    @property
    def target_label(self) -> str:
        if self.target_a is None:
            return f"delta({self.target_q};N,R)"
        return f"delta({self.target_q};{self.target_a},{self.target_b})"


def base_modulus(q: int) -> int:
    """q/2 for q = 2 m with m odd and m >= 3 (the same races); else q."""
    return q // 2 if q % 4 == 2 and q // 2 >= 3 else q


@lru_cache(maxsize=512)
def _orbit_table(q: int) -> dict:
    """{(a, b): (a0, b0, flip, r, inverse)} over ordered pairs of distinct reduced classes.

    (a0, b0) is the least pair of the orbit of {(a, b), (b, a)} under x -> r x^(+-1);
    (a, b) = (r a0^e, r b0^e) or its reverse (flip), with e = -1 if ``inverse``.
    """
    units = reduced_residues(q)
    squares = sorted({x * x % q for x in units})
    inv = {a: pow(a, -1, q) for a in units}
    table: dict = {}
    for a in units:
        for b in units:
            if a == b or (a, b) in table:
                continue
            # the whole orbit of (a, b) and of its reverse
            members = []
            for r in squares:
                for e in (1, -1):
                    x, y = (r * a % q, r * b % q) if e == 1 else (r * inv[a] % q, r * inv[b] % q)
                    members.append((x, y, False))
                    members.append((y, x, True))
            a0, b0, _ = min(members)
            # express every member through the representative (a0, b0)
            for r in squares:
                for e in (1, -1):
                    x, y = (r * a0 % q, r * b0 % q) if e == 1 else (r * inv[a0] % q, r * inv[b0] % q)
                    if (x, y) not in table:
                        table[(x, y)] = (a0, b0, False, r, e == -1)
                    if (y, x) not in table:
                        table[(y, x)] = (a0, b0, True, r, e == -1)
    return table


def canonical_two_way(q: int, a: int, b: int) -> Equivalence:
    """The computed race that delta(q; a, b) equals, and why (exact identities only)."""
    a %= q
    b %= q
    m = base_modulus(q)
    reasons = []
    qa, qb = a, b
    if m != q:
        qa, qb = a % m, b % m
        reasons.append(f"q = 2*{m} with {m} odd: delta({q};{a},{b}) = delta({m};{qa},{qb})")
    a0, b0, flip, r, inverse = _orbit_table(m)[(qa, qb)]
    steps = []
    if r != 1:
        steps.append(f"both classes times the square {r}")
    if inverse:
        steps.append("both classes inverted")
    if steps:
        src = f"({b0},{a0})" if flip else f"({a0},{b0})"
        reasons.append(f"({qa},{qb}) is {src} with " + " and ".join(steps) + f" mod {m}")
    if flip:
        reasons.append(f"reverse race: delta({m};{b0},{a0}) = 1 - delta({m};{a0},{b0})")
    return Equivalence(q, a, b, m, a0, b0, flip, "; ".join(reasons) or "computed")


def canonical_residue(q: int) -> Equivalence:
    m = base_modulus(q)
    reason = (f"q = 2*{m} with {m} odd: the same classes of odd primes" if m != q else "computed")
    return Equivalence(q, None, None, m, None, None, False, reason)


def distinct_two_way(q: int) -> list[tuple[int, int]]:
    """Representatives (a0, b0) of the distinct two-way laws mod q (q itself, no change of modulus)."""
    return sorted({(v[0], v[1]) for v in _orbit_table(q).values()})
