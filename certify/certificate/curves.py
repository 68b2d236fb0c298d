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
from ..errors import BadInput, CertifyError
from .model import Certificate, ball_record, thaw
from .recount import answer_from_enclosure, budget_records, provenance, timed_report

DEFINITION = ("natural density: lim_{N -> oo} (1/N) #{1 <= X <= N : the normalised trace sum is "
              "positive at X}, enclosed by the measure of {limit function > 0} "
              "(`docs/elliptic_curves.md`)")
REFERENCES = (
    "Weil's conjectures, proof for L-functions of elliptic curves over function fields: "
    "La conjecture de Weil II, Publications Mathematiques de l'IHES 52 (1980).",
    "Degree of L(E, u): Formule de Lefschetz et rationalite des fonctions L, Seminaire Bourbaki "
    "279 (1965).",
)
LIMITS = {"prec": 1024, "max_boxes": 2_000_000, "confirm": 6}
#: point counts are recounted by a plain loop over F_(p^n) (q = p prime) while p^n <= this
BRUTE_FORCE_FIELD = 100


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


def hypothesis_records_with_data(R) -> list:
    """The hypotheses with their evidence items {kind, text, data}, text from the data."""
    from ..curves.race import evidence_sentence
    from ..errors import Inconsistent

    recs = []
    for h in R.hypotheses:
        items = R.evidence.get(h.name)
        if items is None:
            raise Inconsistent(f"no evidence data for the hypothesis {h.name!r}")
        ev = [{"kind": k, "text": evidence_sentence(k, d), "data": d} for k, d in items]
        if [e["text"] for e in ev] != list(h.evidence):
            raise Inconsistent(f"the evidence sentences of {h.name} do not follow from their data")
        recs.append({"name": h.name, "statement": h.statement, "status": h.status,
                     "evidence": ev, "reference": h.reference})
    return recs


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
        hypotheses=hypothesis_records_with_data(R), error_budget=budget_records(R.budget),
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


def brute_force_frobenius_sum(E, n: int) -> int:
    """c_n = sum over theta in F_(p^n) and infinity of -sum_x chi(x^3 + A(theta) x + B(theta)).

    An independent path to the point counts (q = p prime only): FLINT's fq_default field
    F_(p^n), a plain double loop, quadratic character from the set of squares; none of
    the vectorised field tables or trace code of :mod:`certify.curves.traces` is used.
    The minimal model at the finite places and the model at infinity are the curve's.
    """
    import itertools

    from flint import fq_default_ctx

    p = E.field.p
    K = fq_default_ctx(p, n)
    elems = [K(list(v)) for v in itertools.product(range(p), repeat=n)]
    squares = {x * x for x in elems}
    zero = K(0)

    def chi(v):
        return 0 if v == zero else (1 if v in squares else -1)

    def coeffs(f):
        return [int(E.field.code(c)) for c in f.coeffs()]

    cA, cB = coeffs(E.A), coeffs(E.B)

    def ev(cs, t):
        acc = zero
        for c in reversed(cs):
            acc = acc * t + K(c)
        return acc

    cubes = [(x, x * x * x) for x in elems]
    total = 0
    for t in elems:
        a, b = ev(cA, t), ev(cB, t)
        total -= sum(chi(x3 + a * x + b) for x, x3 in cubes)
    a, b = K(int(E.field.code(E.a_inf))), K(int(E.field.code(E.b_inf)))
    total -= sum(chi(x3 + a * x + b) for x, x3 in cubes)
    return total


def check_evidence(cert: Certificate, report) -> None:
    """Each evidence item's sentence regenerated from its data, and its data re-derived.

    * ``point-counts``: L(E, u) re-derived from the stored sums c_n alone (Newton's
      identities and the functional equation, the stored confirming degrees checked),
      and every c_n with p^n <= BRUTE_FORCE_FIELD recounted by a plain loop over
      F_(p^n) (:func:`brute_force_frobenius_sum`, an independent path; q prime);
    * ``inverse-roots``: the roots of the stored polynomial enclosed again by Arb, each
      within the stored bound of modulus q;
    * the relation and torsion items: their numbers are the stored parameters;
    * no item twice; each hypothesis's items are then compared with the recount.
    """
    import json

    from ..curves.lpoly import from_coefficients, l_polynomial
    from ..curves.model import make_curve
    from ..curves.race import evidence_sentence

    data = thaw(cert.to_dict())
    q = cert.question
    E = make_curve(q["q"], q["A"], q["B"])
    Lrec = data["spectrum"]["l_polynomial"]
    params = data["parameters"]
    var = data["spectrum"]["race_variable"]
    seen = set()
    for h in data["hypotheses"]:
        for i, e in enumerate(h["evidence"]):
            where = f"evidence {h['name']}[{i}] ({str(e.get('kind'))[:30]})"
            key = (h["name"], e.get("kind"), json.dumps(e.get("data"), sort_keys=True))
            report.add(f"{where}: not a repeated item", key not in seen, "the same item twice")
            seen.add(key)
            try:
                text = evidence_sentence(e["kind"], e["data"])
            except (KeyError, TypeError, ValueError) as exc:
                report.add(f"{where}: sentence regenerated from its data", False, str(exc))
                continue
            report.add(f"{where}: sentence regenerated from its data", e["text"] == text,
                       f"stored {e['text'][:80]!r}, from the data {text[:80]!r}")
            d = e["data"]
            if e["kind"] == "point-counts":
                c = [0] + [int(x) for x in d["frobenius_sums"]]
                if len(c) > 200 or any(abs(x) > 10**200 for x in c):
                    report.add(f"{where}: sizes", False, "too many or too large sums")
                    continue

                def source(n, c=c):
                    if n >= len(c):
                        raise BadInput(f"the stored point counts stop at degree {len(c) - 1}")
                    return c[n]

                try:
                    Lfs = l_polynomial(E, confirm=len(d["degrees_confirmed"]), c_source=source)
                    got = {"coefficients": list(Lfs.coeffs), "sign": Lfs.sign,
                           "degrees_used": Lfs.degrees_used,
                           "degrees_confirmed": list(Lfs.degrees_confirmed)}
                except (CertifyError, ArithmeticError) as exc:
                    report.add(f"{where}: L(E, u) re-derived from the stored point counts", False,
                               str(exc))
                    continue
                want = {"coefficients": Lrec["coefficients"], "sign": d["sign"],
                        "degrees_used": d["degrees_used"],
                        "degrees_confirmed": list(d["degrees_confirmed"])}
                report.add(f"{where}: L(E, u) re-derived from the stored point counts",
                           got == want and d["degree"] == len(Lrec["coefficients"]) - 1,
                           f"re-derived {got}, stored {want}")
                if E.field.k == 1:
                    for n in range(1, len(c)):
                        if E.field.p ** n > BRUTE_FORCE_FIELD:
                            break
                        b = brute_force_frobenius_sum(E, n)
                        report.add(f"{where}: c_{n} recounted by a plain loop over F_{E.field.p}^{n}",
                                   b == c[n], f"stored {c[n]}, recounted {b}")
            elif e["kind"] == "inverse-roots":
                coeffs = [int(x) for x in d["coefficients"]]
                ok = coeffs == Lrec["coefficients"] and d["degree"] == len(coeffs) - 1
                if report.add(f"{where}: the stored L-polynomial", ok, "coefficients differ") \
                        and len(coeffs) > 1:
                    try:
                        err = from_coefficients(E.q, coeffs, 1, [0], 0, ()).max_modulus_error
                    except (CertifyError, ArithmeticError) as exc:
                        report.add(f"{where}: inverse roots of the stored polynomial enclosed",
                                   False, str(exc))
                        continue
                    report.add(f"{where}: every inverse root within the stored bound of modulus q",
                               Fraction(err) <= Fraction(d["max_modulus_error"]),
                               f"re-derived {err:.3g}, stored {d['max_modulus_error']}")
            elif e["kind"] in ("torsion-only", "torsion-roots"):
                report.add(f"{where}: the period of the race variable",
                           d["period"] == var["period"], f"stored {d['period']}, {var['period']}")
            elif e["kind"] == "relation-search":
                report.add(f"{where}: the number of non-torsion angles",
                           d["angles"] == len(var["weights"]), f"{d['angles']} vs {len(var['weights'])}")
            elif e["kind"] == "relations-confirmed":
                report.add(f"{where}: the relations of the parameters",
                           d["relations"] == params.get("relations"), "differ")
            elif e["kind"] == "orbit-closure":
                report.add(f"{where}: the orbit closure of the parameters",
                           d["description"] == params.get("orbit_closure"), "differs")


def _evidence_then_rebuild(cert: Certificate, report) -> Certificate:
    check_evidence(cert, report)
    if report.failures:  # evidence that does not follow from its data: no costly recount
        from ..errors import Inconsistent

        raise Inconsistent("the evidence does not follow from its data; recount skipped")
    return _rebuild(cert)


def verify_curve(cert: Certificate):
    """Check a ``curve-race`` certificate's evidence from its data, then recount it
    (a :class:`~.verify.VerifyReport`)."""
    return timed_report(cert.label, cert, _evidence_then_rebuild, _question, with_report=True)
