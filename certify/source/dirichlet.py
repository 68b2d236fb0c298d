"""Dirichlet characters modulo q: values, parity, conductors, primitive reductions.

Characters are labelled as in python-flint (Conrey labels): ``chi_{q,n}`` for
``n`` coprime to ``q``.  The conjugate of ``chi_{q,n}`` is ``chi_{q,n^{-1}}``;
``chi_{q,n}`` is induced by the primitive character ``chi_{q*, n mod q*}``
where ``q*`` is its conductor.

Values are exact: ``chi(a) = exp(2 pi i e / order)`` with the integer
exponent ``e`` kept, so sums of values are exact elements of a cyclotomic
field, evaluated in interval arithmetic only when a modulus is needed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

from flint import dirichlet_char, dirichlet_group

from ..arith import acb
from ..errors import BadInput

MAX_MODULUS = 10**6


def check_modulus(q) -> int:
    """Return ``q`` as an int >= 3, or raise BadInput."""
    if isinstance(q, bool) or not isinstance(q, int):
        try:
            if isinstance(q, str) and q.strip().lstrip("+").isdigit():
                q = int(q)
            else:
                raise ValueError
        except ValueError:
            raise BadInput(f"modulus must be an integer, got {q!r}") from None
    if q < 3:
        raise BadInput(f"modulus must be at least 3 (got {q}): for q < 3 there is no race")
    if q > MAX_MODULUS:
        raise BadInput(f"modulus {q} is beyond the supported range (<= {MAX_MODULUS})")
    return q


def check_class(q: int, a, what: str = "class") -> int:
    """Return the residue ``a mod q`` as an int coprime to q, or raise BadInput."""
    if isinstance(a, bool) or not isinstance(a, int):
        if isinstance(a, str) and a.strip().lstrip("+-").isdigit():
            a = int(a)
        else:
            raise BadInput(f"{what} must be an integer, got {a!r}")
    if math.gcd(a, q) != 1:
        raise BadInput(f"{what} {a} is not coprime to the modulus {q}")
    return a % q


def reduced_residues(q: int) -> list[int]:
    return [a for a in range(1, q) if math.gcd(a, q) == 1]


def square_root_count(q: int, a: int) -> int:
    """#{x mod q : x^2 = a mod q}."""
    a %= q
    return sum(1 for x in range(q) if (x * x - a) % q == 0)


def c_value(q: int, a: int) -> int:
    """c(q, a) = -1 + #{x mod q : x^2 = a mod q}, the bias constant of class a."""
    return -1 + square_root_count(q, a)


@dataclass(frozen=True)
class Character:
    """A Dirichlet character chi_{q,n} with exact values.

    Attributes
    ----------
    modulus, label : int
        The character is chi_{modulus, label} (Conrey label).
    order : int
        Its order; values are order-th roots of unity.
    conductor : int
        Modulus of the primitive character inducing it.
    primitive_label : int
        Label of that primitive character modulo ``conductor``.
    parity : int
        0 if chi(-1) = 1 (even), 1 if odd.
    conjugate_label : int
        Label of the complex conjugate character.
    """

    modulus: int
    label: int
    order: int
    conductor: int
    primitive_label: int
    parity: int
    conjugate_label: int

    @property
    def is_principal(self) -> bool:
        return self.order == 1

    @property
    def is_real(self) -> bool:
        return self.order <= 2

    @property
    def is_primitive(self) -> bool:
        return self.conductor == self.modulus

    @property
    def primitive_key(self) -> tuple[int, int]:
        """(conductor, label) of the primitive character inducing this one."""
        return (self.conductor, self.primitive_label)

    def flint(self):
        return dirichlet_char(self.modulus, self.label)

    def exponent(self, a: int) -> int | None:
        """e with chi(a) = exp(2 pi i e / order), or None if gcd(a, q) > 1."""
        if math.gcd(a, self.modulus) != 1:
            return None
        e = _flint_char(self.modulus, self.label).chi_exponent(a % self.modulus)
        return (int(e) * self.order // _group_exponent(self.modulus)) % self.order

    def value(self, a: int) -> acb:
        """chi(a) as a complex ball (0 if gcd(a, q) > 1)."""
        e = self.exponent(a)
        if e is None:
            return acb(0)
        return acb.exp_pi_i(acb(2 * e) / self.order) if e else acb(1)

    def __str__(self) -> str:
        return f"chi_{{{self.modulus},{self.label}}}"


@lru_cache(maxsize=64)
def _group_exponent(q: int) -> int:
    return int(dirichlet_group(q).exponent())


@lru_cache(maxsize=4096)
def _flint_char(q: int, n: int):
    return dirichlet_char(q, n)


def _value_fraction(q: int, n: int, a: int) -> Fraction:
    """chi_{q,n}(a) = exp(2 pi i f) with f in [0, 1) returned exactly."""
    return Fraction(int(_flint_char(q, n).chi_exponent(a % q)), _group_exponent(q)) % 1


def factor(n: int) -> dict:
    """{prime: exponent} of n >= 1 by trial division (moduli here are at most ~10^7)."""
    out: dict = {}
    d = 2
    while d * d <= n:
        while n % d == 0:
            out[d] = out.get(d, 0) + 1
            n //= d
        d += 1 if d == 2 else 2
    if n > 1:
        out[n] = out.get(n, 0) + 1
    return out


def primitive_root(p: int, e: int) -> int:
    """The least primitive root modulo p^e (p an odd prime).

    g generates (Z/p^e)^* iff it generates (Z/p)^* (g^((p-1)/r) != 1 mod p for each prime
    r | p - 1) and, when e >= 2, g^(p-1) != 1 mod p^2.
    """
    rs = list(factor(p - 1))
    for g in range(2, p * p):
        if g % p == 0:
            continue
        if any(pow(g, (p - 1) // r, p) == 1 for r in rs):
            continue
        if e >= 2 and pow(g, p - 1, p * p) == 1:
            continue
        return g
    raise ValueError(f"no primitive root modulo {p}^{e}")


@lru_cache(maxsize=256)
def unit_generators(m: int) -> tuple[int, ...]:
    """Classes generating (Z/m)^*: a primitive root of each odd prime power (-1 and 5 for
    2^e, e >= 3; -1 for 4), lifted by the Chinese remainder theorem (1 at the other primes)."""
    gens = []
    for p, e in sorted(factor(m).items()):
        pe = p ** e
        local = ([] if pe == 2 else [pe - 1] if pe == 4 else [pe - 1, 5]) if p == 2 \
            else [primitive_root(p, e)]
        rest = m // pe
        for g in local:
            gens.append((g * rest * pow(rest, -1, pe) + pe * pow(pe, -1, rest)) % m
                        if rest > 1 else g % m)
    return tuple(gens)


def _primitive_label(q: int, n: int, cond: int) -> int:
    """Label mod ``cond`` of the primitive character inducing chi_{q,n}.

    Found by comparing exact values (labels do not always reduce as n mod cond).
    """
    if cond == 1:
        return 1
    if cond == q:
        return n  # chi_{q,n} is itself primitive
    # a character mod cond is fixed by its values on generators of (Z/cond)^*
    lifts = []
    for a in unit_generators(cond):
        b = a
        while math.gcd(b, q) != 1:
            b += cond
        lifts.append((a, _value_fraction(q, n, b)))
    guess = n % cond
    candidates = [guess] + [m for m in range(1, cond) if m != guess and math.gcd(m, cond) == 1]
    for m in candidates:
        if all(_value_fraction(cond, m, a) == f for a, f in lifts):
            return m
    raise RuntimeError(f"no primitive character mod {cond} induces chi_{{{q},{n}}}")


@lru_cache(maxsize=256)
def characters(q: int) -> tuple[Character, ...]:
    """All Dirichlet characters modulo q, principal first, in label order."""
    q = check_modulus(q)
    out = []
    for n in reduced_residues(q):
        chi = dirichlet_char(q, n)
        cond = int(chi.conductor())
        out.append(
            Character(
                modulus=q,
                label=n,
                order=int(chi.order()),
                conductor=cond,
                primitive_label=_primitive_label(q, n, cond),
                parity=int(chi.parity()),
                conjugate_label=pow(n, -1, q),
            )
        )
    out.sort(key=lambda c: (not c.is_principal, c.label))
    return tuple(out)


def primitive_character(conductor: int, label: int) -> Character:
    """The primitive character chi_{conductor,label} (checked primitive)."""
    chi = dirichlet_char(conductor, label)
    if int(chi.conductor()) != conductor:
        raise BadInput(f"chi_{{{conductor},{label}}} is not primitive")
    return Character(conductor, label, int(chi.order()), conductor, label,
                     int(chi.parity()), pow(label, -1, conductor))
