"""Certificates of trace races of elliptic curves over F_q(t) (kind ``curve-race``).

Verified by a recount (see :mod:`.recount`): the curve is rebuilt from q, A, B;
the L-polynomial from point counts and the functional equation, confirmed by the
stored number of further degrees; its inverse roots enclosed by Arb; the
relations among the angles and the enclosure recomputed with the stored
parameters; every stored field compared with the re-derived one.
"""

from __future__ import annotations

import shlex
import time
from fractions import Fraction

from ..arith import arb
from ..errors import BadInput
from .model import Certificate, ball_record
from .recount import (answer_from_enclosure, budget_records, hypothesis_records, provenance,
                      timed_report)

DEFINITION = ("natural density: lim_{N -> oo} (1/N) #{1 <= X <= N : the normalised trace sum is "
              "positive at X}, enclosed by the measure of {limit function > 0} "
              "(docs/elliptic_curves.md)")
REFERENCES = (
    "Weil's conjectures, proof for L-functions of elliptic curves over function fields: "
    "La conjecture de Weil II, Publications Mathematiques de l'IHES 52 (1980).",
    "Degree of L(E, u): Formule de Lefschetz et rationalite des fonctions L, Seminaire Bourbaki "
    "279 (1965).",
)
LIMITS = {"prec": 1024, "max_boxes": 2_000_000, "confirm": 6}


def caution() -> str:
    from ..result import CAUTION

    return CAUTION + " Re-check this file with `certify verify`."


def _ball(x: arb) -> dict:
    return ball_record(x)


def question_record(E, mode: str) -> dict:
    from types import SimpleNamespace

    from ..curves.race import TraceRaceResult

    cd = E.as_dict()
    return {"setting": "E/F_q(t)", "q": E.q, "A": cd["A_input"], "B": cd["B_input"],
            "mode": mode, "label": f"delta_{mode}(E: {E.describe()})",
            "statement": TraceRaceResult.statement(SimpleNamespace(mode=mode)),
            "definition": DEFINITION}


def _question(cert: Certificate) -> dict:
    from ..curves.model import make_curve

    q = cert.question
    if q["mode"] not in ("cumulative", "degree"):
        raise BadInput(f"unknown mode {q['mode']!r}")
    return question_record(make_curve(q["q"], q["A"], q["B"]), q["mode"])


def curve_certificate(R, target: Fraction, confirm: int, max_boxes: int,
                      seconds: float | None = None) -> Certificate:
    E, L = R.curve, R.lpoly
    cd = E.as_dict()
    question = question_record(E, R.mode)
    params = {k: v for k, v in R.parameters.items() if k != "command"}
    params.update({"prec": int(R.parameters.get("prec", 128)), "max_boxes": max_boxes,
                   "confirm": confirm, "target_width": str(target)})
    var = R.variable
    spectrum = {
        "curve": cd, "l_polynomial": L.as_dict(),
        "race_variable": {"mean_by_residue": [_ball(m) for m in var.mu], "period": var.period,
                          "weights": [_ball(w) for w in var.weights]},
        "per_residue": [{"lower": str(e.lower), "upper": str(e.upper)} for e in R.per_residue],
    }
    inputs = {"setting": "E/F_q(t)", "q": E.q, "A": question["A"], "B": question["B"],
              "mode": R.mode, "target": str(target), "confirm": confirm, "max_boxes": max_boxes}
    cmd = " ".join(shlex.quote(a) for a in ["certify", "curve", str(E.q), question["A"],
                                             question["B"], "--mode", R.mode, "--width",
                                             f"{float(target):.6g}", "--confirm", str(confirm),
                                             "--max-boxes", str(max_boxes)])
    total = seconds if seconds is not None else 0.0
    return Certificate(
        question=question,
        answer=answer_from_enclosure(R.density.lower, R.density.upper, target),
        hypotheses=hypothesis_records(R.hypotheses), error_budget=budget_records(R.budget),
        parameters=params, spectrum=spectrum, provenance=provenance(cmd, inputs, total),
        references=list(REFERENCES), caution=caution(), kind="curve-race")


def certify_curve(q, A: str, B: str, mode: str = "cumulative", target: Fraction = Fraction(1, 10**8),
                  confirm: int = 1, max_boxes: int = 100000):
    """(result, certificate) of a curve's trace race."""
    from ..curves.lpoly import l_polynomial
    from ..curves.model import make_curve
    from ..curves.race import trace_race

    t0 = time.time()
    E = make_curve(q, A, B)
    L = l_polynomial(E, confirm=confirm)
    R = trace_race(E, L, mode, float(target), observe=0, max_boxes=max_boxes)
    return R, curve_certificate(R, target, confirm, max_boxes, time.time() - t0)


def _rebuild(cert: Certificate) -> Certificate:
    p = cert.parameters
    for k, lim in LIMITS.items():
        v = p[k]
        if type(v) is not int or not 0 <= v <= lim:
            raise BadInput(f"parameter {k} = {str(v)[:20]} outside 0..{lim}")
    target = Fraction(p["target_width"])
    if not Fraction(1, 10**30) <= target < 1:
        raise BadInput(f"target width {p['target_width'][:30]} outside [1e-30, 1)")
    q = cert.question
    return certify_curve(q["q"], q["A"], q["B"], q["mode"], target, p["confirm"],
                         p["max_boxes"])[1]


def verify_curve(cert: Certificate):
    """Recount a ``curve-race`` certificate (a :class:`~.verify.VerifyReport`)."""
    return timed_report(cert.label, cert, _rebuild, _question)
