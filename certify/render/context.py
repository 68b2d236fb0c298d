"""The context dict every renderer reads: display strings built from a certificate only.

Renderers show only what ``certify verify`` re-derives: sentences (question,
hypotheses, evidence, caution, command line) are regenerated here from the stored
data by the functions verify compares against, numbers derived from the enclosure
are recomputed from its ends, and parameters are limited to those verify checks.
"""

from __future__ import annotations

from fractions import Fraction

from ..arith import ball_from_strings, decimal_down, decimal_up
from ..certificate.model import Certificate, ball_of
from ..certificate.numbers import sci

STATUS_TEXT = {
    "assumed": "assumed (not proven; evidence below)",
    "verified": "verified by this computation",
    "theorem": "proved (theorem)",
}


def _short_ball(record, digits: int = 12) -> str:
    return ball_of(record).str(digits, radius=True)


def tiny_gaps(cert: Certificate) -> list[dict]:
    """Gaps worth printing in scientific notation: 1 - delta near 1, delta near 0, delta - 1/2 near 1/2."""
    lo, hi = cert.lower, cert.upper
    a = cert.answer
    out = []
    small = a.get("small_side")
    if small is not None:
        # the li race: its small side, with the significant digits common to the enclosure
        certified = f" (certified: {small['certified']})" if small.get("certified") else ""
        out.append({"what": small["name"] + certified, "lower": small["lower"],
                    "upper": small["upper"]})
        return out
    if lo > Fraction(99, 100):
        out.append({"what": "1 - delta", "lower": a["gap_to_one"]["lower"],
                    "upper": a["gap_to_one"]["upper"]})
    if hi < Fraction(1, 100):
        out.append({"what": "delta", "lower": sci(lo, 4, up=False), "upper": sci(hi, 4, up=True)})
    if abs((lo + hi) / 2 - Fraction(1, 2)) < Fraction(1, 100):
        out.append({"what": "delta - 1/2", "lower": a["gap_to_half"]["lower"],
                    "upper": a["gap_to_half"]["upper"]})
    return out


def _digits_text(a: dict) -> str:
    """What the answer's digits line shows: the exact value, certified decimals, or "(none)".

    An integer part alone ("0" for [0.4999.., 0.5000..]) is not shown as digits.
    """
    ex = a.get("exact")
    if ex:
        return f"{ex['value']} exactly ({ex['reason']})"
    d = a["certified_digits"]
    return d if "." in d and d.split(".", 1)[1] else "(none)"


def _gaps_from_ends(lo: Fraction, hi: Fraction) -> list[dict]:
    out = []
    if lo > Fraction(99, 100):
        out.append({"what": "1 - delta", "lower": sci(1 - hi, 4, up=False), "upper": sci(1 - lo, 4, up=True)})
    if hi < Fraction(1, 100):
        out.append({"what": "delta", "lower": sci(lo, 4, up=False), "upper": sci(hi, 4, up=True)})
    if abs((lo + hi) / 2 - Fraction(1, 2)) < Fraction(1, 100) and hi > lo:
        out.append({"what": "delta - 1/2", "lower": sci(lo - Fraction(1, 2), 4, up=False),
                    "upper": sci(hi - Fraction(1, 2), 4, up=True)})
    return out


def _spectrum_lines(cert: Certificate) -> list[str]:
    sp = cert.spectrum
    if cert.kind == "ffield-race":
        lines = [f"L(u, {L['character']}) (order {L['order']}, {L['parity']}, conductor "
                 f"{L['conductor']}): coefficients [{', '.join(L['coefficients'])}]; "
                 f"{L['weil_check']}" for L in sp["l_polynomials"]]
        lines.append("relations among (pi, theta_1, ...), confirmed exactly: "
                     + ("; ".join(str(list(r)) for r in sp["relations"]) or "none"))
        lines.append(f"orbit closure: {sp['orbit_closure']}")
        return lines
    if cert.kind == "ecq-race":
        E, rk = sp["curve"], sp["analytic_rank"]
        loc = ", ".join(f"p = {ld['p']} {ld['kodaira']} ({ld['reduction']}, w = "
                        f"{'open' if ld['root_number'] is None else ld['root_number']})"
                        for ld in E["local_data"])
        return [f"E = {E['minimal_model']} (minimal model), conductor {E['conductor']}, "
                f"j = {E['j_invariant']}; local data: {loc}",
                f"root number {rk['root_number']:+d}; analytic rank {rk['value']} "
                f"({'certified' if rk['certified'] else 'not certified: at most ' + str(rk['upper_bound'])})",
                f"{len(sp['zeros'])} zeros of L(E, s) isolated to height {sp['isolation_height']}; "
                f"{len(sp['power_sums_all_zeros'])} exact power sums; mean 1 - 2r = {sp['mean']}",
                *(f"independent check: {e['text']}" for e in sp.get("evidence", []))]
    if cert.kind == "order-race":
        lines = []
        for g in sp["groups"]:
            ls = ", ".join(f"L(s, chi_{{{lf['conductor']},{lf['label']}}})" for lf in g["l_functions"])
            lines.append(f"{g['label']}: {ls}; {len(g['zeros'])} zeros isolated to height "
                         f"{g['isolation_height']}; {g['moments']['count']} exact moments; "
                         f"direction vector v_chi with {len(g['vector'])} complex entries")
        return lines
    if cert.kind == "twist-family-race":
        return _twist_lines(cert)
    if cert.kind == "curve-race":
        L, E = sp["l_polynomial"], sp["curve"]
        return [f"curve: y^2 = x^3 + ({E['A']})*x + ({E['B']}) over {E['field']}; conductor "
                f"degree {E['conductor_degree']}",
                "bad places: " + ", ".join(f"{b['place']} ({b['kodaira']}, {b['reduction']})"
                                           for b in E["bad_places"]),
                f"L(E, u) = {L['text']} (degree {L['degree']}, sign {L['sign']:+d}, analytic rank "
                f"{L['analytic_rank']}), from point counts of degree <= "
                f"{L['degrees_from_point_counts']}, confirmed by degrees {list(L['degrees_confirmed'])}"]
    return []


#: members listed one by one in a document (all of them are in the JSON file)
MAX_MEMBER_LINES = 40
#: decimal places of a member's density shown in the table (the JSON file keeps every place)
SHOWN_PLACES = 12


def _twist_lines(cert: Certificate) -> list[str]:
    """The family's L-data and distribution, each line from fields verify re-derives."""
    sp, q = cert.spectrum, cert.question
    E = sp["base_curve"]
    s = sp["summary"]
    n_mem = len(sp["members"])
    lines = [f"base curve: y^2 = x^3 + ({E['A']})*x + ({E['B']}) over {E['field']}; conductor degree "
             f"{E['conductor_degree']}",
             (f"members: a seeded sample of {n_mem} (seed {q['seed']}) of the {sp['population']} twists"
              if sp["sampled"] else f"members: all {sp['population']} twists")
             + f" by monic square-free f of degree {q['d']} coprime to the discriminant; "
               f"{s['certified']} certified, {s['not_certified']} not certified, "
               f"{s['relation_case']} on the orbit closure of relations among the angles",
             "analytic ranks: " + ", ".join(f"rank {r}: {k}" for r, k in s["rank_counts"].items())]
    if s["mean"] is not None:
        w = s["within"]
        rad = Fraction(w["radius"])
        lines.append(f"share of members whose density lies within {rad} of 1/2: between {w['lower']} and "
                     f"{w['upper']} ({w['inside']} certainly inside, {w['outside']} certainly outside, "
                     f"{w['undecided']} undecided by their enclosures)")
        lines.append(f"spread (sample standard deviation of the enclosures' midpoints) between "
                     f"{s['spread']['lower']} and {s['spread']['upper']}")
        h = s["histogram"]
        nb = h["bins"]
        lines.append(f"histogram of the midpoints over {nb} bins of width 1/{nb} on [0, 1]: "
                     + ", ".join(f"[{Fraction(j, nb)}, {Fraction(j + 1, nb)}): {c}"
                                 for j, c in enumerate(h["counts"]) if c))
    if n_mem > MAX_MEMBER_LINES:
        lines.append(f"the table below lists the first {MAX_MEMBER_LINES} members; the other "
                     f"{n_mem - MAX_MEMBER_LINES} are in the JSON file and re-checked by verify")
    return lines


def member_table(cert: Certificate) -> list[dict]:
    """One row per listed member of a twist family (at most :data:`MAX_MEMBER_LINES`), each
    cell a field verify re-derives (the density as stored, or the reason it is not certified)."""
    if cert.kind != "twist-family-race":
        return []
    rows = []
    for m in cert.spectrum["members"][:MAX_MEMBER_LINES]:
        dn = m["density"]
        if not dn:
            lo = hi = ""
            note = str(m["status"])
        elif dn["lower"] == dn["upper"]:
            lo, hi, note = dn["lower"], dn["upper"], "exact"
        else:
            # long stored ends shown with SHOWN_PLACES places, rounded outward (still an enclosure)
            lo, hi, note = dn["lower"], dn["upper"], ""
            if len(lo) > SHOWN_PLACES + 2 or len(hi) > SHOWN_PLACES + 2:
                lo = decimal_down(Fraction(lo), SHOWN_PLACES)
                hi = decimal_up(Fraction(hi), SHOWN_PLACES)
        rows.append({"f": m["f"], "conductor_degree": m["conductor_degree"], "l_degree": m["l_degree"],
                     "sign": f"{m['sign']:+d}", "rank": m["rank"], "lower": lo, "upper": hi,
                     "note": note})
    return rows


def observation_context(cert: Certificate):
    """The observed race of an ``ecq-race`` certificate (verify recounts it), or None: a label
    saying it is observed data and no part of the proven enclosure, and its sentences."""
    if cert.kind != "ecq-race" or "observation" not in cert.spectrum:
        return None
    from ..ecobserve import OBSERVATION_LABEL, observation_lines

    rec = cert.spectrum["observation"]
    return {"label": OBSERVATION_LABEL, "bound": rec["bound"], "lines": observation_lines(rec)}


def recount_context(cert: Certificate, file_name: str) -> dict:
    """The context of a certificate verified by a recount (F_q[t] races, curve races): every
    field shown was compared by ``verify`` with its re-derived value."""
    q, a = cert.question, cert.answer
    lo, hi = cert.lower, cert.upper
    if cert.kind == "ffield-race":
        ws = ", ".join(f"{c}: {w}" for c, w in zip(q["classes"], q["weights"]))
        setting = (f"Race in F_{q['q']}[t] modulo {q['modulus']} ({q['mode']}); weights {ws}")
    elif cert.kind == "order-race":
        setting = (f"Ordering of {len(q['classes'])} classes modulo {q['modulus']}: "
                   + " > ".join(f"pi(x;{q['modulus']},{c})" for c in q["classes"])
                   + f"; mean vector ({a['mean']})")
    elif cert.kind == "ecq-race":
        setting = (f"Bias of the Frobenius traces of the elliptic curve E = {q['ainvs']} over Q: "
                   "sum_(p <= x) a_p(E)/sqrt(p) > 0")
    elif cert.kind == "twist-family-race":
        setting = (f"Quadratic twists of degree {q['d']} of an elliptic curve over {q['field']} "
                   f"({q['mode']} trace race)")
    else:
        setting = f"Trace race of an elliptic curve over F_{q['q']}(t) ({q['mode']})"
    hyps = [{"name": h["name"], "statement": h["statement"], "status": h["status"],
             "status_text": STATUS_TEXT.get(h["status"], h["status"]),
             "evidence": [e["text"] for e in h["evidence"]], "reference": h["reference"]}
            for h in cert.hypotheses]
    assumed = [h["name"] for h in cert.hypotheses if h["status"] == "assumed"]
    budget = [dict(e) for e in cert.error_budget]
    total = sum((Fraction(e["bound"]) for e in cert.error_budget), Fraction(0))
    params = [(k, v) for k, v in cert.parameters.items()
              if isinstance(v, (str, int, float, bool)) or v is None]
    exact = a.get("exact")
    return {
        "label": cert.label,
        "question": {"kind": cert.kind, "modulus": "", "statement": q["statement"],
                     "setting_line": setting, "weights": "", "definition": q["definition"],
                     "normalisation": q.get("normalisation", "")},
        "answer": {"lower": a["enclosure"]["lower"], "upper": a["enclosure"]["upper"],
                   "width": a["width"], "digits": a["certified_digits"] or "(none)",
                   "target": a["target_width"], "target_met": a["target_met"], "mean": "",
                   "variance": "", "exact": exact or ""},
        "gaps": _gaps_from_ends(lo, hi),
        "hypotheses": hyps,
        "hypothesis_names": " and ".join(assumed) if assumed else "no unproven hypothesis",
        "budget": budget,
        "budget_total": sci(total, 3, up=True),
        "groups": [],
        "spectrum_lines": _spectrum_lines(cert),
        "members": member_table(cert),
        "observation": observation_context(cert),
        "parameters": params,
        "provenance": {"command_line": cert.provenance["command_line"],
                       "input_digest": cert.provenance["input_digest"]},
        "verify_command": f"certify verify {file_name}",
        "references": list(cert.references),
        "caution": cert.caution,
        "schema_version": cert.schema_version,
    }


def certificate_context(cert: Certificate, file_name: str = "certificate.json") -> dict:
    """Everything the templates show, as strings and lists (no computation in templates)."""
    if cert.kind != "dirichlet-race":
        return recount_context(cert, file_name)
    a = cert.answer
    q = cert.question
    groups = []
    for g in cert.spectrum["groups"]:
        ls = ["zeta(s)" if lf["conductor"] == 1 else f"L(s, chi_{{{lf['conductor']},{lf['label']}}})"
              for lf in g["l_functions"]]
        first = [ball_from_strings(z["mid"], z["rad"]).str(15, radius=False) for z in g["zeros"][:3]]
        groups.append({
            "label": g["label"], "l_functions": ", ".join(ls), "zeros": len(g["zeros"]),
            "height": decimal_down(Fraction(g["isolation_height"]), 4), "moments": g["moments"]["count"],
            "scale": _short_ball(g["scale"], 10), "first_zeros": ", ".join(first),
        })
    from ..certificate.build import (answer_fields, certificate_caution, certificate_references,
                                     evidence_text, hypothesis_statements, question_record,
                                     reproduce_command)
    from ..certificate.verify import SHOWN_PARAMETERS, question_from_record
    from ..race.question import riemann_hypothesis_name

    # every sentence is regenerated from the stored data (as verify does), never copied
    question = question_from_record(q)
    digits = int(cert.parameters["digits_requested"])
    rh = riemann_hypothesis_name(question)
    qrec = question_record(question)
    canonical = hypothesis_statements(cert.spectrum, rh)
    hyps = []
    for h in cert.hypotheses:
        hyps.append({"name": h["name"], "statement": canonical.get(h["name"], h["statement"]),
                     "status": "assumed", "status_text": STATUS_TEXT["assumed"],
                     "evidence": [evidence_text(e, rh) for e in h["evidence"]],
                     "reference": ""})
    budget = [{"name": e["name"], "bound": e["bound"], "description": e["description"]}
              for e in cert.error_budget]
    total = sum((Fraction(e["bound"]) for e in cert.error_budget), Fraction(0))
    weights = (question.weights_text
               or "none (pi(x) against li(x): zeta alone)")
    derived = answer_fields(cert.lower, cert.upper, digits)
    a = {**a, **derived}
    params = [(k, v if not isinstance(v, (list, tuple)) else ", ".join(map(str, v)))
              for k, v in cert.parameters.items() if k in SHOWN_PARAMETERS]
    return {
        "label": question.label,
        "spectrum_lines": [],
        "members": [],
        "observation": None,
        "question": {"kind": question.kind, "modulus": question.modulus,
                     "setting_line": f"Race: {question.kind} modulo {question.modulus}; "
                                     f"weights {weights}",
                     "statement": question.statement, "weights": weights,
                     "definition": qrec["definition"], "normalisation": qrec["normalisation"]},
        "answer": {"lower": a["enclosure"]["lower"], "upper": a["enclosure"]["upper"],
                   "width": a["width"], "digits": _digits_text(a),
                   "target": a["target_width"], "target_met": a["target_met"],
                   "mean": a["mean"], "variance": _short_ball(a["variance"], 15), "exact": ""},
        "gaps": tiny_gaps(cert),
        "hypotheses": hyps,
        "hypothesis_names": " and ".join(h["name"] for h in cert.hypotheses),
        "budget": budget,
        "budget_total": sci(total, 3, up=True),
        "groups": groups,
        "parameters": params,
        # only what verify re-derives: the command from the question, the digest it checks
        "provenance": {"command_line": reproduce_command(question, digits),
                       "input_digest": cert.provenance["input_digest"]},
        "verify_command": f"certify verify {file_name}",
        "references": certificate_references(),
        "caution": certificate_caution(rh),
        "schema_version": cert.schema_version,
    }
