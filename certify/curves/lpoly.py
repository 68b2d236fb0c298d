"""The L-polynomial L(E, u) of a non-isotrivial curve over F_q(t).

L(E, u) = prod_{v good} (1 - a_v u^deg v + q^deg v u^(2 deg v))^-1 prod_{v bad} (1 - a_v u^deg v)^-1

is a polynomial with integer coefficients of degree N' = deg N - 4
(Grothendieck-Ogg-Shafarevich), with the functional equation

    L(E, u) = eps (q u)^N' L(E, 1/(q^2 u)),   eps = +-1,

i.e. l_{N'-i} = eps q^(N'-2i) l_i, and inverse roots of modulus q (La conjecture de Weil II, Publ. Math. IHES 52 (1980)).
The coefficients l_0..l_D follow exactly from the sums c_1..c_D of
:mod:`certify.curves.traces` by Newton's identities i l_i = sum_{n<=i} c_n l_{i-n};
the functional equation gives the rest once eps is known, and eps is read off the
first coefficient above the middle whose mirror is non-zero.  Degrees beyond
those used confirm the result (c_n = -sum gamma_j^n exactly).

The analytic rank is the exact multiplicity of the factor (1 - q u) in Z[u].
"""

from __future__ import annotations

from dataclasses import dataclass, field

from flint import fmpz_poly

from ..arith import acb, arb, fmpq, workprec
from ..errors import Inconsistent, PrecisionExhausted
from .fieldtable import MAX_FIELD_SIZE

#: Confirmation by further degrees is skipped where q^n exceeds this (recorded in the result).
CONFIRM_LIMIT = min(MAX_FIELD_SIZE, 2_000_000)
from .model import EllipticCurve
from .traces import frobenius_sum

__all__ = [
    "LPolynomial", "RootData", "newton_coefficients", "power_sums", "l_polynomial",
    "from_coefficients", "exact_multiplicity", "root_kind", "REAL_KINDS",
]


def newton_coefficients(c: list[int]) -> list[int]:
    """l_0..l_D from c_1..c_D (c[0] unused) with i l_i = sum_{n=1}^{i} c_n l_{i-n}, exactly."""
    l = [1]
    for i in range(1, len(c)):
        s = sum(c[n] * l[i - n] for n in range(1, i + 1))
        if s % i:
            raise Inconsistent(f"Newton's identity gives a non-integral coefficient l_{i}")
        l.append(s // i)
    return l


def power_sums(l: list[int], n_max: int) -> list[int]:
    """c_1..c_{n_max} (index 0 unused) of the polynomial sum l_i u^i with l_0 = 1: c_n = -sum gamma^n."""
    c = [0]
    for n in range(1, n_max + 1):
        s = n * (l[n] if n < len(l) else 0) - sum(c[m] * (l[n - m] if n - m < len(l) else 0) for m in range(1, n))
        c.append(s)
    return c


def exact_multiplicity(coeffs: list[int], factor: list[int]) -> int:
    """How many times the integer polynomial ``factor`` divides ``coeffs`` exactly in Z[u]."""
    P = fmpz_poly(coeffs)
    D = fmpz_poly(factor)
    m = 0
    while P.degree() >= D.degree() and not P.is_zero():
        Qt, R = divmod(P, D)
        if not R.is_zero():
            break
        P = Qt
        m += 1
    return m


#: The kinds of inverse roots: gamma = +q, gamma = -q, or a non-real gamma (one per conjugate pair).
REAL_KINDS = ("plus", "minus")


def root_kind(factor, q: int) -> str:
    """Exactly which kind of inverse root an irreducible factor of L(E, u) in Z[u] carries.

    A real inverse root has modulus q, so it is +q or -q and its factor is exactly
    1 - q u ("plus") or 1 + q u ("minus") (up to sign); any other irreducible factor has
    no real root ("complex": its roots come in conjugate pairs).  The decision reads the
    integer coefficients only, never a ball's width.  This is the one place where the
    curves code decides whether a root is real; every user (limit law, mean term, LI and
    relation paths, observed sums, twist families) reads :attr:`RootData.kind`.
    """
    f = [int(c) for c in factor]
    while len(f) > 1 and f[-1] == 0:
        f.pop()
    if f and f[0] < 0:
        f = [-c for c in f]
    if f == [1, -q]:
        return "plus"
    if f == [1, q]:
        return "minus"
    if len(f) == 2:
        raise Inconsistent(f"L(E, u) has a linear factor {tuple(f)} whose root is not +-1/q")
    return "complex"


@dataclass(frozen=True)
class RootData:
    """An inverse root gamma = q e^(i theta) with certified enclosures.

    ``factor`` is the index of the irreducible factor of L in Z[u] it belongs to,
    ``multiplicity`` that factor's exponent, ``torsion_order`` m > 0 when gamma / q
    is a primitive m-th root of unity (exactly: the factor is cyclotomic in q u).
    ``kind`` is "plus" (gamma = q), "minus" (gamma = -q) or "complex" (a conjugate pair,
    this being the representative with Im > 0), decided exactly by :func:`root_kind`.
    """

    gamma: acb
    angle: arb            # theta in [0, pi] for the representative with Im >= 0
    multiplicity: int
    factor: int
    torsion_order: int
    kind: str = "complex"

    @property
    def is_real(self) -> bool:
        return self.kind in REAL_KINDS


@dataclass(frozen=True)
class LPolynomial:
    """L(E, u) with the data that certify it."""

    q: int
    coeffs: tuple[int, ...]                 # l_0 .. l_N'
    degree: int
    sign: int                               # eps of the functional equation
    rank: int                               # order of vanishing at u = 1/q
    rank_minus: int                         # multiplicity of (1 + q u): inverse root -q
    degrees_used: int                       # c_1..c_D from point counts
    degrees_confirmed: tuple[int, ...]      # further c_n checked against the polynomial
    frobenius_sums: tuple[int, ...]         # c_1.. (index 0 unused)
    factors: tuple[tuple[tuple[int, ...], int], ...]   # irreducible factors of L in Z[u]
    roots: tuple[RootData, ...] = field(default=())     # representatives, Im gamma >= 0
    max_modulus_error: float = 0.0

    def as_text(self, var: str = "u") -> str:
        terms = []
        for i, c in enumerate(self.coeffs):
            if c == 0:
                continue
            mono = "" if i == 0 else (var if i == 1 else f"{var}^{i}")
            terms.append(f"{c}" if not mono else (mono if c == 1 else (f"-{mono}" if c == -1 else f"{c}*{mono}")))
        return " + ".join(terms).replace("+ -", "- ") if terms else "0"

    def evaluate_at(self, u) -> int:
        return sum(c * u**i for i, c in enumerate(self.coeffs))

    def as_dict(self) -> dict:
        return {
            "coefficients": list(self.coeffs), "degree": self.degree, "text": self.as_text(),
            "sign": self.sign, "analytic_rank": self.rank, "multiplicity_of_root_minus_q": self.rank_minus,
            "degrees_from_point_counts": self.degrees_used,
            "degrees_confirmed": list(self.degrees_confirmed),
            "factors": [{"coefficients": list(f), "exponent": e} for f, e in self.factors],
            "inverse_roots": [
                {"real": [str(r.gamma.real.mid()), str(r.gamma.real.rad())],
                 "imag": [str(r.gamma.imag.mid()), str(r.gamma.imag.rad())],
                 "angle_over_pi": str(r.angle / arb.pi()), "multiplicity": r.multiplicity,
                 "torsion_order": r.torsion_order, "kind": r.kind}
                for r in self.roots
            ],
        }


def _torsion_order(f: list[int], q: int) -> int:
    """m if the inverse roots of the factor f(u) are q times primitive m-th roots of unity, else 0.

    R(w) = w^deg f(1/(q w)) / f(0) has roots gamma / q; it must be in Z[w] and cyclotomic.
    """
    d = len(f) - 1
    coeffs = [fmpq(f[i], f[0] * q**i) for i in range(d + 1)]  # coefficient of w^(d-i)
    if any(c.q != 1 for c in coeffs):
        return 0
    R = fmpz_poly([int(coeffs[d - j].p) for j in range(d + 1)])
    return int(R.is_cyclotomic())


def _roots(coeffs: list[int], q: int, factors, prec: int = 128) -> tuple[tuple[RootData, ...], float]:
    """Certified inverse roots, one representative per conjugate pair, per irreducible factor.

    A real inverse root has modulus q, so it is +-q and its factor is linear (1 -+ q u);
    a factor of degree >= 2 has no real root and exactly half its roots in Im > 0.
    """
    out: list[RootData] = []
    max_err = 0.0
    for idx, (f, e) in enumerate(factors):
        tors = _torsion_order(list(f), q)
        kind = root_kind(f, q)
        if kind in REAL_KINDS:
            gamma = q if kind == "plus" else -q
            out.append(RootData(acb(gamma), arb(0) if gamma > 0 else arb.pi(), e, idx, tors, kind))
            continue
        if (len(f) - 1) % 2:
            raise Inconsistent("an irreducible factor of odd degree >= 3 cannot have all roots of modulus q")
        rev = fmpz_poly(list(reversed(f)))  # its roots are the inverse roots gamma
        for bits in (prec, 2 * prec, 4 * prec, 8 * prec):
            with workprec(bits):
                rts = [r for r, _m in rev.complex_roots()]
                upper = [r for r in rts if r.imag > 0]
                if len(upper) != (len(f) - 1) // 2 or any(r.rad() > arb(2) ** (-bits // 3) * q for r in rts):
                    continue
                qq = arb(q)
                for r in rts:
                    mod_err = abs(r) - qq
                    if not mod_err.contains(0):
                        raise Inconsistent(f"an inverse root of L has modulus {abs(r)} != q = {q}")
                    max_err = max(max_err, float(abs(mod_err).upper()))
                for r in upper:
                    out.append(RootData(r, r.arg(), e, idx, tors))
                break
        else:
            raise PrecisionExhausted("not certified: could not isolate the inverse roots of L(E, u)")
    return tuple(out), max_err


def from_coefficients(q: int, coeffs: list[int], sign: int, c: list[int], degrees_used: int,
                      confirmed: tuple[int, ...]) -> LPolynomial:
    """Assemble an :class:`LPolynomial` (factors, rank, certified roots) from exact coefficients."""
    N = len(coeffs) - 1
    if N > 0:
        P = fmpz_poly(coeffs)
        _content, facs = P.factor()
        factors = []
        for g, e in facs:
            gl = [int(x) for x in g.coeffs()]
            if gl[0] < 0:
                gl = [-x for x in gl]
            factors.append((tuple(gl), int(e)))
        factors.sort(key=lambda fe: (len(fe[0]), fe[0]))
    else:
        factors = []
    rank = exact_multiplicity(coeffs, [1, -q]) if N > 0 else 0
    rank_minus = exact_multiplicity(coeffs, [1, q]) if N > 0 else 0
    roots, err = _roots(coeffs, q, factors) if N > 0 else ((), 0.0)
    return LPolynomial(q, tuple(coeffs), N, sign, rank, rank_minus, degrees_used, confirmed,
                       tuple(c), tuple(factors), roots, err)


def l_polynomial(E: EllipticCurve, confirm: int = 1, c_source=None) -> LPolynomial:
    """Compute L(E, u) exactly from point counts and the functional equation.

    Parameters
    ----------
    E : EllipticCurve
    confirm : int
        Number of degrees beyond those used whose c_n are checked against the
        polynomial (skipped where the field q^n exceeds the table limit; the
        degrees actually checked are recorded).
    c_source : callable, optional
        n -> c_n; defaults to the point counts of E (families pass a faster one).
    """
    q = E.q
    N = E.l_degree
    cs = c_source or (lambda n: frobenius_sum(E, n))
    c = [0]

    def need(D):
        while len(c) <= D:
            c.append(int(cs(len(c))))

    h = N // 2
    need(max(h, 1))
    l = newton_coefficients(c)
    sign = None
    if N == 0:
        sign = 1
        used = 1
        coeffs = [1]
        if c[1] != 0:
            raise Inconsistent("L(E, u) should be 1 (deg N = 4) but c_1 != 0")
    else:
        if N % 2 == 0 and l[h] != 0:
            sign = 1
        # the largest j < N/2 with l_j != 0 (j = 0 always qualifies: l_0 = 1)
        j = max(i for i in range(0, (N + 1) // 2) if l[i] != 0)
        k = N - j
        need(k)
        l = newton_coefficients(c)
        ratio = fmpq(l[k], q ** (N - 2 * j) * l[j])
        if ratio not in (fmpq(1), fmpq(-1)):
            raise Inconsistent(f"the functional equation fails: l_{k} / (q^{N - 2 * j} l_{j}) = {ratio}")
        s2 = int(ratio.p)
        if sign is not None and s2 != sign:
            raise Inconsistent("the functional equation's sign is inconsistent")
        sign = s2
        coeffs = [0] * (N + 1)
        for i in range(0, N + 1):
            if i <= N - i:
                coeffs[i] = l[i]
            else:
                coeffs[i] = sign * q ** (2 * i - N) * l[N - i]
        used = len(c) - 1
        # every coefficient computed from the Euler product must agree
        for i in range(len(l)):
            if i <= N and l[i] != coeffs[i]:
                raise Inconsistent(f"coefficient l_{i} from point counts disagrees with the functional equation")
            if i > N and l[i] != 0:
                raise Inconsistent(f"the Euler product has a non-zero coefficient l_{i} beyond degree {N}")
    confirmed = []
    n = used + 1
    while len(confirmed) < confirm and q**n <= CONFIRM_LIMIT:
        need(n)
        pred = power_sums(coeffs, n)
        if pred[n] != c[n]:
            raise Inconsistent(f"c_{n} from point counts ({c[n]}) disagrees with L(E, u) ({pred[n]})")
        confirmed.append(n)
        n += 1
    return from_coefficients(q, coeffs, sign, c, used, tuple(confirmed))
