"""Certificates of prime races in F_q[t] (kind ``ffield-race``), verified by a recount.

The stored inputs (q, modulus, classes, weights, mode) and parameters (precision,
box budget, relation-search bound, leaders' bound, target) determine the whole
computation: :func:`verify_ffield` re-derives the L-polynomials from exact character
sums, their inverse roots, the relations (confirmed exactly) and the enclosure,
and compares (see :mod:`.recount`).
"""

from __future__ import annotations

import shlex
import time
from fractions import Fraction

from ..errors import BadInput
from ..result import CAUTION
from .model import Certificate, ball_record
from .recount import (answer_from_enclosure, budget_records, hypothesis_records, provenance,
                      timed_report)

DEFINITION = ("natural density: lim_{N -> oo} (1/N) #{1 <= X <= N : the race's sign is positive "
              "at X}, which the limit function's Haar measure encloses (docs/function_fields.md)")
NORMALISATION = ("phi(m) X R(X) / q^(X/2) (degree = X) and phi(m) X C(X) / q^(X/2) (degree <= X) "
                 "equal G(X (1/2, theta_1/2pi, ...)) + o(1), G a trigonometric polynomial on the "
                 "orbit closure of the inverse roots' angles")
REFERENCES = (
    "Weil's theorem for L-functions of F_q[t]: Number Theory in Function Fields, Graduate Texts "
    "in Mathematics 210, Springer (2002), chapters 4-5.",
    "Lattice reduction: Factoring polynomials with rational coefficients, Mathematische Annalen "
    "261 (1982).",
)
LIMITS = {"prec": 1024, "max_boxes": 2_000_000, "coeff_bound": 200, "leader_bound": 2000}


def caution() -> str:
    return (CAUTION + " Here Weil's theorem is proven; LI or the completeness of the listed "
            "relations is assumed. Re-check this file with `certify verify`.")


def _complex(z) -> dict:
    return {"re": ball_record(z.real), "im": ball_record(z.imag)}


def command_line(qn, digits_or_target, leader_bound: int) -> str:
    base = ["certify", "ffrace", str(qn.q), qn.modulus]
    if qn.classes == ("non-residues", "residues"):
        base.append("--residues")
    else:
        base += list(qn.classes) + ["--weights"] + [str(w) for w in qn.weights]
    import math

    digits = max(1, round(-math.log10(Fraction(digits_or_target))))
    base += ["--mode", qn.mode, "--digits", str(digits), "--leaders", str(leader_bound)]
    return " ".join(shlex.quote(a) for a in base)


def question_record(qn) -> dict:
    return {"setting": "F_q[t]", "q": qn.q, "modulus": qn.modulus,
            "classes": list(qn.classes), "weights": list(qn.weights), "mode": qn.mode,
            "label": qn.label, "statement": qn.statement, "definition": DEFINITION,
            "normalisation": NORMALISATION}


def _question(cert: Certificate) -> dict:
    return question_record(rebuild_question(cert.question)[0])


def ffield_certificate(res, target: Fraction, prec: int, max_boxes: int, coeff_bound: int,
                       leader_bound: int, seconds: float | None = None) -> Certificate:
    """The certificate of an F_q[t] race result computed with these parameters."""
    qn = res.question
    question = question_record(qn)
    params = {k: v for k, v in res.parameters.items()}
    params.update({"prec": prec, "max_boxes": max_boxes, "coeff_bound": coeff_bound,
                   "leader_bound": leader_bound, "target_width": str(target), "case": res.case})
    spectrum = {
        "l_polynomials": [{"character": L.character, "order": L.order, "parity": L.parity,
                           "conductor": L.conductor, "degree": L.degree,
                           "coefficients": list(L.coefficients),
                           "inverse_roots": [_complex(r) for r in L.inverse_roots],
                           "weil_check": L.weil.describe(), "weight": _complex(L.weight)}
                          for L in res.l_data],
        "points": [{"kind": p.kind, "theta_over_2pi": ball_record(p.x), "alpha": _complex(p.alpha),
                    "minimal_polynomial": [int(c) for c in p.root.g], "root_index": p.root.index,
                    "coefficient_A": _complex(p.A), "characters": list(p.characters)}
                   for p in res.points],
        "mu_0": ball_record(res.mu0), "mu_pi": ball_record(res.mupi), "c_2": res.c2,
        "relations": [list(map(int, r)) for r in res.relations],
        "orbit_closure": res.closure.describe(),
        "leaders": res.leaders.to_dict() if res.leaders else None,
    }
    inputs = {"setting": "F_q[t]", **{k: question[k] for k in ("q", "modulus", "classes",
                                                               "weights", "mode")},
              "target": str(target), "prec": prec, "max_boxes": max_boxes,
              "coeff_bound": coeff_bound, "leader_bound": leader_bound}
    total = seconds if seconds is not None else float(res.timings.get("total", 0.0))
    return Certificate(
        question=question,
        answer=answer_from_enclosure(res.density.lower, res.density.upper, target),
        hypotheses=hypothesis_records(res.hypotheses),
        error_budget=budget_records(res.budget),
        parameters=params, spectrum=spectrum,
        provenance=provenance(command_line(qn, str(target), leader_bound), inputs, total),
        references=list(REFERENCES), caution=caution(), kind="ffield-race")


def rebuild_question(rec):
    from ..ffield.race import parse_race, residue_race

    if list(rec["classes"]) == ["non-residues", "residues"]:
        return residue_race(rec["q"], rec["modulus"], rec["mode"])
    return parse_race(rec["q"], rec["modulus"], list(rec["classes"]), list(rec["weights"]),
                      rec["mode"])


def certify_ffield(qn, G, wd, target: Fraction, prec: int = 160, max_boxes: int = 200000,
                   coeff_bound: int = 60, leader_bound: int = 60, progress=None):
    """(result, certificate) of an F_q[t] race (``progress(message)`` is told each stage)."""
    from ..ffield.race import certify_ffrace

    t0 = time.time()
    res = certify_ffrace(qn, G, wd, target_width=float(target), prec=prec,
                         leader_bound=leader_bound, max_boxes=max_boxes, coeff_bound=coeff_bound,
                         progress=progress)
    return res, ffield_certificate(res, target, prec, max_boxes, coeff_bound, leader_bound,
                                   time.time() - t0)


def _rebuild(cert: Certificate) -> Certificate:
    p = cert.parameters
    for k, lim in LIMITS.items():
        v = p[k]
        if type(v) is not int or not 0 <= v <= lim:
            raise BadInput(f"parameter {k} = {str(v)[:20]} outside 0..{lim}")
    target = Fraction(p["target_width"])
    if not Fraction(1, 10**30) <= target < 1:
        raise BadInput(f"target width {p['target_width'][:30]} outside [1e-30, 1)")
    qn, G, wd = rebuild_question(cert.question)
    # the stored question must be a valid race (parse_race refuses the rest) and the
    # parse must not have normalised anything away
    return certify_ffield(qn, G, wd, target, p["prec"], p["max_boxes"], p["coeff_bound"],
                          p["leader_bound"])[1]


def verify_ffield(cert: Certificate):
    """Recount an ``ffield-race`` certificate (a :class:`~.verify.VerifyReport`)."""
    return timed_report(cert.label, cert, _rebuild, _question)
