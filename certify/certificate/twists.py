"""Certificates of quadratic-twist families over F_q(t) (kind ``twist-family-race``).

One certificate per twist degree d: the family E_f : y^2 = x^3 + A f^2 x + B f^3,
f monic square-free of degree d over F_(q^n) and coprime to the discriminant
(the whole family, or a seeded sample of a stated size).  The certified number
(``answer``) is the mean of the members' densities, enclosed by the mean of the
members' stored enclosures; ``spectrum`` holds the L-data and the stored
enclosure of every member and the family's distribution (share within c/d of
1/2, histogram, spread, rank counts), each computed from the stored member
enclosures alone.

``verify`` re-checks, in this order (the cheap checks first; a failure stops
before the recount):

1. the question, rebuilt from the stored inputs;
2. the member list: exactly the population (or the seeded sample), in order, no
   member twice, the population size recounted;
3. every member's L-polynomial re-derived from the twisted curve's own point
   counts (the generic path of :mod:`certify.curves.lpoly`, not the family's
   fast twisted counts that wrote the certificate): coefficients, sign, rank,
   degrees, conductor degree;
4. the mean, the error budget, the share within c/d of 1/2, the histogram,
   the spread and the rank counts from the stored member enclosures, and each
   evidence item's data and sentence from the member records;
5. a recount of the whole family with the stored parameters (the densities by
   the same engine), every stored field compared with the re-derived one
   (:func:`certify.certificate.recount.compare`).
"""

from __future__ import annotations

import shlex
import time
from fractions import Fraction

from ..arith import arb, decimal_down, decimal_up
from ..errors import BadInput, CertifyError, Inconsistent
from .curves import REFERENCES  # the same sources as a single curve's race
from .model import Certificate, thaw
from .numbers import places_for, sci
from .recount import answer_from_enclosure, provenance, timed_report

KIND = "twist-family-race"
DEFINITION = ("the mean, over the members E_f of the family, of the natural density "
              "lim_{N -> oo} (1/N) #{1 <= X <= N : the normalised trace sum of E_f is positive at X}; "
              "each member's density enclosed by the measure of {limit function > 0} "
              "(`docs/elliptic_curves.md`)")
#: bounds on what a stored certificate may ask the verifier to recount
LIMITS = {"max_boxes": 10**7, "bins": 1000, "d": 12, "n": 12}
MAX_MEMBERS = 5000


def statement(mode: str) -> str:
    deg = "of degree <= X" if mode == "cumulative" else "of degree exactly X"
    return ("for each monic square-free f of degree d coprime to the discriminant, the trace race of "
            f"E_f : y^2 = x^3 + A f^2 x + B f^3 (the sign of the normalised sum of a_v over good places "
            f"{deg}); the certified number is the mean density over the members")


def question_record(E, q0: int, d: int, n: int, mode: str, sample, seed, c: float) -> dict:
    """The question of a family (E over F_(q^n), already base-changed; q0 = q)."""
    what = f"{sample} sampled twists (seed {seed})" if sample is not None else "all twists"
    return {"setting": "twists of E/F_q(t)", "q": q0, "A": E.A_input, "B": E.B_input, "n": n, "d": d,
            "mode": mode, "sample": sample, "seed": seed if sample is not None else None, "c": c,
            "field": E.field.describe(),
            "label": f"mean delta_{mode}(E_f), deg f = {d}, {what} of E: {E.describe()}",
            "statement": statement(mode), "definition": DEFINITION}


# -- the member records and everything derived from them -------------------------------

def _ends(lo: Fraction, hi: Fraction) -> dict:
    """A member's stored enclosure: outward decimals, or the exact value p/q twice."""
    if lo == hi:
        return {"lower": str(lo), "upper": str(hi)}
    p = min(places_for(hi - lo), 60)
    return {"lower": decimal_down(lo, p), "upper": decimal_up(hi, p)}


def member_record(m) -> dict:
    return {"f": m.f, "conductor_degree": m.conductor_degree, "l_degree": m.l_degree,
            "rank": m.rank, "sign": m.sign, "l_coefficients": list(m.l_coefficients),
            "confirmed_by_degrees": list(m.confirmed), "status": m.status, "assumed": list(m.assumed),
            "density": None if m.density is None else _ends(m.density.lower, m.density.upper)}


def _fraction(text, where: str) -> Fraction:
    from .model import safe_fraction

    return safe_fraction(text, where)


def stored_enclosures(members: list) -> list:
    """[(lower, upper)] of the certified members' stored enclosures (exact fractions)."""
    out = []
    for i, m in enumerate(members):
        if m["density"] is None:
            continue
        lo = _fraction(m["density"]["lower"], f"member {i + 1} lower")
        hi = _fraction(m["density"]["upper"], f"member {i + 1} upper")
        if not 0 <= lo <= hi <= 1:
            raise BadInput(f"member {i + 1}: the stored enclosure is not an interval in [0, 1]")
        out.append((lo, hi))
    return out


def summary_record(members: list, d: int, c: float, bins: int) -> dict:
    """The family's distribution, computed from the stored member records alone."""
    enc = stored_enclosures(members)
    k = len(enc)
    ranks: dict = {}
    for m in members:
        ranks[str(m["rank"])] = ranks.get(str(m["rank"]), 0) + 1
    out = {"members": len(members), "certified": k, "not_certified": len(members) - k,
           "relation_case": sum(1 for m in members if str(m["status"]).startswith("certified on the orbit")),
           "rank_counts": dict(sorted(ranks.items(), key=lambda kv: int(kv[0])))}
    if not k:
        out.update({"mean": None, "spread": None, "within": None, "histogram": None})
        return out
    lo = sum((a for a, _ in enc), Fraction(0)) / k
    hi = sum((b for _, b in enc), Fraction(0)) / k
    out["mean"] = {"lower": str(lo), "upper": str(hi)}
    # spread: the sample standard deviation of the enclosures' midpoints (exact variance, Arb root)
    mids = [(a + b) / 2 for a, b in enc]
    if k > 1:
        mbar = sum(mids, Fraction(0)) / k
        var = sum(((x - mbar) ** 2 for x in mids), Fraction(0)) / (k - 1)
        s = (arb(var.numerator) / arb(var.denominator)).sqrt()
        out["spread"] = {"lower": decimal_down(s, 6), "upper": decimal_up(s, 6),
                         "of": "sample standard deviation of the midpoints of the member enclosures"}
    else:
        out["spread"] = {"lower": "0", "upper": "0",
                         "of": "sample standard deviation of the midpoints of the member enclosures"}
    rad = Fraction(c).limit_denominator(10**6) / d
    half = Fraction(1, 2)
    inside = sum(1 for a, b in enc if a >= half - rad and b <= half + rad)
    outside = sum(1 for a, b in enc if b < half - rad or a > half + rad)
    und = k - inside - outside
    out["within"] = {"radius": str(rad), "inside": inside, "outside": outside, "undecided": und,
                     "lower": str(Fraction(inside, k)), "upper": str(Fraction(inside + und, k))}
    counts = [0] * bins
    for x in mids:
        counts[min(int(x * bins), bins - 1)] += 1
    out["histogram"] = {"bins": bins, "range": ["0", "1"], "counts": counts,
                        "of": "midpoints of the member enclosures; bin j is [j/bins, (j+1)/bins), "
                              "the last one closed"}
    return out


def budget_record(members: list) -> list:
    enc = stored_enclosures(members)
    w = max((b - a for a, b in enc), default=Fraction(0))
    return [{"name": "member enclosures", "bound": sci(w, 3, up=True),
             "description": "largest width of a member's stored density enclosure (each from the "
                            "density engine, rounded outward); the mean's enclosure is at most as wide"}]


def evidence_sentence(kind: str, data: dict) -> str:
    if kind == "inverse-roots":
        return (f"L(E_f, u) computed for {data['members']} of the {data['population_listed']} members "
                "listed, each from point counts and the functional equation, its inverse roots enclosed "
                "by Arb and checked to have modulus q (Weil's theorem)")
    if kind == "torsion-only":
        return (f"none of the {data['members']} certified members assumes a hypothesis: every inverse root "
                "of each is q times a root of unity (exact cyclotomic factors), so each density is exact")
    if kind == "relation-search":
        return (f"LLL relation search among the angles of each of the {data['members']} certified members; "
                f"{data['relation_case']} member(s) whose angles satisfy relations (each confirmed exactly) "
                f"certified on the orbit closure instead; {data['not_certified']} member(s) not certified, "
                "with the reason stored beside the member")
    raise ValueError(f"unknown evidence kind {kind!r}")


def evidence_data(members: list) -> dict:
    """{hypothesis name: [(kind, data)]} from the member records."""
    computed = sum(1 for m in members if m["l_coefficients"])
    certified = sum(1 for m in members if m["density"] is not None)
    rel = sum(1 for m in members if str(m["status"]).startswith("certified on the orbit"))
    assuming = sum(1 for m in members if m["density"] is not None and m["assumed"])
    li = (("relation-search", {"members": certified, "relation_case": rel,
                               "not_certified": len(members) - certified}) if assuming
          else ("torsion-only", {"members": certified}))
    return {"RH for each L(E_f,u)": [("inverse-roots", {"members": computed,
                                                        "population_listed": len(members)})],
            "LI for each member": [li]}


def hypothesis_records(hypotheses, members: list) -> list:
    data = evidence_data(members)
    recs = []
    for h in hypotheses:
        items = data.get(h.name)
        if items is None:
            raise Inconsistent(f"no evidence data for the hypothesis {h.name!r}")
        recs.append({"name": h.name, "statement": h.statement, "status": h.status,
                     "evidence": [{"kind": k, "text": evidence_sentence(k, d), "data": d} for k, d in items],
                     "reference": h.reference})
    return recs


def caution(hypotheses) -> str:
    from ..result import caution_text

    return caution_text(hypotheses, "Re-check this file with `certify verify`.")


def command_line(p: dict) -> str:
    args = ["certify", "twists", str(p["q"]), p["A"], p["B"], "--degrees", str(p["d"]),
            "--extension", str(p["n"]), "--mode", p["mode"], "--width", f"{float(Fraction(p['target_width'])):.6g}",
            "--c", f"{p['c']:g}", "--max-boxes", str(p["max_boxes"])]
    if p["sample"] is not None:
        args += ["--sample", str(p["sample"]), "--seed", str(p["seed"])]
    return " ".join(shlex.quote(a) for a in args)


def family_certificate(R, target: Fraction, seconds: float | None = None) -> Certificate:
    """The certificate of one :class:`~certify.curves.family.FamilyResult`."""
    P = R.parameters
    members = [member_record(m) for m in R.members]
    if not any(m["density"] is not None for m in members):
        from ..errors import PrecisionExhausted

        raise PrecisionExhausted("not certified: no member of the family was certified, so there is "
                                 "no mean density to certify")
    from ..curves.model import _check_field

    params = {"q": int(_check_field(P["q"]).q), "A": P["A"], "B": P["B"], "n": P["n"], "d": P["d"], "mode": P["mode"],
              "target_width": str(target), "max_boxes": P["max_boxes_relation_case"],
              "sample": P["sample"], "seed": P["seed"], "c": float(P["c"]), "bins": P["bins"]}
    question = question_record(R.base_curve, params["q"], R.twist_degree, P["n"], P["mode"], P["sample"],
                               P["seed"], float(P["c"]))
    summary = summary_record(members, R.twist_degree, float(P["c"]), P["bins"])
    spectrum = {"base_curve": R.base_curve.as_dict(), "population": R.population,
                "sampled": R.sampled, "members": members, "summary": summary}
    lo, hi = Fraction(summary["mean"]["lower"]), Fraction(summary["mean"]["upper"])
    inputs = {"setting": "twists of E/F_q(t)", **{k: params[k] for k in
                                                  ("q", "A", "B", "n", "d", "mode", "target_width",
                                                   "max_boxes", "sample", "seed", "c", "bins")}}
    return Certificate(
        question=question, answer=answer_from_enclosure(lo, hi, target),
        hypotheses=hypothesis_records(R.hypotheses, members), error_budget=budget_record(members),
        parameters=params, spectrum=spectrum,
        provenance=provenance(command_line(params), inputs, seconds or 0.0),
        references=list(REFERENCES), caution=caution(R.hypotheses), kind=KIND)


def certify_family(q, A: str, B: str, d: int, n: int = 1, sample=None, seed: int = 0,
                   mode: str = "cumulative", target: Fraction = Fraction(1, 1000), c: float = 1.0,
                   bins: int = 20, max_boxes: int = 3000):
    """(FamilyResult, certificate) of the twists of degree d.

    Examples
    --------
    >>> from fractions import Fraction
    >>> R, cert = certify_family(5, "t", "t^2 + 1", 1, target=Fraction(1, 1000))
    >>> cert.kind, cert.answer["exact"]
    ('twist-family-race', '3/10')
    """
    from ..curves.family import twist_family

    t0 = time.time()
    R = twist_family(q, A, B, d, n=n, sample=sample, seed=seed, mode=mode, target_width=float(target),
                     c=c, bins=bins, max_boxes=max_boxes)
    return R, family_certificate(R, target, time.time() - t0)


# -- verify ----------------------------------------------------------------------------

def _inputs(cert: Certificate) -> dict:
    """The stored parameters, bounded before any work (BadInput)."""
    p = thaw(cert.parameters)
    for k, lim in LIMITS.items():
        v = p[k]
        if type(v) is not int or not 1 <= v <= lim:
            raise BadInput(f"parameter {k} = {str(v)[:20]} outside 1..{lim}")
    if p["mode"] not in ("cumulative", "degree"):
        raise BadInput(f"unknown mode {str(p['mode'])[:20]!r}")
    target = _fraction(p["target_width"], "target_width")
    if not Fraction(1, 10**12) <= target < 1:
        raise BadInput(f"target width {p['target_width'][:30]} outside [1e-12, 1)")
    if not isinstance(p["c"], (int, float)) or isinstance(p["c"], bool) or not 0 < p["c"] <= 1e6:
        raise BadInput("parameter c outside (0, 1e6]")
    if p["sample"] is not None and (type(p["sample"]) is not int or not 1 <= p["sample"] <= MAX_MEMBERS):
        raise BadInput(f"sample size outside 1..{MAX_MEMBERS}")
    if p["sample"] is not None and type(p["seed"]) is not int:
        raise BadInput("the seed of a sample is an integer")
    if p["sample"] is None and p["seed"] is not None:
        raise BadInput("a seed without a sample")
    # the sizes the CLI accepts (field of the point counts, number of members)
    from types import SimpleNamespace

    from ..batch.limits import twist_members as population_bound
    from ..commands.options import Limits
    from ..curves.commands import _check_curve_size
    from ..curves.model import _check_field

    Q = _check_field(p["q"]).q
    if p["n"] > 1 and Q ** p["n"] > 10**6:
        raise BadInput(f"F_{Q}^{p['n']} is too large")
    _check_curve_size(SimpleNamespace(q=p["q"], A=p["A"], B=p["B"], limit=None), "a twist", p["d"], n=p["n"])
    pop = population_bound(Q, p["n"], p["d"])
    Limits().require("members", min(pop, p["sample"] or pop), "the stored family")
    p["target"] = target
    return p


def _base(p: dict):
    from ..curves.family import base_change
    from ..curves.model import make_curve

    return base_change(make_curve(p["q"], p["A"], p["B"]), p["n"])


def _question(cert: Certificate) -> dict:
    p = _inputs(cert)
    return question_record(_base(p), p["q"], p["d"], p["n"], p["mode"], p["sample"], p["seed"], float(p["c"]))


def check_stored(cert: Certificate, report) -> None:
    """Steps 2-4 of the module docstring (each a named check of ``report``)."""
    import json

    from ..curves.family import twist, twist_members
    from ..curves.lpoly import l_polynomial
    from ..ffield.poly import poly_str

    data = thaw(cert.to_dict())
    p = _inputs(cert)
    E = _base(p)
    sp = data["spectrum"]
    members = sp["members"]
    fs, pop = twist_members(E, p["d"], p["sample"], p["seed"] or 0)
    want = [poly_str(f, E.field) for f in fs]
    have = [m["f"] for m in members]
    report.add("members: no member twice", len(set(have)) == len(have),
               f"{len(have) - len(set(have))} repeated")
    report.add("members: exactly the family " + ("(the seeded sample)" if p["sample"] else "(all of it)")
               + ", in order", have == want,
               f"stored {len(have)} members {have[:4]}..., the family has {len(want)} {want[:4]}...")
    report.add("population size recounted", sp["population"] == pop and sp["sampled"] == (len(fs) < pop),
               f"stored {sp['population']}, recounted {pop}")
    if have != want:
        return
    # every member's L-polynomial from the twisted curve's own point counts (the generic path)
    bad = []
    for f, m in zip(fs, members):
        Ef = twist(E, f)
        try:
            L = l_polynomial(Ef, confirm=len(m["confirmed_by_degrees"]))
            got = (list(L.coeffs), L.sign, L.rank, L.degree, Ef.conductor_degree, list(L.degrees_confirmed))
        except CertifyError as exc:
            got = ("not computed", str(exc)[:60])
        stored = (m["l_coefficients"], m["sign"], m["rank"], m["l_degree"], m["conductor_degree"],
                  m["confirmed_by_degrees"])
        if m["l_coefficients"] == [] and got[0] == "not computed":
            continue
        if got != stored:
            bad.append(m["f"])
    report.add(f"L(E_f, u) of each of the {len(members)} members re-derived from its own point counts",
               not bad, f"differs for f = {', '.join(bad[:5])}")
    # the distribution and the answer from the stored enclosures
    try:
        summary = summary_record(members, p["d"], float(p["c"]), p["bins"])
    except CertifyError as exc:
        report.add("summary: computed from the stored member enclosures", False, str(exc))
        return
    for key in summary:
        report.add(f"summary {key}: from the stored member enclosures",
                   sp["summary"].get(key) == summary[key],
                   f"stored {json.dumps(sp['summary'].get(key))[:120]}, derived {json.dumps(summary[key])[:120]}")
    report.add("summary: no other field", set(sp["summary"]) == set(summary),
               f"stored keys {sorted(sp['summary'])}")
    if summary["mean"] is not None:
        lo, hi = Fraction(summary["mean"]["lower"]), Fraction(summary["mean"]["upper"])
        ans = answer_from_enclosure(lo, hi, p["target"])
        report.add("answer: the mean of the stored member enclosures, rounded outward",
                   data["answer"] == ans, f"stored {data['answer']}, derived {ans}")
    bud = budget_record(members)
    report.add("error budget: the widest stored member enclosure",
               data["error_budget"] == bud, f"stored {data['error_budget']}, derived {bud}")
    ev = evidence_data(members)
    for h in data["hypotheses"]:
        items = ev.get(h["name"])
        stored_items = [(e.get("kind"), e.get("data")) for e in h["evidence"]]
        report.add(f"evidence of {h['name'][:40]}: data from the member records", stored_items == items,
                   f"stored {json.dumps(stored_items)[:120]}")
        for e in h["evidence"]:
            try:
                text = evidence_sentence(e["kind"], e["data"])
            except (KeyError, TypeError, ValueError) as exc:
                text = f"(no sentence: {exc})"
            report.add(f"evidence of {h['name'][:40]}: sentence from its data", e.get("text") == text,
                       f"stored {str(e.get('text'))[:80]!r}")


def _stored_then_rebuild(cert: Certificate, report) -> Certificate:
    check_stored(cert, report)
    if report.failures:
        raise Inconsistent("the stored member data or the fields derived from them do not check; "
                           "recount skipped")
    p = _inputs(cert)
    return certify_family(p["q"], p["A"], p["B"], p["d"], p["n"], p["sample"], p["seed"] or 0,
                          p["mode"], p["target"], float(p["c"]), p["bins"], p["max_boxes"])[1]


def verify_twist_family(cert: Certificate):
    """Re-check a ``twist-family-race`` certificate (a :class:`~.verify.VerifyReport`)."""
    return timed_report(cert.label, cert, _stored_then_rebuild, _question, with_report=True)


__all__ = ["KIND", "certify_family", "family_certificate", "verify_twist_family", "summary_record"]
