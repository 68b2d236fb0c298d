"""The context dict every renderer reads: display strings built from a certificate only."""

from __future__ import annotations

from fractions import Fraction

from ..arith import ball_from_strings, decimal_down
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


def certificate_context(cert: Certificate, file_name: str = "certificate.json") -> dict:
    """Everything the templates show, as strings and lists (no computation in templates)."""
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
    hyps = []
    for h in cert.hypotheses:
        hyps.append({"name": h["name"], "statement": h["statement"], "status": h["status"],
                     "status_text": STATUS_TEXT.get(h["status"], h["status"]),
                     "evidence": [e["text"] for e in h["evidence"]],
                     "reference": h.get("reference", "")})
    budget = [{"name": e["name"], "bound": e["bound"], "description": e["description"]}
              for e in cert.error_budget]
    total = sum((Fraction(e["bound"]) for e in cert.error_budget), Fraction(0))
    weights = (", ".join(f"w_{w['class']} = {w['weight']}" for w in q["weights"])
               or "none (pi(x) against li(x): zeta alone)")
    prov = cert.provenance
    params = [(k, v if not isinstance(v, (list, tuple)) else ", ".join(map(str, v)))
              for k, v in cert.parameters.items()]
    return {
        "label": cert.label,
        "question": {"kind": q["kind"], "modulus": q["modulus"], "statement": q["statement"],
                     "weights": weights, "definition": q["definition"],
                     "normalisation": q["normalisation"]},
        "answer": {"lower": a["enclosure"]["lower"], "upper": a["enclosure"]["upper"],
                   "width": a["width"], "digits": _digits_text(a),
                   "target": a["target_width"], "target_met": a["target_met"],
                   "mean": a["mean"], "variance": _short_ball(a["variance"], 15)},
        "gaps": tiny_gaps(cert),
        "hypotheses": hyps,
        "hypothesis_names": " and ".join(h["name"] for h in cert.hypotheses),
        "budget": budget,
        "budget_total": sci(total, 3, up=True),
        "groups": groups,
        "parameters": params,
        "provenance": {"certify": prov["certify"], "python_flint": prov["python_flint"],
                       "python": prov["python"], "platform": prov["platform"],
                       "command_line": prov["command_line"], "date": prov["date"],
                       "input_digest": prov["input_digest"]},
        "verify_command": f"certify verify {file_name}",
        "references": list(cert.references),
        "caution": cert.caution,
        "schema_version": cert.schema_version,
    }
