"""Races over Q as data: the question asked and its reduction to a race variable.

A race modulo q is given by rational weights w_a on reduced classes with
sum w_a = 0; it asks for the logarithmic density of
{x >= 2 : sum_a w_a pi(x; q, a) > 0}.  Two-way races take w = e_a - e_b;
the residue race takes w_a = 1/#N on non-residues and -1/#R on residues
(do the non-residues lead, on average per class?).

Under GRH and LI the normalised race has the limit law of
X = mu + sum_{chi != chi_0} sum_{gamma_chi > 0} 2 |W(chi)| / |rho| cos Theta,
with mu = -sum_a w_a c(q, a) and W(chi) = sum_a w_a chi(a) (docs/method.md, section 1).

The race of pi(x) against li(x) is a question of "modulus 1" (kinds
``pi>li`` and ``pi<li``): under RH and LI for zeta, (log x / sqrt x)(pi(x) - li(x))
has the law of X = -1 + sum_{gamma > 0} (2 / |rho|) cos Theta over the zeros
of zeta (docs/method.md, section 9); ``pi<li`` asks for P(-X > 0).
"""

from __future__ import annotations

import math

from dataclasses import dataclass
from fractions import Fraction

from flint import dirichlet_char, fmpz_poly

from ..arith import acb, arb
from ..errors import BadInput
from ..source.dirichlet import (Character, c_value, characters, check_class, check_modulus,
                                reduced_residues)


@dataclass(frozen=True)
class RaceQuestion:
    """What is asked: modulus, race kind and the weights on classes.

    ``weights`` is a tuple of (class, weight) pairs with exact rational weights
    summing to zero; ``kind`` is "two-way", "residues" or "weighted".
    """

    modulus: int
    kind: str
    weights: tuple[tuple[int, Fraction], ...]
    classes: tuple[int, ...] = ()
    # the residue race built from the factorisation of q (weights not listed class by
    # class): the real characters, the exact mean and |W(chi)| (:func:`residue_structure`)
    structure: "ResidueStructure | None" = None

    @property
    def is_li_race(self) -> bool:
        """Whether this is the race of pi(x) against li(x) (the zeta race)."""
        return self.kind in LI_KINDS

    @property
    def label(self) -> str:
        q = self.modulus
        if self.is_li_race:
            return f"delta({self.kind})"
        if self.kind == "two-way":
            a, b = self.classes
            return f"delta({q};{a},{b})"
        if self.kind == "residues":
            return f"delta({q};N,R)"
        terms = " ".join(f"{'+' if w > 0 else '-'}{abs(w)}*pi(x;{q},{a})" for a, w in self.weights)
        return f"density of [{terms.lstrip('+')} > 0]"

    @property
    def statement(self) -> str:
        q = self.modulus
        if self.is_li_race:
            rel = ">" if self.kind == "pi>li" else "<"
            return f"the logarithmic density of the set of x >= 2 with pi(x) {rel} li(x)"
        if self.kind == "two-way":
            a, b = self.classes
            return (f"the logarithmic density of the set of x >= 2 with "
                    f"pi(x;{q},{a}) > pi(x;{q},{b})")
        if self.kind == "residues":
            return (f"the logarithmic density of the set of x >= 2 where the quadratic "
                    f"non-residues mod {q} lead the residues, each class group averaged: "
                    f"sum over non-residues a of pi(x;{q},a)/#N > sum over residues b of pi(x;{q},b)/#R")
        return f"the logarithmic density of the set of x >= 2 with {self.label[len('density of ['):-1]}"

    @property
    def normalisation(self) -> Fraction:
        """The factor c > 0 with sum_a |c w_a| = 2 (1 for two-way and residue races).

        The density of sum_a w_a pi(x;q,a) > 0 does not change when every weight
        is multiplied by the same c > 0 (docs/method.md, section 1c); the race
        variable is built from the normalised weights, so that a race and any
        positive multiple of it are computed identically.
        """
        if self.is_li_race:
            return Fraction(1)  # no weights: the race variable is fixed (docs/method.md, section 9)
        if self.structure is not None:
            return Fraction(1)  # 1/#N on the non-residues, -1/#R on the residues: sum |w_a| = 2
        total = sum((abs(w) for _, w in self.weights), Fraction(0))
        if total == 0:
            raise BadInput("all weights are zero: there is no race")
        return Fraction(2) / total

    @property
    def normalised_weights(self) -> tuple[tuple[int, Fraction], ...]:
        """The weights times :attr:`normalisation` (sum of absolute values 2)."""
        c = self.normalisation
        return tuple((a, w * c) for a, w in self.weights)

    @property
    def weights_text(self) -> str:
        """The weights as text: class by class, or by the rule for a residue race of a
        large modulus (its classes are not listed)."""
        st = self.structure
        if st is not None:
            return (f"w_a = 1/{st.non_residues} on each of the {st.non_residues} non-residues, "
                    f"w_a = -1/{st.residues} on each of the {st.residues} residues")
        return ", ".join(f"w_{a} = {w}" for a, w in self.weights)

    def weight_of(self, a: int) -> Fraction:
        if self.structure is not None:
            from ..source.dirichlet import check_class

            a = check_class(self.modulus, a)
            square = all(chi.value(a).real > 0 for chi in self.structure.characters)
            st = self.structure
            return Fraction(-1, st.residues) if square else Fraction(1, st.non_residues)
        for c, w in self.weights:
            if c == a:
                return w
        return Fraction(0)


LI_KINDS = ("pi>li", "pi<li")


def prime_vs_li(direction: str = "pi<li") -> RaceQuestion:
    """The race pi(x) > li(x) (``"pi>li"``) or its reverse pi(x) < li(x) (``"pi<li"``).

    li(x) is the logarithmic integral; its density does not depend on whether li
    is taken from 0 (principal value) or from 2, which differ by a constant.
    """
    d = str(direction).strip().replace(" ", "").lower()
    if d not in LI_KINDS:
        raise BadInput(f"direction must be one of {', '.join(LI_KINDS)} (got {direction!r})")
    return RaceQuestion(1, d, ())


def riemann_hypothesis_name(question: RaceQuestion) -> str:
    """"RH" for the zeta race (pi against li), "GRH" for races of Dirichlet L-functions."""
    return "RH" if question.is_li_race else "GRH"


def _as_fraction(w) -> Fraction:
    if isinstance(w, bool):
        raise BadInput(f"weight must be a number, got {w!r}")
    try:
        f = Fraction(w) if not isinstance(w, float) else Fraction(repr(w))
    except (ValueError, ZeroDivisionError, TypeError):
        raise BadInput(f"weight must be a rational number such as 1, -2 or 3/4, got {w!r}") from None
    return f


def two_way(q, a, b) -> RaceQuestion:
    """The race pi(x;q,a) > pi(x;q,b)."""
    q = check_modulus(q)
    a = check_class(q, a, "class a")
    b = check_class(q, b, "class b")
    if a == b:
        raise BadInput(f"the two classes must differ modulo {q} (got {a} and {b})")
    return RaceQuestion(q, "two-way", ((a, Fraction(1)), (b, Fraction(-1))), (a, b))


def quadratic_residues(q: int) -> list[int]:
    return sorted({(x * x) % q for x in reduced_residues(q)})


# above this modulus the residue race is built from the factorisation of q (its real
# characters) rather than class by class (whose mean costs ~ q^2 operations)
RESIDUE_STRUCTURE_MIN_MODULUS = 2_000
MAX_RESIDUE_MODULUS = 10**12  # the factorisation path; the CLI states a lower limit (residue-modulus)


@dataclass(frozen=True)
class ResidueStructure:
    """The residue race mod q from the factorisation of q, without the character group.

    With 2^k real characters mod q (the 2-rank of the unit group is k), a real
    character is trivial on the squares, so for the weights 1/#N on the
    non-residues and -1/#R on the residues, W(chi) = -1 - #R/#N = -2^k/(2^k - 1) for
    every non-principal real chi, and W(chi) = 0 for every complex chi (it is
    non-trivial on the squares, so its sums over R and over all classes vanish).
    A residue has 2^k square roots, so c(q, a) = 2^k - 1 on R and -1 on N, and
    mu = -sum_a w_a c(q, a) = 1 + (2^k - 1) = 2^k (docs/method.md, section 1d).

    ``characters`` are the non-principal real characters mod q (label order),
    ``phi`` = phi(q), ``residues`` = #R = phi / 2^k.
    """

    modulus: int
    characters: tuple
    phi: int
    real_count: int  # 2^k

    @property
    def residues(self) -> int:
        return self.phi // self.real_count

    @property
    def non_residues(self) -> int:
        return self.phi - self.residues

    @property
    def mean(self) -> Fraction:
        return Fraction(self.real_count)

    @property
    def weight(self) -> Fraction:
        """W(chi) for every non-principal real character (exact)."""
        return Fraction(-self.real_count, self.real_count - 1)


def _local_real_characters(p: int, e: int) -> list:
    """Real characters mod p^e: (label mod p^e, conductor, primitive label, parity)."""
    pe = p ** e
    if p != 2:
        # the Legendre symbol mod p, induced to p^e: Conrey label -1 (it is chi(g^j) = (-1)^j)
        return [(1, 1, 1, 0), (pe - 1, p, p - 1, ((p - 1) // 2) % 2)]
    from ..source.dirichlet import _primitive_label

    out = [(1, 1, 1, 0)]
    roots = sorted({n for n in (pe - 1, pe // 2 - 1, pe // 2 + 1) if n > 1 and n * n % pe == 1})
    for n in roots:
        chi = dirichlet_char(pe, n)
        cond = int(chi.conductor())
        out.append((n, cond, _primitive_label(pe, n, cond), int(chi.parity())))
    return out


def _crt(pairs) -> tuple[int, int]:
    """(x, m) with x = r_i mod m_i for the coprime pairs (r_i, m_i), m = prod m_i."""
    x, m = 0, 1
    for r, mi in pairs:
        if mi == 1:
            continue
        t = ((r - x) * pow(m, -1, mi)) % mi
        x, m = x + m * t, m * mi
    return x % m if m > 1 else 1, m


def residue_structure(q: int) -> ResidueStructure:
    """The real characters mod q from sympy's factorisation (no character group is built)."""
    from itertools import product

    from sympy import factorint

    fac = sorted((int(p), int(e)) for p, e in factorint(q).items())
    locals_ = [(p ** e, _local_real_characters(p, e)) for p, e in fac]
    phi = 1
    for p, e in fac:
        phi *= (p - 1) * p ** (e - 1)
    chars = []
    for combo in product(*[loc for _, loc in locals_]):
        label, _ = _crt([(c[0], pe) for (pe, _), c in zip(locals_, combo)])
        label = label if q > 1 else 1
        cond = 1
        for c in combo:
            cond *= c[1]
        plabel, _ = _crt([(c[2], c[1]) for c in combo])
        parity = sum(c[3] for c in combo) % 2
        if cond == 1:
            continue
        chars.append(Character(q, label % q, 2, cond, plabel % cond if cond > 1 else 1, parity,
                               label % q))
    chars.sort(key=lambda c: c.label)
    return ResidueStructure(q, tuple(chars), phi, len(chars) + 1)


def residue_race(q, method: str = "auto") -> RaceQuestion:
    """Non-residues against residues, each side averaged over its classes.

    ``method`` "classes" lists the weights class by class and finds the characters
    with W(chi) != 0 in the character group; "structure" builds the same race from the
    factorisation of q (:func:`residue_structure`: the real characters only, the mean
    and |W(chi)| exactly), the only way for a large modulus; "auto" takes the
    structure when q exceeds RESIDUE_STRUCTURE_MIN_MODULUS.
    """
    if method not in ("auto", "classes", "structure"):
        raise BadInput(f"method must be auto, classes or structure (got {method!r})")
    if method != "classes":
        qq = _residue_modulus(q)
        if method == "structure" or qq > RESIDUE_STRUCTURE_MIN_MODULUS:
            return RaceQuestion(qq, "residues", (), structure=residue_structure(qq))
    q = check_modulus(q)
    res = set(quadratic_residues(q))
    non = [a for a in reduced_residues(q) if a not in res]
    if not non:
        raise BadInput(f"every reduced class mod {q} is a square: no residue race")
    ws = [(a, Fraction(1, len(non))) for a in non] + [(a, Fraction(-1, len(res))) for a in sorted(res)]
    ws.sort()
    return RaceQuestion(q, "residues", tuple(ws))


def _residue_modulus(q) -> int:
    """check_modulus, with the larger range of the factorisation path."""
    from ..source import dirichlet

    if isinstance(q, (int, str)) and not isinstance(q, bool):
        try:
            v = int(str(q).strip().lstrip("+")) if isinstance(q, str) else q
        except ValueError:
            v = None
        if v is not None and dirichlet.MAX_MODULUS < v <= MAX_RESIDUE_MODULUS:
            return v
    if isinstance(q, int) and not isinstance(q, bool) and q > MAX_RESIDUE_MODULUS:
        raise BadInput(f"modulus {q} is beyond the supported range of residue races "
                       f"(<= {MAX_RESIDUE_MODULUS})")
    return check_modulus(q)


def weighted(q, weights: dict) -> RaceQuestion:
    """The race sum_a w_a pi(x;q,a) > 0 for rational weights summing to zero."""
    q = check_modulus(q)
    acc: dict[int, Fraction] = {}
    for a, w in weights.items():
        a = check_class(q, a, "class")
        acc[a] = acc.get(a, Fraction(0)) + _as_fraction(w)
    acc = {a: w for a, w in acc.items() if w != 0}
    if not acc:
        raise BadInput("all weights are zero: there is no race")
    if sum(acc.values()) != 0:
        raise BadInput(f"weights must sum to zero (they sum to {sum(acc.values())})")
    return RaceQuestion(q, "weighted", tuple(sorted(acc.items())))


def mean_of(question: RaceQuestion) -> Fraction:
    """mu = -sum_a w_a c(q, a), for the normalised weights (docs/method.md, section 1c);
    -1 for pi(x) > li(x) (the prime squares), +1 for the reverse."""
    if question.is_li_race:
        return Fraction(-1) if question.kind == "pi>li" else Fraction(1)
    if question.structure is not None:
        return question.structure.mean
    return -sum((w * c_value(question.modulus, a) for a, w in question.normalised_weights),
                Fraction(0))


def weight_sum_is_zero(question: RaceQuestion, chi: Character, weights=None) -> bool:
    """Whether W(chi) = sum_a w_a chi(a) is exactly 0 (in the cyclotomic field).

    ``weights``: the question's normalised weights, if the caller has them already."""
    weights = question.normalised_weights if weights is None else weights
    if chi.order == 1:
        return sum(w for _, w in weights) == 0
    coeffs: dict = {}
    for a, w in weights:
        e = chi.exponent(a)
        coeffs[e] = coeffs.get(e, Fraction(0)) + w
    coeffs = {e: c for e, c in coeffs.items() if c != 0}
    if not coeffs:
        return True
    den = 1
    for c in coeffs.values():
        den = den * c.denominator // math.gcd(den, c.denominator)
    ints = [0] * chi.order
    for e, c in coeffs.items():
        ints[e] = int(c * den)
    return fmpz_poly(ints) % fmpz_poly.cyclotomic(chi.order) == 0


def weight_modulus(question: RaceQuestion, chi: Character, weights=None) -> arb:
    """|W(chi)| as a ball, for the normalised weights (``weights``, if the caller has them)."""
    s = acb(0)
    for a, w in (question.normalised_weights if weights is None else weights):
        s += chi.value(a) * (arb(w.numerator) / w.denominator)
    return abs(s)


@dataclass(frozen=True)
class SpectralGroup:
    """Characters sharing one zero multiset in the race variable.

    A real character contributes the positive ordinates of its primitive
    L-function; a pair {chi, conj chi} contributes all ordinates of L(s, chi*)
    (its positive ones and those of the conjugate).  ``scale`` is 2|W(chi)|,
    so each zero carries the weight scale / |rho|.
    """

    characters: tuple[Character, ...]
    primitive_keys: tuple[tuple[int, int], ...]  # (conductor, label) whose positive ordinates count
    parity: int
    is_real: bool
    scale: arb

    @property
    def label(self) -> str:
        if self.primitive_keys == ((1, 1),):
            return "zeta"
        return " & ".join(str(c) for c in self.characters)


_GROUPS: dict = {}  # (question, working precision) -> groups, per process
_GROUPS_MAX = 20000


def spectral_groups(question: RaceQuestion) -> list[SpectralGroup]:
    """The groups of characters with W(chi) != 0, with their scales 2|W(chi)|.

    The li race has one group: zeta (the trivial character, conductor 1), scale 2.
    Memoised per process on the (frozen) question and the working precision: a race
    asks for its groups several times (plan, driver, certificate), and the result is a
    deterministic function of both.
    """
    from flint import ctx

    try:
        key = (question, ctx.prec)
        got = _GROUPS.get(key)
    except TypeError:  # an unhashable question: computed afresh
        return _spectral_groups(question)
    if got is None:
        got = tuple(_spectral_groups(question))
        if len(_GROUPS) >= _GROUPS_MAX:
            _GROUPS.clear()
        _GROUPS[key] = got
    return list(got)


def _spectral_groups(question: RaceQuestion) -> list[SpectralGroup]:
    if question.is_li_race:
        from ..source.dirichlet import primitive_character

        return [SpectralGroup((primitive_character(1, 1),), ((1, 1),), 0, True, arb(2))]
    if question.structure is not None:
        w = question.structure.weight
        scale = 2 * abs(arb(w.numerator) / w.denominator)
        return [SpectralGroup((chi,), (chi.primitive_key,), chi.parity, True, scale)
                for chi in question.structure.characters]
    out = []
    seen = set()
    by_label = {c.label: c for c in characters(question.modulus)}
    weights = question.normalised_weights
    for chi in characters(question.modulus):
        if chi.is_principal or chi.label in seen:
            continue
        seen.add(chi.label)
        if weight_sum_is_zero(question, chi, weights):
            seen.add(chi.conjugate_label)
            continue
        scale = 2 * weight_modulus(question, chi, weights)
        q_star, n_star = chi.primitive_key
        if chi.is_real:
            out.append(SpectralGroup((chi,), ((q_star, n_star),), chi.parity, True, scale))
        else:
            conj = by_label[chi.conjugate_label]
            seen.add(conj.label)
            out.append(SpectralGroup((chi, conj), ((q_star, n_star), (q_star, pow(n_star, -1, q_star))),
                                     chi.parity, False, scale))
    return out


def parse_weight_items(items, sep: str = ":", context: str = "") -> dict:
    """Parse items such as ``3:1`` or ``1:-1/2`` (CLASS, separator, rational weight).

    Returns {class: weight text}; the weights are checked by :func:`weighted`.
    Raises BadInput (one line, prefixed by ``context``) on a malformed item or a
    class given twice.
    """
    pre = f"{context}: " if context else ""
    out: dict = {}
    for item in items:
        item = str(item).strip()
        if sep not in item:
            raise BadInput(f"{pre}weight {item!r} is not of the form CLASS{sep}WEIGHT "
                           f"(e.g. 3{sep}1 or 1{sep}-1/2)")
        a, w = item.split(sep, 1)
        try:
            a = int(a.strip())
        except ValueError:
            raise BadInput(f"{pre}class {a.strip()!r} is not an integer") from None
        if a in out:
            raise BadInput(f"{pre}class {a} is given twice")
        out[a] = w.strip()
    return out
