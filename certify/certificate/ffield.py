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

from ..errors import BadInput, Inconsistent
from ..result import CAUTION
from .model import Certificate, ball_record, thaw
from .recount import answer_from_enclosure, budget_records, provenance, timed_report

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
#: the independent recount of L(u, chi) from the Euler product runs when q^deg L is at most this
EULER_LIMIT = 50_000


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


def evidence_items(res) -> dict:
    """{hypothesis name: [(kind, data), ...]}: the evidence of an F_q[t] race as data.

    Each sentence is generated from its data (:func:`certify.ffield.race.evidence_sentence`);
    the result's own sentences must be exactly those (a mismatch is a bug, raised).
    """
    from ..ffield.race import search_evidence, weil_evidence

    rs = res.parameters.get("relation_search") or {}
    search = search_evidence(rs.get("precision_bits", 0), rs.get("coefficient_bound", 0),
                             res.relations)
    out = {}
    for h in res.hypotheses:
        if h.name == "Weil":
            out[h.name] = weil_evidence(res.l_data)
        elif h.name == "LI":
            out[h.name] = search
        elif h.name == "relations":
            out[h.name] = [("relations-confirmed",
                            {"relations": [list(map(int, r)) for r in res.relations]})] + search
        else:
            raise Inconsistent(f"no evidence data for the hypothesis {h.name!r}")
    return out


def hypothesis_records_with_data(res) -> list:
    from ..ffield.race import evidence_sentence

    items = evidence_items(res)
    recs = []
    for h in res.hypotheses:
        ev = [{"kind": k, "text": evidence_sentence(k, d), "data": d} for k, d in items[h.name]]
        if [e["text"] for e in ev] != list(h.evidence):
            raise Inconsistent(f"the evidence sentences of {h.name} do not follow from their data")
        recs.append({"name": h.name, "statement": h.statement, "status": h.status,
                     "evidence": ev, "reference": h.reference})
    return recs


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
        hypotheses=hypothesis_records_with_data(res),
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


def euler_product_counts(chi, degree: int):
    """N[n, j] = #{f monic, deg f = n, chi(f) = zeta^j}, n <= degree, from the Euler product.

    An independent path to the coefficients of L(u, chi): the monic irreducibles P of each
    degree (every monic polynomial tested by FLINT's irreducibility test, not the sieve the
    race uses), psi(n) = sum_{d k = n} d [chi(P)^k] in the group ring Z[C_o], and
    n l_n = sum_{k <= n} psi(k) l_(n-k), which holds exactly in Z[C_o] (unique
    factorisation; chi multiplicative).  Integer arithmetic throughout.
    """
    import numpy as np

    from ..ffield.poly import is_irreducible, monic_polys

    G = chi.group
    F, o = G.F, chi.order
    psi = [np.zeros(o, dtype=object) for _ in range(degree + 1)]
    for d in range(1, degree + 1):
        for P in monic_polys(F, d):
            if not is_irreducible(P):
                continue
            e = chi.exponent_at(P)
            if e < 0:
                continue
            for k in range(1, degree // d + 1):
                psi[d * k][(k * e) % o] += d
    rows = [np.zeros(o, dtype=object)]
    rows[0][0] = 1
    for n in range(1, degree + 1):
        acc = np.zeros(o, dtype=object)
        for k in range(1, n + 1):
            for j in np.nonzero(psi[k])[0]:
                acc += psi[k][j] * np.roll(rows[n - k], int(j))
        if any(int(x) % n for x in acc):
            raise Inconsistent(f"the Euler product gives a non-integral coefficient l_{n}")
        rows.append(acc // n)
    return np.array([[int(x) for x in r] for r in rows], dtype=np.int64)


def _character_of(G, label: str):
    import re

    m = re.fullmatch(r"chi_\{(-?\d+(?:,-?\d+)*)\}", str(label))
    if not m:
        raise BadInput(f"character label {str(label)[:40]!r} is not chi_{{...}}")
    c = tuple(int(x) for x in m.group(1).split(","))
    if len(c) != len(G.invariants) or any(not 0 <= ci < di for ci, di in zip(c, G.invariants)):
        raise BadInput(f"character label {label} does not name a character of the group")
    return G.character(c)


def check_evidence(cert: Certificate, report) -> None:
    """Each evidence item's sentence regenerated from its data, and its data re-derived.

    * ``weil-check``: the coefficients recounted by the Euler product over monic
      irreducibles (an independent path, :func:`euler_product_counts`, when q^deg L <=
      EULER_LIMIT; else by the recount below only) must be the stored ones, and the root
      census is re-derived from the recounted polynomial (Arb roots, exact classification);
    * ``relation-search``, ``search-caveat``, ``relations-confirmed``: their numbers must be the
      stored parameters and relations (which the recount re-derives);
    * no evidence item twice; each hypothesis's items are then compared with the recount.
    """
    from ..ffield.cyclo import cyclo_ring
    from ..ffield.lpoly import LPolynomial, weil_check
    from ..ffield.race import evidence_sentence

    data = thaw(cert.to_dict())
    G = rebuild_question(cert.question)[1]
    stored_l = {L["character"]: L for L in data["spectrum"]["l_polynomials"]}
    rs = data["parameters"].get("relation_search") or {}
    relations = data["spectrum"]["relations"]
    seen = set()
    for h in data["hypotheses"]:
        for i, e in enumerate(h["evidence"]):
            where = f"evidence {h['name']}[{i}] ({str(e.get('kind'))[:30]})"
            key = (h["name"], e.get("kind"), json_key(e.get("data")))
            report.add(f"{where}: not a repeated item", key not in seen, "the same item twice")
            seen.add(key)
            try:
                text = evidence_sentence(e["kind"], e["data"])
            except (KeyError, TypeError) as exc:
                report.add(f"{where}: sentence regenerated from its data", False, str(exc))
                continue
            report.add(f"{where}: sentence regenerated from its data", e["text"] == text,
                       f"stored {e['text'][:80]!r}, from the data {text[:80]!r}")
            d = e["data"]
            if e["kind"] == "weil-check":
                L = stored_l.get(d["character"])
                if not report.add(f"{where}: an L-polynomial of the spectrum", L is not None
                                  and L["coefficients"] == d["coefficients"],
                                  "its coefficients are not those of the spectrum"):
                    continue
                chi = _character_of(G, d["character"])
                if G.F.q ** len(d["coefficients"]) > EULER_LIMIT * G.F.q:
                    report.add(f"{where}: Euler product recount (skipped: q^deg L over "
                               f"{EULER_LIMIT}; the full recount below re-derives it)", True)
                    continue
                counts = euler_product_counts(chi, len(d["coefficients"]) - 1)
                Lind = LPolynomial(chi, cyclo_ring(chi.order), counts)
                report.add(f"{where}: coefficients recounted from the Euler product",
                           Lind.coefficient_strings() == list(d["coefficients"]),
                           f"Euler product {Lind.coefficient_strings()[:4]}")
                rep = weil_check(Lind, int(data["parameters"]["prec"]))
                census = {"degree": rep.degree, "expected_degree": rep.expected_degree,
                          "roots_modulus_sqrt_q": rep.n_sqrt_q, "roots_modulus_1": rep.n_unit,
                          "expected_modulus_1": rep.expected_unit, "undecided": rep.undecided}
                got = {k: d.get(k) for k in census}
                report.add(f"{where}: root census re-derived from the recounted polynomial",
                           got == census, f"stored {got}, re-derived {census}")
            elif e["kind"] == "relation-search":
                want = (rs.get("precision_bits"), data["parameters"].get("coeff_bound"), relations)
                have = (d["precision_bits"], d["coefficient_bound"], d["relations"])
                report.add(f"{where}: the search's parameters and relations as stored", have == want,
                           f"stored {have}, parameters {want}")
            elif e["kind"] == "search-caveat":
                report.add(f"{where}: the coefficient bound as stored",
                           d["coefficient_bound"] == data["parameters"].get("coeff_bound"))
            elif e["kind"] == "relations-confirmed":
                report.add(f"{where}: the relations of the spectrum", d["relations"] == relations
                           and bool(relations), f"stored {d['relations']}, spectrum {relations}")


def json_key(obj) -> str:
    import json

    return json.dumps(obj, sort_keys=True, default=str)


def _evidence_then_rebuild(cert: Certificate, report) -> Certificate:
    check_evidence(cert, report)
    if report.failures:  # evidence that does not follow from its data: no costly recount
        from ..errors import Inconsistent

        raise Inconsistent("the evidence does not follow from its data; recount skipped")
    return _rebuild(cert)


def verify_ffield(cert: Certificate):
    """Check an ``ffield-race`` certificate's evidence from its data, then recount it
    (a :class:`~.verify.VerifyReport`)."""
    return timed_report(cert.label, cert, _evidence_then_rebuild, _question, with_report=True)
