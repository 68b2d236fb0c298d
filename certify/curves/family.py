"""Quadratic-twist families E_f : y^2 = x^3 + A f^2 x + B f^3 over F_{q^n}(t).

f runs over the monic square-free polynomials of degree d over F_{q^n} that are
coprime to the discriminant of E (the whole family, or a seeded random sample
of a stated size).  For each member the L-polynomial and the certified density
of its trace race are computed; the family's distribution of densities is
summarised by its mean (a certified interval: the mean of the enclosures), its
spread, the share of members within c/d of 1/2 (certain in, certain out, or
undecided by the enclosures), a histogram and a table.

Point counts of the twists come from one table per field: at theta with
f(theta) != 0 the twisted residue curve is the twist of E's by f(theta), so

    T_{E_f}(theta) = chi(f(theta)) T_E(theta),

and at the roots of f the reduction is additive (type I0*) with trace 0 =
chi(0) T_E.  The model is minimal there because f is coprime to Delta.
"""

from __future__ import annotations

import random
import time
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..arith import decimal_down, decimal_up, sci_up
from ..errors import BadInput, CertifyError, Inconsistent
from ..ffield.poly import finite_field, poly_from_index, poly_str
from ..result import CAUTION, Enclosure, Hypothesis
from .fieldtable import field_table
from .lpoly import l_polynomial
from .model import EllipticCurve, curve_from_polys, make_curve
from .race import trace_race
from .traces import degree_data, embedding, poly_codes_in

__all__ = ["MemberResult", "FamilyResult", "base_change", "twist", "twist_members", "twist_family",
           "family_c_source"]

MAX_POPULATION_SCAN = 200_000


def base_change(E: EllipticCurve, n: int) -> EllipticCurve:
    """E viewed over F_{q^n}(t) (coefficients embedded in F_{q^n})."""
    if n == 1:
        return E
    F = E.field
    G = finite_field(F.q**n)
    M = G.k
    if M > 1 and tuple(field_table(G.p, M).modulus) != tuple(G.modulus):
        raise Inconsistent("field conventions differ between the table and F_q")  # pragma: no cover
    emb = embedding(F, M)
    A = G.poly([G.elem(int(emb[F.code(c)])) for c in E.A.coeffs()])
    B = G.poly([G.elem(int(emb[F.code(c)])) for c in E.B.coeffs()])
    return curve_from_polys(G, A, B, E.A_input, E.B_input)


def twist(E: EllipticCurve, f) -> EllipticCurve:
    """The quadratic twist y^2 = x^3 + A f^2 x + B f^3."""
    return curve_from_polys(E.field, E.A * f**2, E.B * f**3)


def twist_members(E: EllipticCurve, d: int, sample: int | None = None, seed: int = 0) -> tuple[list, int]:
    """Monic square-free f of degree d coprime to Delta(E): (chosen list, population size).

    With ``sample`` the members are a uniform random sample (without replacement,
    ``random.Random(seed)``) of that size from the whole population.
    """
    F = E.field
    if d < 1:
        raise BadInput("the twist degree d must be >= 1")
    total = F.q**d
    if total > MAX_POPULATION_SCAN:
        raise BadInput(f"q^d = {total} monic polynomials is too many to scan (at most {MAX_POPULATION_SCAN})")
    disc = E.disc_poly
    pop = []
    for i in range(total, 2 * total):
        f = poly_from_index(i, F)
        if not f.is_squarefree():
            continue
        if not f.gcd(disc).is_one():
            continue
        pop.append(i)
    if not pop:
        raise BadInput(f"no monic square-free polynomial of degree {d} is coprime to the discriminant")
    if sample is not None:
        if sample < 1:
            raise BadInput("the sample size must be >= 1")
        if sample < len(pop):
            pop_sel = sorted(random.Random(seed).sample(pop, sample))
            return [poly_from_index(i, F) for i in pop_sel], len(pop)
    return [poly_from_index(i, F) for i in pop], len(pop)


def family_c_source(E: EllipticCurve, Ef: EllipticCurve, f):
    """n -> c_n of the twist E_f from E's traces: sum over theta of orbit * chi(f(theta)) T_E(theta) + T_inf."""
    F = E.field

    def c(n: int) -> int:
        d = degree_data(E, n)
        T = d.table
        M = F.k * n
        fv = T.evaluate(poly_codes_in(f, F, M), d.theta)
        s = int((d.orbit * T.chi[fv] * d.traces).sum())
        emb = embedding(F, M)
        t_inf = int(T.traces(np.array([emb[F.code(Ef.a_inf)]]), np.array([emb[F.code(Ef.b_inf)]]))[0])
        return s + t_inf

    return c


@dataclass(frozen=True)
class MemberResult:
    """One twist: f, its L-polynomial's data and the density enclosure (None if not certified)."""

    f: str
    conductor_degree: int
    l_degree: int
    rank: int
    sign: int
    l_coefficients: tuple[int, ...]
    density: Enclosure | None
    mean: float | None
    status: str            # "certified" or "not certified: <why>"
    confirmed: tuple[int, ...] = ()   # degrees of point counts beyond those used that confirm L
    assumed: tuple[str, ...] = ()     # the hypotheses this member's density assumes (LI, relations)

    def as_dict(self) -> dict:
        d = {"f": self.f, "conductor_degree": self.conductor_degree, "l_degree": self.l_degree,
             "rank": self.rank, "sign": self.sign, "l_coefficients": list(self.l_coefficients),
             "status": self.status, "limit_mean": self.mean, "confirmed_by_degrees": list(self.confirmed),
             "assumed": list(self.assumed)}
        if self.density is not None:
            d["density"] = {"lower": self.density.lower_str(12), "upper": self.density.upper_str(12)}
        return d


@dataclass(frozen=True)
class FamilyResult:
    """The twist family's members and the distribution of their densities."""

    base_curve: EllipticCurve          # over F_{q^n}
    extension_degree: int              # n
    twist_degree: int                  # d
    mode: str
    members: tuple[MemberResult, ...]
    population: int
    sampled: bool
    seed: int | None
    c: float
    mean: Enclosure | None             # mean of the certified densities (exact interval)
    spread: float | None               # standard deviation of the midpoints
    within: tuple[Fraction, Fraction] | None   # share within c/d of 1/2: [certain, certain + undecided]
    histogram: tuple[tuple[float, ...], tuple[int, ...]]
    rank_counts: dict
    hypotheses: tuple[Hypothesis, ...]
    parameters: dict
    seconds: float
    caution: str = CAUTION

    @property
    def certified(self) -> tuple[MemberResult, ...]:
        return tuple(m for m in self.members if m.density is not None)

    def to_dict(self) -> dict:
        """A JSON-ready dictionary: summary, every member's enclosure, hypotheses."""
        lo = self.mean.lower_str(10) if self.mean else None
        hi = self.mean.upper_str(10) if self.mean else None
        return {
            "question": {"kind": f"quadratic-twist family, trace race ({self.mode})",
                         "base_curve": self.base_curve.describe(), "twist_degree": self.twist_degree,
                         "statement": "for each monic square-free f of degree d coprime to the discriminant, "
                                      "the natural density of the trace race of y^2 = x^3 + A f^2 x + B f^3"},
            "density": {"lower": lo, "upper": hi, "of": "the mean density over the certified members"},
            "summary": self.summary(),
            "members": [m.as_dict() for m in self.members],
            "hypotheses": [h.as_dict() for h in self.hypotheses],
            "error_budget": [
                {"name": "member enclosures", "bound": sci_up(max((m.density.width for m in self.certified), default=Fraction(0)), 3),
                 "description": "largest width of a member's density enclosure (each from the density engine)"}
            ],
            "parameters": self.parameters,
            "caution": self.caution,
        }

    def table(self, limit: int | None = None) -> str:
        """A Markdown table of the members."""
        lines = ["| f | deg N | deg L | rank | eps | density lower | density upper |",
                 "|---|---|---|---|---|---|---|"]
        for m in self.members[: limit or len(self.members)]:
            lo = m.density.lower_str(8) if m.density else "-"
            hi = m.density.upper_str(8) if m.density else m.status
            lines.append(f"| {m.f} | {m.conductor_degree} | {m.l_degree} | {m.rank} | {m.sign:+d} | {lo} | {hi} |")
        return "\n".join(lines)

    def summary(self) -> dict:
        cert = self.certified
        out = {
            "twist_degree": self.twist_degree, "members": len(self.members), "certified": len(cert),
            "relation_case": sum(1 for m in cert if m.status.startswith("certified on the orbit")),
            "wide_enclosures_over_0.01": sum(1 for m in cert if m.density.width > Fraction(1, 100)),
            "population": self.population, "sampled": self.sampled, "seed": self.seed,
            "mean": None if self.mean is None else {"lower": self.mean.lower_str(10), "upper": self.mean.upper_str(10)},
            "spread": self.spread, "c": self.c,
            "share_within_c_over_d_of_half": None if self.within is None else
            {"radius": self.c / self.twist_degree, "lower": decimal_down(self.within[0], 6),
             "upper": decimal_up(self.within[1], 6)},
            "rank_counts": {str(k): v for k, v in sorted(self.rank_counts.items())},
            "histogram": {"edges": list(self.histogram[0]), "counts": list(self.histogram[1])},
            "seconds": round(self.seconds, 3),
        }
        return out


def _member(E: EllipticCurve, f, mode: str, width: float, max_boxes: int) -> MemberResult:
    F = E.field
    Ef = twist(E, f)
    try:
        L = l_polynomial(Ef, confirm=1, c_source=family_c_source(E, Ef, f))
    except CertifyError as exc:
        return MemberResult(poly_str(f, F), Ef.conductor_degree, Ef.l_degree, -1, 0, (), None, None,
                            f"not certified: {exc}")
    try:
        R = trace_race(Ef, L, mode, width, max_boxes=max_boxes)
        mean = float(R.mean().mid())
        status = "certified"
        if "relations" in R.parameters:
            status = (f"certified on the orbit closure (relations {R.parameters['relations']}); "
                      f"width <= {R.density.width_text(2)} with {R.parameters['max_boxes_per_class']} boxes per class")
        assumed = tuple(h.name for h in R.hypotheses if h.status == "assumed")
        return MemberResult(poly_str(f, F), Ef.conductor_degree, L.degree, L.rank, L.sign, L.coeffs,
                            R.density, mean, status, L.degrees_confirmed, assumed)
    except CertifyError as exc:
        msg = str(exc)
        return MemberResult(poly_str(f, F), Ef.conductor_degree, L.degree, L.rank, L.sign, L.coeffs, None, None,
                            msg if msg.startswith("not certified") else f"not certified: {msg}",
                            L.degrees_confirmed)


def twist_family(q, A: str, B: str, d: int, n: int = 1, sample: int | None = None, seed: int = 0,
                 mode: str = "cumulative", target_width: float = 1e-6, c: float = 1.0,
                 bins: int = 20, progress=None, max_boxes: int = 3000) -> FamilyResult:
    """Certify the trace-race density of every twist (or a sample) of degree d over F_{q^n}.

    Parameters
    ----------
    q, A, B : the curve y^2 = x^3 + A x + B over F_q(t) (text polynomials).
    d : degree of the twisting polynomials f.
    n : the family lives over F_{q^n}.
    sample, seed : a random sample of this size (seeded), or None for the whole family.
    mode : "cumulative" or "degree" (see :mod:`certify.curves.race`).
    target_width : density engine width per member.
    c : the share within c/d of 1/2 is reported.
    max_boxes : box budget per residue class for members whose angles satisfy relations.
    """
    if n < 1:
        raise BadInput("the extension degree n must be >= 1")
    if not (c > 0):
        raise BadInput("c must be positive")
    t0 = time.time()
    E0 = make_curve(q, A, B)
    E = base_change(E0, n)
    fs, pop = twist_members(E, d, sample, seed)
    members = []
    for i, f in enumerate(fs):
        members.append(_member(E, f, mode, target_width, max_boxes))
        if progress:
            progress(i + 1, len(fs))
    cert = [m for m in members if m.density is not None]
    if cert:
        lo = sum((m.density.lower for m in cert), Fraction(0)) / len(cert)
        hi = sum((m.density.upper for m in cert), Fraction(0)) / len(cert)
        mean = Enclosure(lo, hi)
        mids = np.array([float(m.density.mid) for m in cert])
        spread = float(mids.std(ddof=1)) if len(mids) > 1 else 0.0
        rad = Fraction(c).limit_denominator(10**6) / d
        half = Fraction(1, 2)
        inside = sum(1 for m in cert if m.density.lower >= half - rad and m.density.upper <= half + rad)
        outside = sum(1 for m in cert if m.density.upper < half - rad or m.density.lower > half + rad)
        undecided = len(cert) - inside - outside
        within = (Fraction(inside, len(cert)), Fraction(inside + undecided, len(cert)))
        counts, edges = np.histogram(mids, bins=bins, range=(0.0, 1.0))
        hist = (tuple(float(e) for e in edges), tuple(int(x) for x in counts))
    else:
        mean, spread, within = None, None, None
        hist = ((), ())
    ranks: dict = {}
    for m in members:
        ranks[m.rank] = ranks.get(m.rank, 0) + 1
    hyps = (
        Hypothesis("RH for each L(E_f,u)", "inverse roots of modulus q", "theorem",
                   ("enclosed and checked for every member",), "La conjecture de Weil II, Publ. Math. IHES 52 (1980)"),
    )
    if any(m.assumed for m in members if m.density is not None):
        hyps += (Hypothesis(
            "LI for each member", "the non-torsion angles of each member together with 1 are Q-linearly "
            "independent", "assumed",
            (f"LLL relation search for each of the {len(members)} members; a member whose angles "
             "satisfy relations (each confirmed exactly) is certified on the orbit closure "
             "instead, or listed as not certified with the reason",)),)
    else:
        # every certified member's inverse roots are q times roots of unity: its density is exact
        hyps += (Hypothesis(
            "LI for each member", "no certified member has non-torsion inverse roots: nothing to assume",
            "verified", ("every inverse root of each certified member is q times a root of unity "
                         "(exact cyclotomic factors)",)),)
    params = {"q": q, "A": A, "B": B, "n": n, "d": d, "mode": mode, "target_width": target_width,
              "max_boxes_relation_case": max_boxes,
              "sample": sample, "seed": seed if sample is not None else None, "c": c, "bins": bins,
              "field": E.field.describe()}
    return FamilyResult(E, n, d, mode, tuple(members), pop, sample is not None and sample < pop,
                        seed if sample is not None else None, c, mean, spread, within, hist, ranks, hyps,
                        params, time.time() - t0)


def plot_families(results: list[FamilyResult], path: str) -> bool:
    """Histograms of the densities, one panel per twist degree; False if matplotlib is missing."""
    try:
        import matplotlib
        matplotlib.use("Agg")
        import matplotlib.pyplot as plt
    except ImportError:
        return False
    from matplotlib.ticker import MaxNLocator

    k = len(results)
    fig, axes = plt.subplots(1, k, figsize=(4.5 * k, 3.6), squeeze=False)
    for ax, r in zip(axes[0], results):
        mids = [float(m.density.mid) for m in r.certified]
        rad = r.c / r.twist_degree
        # the range the densities and the band 1/2 +- c/d occupy (within [0, 1]), not all of [0, 1]
        lo = max(0.0, min(mids + [0.5 - rad]))
        hi = min(1.0, max(mids + [0.5 + rad]))
        pad = 0.03 * (hi - lo or 1.0)
        lo, hi = max(0.0, lo - pad), min(1.0, hi + pad)
        bins = max(5, min(40, int(round(2 * len(mids) ** 0.5)) or 5))
        ax.hist(mids, bins=bins, range=(lo, hi), color="#4477aa", edgecolor="white")
        ax.axvspan(max(lo, 0.5 - rad), min(hi, 0.5 + rad), color="#ddcc77", alpha=0.3,
                   label=rf"$\frac{{1}}{{2}} \pm {r.c:g}/d$")
        ax.axvline(0.5, color="black", lw=0.8)
        ax.set_xlim(lo, hi)
        ax.yaxis.set_major_locator(MaxNLocator(integer=True))  # counts are integers
        ax.set_title(f"$d = {r.twist_degree}$: {len(mids)} twists over {r.base_curve.field.describe()}",
                     fontsize=9)
        ax.set_xlabel(r"certified density $\delta(E_f)$ (midpoint of the enclosure)")
        ax.set_ylabel("number of twists $E_f$")
        ax.legend(fontsize=7)
    fig.suptitle("Trace-race densities of quadratic twists (conditional on LI)", fontsize=10)
    fig.tight_layout()
    fig.savefig(path, dpi=110)
    plt.close(fig)
    return True
