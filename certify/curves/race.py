"""The trace race of a curve over F_q(t): the sign of the normalised sum of a_v.

For X >= 1 put

    T(X) = sum_{v good, deg v <= X} a_v / q^(deg v / 2)          (cumulative race)
    A(n) = sum_{v good, deg v  = n} a_v                          (degree-n race)

and write the inverse roots of L(E, u) as gamma_j = q e^(i theta_j).  The explicit
formula (docs/elliptic_curves.md) gives, as X, n -> infinity,

    (X / q^(X/2)) T(X) = mu_cum(X)  - sum_j Re[ e^(i X theta_j) / (1 - e^(-i theta_j) / sqrt q) ] + o(1),
    (n / q^n)     A(n) = [n even]   - sum_j cos(n theta_j) + o(1),

with the prime-square term mu_cum(X) = q/(q-1) for X even and sqrt q/(q-1) for X odd.
Roots with gamma_j / q a root of unity (the rank's roots gamma = q among them) give
a term periodic in X; the others, under LI, behave like independent uniform phases.
The natural density of {X : T(X) > 0} is then the average over X mod P of
P(mu_r + sum_k w_k cos Theta_k > 0), computed by the shared density engine.
"""

from __future__ import annotations

from ..result import NotebookDisplay

import math
from dataclasses import dataclass, field
from fractions import Fraction

from flint import fmpz_mat

from ..arith import acb, arb, fmpq, lower_fraction, sci_text, workprec
from ..density.bessel import BesselVariable, density_enclosure
from ..errors import BadInput, Inconsistent, PrecisionExhausted
from ..result import CAUTION, DensityEnclosure, Enclosure, ErrorTerm, Hypothesis
from .lpoly import LPolynomial
from .model import EllipticCurve
from .traces import degree_data

__all__ = ["RaceVariable", "TraceRaceResult", "race_variable", "relation_search", "trace_race",
           "observed_race", "MODES"]

MODES = ("cumulative", "degree")

#: Largest working precision (bits) for the exact confirmation of a relation among the angles
#: (certify.ffield.torus.confirm_relation: a separation bound for algebraic integers); beyond it
#: the race is not certified.  Nothing is ever kept on numerical evidence alone.
EXACT_RELATION_BITS = 16_384


@dataclass(frozen=True)
class RaceVariable:
    """The limit law: X = mu[r] + sum_k weights[k] cos Theta_k on the progression X = r mod period."""

    mode: str
    period: int
    mu: tuple[arb, ...]
    weights: tuple[arb, ...]
    angles: tuple[arb, ...]          # theta_k in (0, pi), one per weight (non-torsion roots)
    multiplicities: tuple[int, ...]
    torsion: tuple[tuple[int, int], ...]   # (order m, multiplicity) of each torsion representative


def _lcm(a: int, b: int) -> int:
    return a * b // math.gcd(a, b)


def race_variable(L: LPolynomial, mode: str, prec: int = 128) -> RaceVariable:
    """Mean (periodic in X) and weights of the limit law of the normalised trace race."""
    if mode not in MODES:
        raise BadInput(f"race mode must be one of {', '.join(MODES)}, not {mode!r}")
    q = L.q
    period = 2
    for r in L.roots:
        if r.torsion_order:
            period = _lcm(period, r.torsion_order)
    with workprec(prec):
        sq = arb(q).sqrt()
        mus = []
        for res in range(period):
            if mode == "cumulative":
                m = arb(q) / (q - 1) if res % 2 == 0 else sq / (q - 1)
            else:
                m = arb(1) if res % 2 == 0 else arb(0)
            for r in L.roots:
                if not r.torsion_order:
                    continue
                # r.kind is decided exactly from the factor (lpoly.root_kind): a real root
                # (+q or -q) has no conjugate partner and is counted once
                if r.kind == "plus":
                    zeta = acb(1)
                elif r.kind == "minus":
                    zeta = acb(-1)
                else:
                    zeta = (acb(0, r.angle)).exp()
                term = zeta**res
                if mode == "cumulative":
                    term = term / (1 - zeta.conjugate() / sq)
                contrib = term.real if r.is_real else 2 * term.real
                m = m - r.multiplicity * contrib
            mus.append(m)
        weights, angles, mults = [], [], []
        for r in L.roots:
            if r.torsion_order:
                continue
            if r.is_real:  # pragma: no cover - +-q are torsion (orders 1, 2) by construction
                raise Inconsistent("a real inverse root was not recognised as torsion")
            if mode == "cumulative":
                w = 2 / abs(1 - (acb(0, -r.angle)).exp() / sq)
            else:
                w = arb(2)
            weights.append(r.multiplicity * w)
            angles.append(r.angle)
            mults.append(r.multiplicity)
    tors = tuple((r.torsion_order, r.multiplicity) for r in L.roots if r.torsion_order)
    return RaceVariable(mode, period, tuple(mus), tuple(weights), tuple(angles), tuple(mults), tors)


def relation_search(angles: list[arb], prec: int = 256) -> tuple[list[list[int]], arb | None]:
    """Search integer relations k_0 + sum_j k_j theta_j / (2 pi) = 0 by LLL.

    Returns (candidates, bound): candidate relation vectors (k_0, k_1, ..) whose
    residual is tiny, and, when none is found, a certified lower bound on the
    Euclidean norm of any integer relation: for the lattice with rows
    (e_j, round(C x_j)) and any basis, the shortest vector is at least the least
    Gram-Schmidt norm, and an exact relation k gives a vector of norm at most
    |k| sqrt(1 + n (1/2 + C r)^2) (r bounds the radii of the x_j).
    """
    n = len(angles) + 1
    if len(angles) == 0:
        return [], None
    with workprec(prec + 32):
        xs = [arb(1)] + [a / (2 * arb.pi()) for a in angles]
        rad = max(float(arb(x.rad()).upper()) for x in xs)
        C = 2 ** max(8, min(prec // 2, int(-math.log2(rad + 2.0**-prec)) - 8))
        rows = []
        for j, x in enumerate(xs):
            row = [0] * (n + 1)
            row[j] = 1
            row[n] = int((x * C).mid().floor().unique_fmpz()) if j else C
            rows.append(row)
    B = fmpz_mat(rows).lll()
    cands = []
    for i in range(B.nrows()):
        k = [int(B[i, j]) for j in range(n)]
        resid = int(B[i, n])
        if any(k) and abs(resid) <= 2 * n * (sum(abs(v) for v in k) + 1) and max(abs(v) for v in k) < 10**4:
            with workprec(prec):
                s = sum((arb(v) * x for v, x in zip(k, xs)), arb(0))
            if s.contains(0):
                cands.append(k)
    if cands:
        return cands, None
    # exact Gram-Schmidt norms of the reduced basis
    Bq = [[fmpq(int(B[i, j])) for j in range(n + 1)] for i in range(B.nrows())]
    gs: list[list] = []
    norms = []
    for v in Bq:
        w = list(v)
        for u, un in zip(gs, norms):
            mu = sum((a * b for a, b in zip(v, u)), fmpq(0)) / un
            w = [a - mu * b for a, b in zip(w, u)]
        nn = sum((a * a for a in w), fmpq(0))
        gs.append(w)
        norms.append(nn)
    lam2 = min(norms)
    with workprec(prec):
        lam = (arb(lam2.p) / arb(lam2.q)).sqrt()
        factor = (1 + n * (arb(1) / 2 + C * arb(rad)) ** 2).sqrt()
        bound = lam / factor
    return [], arb(bound.lower())


def _places(d: Enclosure) -> int:
    """Decimal places to print: enough for the width, 12 for an exact value, at most 40."""
    if d.width == 0:
        return 12
    return min(max(d.places(), 6), 40)


def _single_cosine(mu: arb, w: arb) -> Enclosure:
    """P(mu + w cos Theta > 0) = arccos(-mu/w)/pi (clipped to [0, 1]), enclosed."""
    c = -mu / w
    lo_c, hi_c = arb(c.lower()), arb(c.upper())

    def f(x: arb) -> arb:
        if x >= 1:
            return arb(0)
        if x <= -1:
            return arb(1)
        if not (x > -1 and x < 1):
            return arb(0).union(arb(1))
        return x.acos() / arb.pi()

    # decreasing in c: the value at the upper end is the lower bound
    lo, hi = f(hi_c), f(lo_c)
    return Enclosure.from_arb(lo.union(hi))


def _width_floor(k: int, target: float) -> float:
    """The characteristic function decays like xi^(-k/2): three weights need a wider target.

    One and two weights are handled by closed form / rigorous quadrature in the engine.
    """
    floor = {3: 1e-6}.get(k, 0.0)
    return max(target, floor)


@dataclass(frozen=True)
class TraceRaceResult(NotebookDisplay):
    """Everything a certificate for a curve's trace race needs."""

    curve: EllipticCurve
        # the curve's data are in curve.as_dict()
    lpoly: LPolynomial
    mode: str
    variable: RaceVariable
    density: Enclosure
    per_residue: tuple[Enclosure, ...]
    budget: tuple[ErrorTerm, ...]
    hypotheses: tuple[Hypothesis, ...]
    parameters: dict
    relation_bound: arb | None
    observed: tuple[dict, ...] = field(default=())
    caution: str = CAUTION
    #: {hypothesis name: ((kind, data), ...)}: the evidence as data, each sentence generated
    #: from its data by :func:`evidence_sentence` (certificates store the items)
    evidence: dict = field(default_factory=dict)

    @property
    def rank(self) -> int:
        return self.lpoly.rank

    def mean(self) -> arb:
        """The mean of the limit law, averaged over X mod period."""
        s = arb(0)
        for m in self.variable.mu:
            s += m
        return s / self.variable.period

    def statement(self) -> str:
        if self.mode == "cumulative":
            return ("natural density of the X >= 1 with sum over good places v of degree <= X of "
                    "a_v / q^(deg v / 2) > 0")
        return "natural density of the n >= 1 with sum over good places v of degree exactly n of a_v > 0"

    def to_dict(self) -> dict:
        """A JSON-ready dictionary (decimal strings rounded outward)."""
        d = self.density
        places = _places(d)
        var = self.variable
        return {
            "question": {"kind": f"elliptic-curve trace race ({self.mode})", "statement": self.statement(),
                         "curve": self.curve.describe()},
            "density": {
                "lower": d.lower_str(places), "upper": d.upper_str(places),
                "width": d.width_text(), "certified_digits": d.digits()[:40],
                **({"exact": f"{d.lower.numerator}/{d.lower.denominator}"} if d.width == 0 else {}),
            },
            "mean": {"averaged": self.mean().str(15, radius=True),
                     "by_residue": [m.str(15, radius=True) for m in var.mu], "period": var.period},
            "weights": [w.str(15, radius=True) for w in var.weights],
            "per_residue_density": [{"residue": i, "lower": e.lower_str(places), "upper": e.upper_str(places)}
                                    for i, e in enumerate(self.per_residue)],
            "curve": self.curve.as_dict(),
            "l_polynomial": self.lpoly.as_dict(),
            "analytic_rank": self.lpoly.rank,
            "hypotheses": [h.as_dict() for h in self.hypotheses],
            "error_budget": [e.as_dict() for e in self.budget],
            "parameters": self.parameters,
            "observed": list(self.observed),
            "caution": self.caution,
        }


def _combine(encs: list[DensityEnclosure | Enclosure]) -> tuple[Enclosure, tuple[ErrorTerm, ...]]:
    P = len(encs)
    lo = sum((e.enclosure.lower if isinstance(e, DensityEnclosure) else e.lower for e in encs), Fraction(0)) / P
    hi = sum((e.enclosure.upper if isinstance(e, DensityEnclosure) else e.upper for e in encs), Fraction(0)) / P
    terms: dict[str, list] = {}
    desc: dict[str, str] = {}
    for e in encs:
        if isinstance(e, DensityEnclosure):
            for t in e.budget:
                terms.setdefault(t.name, []).append(t.bound)
                desc[t.name] = t.description
    budget = []
    for name, bs in terms.items():
        s = arb(0)
        for b in bs:
            s += b
        budget.append(ErrorTerm(name, arb((s / P).upper()), desc[name] + f" (averaged over {P} residue classes of X)"))
    return Enclosure(lo, hi), tuple(budget)


def observed_race(E: EllipticCurve, L: LPolynomial, var: RaceVariable, x_max: int, prec: int = 128) -> tuple[dict, ...]:
    """Exact trace sums for X <= x_max, the normalised value and the limit formula's value."""
    q = E.q
    out = []
    with workprec(prec):
        sq = arb(q).sqrt()
        total = arb(0)
        for X in range(1, x_max + 1):
            d = degree_data(E, X)
            a_sum = d.good_place_sum
            total += arb(a_sum) / sq**X
            if var.mode == "cumulative":
                val = total * X / sq**X
            else:
                val = arb(a_sum) * X / arb(q) ** X
            pred = var.mu[X % var.period]
            for w, th in zip(var.weights, var.angles):
                if var.mode == "cumulative":
                    z = (acb(0, X * th)).exp() / (1 - (acb(0, -th)).exp() / sq)
                    pred = pred - 2 * (w / (2 / abs(1 - (acb(0, -th)).exp() / sq))) * z.real
                else:
                    pred = pred - w * (X * th).cos()
            out.append({"X": X, "good_trace_sum_degree_X": a_sum, "places": d.good_place_count,
                        "normalised": float(val.mid()), "limit_formula": float(pred.mid())})
    return tuple(out)


def trace_race(E: EllipticCurve, L: LPolynomial, mode: str = "cumulative", target_width: float = 1e-8,
               prec: int = 128, observe: int = 0, max_boxes: int = 100_000) -> TraceRaceResult:
    """Certified natural density of {X : the normalised trace sum is > 0}.

    Parameters
    ----------
    E, L : the curve and its L-polynomial (:func:`certify.curves.lpoly.l_polynomial`).
    mode : "cumulative" (good places of degree <= X) or "degree" (degree exactly X).
    target_width : the density engine's target width for each residue class of X.
    observe : if > 0, also list the exact sums for X <= observe (point counts).
    max_boxes : box budget per residue class when the angles satisfy integer relations.
    """
    if not (0 < target_width < 1):
        raise BadInput("the target width must lie in (0, 1)")
    var = race_variable(L, mode, prec)
    k = len(var.weights)
    rel_bound = None
    ev = base_evidence(L)
    hyps = [
        Hypothesis(
            "RH for L(E,u)", "every inverse root of L(E, u) has absolute value q",
            "theorem", _sentences(ev["RH for L(E,u)"]),
            "La conjecture de Weil II, Publ. Math. IHES 52 (1980)"),
        Hypothesis(
            "Degree and functional equation",
            f"L(E, u) has degree deg N - 4 = {L.degree} and satisfies L(u) = eps (qu)^N' L(1/(q^2 u))",
            "theorem", _sentences(ev["Degree and functional equation"]),
            "Formule de Lefschetz et rationalité des fonctions L, Sém. Bourbaki 279 (1965); "
            "Caractéristique d'Euler-Poincaré d'un faisceau, Sém. Bourbaki 286 (1965)"),
        Hypothesis(
            "Weight bound for Sym^2", "the Sym^2 trace sums over places of degree m are O(q^(3m/2))",
            "theorem", _sentences(ev["Weight bound for Sym^2"]),
            "La conjecture de Weil II, Publ. Math. IHES 52 (1980)"),
    ]
    if k == 0:
        encs = []
        for res, m in enumerate(var.mu):
            if m > 0:
                encs.append(Enclosure(Fraction(1), Fraction(1)))
            elif m < 0:
                encs.append(Enclosure(Fraction(0), Fraction(0)))
            else:
                raise PrecisionExhausted(
                    f"not certified: the limit of the normalised sum is 0 on the progression "
                    f"X = {res} mod {var.period} (every inverse root is q times a root of unity), "
                    "so its sign there is decided by lower-order terms")
        ev["LI"] = (("torsion-only", {"period": var.period}),)
        hyps.append(Hypothesis("LI", "no non-torsion inverse roots: nothing to assume", "verified",
                               _sentences(ev["LI"])))
        dens, budget = _combine(encs)
        params = {"engine": "exact (periodic limit)", "period": var.period}
    else:
        cands, rel_bound = relation_search(list(var.angles), prec=max(256, 2 * prec))
        if cands:
            return _relation_case(E, L, var, mode, target_width, prec, hyps, max_boxes, observe, ev)
        ev["LI"] = (("relation-search", {"angles": k,
                                         "norm_lower_bound": sci_text(lower_fraction(rel_bound), 4,
                                                                      up=False)}),
                    ("torsion-roots", {"representatives": len(var.torsion), "period": var.period}))
        hyps.append(Hypothesis(
            "LI", f"the numbers 1, theta_1/2pi, ..., theta_{k}/2pi of the {k} non-torsion angles are "
            "linearly independent over Q",
            "assumed", _sentences(ev["LI"])))
        width = _width_floor(k, target_width)
        encs = []
        cache: dict = {}
        for m in var.mu:
            key = (str(m.mid()), str(m.rad()))
            if key not in cache:
                if k == 1:
                    cache[key] = _single_cosine(m, var.weights[0])
                else:
                    cache[key] = density_enclosure(BesselVariable(m, var.weights), width)
            encs.append(cache[key])
        dens, budget = _combine(encs)
        params = {"engine": "closed form arccos" if k == 1 else "certify.density.bessel.density_enclosure",
                  "period": var.period, "target_width_per_class": width, "non_torsion_angles": k}
        if k > 1:
            params["engine_parameters"] = [e.parameters for e in encs[:1]]
    per = tuple(e.enclosure if isinstance(e, DensityEnclosure) else e for e in encs)
    params.update({"mode": mode, "prec": prec, "q": E.q, "l_degree": L.degree, "rank": L.rank})
    obs = observed_race(E, L, var, observe, prec) if observe > 0 else ()
    return TraceRaceResult(E, L, mode, var, dens, per, budget, tuple(hyps), params, rel_bound, obs,
                           evidence=ev)


# -- evidence: (kind, data) items; each sentence is generated from its data alone, so that
# ``certify verify`` can regenerate it (certify/certificate/curves.py re-derives the data)

def base_evidence(L) -> dict:
    """The evidence of the three theorems a curve race uses, from its L-polynomial."""
    c = list(L.frobenius_sums[1:])
    return {
        "RH for L(E,u)": (("inverse-roots", {
            "degree": L.degree, "coefficients": [int(x) for x in L.coeffs],
            "max_modulus_error": sci_text(Fraction(L.max_modulus_error), 3, up=True)}),),
        "Degree and functional equation": (("point-counts", {
            "degree": L.degree, "sign": L.sign, "degrees_used": L.degrees_used,
            "degrees_confirmed": list(L.degrees_confirmed),
            "frobenius_sums": [int(x) for x in c]}),),
        "Weight bound for Sym^2": (("usage-note", {"term": "prime squares"}),),
    }


def evidence_sentence(kind: str, d: dict) -> str:
    """The sentence of an evidence item, from its data alone (KeyError for an unknown kind)."""
    if kind == "inverse-roots":
        return (f"all {d['degree']} inverse roots enclosed by Arb; ||gamma| - q| <= "
                f"{d['max_modulus_error']} for each")
    if kind == "point-counts":
        return (f"eps = {d['sign']:+d} read from point counts of degrees <= {d['degrees_used']}; "
                f"confirmed by the exact point counts of degrees {list(d['degrees_confirmed'])}")
    if kind == "usage-note" and d == {"term": "prime squares"}:
        return "used only for the prime-square term's limit (`docs/elliptic_curves.md`)"
    if kind == "torsion-only":
        return ("every inverse root is q times a root of unity (exact cyclotomic factors; "
                f"period {d['period']} in X)")
    if kind == "relation-search":
        return (f"LLL on {d['angles']} angles found no relation; any integer relation has "
                f"Euclidean norm >= {d['norm_lower_bound']} (certified from exact Gram-Schmidt norms)")
    if kind == "torsion-roots":
        return (f"{d['representatives']} torsion root representative(s) handled exactly "
                f"(period {d['period']} in X)")
    if kind == "relations-confirmed":
        return (f"all {len(d['relations'])} relation(s) confirmed exactly (separation bound for "
                "algebraic integers: prod (gamma_j/q)^(P k_j) = 1)")
    if kind == "orbit-closure":
        return f"orbit closure: {d['description']}"
    if kind == "no-further-relation":
        return f"LLL found no further short relation among the {d['angles']} angles"
    raise KeyError(f"unknown evidence kind {kind!r}")


def _sentences(items) -> tuple:
    return tuple(evidence_sentence(k, d) for k, d in items)


def _relation_case(E, L, var, mode, target_width, prec, hyps, max_boxes, observe,
                   ev=None) -> TraceRaceResult:
    """The angles satisfy integer relations: the density on the orbit closure, by box subdivision.

    With P the period, X = r + P s and y_j = P theta_j / 2 pi, the orbit {s y} fills the
    closed subgroup H cut out by the integer relations among 1/P, x_1, .., x_J (found by
    LLL, each confirmed exactly: prod (gamma_j/q)^(P k_j) = 1 by a separation bound), and on the
    class r the limit function is G_r(y) = mu_r + sum_j Re(B_j e^(2 pi i (r x_j + y_j))).
    The natural density along the class lies between the Haar measures of {G_r > 0} and
    {G_r >= 0} on H (equidistribution on H, portmanteau); box subdivision encloses both.
    """
    from flint import fmpz_poly

    from ..ffield.torus import (TrigFunction, confirm_relation, density_on_closure, find_relations,
                                identify_root, orbit_closure, vanishing_coset)

    q = L.q
    P = var.period
    J = len(var.angles)
    nt = [r for r in L.roots if not r.torsion_order]
    with workprec(max(256, 2 * prec)):
        xs = [a / (2 * arb.pi()) for a in var.angles]
        cands = find_relations([arb(1) / P] + xs, coeff_bound=60, prec=256)
    if not cands:
        raise PrecisionExhausted("not certified: a relation among the angles was suggested but not reproduced")
    rev = fmpz_poly(list(reversed(L.coeffs)))
    exact = [identify_root(r.gamma, rev) for r in nt]
    rels = []
    for k in cands:
        if not any(k[1:]):
            continue  # k_0 alone: P * (1/P) is an integer, no information on the angles
        kk = [0] + [P * kj for kj in k[1:]]
        verdict = confirm_relation(exact, kk, q * q, max_bits=EXACT_RELATION_BITS)
        if verdict is None:
            raise PrecisionExhausted(
                f"not certified: the candidate relation {k} among the angles could not be confirmed or "
                f"refuted exactly within {EXACT_RELATION_BITS} bits (minimal "
                f"polynomials of degrees {[ex.poly().degree() for ex, kj in zip(exact, k[1:]) if kj]})")
        if verdict != 0:
            # REFUTED (prod (gamma_j/q)^(P k_j) != +-1) or = -1: k is not a relation of 1/P, x_1, ..
            raise PrecisionExhausted(f"not certified: the candidate relation {k} among the angles is false "
                                     "(exact), although LLL found it numerically")
        rels.append(list(k[1:]))
    H = orbit_closure(rels, J)
    encs = []
    und_total = Fraction(0)
    boxes_total = 0
    with workprec(prec):
        sq = arb(q).sqrt()
        Bs = []
        for r in nt:
            if mode == "cumulative":
                B = -2 * r.multiplicity / (1 - (acb(0, -r.angle)).exp() / sq)
            else:
                B = acb(-2 * r.multiplicity)
            Bs.append(B)
        for res in range(P):
            terms = tuple((j, Bs[j] * (acb(0, res * nt[j].angle)).exp()) for j in range(J))
            G = TrigFunction(var.mu[res], terms)
            coset = vanishing_coset(G, H, prec=max(96, prec))
            if coset is not None:
                raise PrecisionExhausted(
                    f"not certified: the limit function vanishes identically on the progression X = {res} "
                    f"mod {P} restricted to the coset {list(coset)} of the orbit closure ({H.describe()}), "
                    "so the sign there is decided by lower-order terms")
            lo, hi, und, boxes = density_on_closure(G, H, target_width, max_boxes=max_boxes, prec=max(96, prec))
            encs.append(Enclosure(Fraction(lo), Fraction(hi)))
            und_total += Fraction(und)
            boxes_total += boxes
    dens, _ = _combine(encs)
    und_avg = und_total / P
    budget = (ErrorTerm("undecided volume", arb(float(und_avg)) + arb(0, 1e-15) if und_avg else arb(0),
                        "Haar measure of the boxes of the orbit closure where the sign of the limit "
                        "function was not decided (averaged over the residue classes of X)"),)
    ev = dict(ev if ev is not None else base_evidence(L))
    ev["Relations among the angles"] = (("relations-confirmed", {"relations": [list(r) for r in rels]}),
                                        ("orbit-closure", {"description": H.describe()}),
                                        ("no-further-relation", {"angles": J}))
    hyps.append(Hypothesis(
        "Relations among the angles", f"the integer relations among 1/{P}, theta_1/2pi, ..., theta_{J}/2pi are "
        f"generated by the {len(rels)} relation(s) {rels}", "assumed",
        _sentences(ev["Relations among the angles"])))
    params = {"engine": "box subdivision on the orbit closure (certify.ffield.torus)", "period": P,
              "relations": rels, "relations_confirmed_exactly": True, "orbit_closure": H.describe(), "boxes": boxes_total,
              "max_boxes_per_class": max_boxes, "non_torsion_angles": J,
              "mode": mode, "prec": prec, "q": q, "l_degree": L.degree, "rank": L.rank}
    obs = observed_race(E, L, var, observe, prec) if observe > 0 else ()
    return TraceRaceResult(E, L, mode, var, dens, tuple(encs), budget, tuple(hyps), params, None, obs,
                           evidence=ev)
