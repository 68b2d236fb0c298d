"""Prime races in F_q[t]: limit functions, densities (LI and relation cases), leaders.

Race.  Integer weights w_a on unit classes a mod m, sum w_a = 0;
R(n) = sum_a w_a pi(n; m, a).  The *prescribed-degree* race looks at the sign
of R(X), the *cumulative* race at the sign of C(X) = sum_{n <= X} R(n); the
density is the natural density of the X >= 1 where the sign is positive.

Limit function (docs/function_fields.md derives it from the exact explicit
formula of :mod:`.counts`).  With Wbar(chi) = sum_a w_a conj(chi(a)),
c_2 = sum_{c unit} w(c^2), and for each distinct inverse root alpha of modulus
sqrt(q) the coefficient A_alpha = sum of Wbar(chi) over the characters whose
L-polynomial has alpha as a root (with multiplicity):

    phi(m) X R(X) / q^(X/2)          = G_deg(X (1/2, x_1, ..., x_J)) + o(1),
    phi(m) X C(X) / q^(X/2)          = G_cum(X (1/2, x_1, ..., x_J)) + o(1),
    G(x) = mu_0 k_0 + mu_pi k_pi cos(2 pi x_0) + sum_k Re(B_k e^(2 pi i x_k)),

where x_k = theta_k / 2 pi over the roots alpha_k = sqrt(q) e^(i theta_k) with
0 < theta_k < pi, mu_0 = -A_(+sqrt q) - c_2/2, mu_pi = -A_(-sqrt q) - c_2/2,
B_k = -2 A_k k(theta_k), and k(theta) = 1 (prescribed degree) or
k(theta) = 1/(1 - e^(-i theta)/sqrt q) (cumulative).

Densities.  The lower and upper natural densities lie between the Haar
measures of {G > 0} and {G >= 0} on the closure of the orbit
{X (1/2, x_1, .., x_J)}.  Under LI (no relation among pi, theta_1, ...,
theta_J beyond 2 (pi) = 0) the closure is {0, 1/2} x T^J and each half is a
sum of independent cosines: the shared density engine
:func:`certify.density.bessel.density_enclosure` is applied to
mu_0 k_0 +- mu_pi k_pi + sum |B_k| cos Theta_k and the two parities averaged.
With relations the closure is computed exactly (:mod:`.torus`) and the
density enclosed by box subdivision.
"""

from __future__ import annotations

from ..result import NotebookDisplay

import math
import time
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np
from flint import acb, fmpz_poly

from ..arith import arb, workprec
from ..errors import BadInput, Inconsistent, PrecisionExhausted
from ..result import CAUTION, Enclosure, ErrorTerm, Hypothesis
from .characters import Character, CharacterGroup, character_group
from .counts import RaceCounter
from .cyclo import cyclo_ring
from .lpoly import WeilReport, l_polynomial, weil_check
from .poly import (
    MAX_TABLE, finite_field, parse_field_order, parse_monic, parse_poly, poly_index, poly_str,
)
from .torus import (
    MAX_CONFIRM_BITS, REFUTED, ExactRoot, OrbitClosure, TrigFunction, confirm_relation, density_on_closure,
    find_relations, identify_root, orbit_closure, root_kind, vanishing_coset,
)

__all__ = ["FFRaceQuestion", "parse_race", "residue_race", "race_spectrum", "certify_ffrace", "FFRaceResult",
           "exact_race_values", "empirical_frequency", "leader_report", "MODES"]

MODES = ("cumulative", "degree")


# ---------------------------------------------------------------- the question
@dataclass(frozen=True)
class FFRaceQuestion:
    """Which race: field order, modulus, classes with integer weights, and mode."""

    q: int
    modulus: str
    classes: tuple[str, ...]
    weights: tuple[int, ...]
    mode: str

    @property
    def label(self) -> str:
        if len(self.classes) == 2 and self.weights == (1, -1):
            core = f"{self.classes[0]} vs {self.classes[1]}"
        else:
            core = " ".join(f"{w:+d}*[{c}]" for c, w in zip(self.classes, self.weights))
        return f"delta_{self.mode}(F_{self.q}[t], {self.modulus}; {core})"

    @property
    def statement(self) -> str:
        if self.classes == ("non-residues", "residues"):
            s = (f"{self.weights[0]} * (sum of pi(n; m, a) over each non-residue class a) "
                 f"- {-self.weights[1]} * (sum over each residue class)")
        else:
            s = " + ".join(f"({w})*pi(n; m, {c})" for c, w in zip(self.classes, self.weights))
        if self.mode == "cumulative":
            return (f"natural density of the X >= 1 with sum_(n <= X) [{s}] > 0, "
                    f"m = {self.modulus} over F_{self.q}")
        return f"natural density of the n >= 1 with {s} > 0 (degree exactly n), m = {self.modulus} over F_{self.q}"


def parse_race(q, modulus: str, classes: list[str], weights: list | None = None,
               mode: str = "cumulative"):
    """Validate a race; returns (question, group, {position: weight}).

    Raises BadInput (one line) for q not a prime power, m not monic or of degree 0,
    classes not coprime to m or repeated, weights not integers summing to 0.
    """
    qi = parse_field_order(q)
    if mode not in MODES:
        raise BadInput(f"mode must be one of {', '.join(MODES)}, got {mode!r}")
    F = finite_field(qi)
    m = parse_monic(modulus, F, "modulus")
    if qi ** m.degree() > MAX_TABLE:
        raise BadInput(f"q^deg m = {qi}^{m.degree()} exceeds the table limit {MAX_TABLE}")
    if len(classes) < 2:
        raise BadInput("a race needs at least two classes")
    if weights is None:
        if len(classes) != 2:
            raise BadInput("give --weights for a race of more than two classes")
        weights = [1, -1]
    if len(weights) != len(classes):
        raise BadInput(f"{len(classes)} classes but {len(weights)} weights")
    ws = []
    for w in weights:
        try:
            ws.append(int(str(w).strip()))
        except ValueError:
            raise BadInput(f"weights must be integers, got {w!r}") from None
    if sum(ws) != 0:
        raise BadInput(f"weights must sum to 0 (got {sum(ws)})")
    if not any(ws):
        raise BadInput("weights are all zero")
    G = character_group(F, m)
    wd: dict[int, int] = {}
    seen: dict[int, str] = {}
    for c, w in zip(classes, ws):
        f = parse_poly(c, F)
        idx = poly_index(f % m, F)
        if not G.is_unit[idx]:
            raise BadInput(f"class {c!r} is not coprime to the modulus {poly_str(m, F)!r}")
        p = int(G.pos[idx])
        if p in seen:
            raise BadInput(f"classes {seen[p]!r} and {c!r} are the same residue class mod {poly_str(m, F)}")
        seen[p] = c
        wd[p] = w
    qn = FFRaceQuestion(qi, poly_str(m, F), tuple(str(c).strip() for c in classes), tuple(ws), mode)
    return qn, G, wd


def residue_race(q, modulus: str, mode: str = "cumulative"):
    """Non-residues against residues: weights #squares on each non-square class and
    -#non-squares on each square class (divided by their gcd), so sum w = 0.

    R(n) > 0 means the non-residues are ahead (the bias expected from the squares term).
    """
    qi = parse_field_order(q)
    if mode not in MODES:
        raise BadInput(f"mode must be one of {', '.join(MODES)}, got {mode!r}")
    F = finite_field(qi)
    m = parse_monic(modulus, F, "modulus")
    if qi ** m.degree() > MAX_TABLE:
        raise BadInput(f"q^deg m = {qi}^{m.degree()} exceeds the table limit {MAX_TABLE}")
    G = character_group(F, m)
    sq = np.zeros(G.order, dtype=bool)
    sq[np.unique(G.power_map(2))] = True
    n_sq, n_non = int(sq.sum()), int((~sq).sum())
    if n_non == 0:
        raise BadInput(f"every unit is a square modulo {poly_str(m, F)} over F_{qi}: no residue race")
    g = math.gcd(n_sq, n_non)
    wd = {int(p): (n_sq // g if not sq[p] else -(n_non // g)) for p in range(G.order)}
    qn = FFRaceQuestion(qi, poly_str(m, F), ("non-residues", "residues"),
                        (n_sq // g, -(n_non // g)), mode)
    return qn, G, wd


# ---------------------------------------------------------------- spectrum
@dataclass(frozen=True, eq=False)
class LData:
    """One L-polynomial used by a race, for reports and certificates."""

    character: str
    order: int
    parity: str
    conductor: str
    degree: int
    coefficients: tuple[str, ...]  # exact, as polynomials in zeta = exp(2 pi i / order)
    inverse_roots: tuple[acb, ...]
    weil: WeilReport
    weight: acb  # Wbar(chi)


@dataclass(frozen=True, eq=False)
class SpectralPoint:
    """A distinct inverse root of modulus sqrt(q) (one per conjugate pair) and its coefficient."""

    root: ExactRoot
    alpha: acb
    kind: str  # "complex" (0 < theta < pi), "plus" (alpha = sqrt q), "minus" (alpha = -sqrt q)
    x: arb  # theta / 2 pi
    A: acb  # sum of Wbar(chi) over the characters having this root
    characters: tuple[str, ...]


def _character_matrix(G: CharacterGroup) -> np.ndarray:
    n = G.order
    C = np.zeros((n, len(G.invariants)), dtype=np.int64)
    k = np.arange(n, dtype=np.int64)
    for j, d in enumerate(G.invariants):
        k, C[:, j] = np.divmod(k, d)
    return C


def quadratic_characters(G: CharacterGroup) -> list[Character]:
    """The characters with chi^2 = 1 (trivial one first)."""
    import itertools
    opts = [(0, d // 2) if d % 2 == 0 else (0,) for d in G.invariants]
    return [G.character(c) for c in itertools.product(*opts)]


def race_weights(G: CharacterGroup, wd: dict[int, int], candidates: list[Character] | None = None):
    """(list of (chi, Wbar(chi) exact in Z[zeta_e])) for non-trivial chi with Wbar != 0, and c_2.

    ``candidates`` (optional) restricts the characters examined; the caller guarantees
    Wbar = 0 for the others (e.g. the quadratic characters for a residue race).
    """
    if candidates is not None:
        return _race_weights_listed(G, wd, candidates)
    e = G.exponent
    R = cyclo_ring(e)
    d = np.array(G.invariants, dtype=np.int64)
    pos = np.array(list(wd.keys()), dtype=np.int64)
    w = np.array(list(wd.values()), dtype=np.int64)
    Y = G.logs(G.elements[pos]) if len(d) else np.zeros((len(pos), 0), dtype=np.int64)
    C = _character_matrix(G)
    scale = (e // d) if len(d) else np.zeros(0, dtype=np.int64)
    ex = (C @ (Y * scale).T) % e if len(d) else np.zeros((G.order, len(pos)), dtype=np.int64)
    out = []
    for i in range(G.order):
        if i == 0:
            continue
        counts = np.zeros(e, dtype=np.int64)
        np.add.at(counts, (-ex[i]) % e, w)
        if not counts.any():
            continue
        val = R.from_counts(counts)
        if val.is_zero():
            continue
        out.append((G.character(C[i]), val))
    # c_2 = sum over units c of w(c^2)
    sq = G.power_map(2)
    wfull = np.zeros(G.order, dtype=np.int64)
    wfull[pos] = w
    c2 = int(wfull[sq].sum())
    return out, c2


def _race_weights_listed(G: CharacterGroup, wd: dict[int, int], candidates):
    e = G.exponent
    R = cyclo_ring(e)
    pos = np.array(list(wd.keys()), dtype=np.int64)
    w = np.array(list(wd.values()), dtype=np.int64)
    out = []
    for chi in candidates:
        if chi.is_trivial():
            continue
        ex = chi.position_exponents[pos] * (e // chi.order)
        counts = np.zeros(e, dtype=np.int64)
        np.add.at(counts, (-ex) % e, w)
        val = R.from_counts(counts)
        if not val.is_zero():
            out.append((chi, val))
    sq = G.power_map(2)
    wfull = np.zeros(G.order, dtype=np.int64)
    wfull[pos] = w
    return out, int(wfull[sq].sum())


def race_spectrum(G: CharacterGroup, wd: dict[int, int], prec: int = 128,
                  candidates: list[Character] | None = None):
    """Spectral points, c_2, and the L-data of the characters with Wbar(chi) != 0."""
    q = G.F.q
    e = G.exponent
    R = cyclo_ring(e)
    chars, c2 = race_weights(G, wd, candidates)
    if len(chars) * G.size > 4 * 10**8:
        raise BadInput(f"this race involves {len(chars)} characters modulo a table of {G.size} "
                       "residues, beyond this tool's budget; use a smaller modulus or --residues")
    ldata = []
    acc: dict[ExactRoot, list] = {}
    with workprec(prec):
        for chi, wbar in chars:
            L = l_polynomial(chi)
            rep = weil_check(L, prec)
            if not rep.ok:
                raise Inconsistent(f"{chi.label()}: inverse roots disagree with Weil's theorem "
                                   f"and the degree formula ({rep.describe()})")
            roots = L.inverse_roots(prec)
            ldata.append(LData(chi.label(), chi.order, "even" if chi.is_even else "odd",
                               poly_str(chi.conductor, G.F), L.degree, tuple(L.coefficient_strings()),
                               roots, rep, R.to_acb(wbar, prec)))
            N = L.norm_polynomial
            norm_rev = fmpz_poly(list(reversed(N.coeffs())))
            for a in roots:
                key = identify_root(a, norm_rev, prec)
                if root_kind(key, q) == "unit":
                    continue  # modulus 1: contributes o(1) after normalisation
                slot = acc.setdefault(key, [R.zero, [], a])
                slot[0] = slot[0] + wbar
                slot[1].append(chi.label())
    points = []
    for key, (aexact, labels, a) in acc.items():
        if aexact.is_zero():
            continue  # the weights cancel exactly on this root
        with workprec(prec):
            A = R.to_acb(aexact, prec)
            ball = key.ball(prec)
            kind = root_kind(key, q)
            if kind in ("plus", "minus"):
                x = arb(0) if kind == "plus" else arb(1) / 2
            else:
                p2 = prec
                while ball.imag.contains(0):
                    p2 *= 2
                    if p2 > 8192:
                        raise PrecisionExhausted("not certified: cannot separate a root from the real axis")
                    ball = key.ball(p2)
                if ball.imag < 0:
                    continue  # its conjugate carries the pair
                kind = "complex"
                x = ball.arg() / (2 * arb.pi())
        points.append(SpectralPoint(key, ball, kind, x, A, tuple(labels)))
    points.sort(key=lambda p: float(p.x.mid()))
    return points, c2, ldata


def limit_function(points: list[SpectralPoint], c2: int, q: int, mode: str, prec: int = 128):
    """(TrigFunction on T^(J+1), mu_0 k_0, mu_pi k_pi, list of complex points)."""
    with workprec(prec):
        sq = arb(q).sqrt()
        k0 = sq / (sq - 1) if mode == "cumulative" else arb(1)
        kpi = sq / (sq + 1) if mode == "cumulative" else arb(1)
        a_plus = sum((p.A.real for p in points if p.kind == "plus"), arb(0))
        a_minus = sum((p.A.real for p in points if p.kind == "minus"), arb(0))
        mu0 = (-a_plus - arb(c2) / 2) * k0
        mupi = (-a_minus - arb(c2) / 2) * kpi
        cpts = [p for p in points if p.kind == "complex"]
        terms = [(0, acb(mupi))]
        for i, p in enumerate(cpts, start=1):
            kap = acb(1)
            if mode == "cumulative":
                kap = acb(q) / (acb(q) - p.alpha.conjugate())
            terms.append((i, -2 * p.A * kap))
        return TrigFunction(mu0, tuple(terms)), mu0, mupi, cpts


# ---------------------------------------------------------------- exact series
def exact_race_values(G: CharacterGroup, wd: dict[int, int], n_max: int,
                      question: FFRaceQuestion | None = None) -> list[int]:
    """[R(n) for n = 1..n_max], exact integers by the explicit formula."""
    rc = race_counter(G, wd, question) if question is not None else RaceCounter(G, wd)
    return [v for _, v in rc.run(n_max)]


def empirical_frequency(values: list[int], mode: str, start: int = 1) -> Fraction:
    """Share of X in [start, len(values)] with R(X) > 0 (degree) or C(X) > 0 (cumulative)."""
    pos = 0
    tot = 0
    c = 0
    for n, v in enumerate(values, start=1):
        c += v
        if n >= start:
            tot += 1
            pos += (c if mode == "cumulative" else v) > 0
    return Fraction(pos, max(tot, 1))


@dataclass(frozen=True)
class LeaderReport:
    """From exact counts: which class leads (has the most primes) at each degree."""

    bound: int
    mode: str
    leaders: tuple[str, ...]  # per degree 1..bound; "tie" when several lead
    first_change: int | None  # first degree whose leader differs from the previous degree's
    degrees_led: dict

    def to_dict(self) -> dict:
        return {"bound": self.bound, "mode": self.mode, "first_leader_change": self.first_change,
                "degrees_led": {k: list(v) for k, v in self.degrees_led.items()},
                "leaders": list(self.leaders)}


def leader_report(G: CharacterGroup, classes: list[str], groups: list[dict], bound: int,
                  mode: str) -> LeaderReport:
    """Leaders per degree (prescribed degree or cumulative) from exact counts.

    ``groups[i]`` is {position: 1} for a single class, or several positions for a set
    of classes (their counts are added), named ``classes[i]``.
    """
    series = []
    for grp in groups:
        vals = [v for _, v in RaceCounter(G, grp).run(bound)]
        if mode == "cumulative":
            vals = list(np.cumsum(np.array(vals, dtype=object)))
        series.append(vals)
    leaders = []
    led = {c: [] for c in classes}
    for n in range(bound):
        col = [s[n] for s in series]
        top = max(col)
        who = [c for c, v in zip(classes, col) if v == top]
        if len(who) == 1:
            leaders.append(who[0])
            led[who[0]].append(n + 1)
        else:
            leaders.append("tie")
    return LeaderReport(bound, mode, tuple(leaders), _first_change(leaders), led)


def _first_change(leaders) -> int | None:
    """The first degree (1-based) whose leader differs from the previous non-tied leader."""
    prev = None
    for n, ld in enumerate(leaders, start=1):
        if ld == "tie":
            continue
        if prev is not None and ld != prev:
            return n
        prev = ld
    return None


def race_counter(G: CharacterGroup, wd: dict[int, int], question: FFRaceQuestion) -> RaceCounter:
    """The exact counter for a race (restricted to the quadratic characters for a residue race:
    w(c^r) depends only on r mod 2 there, and only characters of order <= 2 see w)."""
    if is_residue_race(question):
        return RaceCounter(G, wd, characters=quadratic_characters(G), period=2)
    return RaceCounter(G, wd)


def residue_leader_report(G: CharacterGroup, wd: dict[int, int], bound: int, mode: str) -> LeaderReport:
    """Leaders between non-residues and residues by the certified statistic: the sign of the
    weighted count R(n) = A pi(n; non-residues) - B pi(n; residues) (or of its cumulative sum),
    the same weighted race whose density is certified (A = #squares, B = #non-squares, divided by
    their gcd, so that each *class* weighs the same).  Raw counts of primes would favour the side
    with more classes."""
    rc = RaceCounter(G, wd, characters=quadratic_characters(G), period=2)
    names = ("non-residues", "residues")
    leaders, led = [], {n: [] for n in names}
    cum_r = 0
    for n, r in rc.run(bound):
        cum_r += r
        rr = cum_r if mode == "cumulative" else r
        if rr > 0:
            leaders.append(names[0]); led[names[0]].append(n)
        elif rr < 0:
            leaders.append(names[1]); led[names[1]].append(n)
        else:
            leaders.append("tie")
    return LeaderReport(bound, mode, tuple(leaders), _first_change(leaders), led)


# ---------------------------------------------------------------- certification
@dataclass(frozen=True, eq=False)
class FFRaceResult(NotebookDisplay):
    """Everything a certificate needs about one function-field race."""

    question: FFRaceQuestion
    case: str  # "LI" or "relations"
    density: Enclosure
    budget: tuple[ErrorTerm, ...]
    hypotheses: tuple[Hypothesis, ...]
    parameters: dict
    l_data: tuple[LData, ...]
    points: tuple[SpectralPoint, ...]
    relations: tuple[tuple[int, ...], ...]
    closure: OrbitClosure
    mu0: arb
    mupi: arb
    c2: int
    leaders: LeaderReport | None
    target_width: float
    timings: dict = field(default_factory=dict)
    caution: str = CAUTION

    @property
    def target_met(self) -> bool:
        return self.density.width <= Fraction(self.target_width)

    def to_dict(self) -> dict:
        d = self.density
        places = min(d.places(), 30)
        return {
            "question": {"q": self.question.q, "modulus": self.question.modulus,
                         "classes": list(self.question.classes),
                         "weights": list(self.question.weights), "mode": self.question.mode,
                         "label": self.question.label, "statement": self.question.statement},
            "case": self.case,
            "density": {"lower": d.lower_str(places), "upper": d.upper_str(places),
                        "width": d.width_text(), "certified_digits": d.digits(),
                        "target_width": f"{self.target_width:.0e}", "target_met": self.target_met},
            "hypotheses": [h.as_dict() for h in self.hypotheses],
            "error_budget": [e.as_dict() for e in self.budget],
            "parameters": self.parameters,
            "limit_function": {
                "mu_0": self.mu0.str(20, radius=True), "mu_pi": self.mupi.str(20, radius=True),
                "c_2": self.c2,
                "points": [{"kind": p.kind, "theta_over_2pi": p.x.str(20, radius=True),
                            "alpha": p.alpha.str(20, radius=True),
                            "minimal_polynomial": list(p.root.g), "root_index": p.root.index,
                            "coefficient_A": p.A.str(15, radius=True),
                            "characters": list(p.characters)} for p in self.points],
                "relations": [list(r) for r in self.relations],
                "orbit_closure": self.closure.describe(),
            },
            "l_polynomials": [{"character": L.character, "order": L.order, "parity": L.parity,
                               "conductor": L.conductor, "degree": L.degree,
                               "coefficients": list(L.coefficients),
                               "inverse_roots": [r.str(15, radius=True) for r in L.inverse_roots],
                               "weil_check": L.weil.describe(),
                               "weight": L.weight.str(12, radius=True)} for L in self.l_data],
            "leaders": self.leaders.to_dict() if self.leaders else None,
            "timings_seconds": self.timings,
            "caution": self.caution,
        }


_REF_WEIL = ("Weil's theorem (the Riemann hypothesis for curves over finite fields), as for "
             "Dirichlet L-functions of F_q[t] in Number Theory in Function Fields, "
             "GTM 210 (2002), ch. 4-5")


def is_residue_race(question: FFRaceQuestion) -> bool:
    return question.classes == ("non-residues", "residues")


def certify_ffrace(question: FFRaceQuestion, G: CharacterGroup, wd: dict[int, int],
                   target_width: float = 1e-10, prec: int = 160, leader_bound: int = 60,
                   max_boxes: int = 200000, coeff_bound: int = 60, max_confirm_bits: int = MAX_CONFIRM_BITS,
                   max_box_dim: int = 3, max_angles: int = 32, progress=None) -> FFRaceResult:
    """Certify the density of a function-field race (see the module docstring).

    ``progress`` (optional) is called with a one-line message before each stage that can take
    long (spectrum, relation search, density, leaders); the CLI prints them to stderr.
    """
    t0 = time.time()
    q = question.q
    # a residue race only sees the quadratic characters (docs/function_fields.md)
    cands = quadratic_characters(G) if is_residue_race(question) else None
    say = progress or (lambda msg: None)
    say(f"computing the L-polynomials and inverse roots of the characters that see the race "
        f"(group of order {G.order})")
    points, c2, ldata = race_spectrum(G, wd, prec, cands)
    t1 = time.time()
    Gf, mu0, mupi, cpts = limit_function(points, c2, q, question.mode, prec)
    J = len(cpts)
    # fake relations with entries <= B among J+1 numbers reach |k.x| ~ (2B+1)^-(J+1);
    # the acceptance threshold 2^(-rel_prec/3) must lie far below that
    rel_prec = max(2 * prec, int(3 * ((J + 1) * math.log2(2 * coeff_bound + 1) + 40)))
    with workprec(rel_prec + 64):
        xs = [arb(1) / 2] + [identify_x(p, rel_prec + 64) for p in cpts]
    if J > max_angles:
        raise PrecisionExhausted(
            f"not certified: the race sees {J} distinct angles in (0, pi) (from {len(ldata)} L-polynomials); "
            f"the relation search that decides between the LI case and the relation case (LLL in dimension "
            f"{J + 2} at {rel_prec} bits) is limited to {max_angles} angles in this tool. Large Galois orbits "
            "of characters cause this; a smaller modulus, a residue race (--residues) or a larger field "
            "with fewer characters may stay within the limit")
    if J:
        say(f"{len(ldata)} L-polynomials, {J} angles in (0, pi) ({t1 - t0:.1f} s); searching integer "
            f"relations by LLL in dimension {J + 2} at {rel_prec} bits")
    cands = find_relations(xs, coeff_bound=coeff_bound, prec=rel_prec) if J else []
    confirmed = []
    unconfirmed = []
    refuted = 0
    roots = [p.root for p in cpts]
    if any(any(k[1:]) for k in cands):
        from flint import fmpz_mat as _fm
        rank = _fm([[2] + [0] * J] + [list(k) for k in cands]).rank()
        if J + 1 - rank > max_box_dim:
            raise PrecisionExhausted(
                f"not certified: {J} angles in (0, pi) and LLL suggests {len(cands)} relation(s) among them; "
                f"even if every one holds, the orbit closure has dimension {J + 1 - rank}, and box "
                f"subdivision (the method for the relation case) is limited to dimension <= {max_box_dim}; "
                "the LI engine does not apply since the angles are not independent")
        say(f"confirming {len(cands)} candidate relation(s) among {J} angles exactly "
                 f"(separation bound for algebraic integers, at most {max_confirm_bits} bits)")
    for k in cands:
        if not any(k[1:]):
            continue
        par = confirm_relation(roots, k, q, prec=prec, max_bits=max_confirm_bits)
        if par is None:
            unconfirmed.append(k)
            break  # one undecided candidate already stops the certification
        elif par == REFUTED:
            refuted += 1  # proved false exactly: not a relation, nothing to use
        else:
            confirmed.append([par] + list(k[1:]))
    if unconfirmed:
        raise PrecisionExhausted(
            f"not certified: {len(unconfirmed)} candidate relation(s) among the angles could not be "
            f"confirmed or refuted exactly within {max_confirm_bits} bits (the separation bound needs "
            f"about (D - 1)(1 + S log2 q) bits, D the product of the minimal polynomials' degrees) "
            f"(first: {unconfirmed[0]}, degrees of the minimal polynomials involved: "
            f"{[r.poly().degree() for r, kj in zip(roots, unconfirmed[0][1:]) if kj]})")
    rows = [[2] + [0] * J] + confirmed
    if confirmed:
        # a reduced basis (Hermite form) of the relation lattice, for the report
        from flint import fmpz_mat
        Hn = fmpz_mat(rows).hnf()
        rows = [[int(Hn[i, j]) for j in range(J + 1)] for i in range(Hn.nrows())]
        rows = [r for r in rows if any(r)]
        confirmed = [r for r in rows if any(r[1:])]
    H = orbit_closure(rows, J + 1)
    coset = vanishing_coset(Gf, H, prec)
    if coset is not None:
        raise PrecisionExhausted(
            f"not certified: the limit function vanishes identically on the coset {list(coset)} of the "
            f"orbit closure ({H.describe()}), i.e. on a progression of X, so the sign there is decided by "
            "lower-order terms")
    t2 = time.time()
    budget = []
    params = {"q": q, "modulus": question.modulus, "mode": question.mode,
              "classes": list(question.classes), "weights": list(question.weights),
              "group": G.describe(), "characters_used": len(ldata),
              "spectral_points": len(points), "angles_J": J,
              "relation_search": {"method": "LLL on [I | round(C x)] with x_0 = 1/2",
                                  "precision_bits": rel_prec, "coefficient_bound": coeff_bound},
              "working_precision_bits": prec}
    case = "relations" if confirmed else ("LI" if J else "no angles")
    method = None
    enclosure = None
    if case == "LI" and J >= 2:
        try:
            from ..density.bessel import BesselVariable, density_enclosure
            halves = []
            for eps in (1, -1):
                with workprec(prec):
                    var = BesselVariable(mu0 + eps * mupi, tuple(abs(B) for _, B in Gf.terms[1:]))
                halves.append(density_enclosure(var, target_width))
            lo = (halves[0].enclosure.lower + halves[1].enclosure.lower) / 2
            hi = (halves[0].enclosure.upper + halves[1].enclosure.upper) / 2
            enclosure = Enclosure(lo, hi)
            for tag, h in zip(("X even", "X odd"), halves):
                for e in h.budget:
                    budget.append(ErrorTerm(f"{e.name} ({tag})", e.bound / 2, e.description))
            method = "density engine (Bessel product), averaged over the parity of X"
            params["engine"] = [h.parameters for h in halves]
        except (ImportError, PrecisionExhausted) as exc:
            params["engine_failure"] = str(exc)
            enclosure = None
    if enclosure is None and case == "relations" and H.dim > max_box_dim:
        raise PrecisionExhausted(
            f"not certified: the angles satisfy {len(confirmed)} independent relation(s) (confirmed exactly), "
            f"so the orbit closure is {H.describe()}; box subdivision, the method for the relation case, "
            f"is limited to closures of dimension <= {max_box_dim} (the number of boxes grows like "
            f"2^(dimension x levels)), and this one has dimension {H.dim}")
    if enclosure is None:
        say(f"box subdivision on the orbit closure ({H.describe()}), at most {max_boxes} boxes")
        lo, hi, und, boxes = density_on_closure(Gf, H, target_width, max_boxes=max_boxes)
        enclosure = Enclosure(lo, hi)
        with workprec(64):
            budget.append(ErrorTerm("undecided volume", arb(und.numerator) / und.denominator,
                                    "Haar measure of the boxes of the orbit closure where the "
                                    "interval enclosure of the limit function contains 0"))
        method = "interval box subdivision on the orbit closure"
        params["boxes"] = boxes
    params["method"] = method
    t3 = time.time()
    hyps = [Hypothesis("Weil", "Every inverse root of L(u, chi) has modulus sqrt(q) or 1 "
                       "(the Riemann hypothesis for curves over finite fields).", "theorem",
                       tuple(evidence_sentence(k, d) for k, d in weil_evidence(ldata)),
                       _REF_WEIL)]
    ev = [evidence_sentence(k, d) for k, d in search_evidence(rel_prec, coeff_bound, confirmed)]
    if case == "no angles":
        pass  # the limit function depends on the parity of X only: nothing to assume
    elif case == "LI":
        hyps.append(Hypothesis(
            "LI", f"The numbers pi, theta_1, ..., theta_{J} (arguments in (0, pi) of the distinct "
            "inverse roots of modulus sqrt(q), one per conjugate pair) are linearly independent "
            "over Q.", "assumed", tuple(ev)))
    else:
        hyps.append(Hypothesis(
            "relations", "Every Q-linear relation among pi, theta_1, ..., theta_" + str(J)
            + " follows from the listed relations (confirmed exactly).", "assumed",
            tuple([evidence_sentence("relations-confirmed", {"relations": confirmed})] + ev)))
    leaders = None
    if leader_bound:
        say(f"exact prime counts to degree {leader_bound} for the leaders")
        if len(question.classes) == len(wd):
            groups = [{p: 1} for p in wd]
            leaders = leader_report(G, list(question.classes), groups, leader_bound, question.mode)
        else:
            leaders = residue_leader_report(G, wd, leader_bound, question.mode)
    t4 = time.time()
    return FFRaceResult(
        question, case, enclosure, tuple(budget), tuple(hyps), params, tuple(ldata),
        tuple(points), tuple(tuple(r) for r in confirmed), H, mu0, mupi, c2, leaders,
        target_width, {"spectrum": t1 - t0, "relations": t2 - t1, "density": t3 - t2,
                       "leaders": t4 - t3, "total": t4 - t0})


# -- evidence for the hypotheses: (kind, data) items, their sentences generated from the data
# (the certificate stores the items; ``certify verify`` regenerates each sentence and re-derives
# the data, see certify/certificate/ffield.py)

SEARCH_CAVEAT = "the search is evidence only: a relation with larger coefficients is not excluded"


def weil_evidence(ldata) -> list[tuple[str, dict]]:
    """One ``weil-check`` item per L-polynomial: its exact coefficients and the root census."""
    return [("weil-check", {"character": L.character, "coefficients": list(L.coefficients),
                            "degree": L.weil.degree, "expected_degree": L.weil.expected_degree,
                            "roots_modulus_sqrt_q": L.weil.n_sqrt_q, "roots_modulus_1": L.weil.n_unit,
                            "expected_modulus_1": L.weil.expected_unit,
                            "undecided": L.weil.undecided})
            for L in ldata]


def search_evidence(rel_prec: int, coeff_bound: int, confirmed) -> list[tuple[str, dict]]:
    """The relation search (LLL) and its caveat, as evidence items."""
    return [("relation-search", {"precision_bits": int(rel_prec), "coefficient_bound": int(coeff_bound),
                                 "relations": [list(map(int, r)) for r in confirmed]}),
            ("search-caveat", {"coefficient_bound": int(coeff_bound)})]


def _relation_text(r) -> str:
    return (" + ".join(f"{k}*{'pi' if i == 0 else f'theta_{i}'}" for i, k in enumerate(r) if k)
            + " = 0 mod 2 pi")


def evidence_sentence(kind: str, data: dict) -> str:
    """The sentence of an evidence item, generated from its data alone (KeyError if unknown)."""
    if kind == "weil-check":
        return (f"L(u, {data['character']}): degree {data['degree']} (expected "
                f"{data['expected_degree']}); {data['roots_modulus_sqrt_q']} roots of modulus "
                f"sqrt(q), {data['roots_modulus_1']} of modulus 1 (expected "
                f"{data['expected_modulus_1']}); {data['undecided']} undecided")
    if kind == "relation-search":
        return (f"LLL at {data['precision_bits']} bits found no relation with coefficients <= "
                f"{data['coefficient_bound']} other than those listed"
                + (" (none)" if not data["relations"] else ""))
    if kind == "search-caveat":
        return SEARCH_CAVEAT
    if kind == "relations-confirmed":
        return ("confirmed exactly (separation bound for algebraic integers and ball sign): "
                + "; ".join(_relation_text(r) for r in data["relations"]))
    raise KeyError(f"unknown evidence kind {kind!r}")


def identify_x(p: SpectralPoint, prec: int) -> arb:
    """theta / 2 pi of a complex point at ``prec`` bits (from the exact root)."""
    with workprec(prec):
        return p.root.ball(prec).arg() / (2 * arb.pi())
