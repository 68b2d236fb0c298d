"""Races among r >= 2 classes: the ordering asked and its reduction to a random vector.

delta(q; a_1, ..., a_r) is the logarithmic density of the x with
pi(x;q,a_1) > pi(x;q,a_2) > ... > pi(x;q,a_r).  With
E(x;a) = (log x/sqrt x)(phi(q) pi(x;q,a) - pi(x)), the ordering holds exactly
when every consecutive difference Y_i = E(x;a_i) - E(x;a_{i+1}) is positive.
Under GRH and LI the vector Y has the limit law (docs/method.md, section 10)

    Y = mu + sum_{chi != chi_0} sum_{gamma_chi > 0} 2 Re(v_chi U_gamma) / |rho|,
    mu_i = -c(q, a_i) + c(q, a_{i+1}),   v_{chi,i} = conj chi(a_i) - conj chi(a_{i+1}).

A real character contributes its positive ordinates; a conjugate pair
{chi, conj chi} all ordinates of L(s, chi*) with one vector (|<xi, conj v>| =
|<xi, v>| for real xi), exactly as the spectral groups of two-way races.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from fractions import Fraction

from ..errors import BadInput
from ..source.dirichlet import Character, c_value, characters, check_class, check_modulus

MAX_CLASSES = 5


@dataclass(frozen=True)
class OrderQuestion:
    """pi(x;q,a_1) > ... > pi(x;q,a_r): the modulus and the classes in order."""

    modulus: int
    classes: tuple[int, ...]

    kind = "ordering"
    is_li_race = False  # the hypotheses are GRH (Dirichlet L-functions) and LI

    @property
    def label(self) -> str:
        return f"delta({self.modulus};{','.join(map(str, self.classes))})"

    @property
    def statement(self) -> str:
        q = self.modulus
        chain = " > ".join(f"pi(x;{q},{a})" for a in self.classes)
        return f"the logarithmic density of the set of x >= 2 with {chain}"

    @property
    def dimension(self) -> int:
        return len(self.classes) - 1

    def reversed(self) -> "OrderQuestion":
        return OrderQuestion(self.modulus, tuple(reversed(self.classes)))


def ordering(q, *classes) -> OrderQuestion:
    """The ordering pi(x;q,a_1) > ... > pi(x;q,a_r) of r >= 2 distinct reduced classes."""
    q = check_modulus(q)
    if len(classes) == 1 and isinstance(classes[0], (list, tuple)):
        classes = tuple(classes[0])
    if len(classes) < 2:
        raise BadInput("an ordering needs at least two classes")
    if len(classes) > MAX_CLASSES:
        raise BadInput(f"at most {MAX_CLASSES} classes are supported (got {len(classes)}); "
                       "the engine's cost grows like N^(r-1)")
    cs = tuple(check_class(q, a, "class") for a in classes)
    if len(set(cs)) != len(cs):
        raise BadInput(f"the classes must be distinct modulo {q} (got {', '.join(map(str, classes))})")
    return OrderQuestion(q, cs)


def mean_vector(question: OrderQuestion) -> tuple[Fraction, ...]:
    """mu_i = c(q, a_{i+1}) - c(q, a_i)."""
    q, a = question.modulus, question.classes
    return tuple(Fraction(c_value(q, a[i + 1]) - c_value(q, a[i])) for i in range(len(a) - 1))


@dataclass(frozen=True)
class OrderGroup:
    """Characters sharing one zero multiset, with the direction vector v in C^(r-1)."""

    characters: tuple[Character, ...]
    primitive_keys: tuple[tuple[int, int], ...]
    parity: int
    is_real: bool
    vector: tuple  # acb, exact values up to rounding
    exponents: tuple  # chi(a_j) = exp(2 pi i e_j / order), j = 1..r (exact data)

    @property
    def label(self) -> str:
        return " & ".join(str(c) for c in self.characters)

    @property
    def reach(self):
        """sum_i |v_i| (an arb): |<xi, v>| <= reach * ||xi||_inf."""
        from ..arith import arb

        return sum((abs(x) for x in self.vector), arb(0))


def order_groups(question: OrderQuestion) -> list[OrderGroup]:
    """Groups of characters not constant on the classes (v != 0, an exact test)."""
    q, a = question.modulus, question.classes
    out, seen = [], set()
    chars = characters(q)
    for chi in chars:
        if chi.is_principal or chi.label in seen:
            continue
        seen.add(chi.label)
        seen.add(chi.conjugate_label)
        ex = tuple(chi.exponent(x) for x in a)
        if len(set(ex)) == 1:
            continue  # chi constant on the classes: v = 0 exactly
        vals = [chi.value(x).conjugate() for x in a]
        vec = tuple(vals[i] - vals[i + 1] for i in range(len(a) - 1))
        qs, ns = chi.primitive_key
        if chi.is_real:
            out.append(OrderGroup((chi,), ((qs, ns),), chi.parity, True, vec, ex))
        else:
            conj = next(c for c in chars if c.label == chi.conjugate_label)
            out.append(OrderGroup((chi, conj), ((qs, ns), (qs, pow(ns, -1, qs))), chi.parity,
                                  False, vec, ex))
    return out


def all_orderings(q, classes) -> list[OrderQuestion]:
    """Every ordering of the given classes (r! questions)."""
    base = ordering(q, *classes)
    return [OrderQuestion(base.modulus, p) for p in itertools.permutations(base.classes)]


def chains(q, classes) -> list[OrderQuestion]:
    """One ordering of each reversal pair (r!/2 questions); the engine gives both of a pair."""
    out, seen = [], set()
    for o in all_orderings(q, classes):
        if tuple(reversed(o.classes)) in seen:
            continue
        seen.add(o.classes)
        out.append(o)
    return out


def parse_order(text: str) -> OrderQuestion:
    """``delta(q;a1,a2,a3)`` -> OrderQuestion (BadInput otherwise)."""
    t = text.strip().replace(" ", "")
    if not (t.startswith("delta(") and t.endswith(")") and ";" in t):
        raise BadInput(f"not an ordering such as delta(8;3,5,7): {text!r}")
    q, rest = t[len("delta("):-1].split(";", 1)
    return ordering(q, *[c for c in rest.split(",") if c])
