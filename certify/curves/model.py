"""Elliptic curves y^2 = x^3 + A(t) x + B(t) over F_q(t), characteristic >= 5.

The constructor :func:`make_curve` reads A and B (text such as ``t^3 + 2*t + 1``,
parsed by :mod:`certify.ffield.poly`), refuses characteristic 2 and 3, singular
and isotrivial curves, replaces a model that is not minimal at some finite place
by a minimal one (divide A by g^4 and B by g^6), and computes for every place of
bad reduction, the place at infinity included, the valuations of c4, c6 and
Delta on the minimal model, the Kodaira type, the reduction kind, the local
trace a_v and the conductor exponent.

In characteristic p >= 5, with c4 = -48 A, c6 = -864 B and
Delta = -16 (4 A^3 + 27 B^2), a model is minimal at v iff v(A) < 4 or v(B) < 6,
and on a minimal model the Kodaira type is read off (v(c4), v(c6), v(Delta))
(the table of Tate's algorithm for p >= 5; see docs/elliptic_curves.md).
The conductor exponent is 0 (good), 1 (multiplicative) or 2 (additive; wild
ramification does not occur for p >= 5).

References
----------
"Algorithm for determining the type of a singular fiber in an elliptic
pencil", Modular Functions of One Variable IV, LNM 476 (1975).
"Sur la classification de Néron des courbes elliptiques en
caractéristique résiduelle 2 et 3", J. Number Theory 44 (1993) (table for p >= 5
in its introduction).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..errors import BadInput, Inconsistent
from ..ffield.poly import FiniteField, factor, finite_field, parse_poly, poly_str

__all__ = ["BadPlace", "EllipticCurve", "make_curve", "curve_from_polys", "valuation"]

INFINITY = "infinity"
_BIG = 10**9  # the valuation of the zero polynomial


def valuation(f, P) -> int:
    """The P-adic valuation of a polynomial f (a large number for f = 0)."""
    if f.is_zero():
        return _BIG
    v = 0
    while True:
        q, r = divmod(f, P)
        if not r.is_zero():
            return v
        f = q
        v += 1


def kodaira_type(vA: int, vB: int, vD: int) -> tuple[str, str, int]:
    """(Kodaira symbol, reduction kind, conductor exponent) on a minimal model, p >= 5."""
    if vD == 0:
        return "I0", "good", 0
    if vA == 0:
        return f"I{vD}", "multiplicative", 1
    if vA == 2 and vB == 3 and vD > 6:
        return f"I{vD - 6}*", "additive", 2
    table = {2: "II", 3: "III", 4: "IV", 6: "I0*", 8: "IV*", 9: "III*", 10: "II*"}
    if vD in table:
        return table[vD], "additive", 2
    raise Inconsistent(f"valuations v(A)={vA}, v(B)={vB}, v(Delta)={vD} fit no Kodaira type")


@dataclass(frozen=True)
class BadPlace:
    """A place of bad reduction with its local data on the minimal model.

    ``a_v`` is +1 (split multiplicative), -1 (non-split multiplicative) or
    0 (additive); the local Euler factor is (1 - a_v u^deg)^-1.
    """

    place: str          # the monic irreducible as text, or "infinity"
    degree: int
    v_c4: int
    v_c6: int
    v_disc: int
    kodaira: str
    reduction: str      # "split multiplicative", "non-split multiplicative", "additive"
    a_v: int
    conductor_exponent: int

    def as_dict(self) -> dict:
        return {
            "place": self.place, "degree": self.degree, "v_c4": self.v_c4 if self.v_c4 < _BIG else None,
            "v_c6": self.v_c6 if self.v_c6 < _BIG else None, "v_disc": self.v_disc,
            "kodaira": self.kodaira, "reduction": self.reduction, "a_v": self.a_v,
            "conductor_exponent": self.conductor_exponent,
        }


@dataclass(frozen=True, eq=False)
class EllipticCurve:
    """A non-isotrivial elliptic curve over F_q(t), held on a model minimal at all finite places.

    ``A``, ``B`` are the minimal model; ``A_input``, ``B_input`` what the user gave;
    ``scale`` the g with A_input = g^4 A, B_input = g^6 B.  At infinity the model
    in s = 1/t is A_inf(s) = s^(4k) A(1/s), B_inf(s) = s^(6k) B(1/s) with
    k = ``k_inf`` the least integer with 4k >= deg A and 6k >= deg B (minimal at s = 0).
    """

    field: FiniteField
    A: object
    B: object
    A_input: str
    B_input: str
    scale: object
    disc_poly: object        # 4 A^3 + 27 B^2 (Delta = -16 times this)
    k_inf: int
    a_inf: object            # A_inf(0), an element of F_q
    b_inf: object            # B_inf(0)
    bad_places: tuple[BadPlace, ...]

    @property
    def q(self) -> int:
        return self.field.q

    @property
    def p(self) -> int:
        return self.field.p

    @property
    def conductor_degree(self) -> int:
        return sum(b.degree * b.conductor_exponent for b in self.bad_places)

    @property
    def l_degree(self) -> int:
        """deg L(E, u) = deg N - 4 (Grothendieck-Ogg-Shafarevich, genus 0 base)."""
        return self.conductor_degree - 4

    @property
    def minimal_disc_degree(self) -> int:
        """Total degree of the minimal discriminant over all places; equals 12 k_inf."""
        return sum(b.degree * b.v_disc for b in self.bad_places)

    def text(self, f) -> str:
        return poly_str(f, self.field)

    def j_invariant(self) -> tuple[str, str]:
        """j = 6912 A^3 / (4 A^3 + 27 B^2) in lowest terms, as (numerator, denominator) text."""
        num = self.A**3 * 6912
        den = self.disc_poly
        g = num.gcd(den)
        num, den = num // g, den // g
        lc = den.leading_coefficient()
        return self.text(num * lc.inverse()), self.text(den * lc.inverse())

    def describe(self) -> str:
        fd = self.field.describe()
        where = f"F_{self.q}(t)" + ("" if self.field.k == 1 else f", {fd}")
        return f"y^2 = x^3 + ({self.text(self.A)})*x + ({self.text(self.B)}) over {where}"

    def as_dict(self) -> dict:
        jn, jd = self.j_invariant()
        return {
            "field": self.field.describe(), "q": self.q,
            "A": self.text(self.A), "B": self.text(self.B),
            "A_input": self.A_input, "B_input": self.B_input,
            "minimal_model_scale": self.text(self.scale),
            "discriminant": self.text(self.disc_poly * (-16)),
            "j_invariant": {"numerator": jn, "denominator": jd},
            "bad_places": [b.as_dict() for b in self.bad_places],
            "conductor_degree": self.conductor_degree,
            "l_degree": self.l_degree,
            "minimal_discriminant_degree": self.minimal_disc_degree,
            "k_inf": self.k_inf,
        }


def _is_square_mod(x, P, F: FiniteField) -> bool:
    """Whether x (a unit modulo the irreducible P) is a square in F_q[t]/P."""
    d = P.degree()
    e = (F.q**d - 1) // 2
    r = (x % P).pow_mod(e, P) if d > 0 else None
    return r == F.one_poly()


def _check_field(q) -> FiniteField:
    F = finite_field(q)
    if F.p in (2, 3):
        raise BadInput(
            f"characteristic {F.p} is not supported: curves y^2 = x^3 + A x + B need characteristic >= 5"
        )
    return F


def make_curve(q, A_text: str, B_text: str) -> EllipticCurve:
    """Parse A and B over F_q and build the curve (see :func:`curve_from_polys`)."""
    F = _check_field(q)
    A = parse_poly(A_text, F)
    B = parse_poly(B_text, F)
    return curve_from_polys(F, A, B, A_text, B_text)


def curve_from_polys(F: FiniteField, A, B, A_text: str | None = None, B_text: str | None = None) -> EllipticCurve:
    """Build the curve y^2 = x^3 + A x + B over F_q(t) from polynomials over F.

    Raises BadInput for characteristic 2 or 3, for a singular curve (4A^3 + 27B^2 = 0)
    and for an isotrivial one (j constant: A = 0, B = 0 or A^3/B^2 constant).
    """
    if F.p in (2, 3):
        _check_field(F.q)
    A_text = A_text if A_text is not None else poly_str(A, F)
    B_text = B_text if B_text is not None else poly_str(B, F)
    disc = A**3 * 4 + B**2 * 27
    if disc.is_zero():
        raise BadInput(f"the curve with A = {A_text}, B = {B_text} is singular (4A^3 + 27B^2 = 0)")
    if A.is_zero() or B.is_zero():
        which = "j = 0 (A = 0)" if A.is_zero() else "j = 1728 (B = 0)"
        raise BadInput(f"the curve is isotrivial ({which}); only curves with non-constant j are supported")
    # j is constant iff A^3 / B^2 is a constant
    lhs = A**3 * B.leading_coefficient() ** 2
    rhs = B**2 * A.leading_coefficient() ** 3
    if lhs == rhs:
        raise BadInput("the curve is isotrivial (its j-invariant is constant); only non-constant j is supported")
    # minimal model at finite places
    scale = F.one_poly()
    for P, _ in factor(A.gcd(B).monic(), F) if not A.gcd(B).is_constant() else []:
        k = min(valuation(A, P) // 4, valuation(B, P) // 6)
        if k > 0:
            scale = scale * P**k
    if not scale.is_one():
        A = A // scale**4
        B = B // scale**6
        disc = A**3 * 4 + B**2 * 27
    degA, degB = A.degree(), B.degree()
    k_inf = max(-(-degA // 4), -(-degB // 6), 0)
    zero = F.ctx(0)
    cA, cB = A.coeffs(), B.coeffs()
    a_inf = cA[4 * k_inf] if 4 * k_inf < len(cA) else zero
    b_inf = cB[6 * k_inf] if 6 * k_inf < len(cB) else zero

    bad: list[BadPlace] = []
    for P, _ in factor(disc.monic(), F) if disc.degree() > 0 else []:
        vA, vB, vD = valuation(A, P), valuation(B, P), valuation(disc, P)
        if vA >= 4 and vB >= 6:
            raise Inconsistent("model still not minimal after reduction")  # pragma: no cover
        kod, kind, f = kodaira_type(vA, vB, vD)
        if kind == "multiplicative":
            split = _is_square_mod(B * 6, P, F)
            kind = "split multiplicative" if split else "non-split multiplicative"
            a_v = 1 if split else -1
        else:
            a_v = 0
        bad.append(BadPlace(poly_str(P, F), P.degree(), vA, vB, vD, kod, kind, a_v, f))
    vA_inf = 4 * k_inf - degA
    vB_inf = 6 * k_inf - degB
    vD_inf = 12 * k_inf - disc.degree()
    if vD_inf > 0:
        kod, kind, f = kodaira_type(vA_inf, vB_inf, vD_inf)
        if kind == "multiplicative":
            split = (b_inf * 6).is_square()
            kind = "split multiplicative" if split else "non-split multiplicative"
            a_v = 1 if split else -1
        else:
            a_v = 0
        bad.append(BadPlace(INFINITY, 1, vA_inf, vB_inf, vD_inf, kod, kind, a_v, f))
    curve = EllipticCurve(F, A, B, A_text, B_text, scale, disc, k_inf, a_inf, b_inf, tuple(bad))
    if curve.minimal_disc_degree != 12 * k_inf:
        raise Inconsistent("the minimal discriminant's degree is not 12 k")  # pragma: no cover
    if curve.l_degree < 0:
        raise Inconsistent(f"conductor degree {curve.conductor_degree} < 4 for a non-isotrivial curve")
    return curve
