"""Elliptic curves over Q: invariants, minimal model, local data by Tate's algorithm.

A curve is given by integral a-invariants [a1, a2, a3, a4, a6] of the
Weierstrass equation y^2 + a1 x y + a3 y = x^3 + a2 x^2 + a4 x + a6.

* :func:`curve_from_ainvs` checks the input (integers, size, non-singular)
  and raises :class:`certify.errors.BadInput` with a one-line message.
* :class:`EllipticCurveQ` holds the b- and c-invariants, the discriminant,
  j, a global minimal model, the conductor and the local data at each bad
  prime (Kodaira type, conductor exponent, Tamagawa number, local root
  number where a formula is implemented), and whether E has CM.

Tate's algorithm follows the published description ("Algorithm for
determining the type of a singular fiber in an elliptic pencil", Modular
Functions of One Variable IV, Lecture Notes in Math. 476 (1975); also
Advanced Topics in the Arithmetic of Elliptic Curves, GTM 151 (1994),
IV.9).  Changes of coordinates x = u^2 x' + r, y = u^3 y' + s u^2 x' + t use
the standard transformation formulas (The Arithmetic of Elliptic Curves,
GTM 106, Table 3.1).

Local root numbers (docs/elliptic_curves_q.md, section 2): w_p = +1 at good
primes, -1 at split and +1 at non-split multiplicative primes; for p >= 5
with additive reduction, (-1/p) if potentially multiplicative, and for
potentially good reduction with e = 12 / gcd(12, v_p(Delta_min)):
(-1/p) if e = 2 or 6, (-3/p) if e = 3, (-2/p) if e = 4 ("Variation of the
root number in families of elliptic curves", Compositio Math. 87 (1993)).
At p = 2 and 3 (any additive p, in fact): if some quadratic twist E^(d) by
a d ramified at p has good or multiplicative reduction at p, then
w_p(E) = (-1, d)_p, the Hilbert symbol (section 2 of the doc derives it from
the epsilon factors of rho (x) chi_d; potentially multiplicative reduction
is always of this kind, "Galois theory, elliptic curves, and root numbers",
Compositio Math. 100 (1996)).  The remaining additive cases at 2 and 3
(potentially good reduction that no quadratic twist makes good) are left
open here (None, source "open"); :func:`certify.source.ell_l.complete_root_numbers`
then derives the single open factor from the root number proven by the
functional equation, or, with open factors at both 2 and 3, only their
product.  The global root number is eps = -prod_p w_p.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from fractions import Fraction

from ..errors import BadInput

MAX_COEFF_DIGITS = 40  # |a_i| < 10^40: factoring the discriminant stays feasible
MAX_CONDUCTOR = 10**9  # beyond this the L-function sums are out of reach anyway

# j-invariants of the 13 orders of class number one (CM curves over Q)
CM_J = {
    0: -3, 1728: -4, -3375: -7, 8000: -8, -32768: -11, 54000: -12, 287496: -16,
    -884736: -19, -12288000: -27, 16581375: -28, -884736000: -43,
    -147197952000: -67, -262537412640768000: -163,
}


def _v(n: int, p: int) -> int:
    """p-adic valuation of a non-zero integer (a large number for 0)."""
    if n == 0:
        return 10**9
    k = 0
    while n % p == 0:
        n //= p
        k += 1
    return k


def b_invariants(a):
    a1, a2, a3, a4, a6 = a
    b2 = a1 * a1 + 4 * a2
    b4 = 2 * a4 + a1 * a3
    b6 = a3 * a3 + 4 * a6
    b8 = a1 * a1 * a6 + 4 * a2 * a6 - a1 * a3 * a4 + a2 * a3 * a3 - a4 * a4
    return b2, b4, b6, b8


def c_invariants(a):
    b2, b4, b6, b8 = b_invariants(a)
    c4 = b2 * b2 - 24 * b4
    c6 = -b2**3 + 36 * b2 * b4 - 216 * b6
    return c4, c6


def discriminant(a) -> int:
    b2, b4, b6, b8 = b_invariants(a)
    return -b2 * b2 * b8 - 8 * b4**3 - 27 * b6 * b6 + 9 * b2 * b4 * b6


def transform(a, r, s, t, u=1):
    """a-invariants after x = u^2 x' + r, y = u^3 y' + s u^2 x' + t (exact; must be integral)."""
    a1, a2, a3, a4, a6 = a
    n1 = a1 + 2 * s
    n2 = a2 - s * a1 + 3 * r - s * s
    n3 = a3 + r * a1 + 2 * t
    n4 = a4 - s * a3 + 2 * r * a2 - (t + r * s) * a1 + 3 * r * r - 2 * s * t
    n6 = a6 + r * a4 + r * r * a2 + r**3 - t * a3 - t * t - r * t * a1
    out = []
    for c, k in ((n1, 1), (n2, 2), (n3, 3), (n4, 4), (n6, 6)):
        d = u**k
        if c % d:
            raise ArithmeticError("non-integral change of coordinates")
        out.append(c // d)
    return tuple(out)


def legendre(a: int, p: int) -> int:
    """The Legendre symbol (a/p) for an odd prime p."""
    a %= p
    if a == 0:
        return 0
    return 1 if pow(a, (p - 1) // 2, p) == 1 else -1


def kronecker_neg(d: int, p: int) -> int:
    """(d/p) for d in {-1, -2, -3} and an odd prime p."""
    return legendre(d, p)


def _roots_mod_p(coeffs, p: int) -> list[tuple[int, int]]:
    """Roots (value, multiplicity) in F_p of a polynomial (coefficients low to high)."""
    from flint import fmpz_mod_poly_ctx, nmod_poly

    if p < 2**62:
        f = nmod_poly([c % p for c in coeffs], p)
    else:
        f = fmpz_mod_poly_ctx(p)([c % p for c in coeffs])
    if f.degree() <= 0:
        return []
    out = []
    for g, e in f.factor()[1]:
        if g.degree() == 1:
            c = [int(x) for x in g.coeffs()]
            out.append(((-c[0] * pow(c[1], -1, p)) % p, int(e)))
    return out


def _quad_splits(b: int, c: int, p: int) -> bool:
    """Whether T^2 + b T + c splits into linear factors over F_p."""
    return len(_roots_mod_p([c, b, 1], p)) > 0


def _singular_point(a, p: int) -> tuple[int, int]:
    """The singular point (x0, y0) mod p of a model with p | Delta."""
    if p <= 3:
        a1, a2, a3, a4, a6 = a
        for x in range(p):
            for y in range(p):
                f = y * y + a1 * x * y + a3 * y - (x**3 + a2 * x * x + a4 * x + a6)
                fx = a1 * y - (3 * x * x + 2 * a2 * x + a4)
                fy = 2 * y + a1 * x + a3
                if f % p == 0 and fx % p == 0 and fy % p == 0:
                    return x, y
        raise ArithmeticError("no singular point found")
    c4, c6 = c_invariants(a)
    b2 = b_invariants(a)[0]
    # model Y^2 = X^3 - 27 c4 X - 54 c6 with X = 36 x + 3 b2, Y = 108 (2 y + a1 x + a3):
    # its singular point is X0 = 0 (cusp, p | c4) or the double root -3 c6 / c4
    X0 = 0 if c4 % p == 0 else (-3 * c6 * pow(c4, -1, p)) % p
    x0 = ((X0 - 3 * b2) * pow(36, -1, p)) % p
    y0 = (-(a[0] * x0 + a[2]) * pow(2, -1, p)) % p
    return x0, y0


@dataclass(frozen=True)
class LocalData:
    """Reduction of E at a prime p (from Tate's algorithm on a p-minimal model).

    ``reduction`` is "good", "split", "nonsplit" (multiplicative) or "additive";
    ``root_number`` is +1/-1, or None where no formula is implemented.
    """

    p: int
    kodaira: str
    conductor_exponent: int
    disc_valuation: int  # of the minimal discriminant
    tamagawa: int
    reduction: str
    root_number: int | None
    minimal_model_changed: bool = False
    root_number_source: str = ""  # how w_p was obtained (a formula, a twist, derived, open)

    @property
    def a_p(self) -> int:
        """The Frobenius trace at a bad prime: 1 split, -1 non-split, 0 additive."""
        return {"split": 1, "nonsplit": -1, "additive": 0}.get(self.reduction, 0)


def local_reduction(a, p: int) -> tuple[LocalData, tuple]:
    """Tate's algorithm at p: (local data, a p-minimal integral model)."""
    a = tuple(a)
    changed = False
    while True:
        D = discriminant(a)
        n = _v(D, p)
        if n == 0:
            return LocalData(p, "I0", 0, 0, 1, "good", 1, changed), a
        # move the singular point to (0, 0): then p | a3, a4, a6
        x0, y0 = _singular_point(a, p)
        a = transform(a, x0, 0, y0)
        a1, a2, a3, a4, a6 = a
        b2, b4, b6, b8 = b_invariants(a)
        if b2 % p:  # multiplicative
            split = _quad_splits(a1, -a2, p)
            cp = n if split else (2 if n % 2 == 0 else 1)
            red = "split" if split else "nonsplit"
            return LocalData(p, f"I{n}", 1, n, cp, red, -1 if split else 1, changed), a
        if a6 % (p * p):
            return LocalData(p, "II", n, n, 1, "additive", None, changed), a
        if b8 % p**3:
            return LocalData(p, "III", n - 1, n, 2, "additive", None, changed), a
        if b6 % p**3:
            cp = 3 if _quad_splits(a3 // p, -(a6 // (p * p)), p) else 1
            return LocalData(p, "IV", n - 2, n, cp, "additive", None, changed), a
        # make p | a1, a2; p^2 | a3, a4; p^3 | a6
        if p == 2:
            s = a2 % 2
            t = 2 * ((a6 // 4) % 2)
        else:
            s = (-a1 * pow(2, -1, p)) % p
            t = (-a3 * pow(2, -1, p * p)) % (p * p)
        a = transform(a, 0, s, t)
        a1, a2, a3, a4, a6 = a
        if a1 % p or a2 % p or a3 % (p * p) or a4 % (p * p) or a6 % p**3:
            raise ArithmeticError(f"Tate's algorithm: step 6 normalisation failed at p = {p}")
        P = [a6 // p**3, a4 // (p * p), a2 // p, 1]
        roots = _roots_mod_p(P, p)
        mult = sorted(e for _, e in roots)
        disc_P = _cubic_disc(P)
        if disc_P % p:
            cp = 1 + len(roots)
            return LocalData(p, "I0*", n - 4, n, cp, "additive", None, changed), a
        if mult and max(mult) == 2:
            alpha = [r for r, e in roots if e == 2][0]
            a = transform(a, p * alpha, 0, 0)
            kod_n, cp, a = _in_star(a, p)
            return LocalData(p, f"I{kod_n}*", n - 4 - kod_n, n, cp, "additive", None, changed), a
        # triple root
        alpha = roots[0][0] if roots else 0
        a = transform(a, p * alpha, 0, 0)
        a1, a2, a3, a4, a6 = a
        x3, x6 = a3 // (p * p), a6 // p**4
        if (x3 * x3 + 4 * x6) % p:
            cp = 3 if _quad_splits(x3, -x6, p) else 1
            return LocalData(p, "IV*", n - 6, n, cp, "additive", None, changed), a
        y0 = x6 % 2 if p == 2 else (-x3 * pow(2, -1, p)) % p
        a = transform(a, 0, 0, p * p * y0)
        a1, a2, a3, a4, a6 = a
        if a4 % p**4:
            return LocalData(p, "III*", n - 7, n, 2, "additive", None, changed), a
        if a6 % p**6:
            return LocalData(p, "II*", n - 8, n, 1, "additive", None, changed), a
        # not minimal at p: scale by u = p and start again
        a = transform(a, 0, 0, 0, p)
        changed = True


def _cubic_disc(P) -> int:
    """Discriminant of d + c T + b T^2 + T^3 (P = [d, c, b, 1])."""
    d, c, b, _ = P
    return b * b * c * c - 4 * c**3 - 4 * b**3 * d - 27 * d * d + 18 * b * c * d


def _in_star(a, p: int):
    """Subprocedure for type I_n^*: returns (n, Tamagawa number, model)."""
    mx = my = p * p
    n = 1
    while True:
        a1, a2, a3, a4, a6 = a
        xa2, xa3, xa6 = a2 // p, a3 // my, a6 // (mx * my)
        if (xa3 * xa3 + 4 * xa6) % p:
            return n, (4 if _quad_splits(xa3, -xa6, p) else 2), a
        t = my * (xa6 % 2 if p == 2 else (-xa3 * pow(2, -1, p)) % p)
        a = transform(a, 0, 0, t)
        my *= p
        n += 1
        a1, a2, a3, a4, a6 = a
        xa2, xa4, xa6 = a2 // p, a4 // (p * mx), a6 // (mx * my)
        if (xa4 * xa4 - 4 * xa2 * xa6) % p:
            ok = len(_roots_mod_p([xa6, xa4, xa2], p)) > 0
            return n, (4 if ok else 2), a
        r = mx * ((xa6 * xa2) % 2 if p == 2 else (-xa4 * pow(2 * xa2, -1, p)) % p)
        a = transform(a, r, 0, 0)
        mx *= p
        n += 1
        if n > 10**4:
            raise ArithmeticError("Tate's algorithm: I_n^* loop did not end")


def reduced_model(c4: int, c6: int):
    """The integral model with a1, a3 in {0,1}, a2 in {-1,0,1} and the given c4, c6 (or None)."""
    b2 = (-c6) % 12
    if b2 > 6:
        b2 -= 12
    if (b2 * b2 - c4) % 24:
        return None
    b4 = (b2 * b2 - c4) // 24
    num = -b2**3 + 36 * b2 * b4 - c6
    if num % 216:
        return None
    b6 = num // 216
    a1 = b2 % 2
    a3 = b6 % 2
    if (b2 - a1) % 4 or (b4 - a1 * a3) % 2 or (b6 - a3) % 4:
        return None
    return (a1, (b2 - a1) // 4, a3, (b4 - a1 * a3) // 2, (b6 - a3) // 4)


def hilbert_minus_one(d: int, p: int) -> int:
    """The Hilbert symbol (-1, d)_p for a non-zero integer d and a prime p."""
    k = _v(d, p)
    u = d // p**k
    if p == 2:
        return 1 if u % 4 == 1 else -1
    return legendre(-1, p) ** k


# representatives of the quadratic characters of Q_p^x ramified at p (Q_p^x / squares)
RAMIFIED_TWISTS = {2: (-1, 3, 2, -2, 6, -6), 3: (3, -3)}


def quadratic_twist_ainvs(c4: int, c6: int, d: int) -> tuple:
    """An integral model of the twist E^(d): y^2 = x^3 - 27 d^2 c4 x - 54 d^3 c6."""
    return (0, 0, 0, -27 * d * d * c4, -54 * d**3 * c6)


def semistable_twist(c4: int, c6: int, p: int):
    """(d, local data of E^(d) at p) for a d ramified at p making E semistable at p, or None."""
    for d in RAMIFIED_TWISTS.get(p, ()):
        a = quadratic_twist_ainvs(c4, c6, d)
        ld, _ = local_reduction(a, p)
        if ld.reduction != "additive":
            return d, ld
    return None


def local_root_number(ld: LocalData, j: Fraction, c4: int = 0, c6: int = 0) -> tuple[int | None, str]:
    """(w_p, how it was obtained) from the local data (None where no formula applies)."""
    p = ld.p
    if ld.reduction in ("good", "split", "nonsplit"):
        return ld.root_number, ld.reduction + " reduction"
    if p <= 3:
        tw = semistable_twist(c4, c6, p) if (c4 or c6) else None
        if tw is not None:
            d, tld = tw
            return hilbert_minus_one(d, p), (
                f"(-1, {d})_{p}: the twist by {d} has {tld.reduction} reduction at {p}")
        return None, "open"
    if _v(j.denominator, p) > 0:  # potentially multiplicative
        return legendre(-1, p), "(-1/p): potentially multiplicative"
    e = 12 // math.gcd(12, ld.disc_valuation)
    if e in (2, 6):
        return legendre(-1, p), f"(-1/p): potentially good, e = {e}"
    if e == 3:
        return legendre(-3, p), "(-3/p): potentially good, e = 3"
    if e == 4:
        return legendre(-2, p), "(-2/p): potentially good, e = 4"
    raise ArithmeticError(f"unexpected semistability defect e = {e} at p = {p}")


def _factor(n: int) -> list[int]:
    """The primes dividing n (FLINT); BadInput if a cofactor is too large to factor quickly."""
    from flint import fmpz

    out = set()
    for p, _ in fmpz(abs(n)).factor_smooth(40):
        if p.is_prime():
            out.add(int(p))
        elif p < fmpz(10) ** 40:
            out.update(int(q) for q, _ in p.factor())
        else:
            raise BadInput(f"the discriminant has a composite factor of {len(str(p))} digits, too "
                           "large to factor here (coefficients beyond the supported range)")
    return sorted(out)


@dataclass(frozen=True)
class EllipticCurveQ:
    """An elliptic curve over Q with its arithmetic data (see the module docstring)."""

    ainvs: tuple
    minimal: tuple
    discriminant: int  # of the given model
    minimal_discriminant: int
    c4: int
    c6: int
    j: Fraction
    conductor: int
    local: tuple  # LocalData at each bad prime, increasing
    cm_discriminant: int | None
    root_number_local: int | None  # -prod w_p, or None if some w_p is unknown
    notes: tuple = field(default=())

    @property
    def has_cm(self) -> bool:
        return self.cm_discriminant is not None

    @property
    def bad_primes(self) -> tuple:
        return tuple(ld.p for ld in self.local)

    def local_at(self, p: int) -> LocalData | None:
        for ld in self.local:
            if ld.p == p:
                return ld
        return None

    @property
    def label(self) -> str:
        return "[" + ",".join(str(x) for x in self.ainvs) + "]"

    def as_dict(self) -> dict:
        return {
            "ainvs": list(self.ainvs), "minimal_model": list(self.minimal),
            "discriminant": str(self.discriminant),
            "minimal_discriminant": str(self.minimal_discriminant),
            "j_invariant": str(self.j), "conductor": self.conductor,
            "cm_discriminant": self.cm_discriminant,
            "root_number_from_local_data": self.root_number_local,
            "notes": list(self.notes),
            "local_data": [
                {"p": ld.p, "kodaira": ld.kodaira, "conductor_exponent": ld.conductor_exponent,
                 "disc_valuation": ld.disc_valuation, "tamagawa": ld.tamagawa,
                 "reduction": ld.reduction, "root_number": ld.root_number,
                 "root_number_source": ld.root_number_source}
                for ld in self.local],
        }


def _parse_int(x, i: int) -> int:
    if isinstance(x, bool):
        raise BadInput(f"a-invariant a{[1, 2, 3, 4, 6][i]} must be an integer, got {x!r}")
    if isinstance(x, int):
        v = x
    elif isinstance(x, Fraction) and x.denominator == 1:
        v = int(x)
    elif isinstance(x, str) and x.strip().lstrip("+-").isdigit():
        v = int(x.strip())
    else:
        raise BadInput(f"a-invariant a{[1, 2, 3, 4, 6][i]} must be an integer, got {x!r}")
    if abs(v) >= 10**MAX_COEFF_DIGITS:
        raise BadInput(f"a-invariant a{[1, 2, 3, 4, 6][i]} has more than {MAX_COEFF_DIGITS} digits: "
                       "beyond the supported range")
    return v


def parse_ainvs(text) -> tuple:
    """Five integers from "[a1,a2,a3,a4,a6]", "a1,a2,a3,a4,a6" or a sequence."""
    if isinstance(text, str):
        s = text.strip().strip("[]()").replace(" ", "")
        items = [x for x in s.split(",")] if s else []
    else:
        try:
            items = list(text)
        except TypeError:
            raise BadInput(f"a-invariants must be five integers, got {text!r}") from None
    if len(items) != 5:
        raise BadInput(f"a curve needs five a-invariants [a1,a2,a3,a4,a6], got {len(items)}")
    return tuple(_parse_int(x, i) for i, x in enumerate(items))


def curve_from_ainvs(ainvs) -> EllipticCurveQ:
    """The curve with a-invariants ``ainvs`` and all its local data (BadInput if singular)."""
    a = parse_ainvs(ainvs)
    D = discriminant(a)
    if D == 0:
        raise BadInput(f"the Weierstrass equation {list(a)} is singular (discriminant 0): "
                       "not an elliptic curve")
    c4, c6 = c_invariants(a)
    j = Fraction(c4**3, D)
    primes = _factor(D)
    # minimal discriminant valuations from Tate's algorithm on the given model
    u = 1
    for p in primes:
        ld, _ = local_reduction(a, p)
        dv = _v(D, p) - ld.disc_valuation
        if dv % 12:
            raise ArithmeticError("Tate's algorithm: discriminant scaling not a multiple of 12")
        u *= p ** (dv // 12)
    minimal = a
    if u > 1:
        m = reduced_model(c4 // u**4, c6 // u**6)
        if m is None or discriminant(m) != D // u**12:
            raise ArithmeticError("could not build the global minimal model")
        minimal = m
    else:
        m = reduced_model(c4, c6)
        if m is not None and discriminant(m) == D:
            minimal = m  # the reduced (normalised) form of the same minimal model
    Dmin = discriminant(minimal)
    local = []
    for p in primes:
        ld, _ = local_reduction(minimal, p)
        if ld.minimal_model_changed or ld.disc_valuation != _v(Dmin, p):
            raise ArithmeticError(f"model not minimal at {p} after reduction")
        w, how = local_root_number(ld, j, c4, c6)
        ld = LocalData(ld.p, ld.kodaira, ld.conductor_exponent, ld.disc_valuation, ld.tamagawa,
                       ld.reduction, w, False, how)
        if ld.conductor_exponent > 0:
            local.append(ld)
    N = 1
    for ld in local:
        N *= ld.p ** ld.conductor_exponent
    ws = [ld.root_number for ld in local]
    eps = None if any(w is None for w in ws) else -math.prod(ws)
    cm = CM_J.get(int(j)) if j.denominator == 1 and int(j) in CM_J else None
    notes = []
    if cm is not None:
        notes.append(f"E has complex multiplication by the order of discriminant {cm}")
    return EllipticCurveQ(a, minimal, D, Dmin, c4, c6, j, N, tuple(local), cm, eps, tuple(notes))


def with_global_root_number(E: EllipticCurveQ, eps: int) -> EllipticCurveQ:
    """E with its open local root numbers derived from a proven global root number ``eps``.

    ``eps`` must be proven independently (the functional equation,
    :meth:`certify.source.ell_l.EllipticL.decide_root_number`).  With all w_p
    known, -prod w_p must equal eps (else Inconsistent).  With one open w_p
    (additive at 2 or 3 and no formula applies), w_p = -eps / prod_{q != p} w_q
    is derived and says so.  With open factors at both 2 and 3 only their
    product is determined: they stay open and a note gives the product.
    """
    from ..errors import Inconsistent

    open_ = [ld for ld in E.local if ld.root_number is None]
    known = math.prod(ld.root_number for ld in E.local if ld.root_number is not None)
    if not open_:
        if -known != eps:
            raise Inconsistent(f"the local root numbers give {-known:+d} but the functional equation "
                               f"proves {eps:+d}; not certified")
        return E
    notes = list(E.notes)
    local = list(E.local)
    if len(open_) == 1:
        ld = open_[0]
        w = -eps * known
        i = local.index(ld)
        local[i] = LocalData(ld.p, ld.kodaira, ld.conductor_exponent, ld.disc_valuation,
                             ld.tamagawa, ld.reduction, w, False,
                             f"derived: -eps / prod of the other w_q, eps = {eps:+d} proven by "
                             "the functional equation (no local formula applied)")
        notes.append(f"w_{ld.p} = {w:+d} derived from the root number proven by the functional "
                     "equation (no local formula implemented for this reduction)")
    else:
        prod = -eps * known
        ps = " w_".join(str(ld.p) for ld in open_)
        local = [LocalData(ld.p, ld.kodaira, ld.conductor_exponent, ld.disc_valuation,
                           ld.tamagawa, ld.reduction, None, False,
                           f"open: only the product w_{ps} = {prod:+d} is determined (from the "
                           "functional equation)") if ld in open_ else ld for ld in local]
        notes.append(f"the product w_{ps} = {prod:+d} is derived from the root number proven by "
                     "the functional equation; the factors themselves are not computed")
    return EllipticCurveQ(E.ainvs, E.minimal, E.discriminant, E.minimal_discriminant, E.c4, E.c6,
                          E.j, E.conductor, tuple(local), E.cm_discriminant, E.root_number_local,
                          tuple(notes))
