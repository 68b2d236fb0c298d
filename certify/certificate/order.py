"""Certificates of orderings of three or more classes (races among several classes).

The same model as two-way races (:class:`~certify.certificate.model.Certificate`,
schema version 2), kind ``order-race``, question kind ``ordering``:
the question stores the classes in order; the answer stores the mean vector
(comma-separated) and the exact covariance matrix; each spectral group stores
its direction vector v in C^(r-1) beside the zeros and moments; the
parameters record the consistency checks run with it (the r! orderings sum to
1, pairwise marginals against two-way densities) when the certificate came
from ``certify order --all``.  ``verify`` re-certifies the zeros, recomputes
the moments, residual sums and vectors, re-runs the orthant engine and
re-checks the hypotheses' evidence with the same code as for two-way races.
"""

from __future__ import annotations

import hashlib
import json
from fractions import Fraction

import time

from ..arith import arb, certified_digits, decimal_down, decimal_up, workprec
from ..density.orthant import VectorGroup, VectorVariable, covariance, orthant_enclosure
from ..race.order import OrderQuestion, mean_vector, order_groups, ordering
from ..spectrum.moments import zero_power_sums
from ..spectrum.spectrum import SpectrumStore, residual_checks, residual_sums
from ..source.dirichlet import primitive_character
from ..errors import Inconsistent
from .build import (RELATION_SIZE, _hypotheses, _spectrum_record, answer_fields,
                    certificate_caution, certificate_references)
from .model import Certificate, ball_of, ball_record
from .numbers import places_for, sci_bound

NORMALISATION = ("E(x;a) = (log x / sqrt x)(phi(q) pi(x;q,a) - pi(x)); under GRH and LI the vector "
                 "Y_i = E(x;a_i) - E(x;a_{i+1}) (i = 1..r-1) has the limit law of "
                 "mu + sum_chi sum_{gamma_chi > 0} 2 Re(v_chi U_gamma)/sqrt(1/4 + gamma^2), U_gamma "
                 "independent uniform on the unit circle, v_{chi,i} = conj chi(a_i) - conj chi(a_{i+1}), "
                 "mu_i = c(q,a_{i+1}) - c(q,a_i) (as in Chebyshev's bias, Experimental Mathematics 3 "
                 "(1994); docs/method.md, section 10).")
DEFINITION = ("delta = lim_{X -> oo} (1/log X) * integral over {2 <= x <= X : pi(x;q,a_1) > ... > "
              "pi(x;q,a_r)} of dx/x (logarithmic density), which equals P(Y_i > 0 for all i) for "
              "the limit law above.")


def reproduce_command(question: OrderQuestion, digits: int) -> str:
    return f"certify order {question.modulus} {' '.join(map(str, question.classes))} " \
           f"--digits {digits} --certificate DIR"


def _family_command(cl, question: OrderQuestion, digits: int) -> bool:
    """True when ``cl`` is the ``--all`` command of a family this ordering belongs to: the
    same modulus and digits, the classes in any order (that command recomputes every
    ordering, this one included)."""
    if not isinstance(cl, str):
        return False
    words = cl.split()
    n = len(question.classes)
    if len(words) != 3 + n + 3 or words[:3] != ["certify", "order", str(question.modulus)] \
            or words[3 + n:] != ["--digits", str(digits), "--all"]:
        return False
    return sorted(words[3:3 + n]) == sorted(map(str, question.classes))


def input_digest(question: OrderQuestion, digits: int) -> str:
    payload = json.dumps({"modulus": question.modulus, "kind": "ordering",
                          "classes": list(question.classes), "digits": digits}, sort_keys=True)
    return "sha256:" + hashlib.sha256(payload.encode()).hexdigest()


def question_record(question: OrderQuestion) -> dict:
    return {"kind": "ordering", "modulus": question.modulus, "classes": list(question.classes),
            "weights": [], "label": question.label, "statement": question.statement,
            "normalisation": NORMALISATION, "definition": DEFINITION}


def _mean_text(mean) -> str:
    return ",".join(str(m) for m in mean)


def answer_record(result) -> dict:
    """The enclosure widened outward to printable decimals; mean vector and exact covariance."""
    lo, hi = result.density.lower, result.density.upper
    width = hi - lo
    places = places_for(width)
    margin = width / 10**6 if width > 0 else Fraction(1, 10 ** (places + 3))
    # a density lies in [0, 1]: the widened ends are kept inside it
    lower = decimal_down(max(lo - margin, Fraction(0)), places)
    upper = decimal_up(min(hi + margin, Fraction(1)), places)
    flo, fhi = Fraction(lower), Fraction(upper)
    return {
        "enclosure": {"lower": lower, "upper": upper},
        "engine_ball": ball_record(result.ball),
        **answer_fields(flo, fhi, result.digits_requested),
        "mean": _mean_text(result.mean),
        "variance": ball_record(result.covariance[0][0]),
        "covariance": [[ball_record(c) for c in row] for row in result.covariance],
    }


def order_certificate(result, store: SpectrumStore, consistency=(),
                      relation_size: int = RELATION_SIZE) -> Certificate:
    """The certificate of an ordering's result computed with ``store``.

    ``consistency``: the family's checks (Consistency objects), recorded in the
    parameters so that a reader sees them beside the enclosure.
    """
    spectrum = _spectrum_record(result, store)
    vectors = {g.label: g.vector for g in order_groups(result.question)}
    for rec in spectrum["groups"]:
        rec["vector"] = [{"re": ball_record(v.real), "im": ball_record(v.imag)}
                         for v in vectors[rec["label"]]]
    params = dict(result.parameters)
    params["digits_requested"] = result.digits_requested
    params["density_target_width"] = repr(10.0 ** (-result.digits_requested))
    params["consistency"] = [c.as_dict() for c in consistency]
    prov = dict(result.provenance)
    if not prov.get("command_line"):
        prov["command_line"] = reproduce_command(result.question, result.digits_requested)
    prov["input_digest"] = input_digest(result.question, result.digits_requested)
    prov["timings_seconds"] = dict(result.timings)
    budget = [{"name": e.name, "bound": sci_bound(e.bound, 3), "description": e.description}
              for e in result.budget]
    return Certificate(
        question=question_record(result.question),
        answer=answer_record(result),
        hypotheses=_hypotheses(result, spectrum, relation_size),
        error_budget=budget,
        parameters=params,
        spectrum=spectrum,
        provenance=prov,
        references=certificate_references(),
        caution=certificate_caution("GRH"),
        kind="order-race",
    )


def certify_order_with_certificate(question: OrderQuestion, digits: int,
                                   store: SpectrumStore | None = None, command_line: str = ""):
    """(OrderResult, Certificate) for one ordering."""
    from ..orders import certify_order

    store = store if store is not None else SpectrumStore()
    result = certify_order(question, digits, store=store, command_line=command_line)
    return result, order_certificate(result, store)


# ---------------------------------------------------------------------------
# re-verification
# ---------------------------------------------------------------------------

def verify_order_certificate(cert: Certificate):
    """Re-check an ``order-race`` certificate from its stored data (a VerifyReport; never raises)."""
    from ..errors import CertifyError
    from .verify import VerifyReport

    t0 = time.time()
    report = VerifyReport(cert.label)
    try:
        _check_limits(cert)
        verify_order(cert, report)
    except CertifyError as exc:
        report.add("re-verification", False, f"{type(exc).__name__}: {exc}")
    except (KeyError, TypeError, ValueError, IndexError, ZeroDivisionError) as exc:
        report.add("re-verification", False, f"malformed certificate data ({type(exc).__name__}: {exc})")
    report.seconds = time.time() - t0
    report.original_seconds = cert.provenance.get("timings_seconds", {}).get("total")
    return report


def _check_limits(cert: Certificate) -> None:
    """The bounds of two-way races (precision, moments, zeros), and at most 5 classes."""
    from ..errors import BadInput
    from ..race.order import MAX_CLASSES
    from .verify import check_limits

    from ..orders import MAX_DIGITS

    if not 3 <= len(cert.question["classes"]) <= MAX_CLASSES:
        raise BadInput(f"an ordering certificate has 3..{MAX_CLASSES} classes")
    d = cert.parameters.get("digits_requested")
    if type(d) is not int or not 1 <= d <= MAX_DIGITS:
        raise BadInput(f"digits_requested {str(d)[:20]} outside 1..{MAX_DIGITS}")
    check_limits(cert)


def verify_order(cert: Certificate, report) -> None:
    """Re-check an ordering's certificate into ``report``."""
    from .verify import _CENTRAL, _check_zero_list, _contains, _overlap, _q, _verify_hypotheses

    _CENTRAL.clear()  # central values are recomputed here, none kept from another certificate
    params = cert.parameters
    prec = int(params["working_precision_bits"])
    digits = int(params["digits_requested"])
    tau = 10.0 ** (-digits)
    from .model import thaw

    question = ordering(cert.question["modulus"], *cert.question["classes"])
    report.add("question: ordering rebuilt from modulus and classes",
               question.label == cert.question["label"],
               f"stored {cert.question['label']}, rebuilt {question.label}")
    expected_q = question_record(question)
    diff = sorted(k for k in set(expected_q) | set(cert.question)
                  if thaw(cert.question.get(k)) != expected_q.get(k))
    report.add("question: kind, modulus, classes, label, statement, normalisation and definition "
               "rebuilt from modulus and classes", not diff,
               f"stored field(s) {', '.join(diff)} differ from the rebuilt question")
    report.add("answer: no exact value (an ordering's density is not known exactly)",
               "exact" not in cert.answer, "an exact value is claimed")
    report.add("provenance: input digest of the question and target",
               cert.provenance.get("input_digest") == input_digest(question, digits),
               "the stored digest is not that of the stored question and target")
    cl = cert.provenance.get("command_line")
    base = f"certify order {question.modulus} {' '.join(map(str, question.classes))} --digits {digits}"
    report.add("provenance: the command line that recomputes it",
               cl in (base, base + " --all", reproduce_command(question, digits))
               or _family_command(cl, question, digits),
               f"stored {str(cl)[:80]!r}")
    report.add("parameters: target of the density engine", params.get("density_target_width")
               == repr(tau), f"stored {params.get('density_target_width')!r}, digits {digits}")
    expected_a = answer_fields(cert.lower, cert.upper, digits)
    diff = sorted(k for k in expected_a if thaw(cert.answer.get(k)) != expected_a[k])
    report.add("answer: width, certified digits, gaps to 1/2 and 1, target and target_met "
               "recomputed from the stored enclosure", not diff,
               f"stored field(s) {', '.join(diff)} differ from what the enclosure gives")
    if report.failures:  # the question, the target or the answer's own fields are not the
        # ones the stored data give: nothing below (zeros, engine at the stored target) is run
        report.add("spectrum and density: not re-checked", False,
                   "the question, target or answer fields did not verify")
        return
    mu = mean_vector(question)
    report.add("answer: mean vector mu_i = c(q,a_{i+1}) - c(q,a_i)",
               _mean_text(mu) == cert.answer["mean"],
               f"stored {cert.answer['mean']}, recomputed {_mean_text(mu)}")
    groups = order_groups(question)
    stored = cert.spectrum["groups"]
    if not report.add("spectrum: character groups match the ordering",
                      [list(map(list, g.primitive_keys)) for g in groups]
                      == [[[lf["conductor"], lf["label"]] for lf in sg["l_functions"]] for sg in stored],
                      "the stored L-functions are not those the ordering needs"):
        return
    vgroups, group_data, all_ok = [], [], True
    for g, sg in zip(groups, stored):
        keys = [tuple(k) for k in g.primitive_keys]
        report.add(f"{g.label}: group label, real flag and parities", sg["label"] == g.label
                   and sg["real"] == g.is_real and [lf["parity"] for lf in sg["l_functions"]]
                   == [primitive_character(c, n).parity for c, n in keys],
                   "stored group label, 'real' flag or parity differ")
        with workprec(prec):
            report.add(f"{g.label}: scale 2 sum_i |v_chi,i|", _overlap(ball_of(sg["scale"]), 2 * g.reach),
                       "stored scale disagrees with the classes")
        T = float(sg["isolation_height"])
        zs = _check_zero_list(report, g.label, list(sg["zeros"]), keys, Fraction(T))
        if zs is None:
            all_ok = False
            continue
        with workprec(prec):
            vec_ok = len(sg.get("vector", ())) == len(g.vector) and all(
                _overlap(ball_of(s["re"]), v.real) and _overlap(ball_of(s["im"]), v.imag)
                for s, v in zip(sg["vector"], g.vector))
        report.add(f"{g.label}: direction vector v_chi", vec_ok, "stored vector disagrees with the classes")
        mom = sg["moments"]
        c0, n0 = keys[0]
        S = zero_power_sums(c0, n0, primitive_character(c0, n0).parity, int(mom["source_count"]),
                            int(mom["source_bits"]))
        K = int(mom["count"])
        with workprec(prec):
            target = [s / (2 if g.is_real else 1) for s in S[:K]]
        stored_t = [ball_of(b) for b in mom["target_sums"]]
        if not report.add(f"{g.label}: {K} exact moments recomputed from log Lambda",
                          len(stored_t) == K and all(_contains(st, t) for st, t in zip(stored_t, target)),
                          "a stored moment does not contain the recomputed value"):
            all_ok = False
            continue
        with workprec(prec):
            R = residual_sums(target, zs)
            try:
                residual_checks(g.label, R, T, keys[0][0], len(keys))
                report.add(f"{g.label}: residual sums R_1..R_{K} and their checks", True)
                stored_r = [ball_of(b) for b in mom.get("residual_sums", [])]
                report.add(f"{g.label}: stored residual sums agree with the recomputed ones",
                           len(stored_r) == K and all(_overlap(a, b) for a, b in zip(stored_r, R)),
                           "a stored residual sum is disjoint from the recomputed one")
            except Inconsistent as exc:
                report.add(f"{g.label}: residual sums and their checks", False, str(exc))
                all_ok = False
                continue
            ws = tuple(1 / (arb(1) / 4 + z * z).sqrt() for z in zs)
            vgroups.append(VectorGroup(g.vector, ws, tuple(R), g.label))
        group_data.append((g, sg, zs, R))
    if not all_ok:
        report.add("density: not re-run", False, "the spectrum did not verify")
        return
    with workprec(prec):
        var = VectorVariable(tuple(arb(m.numerator) / m.denominator for m in mu), tuple(vgroups))
        cov = covariance(var)
        stored_cov = cert.answer.get("covariance", ())
        report.add("answer: covariance matrix recomputed from the exact moments",
                   len(stored_cov) == len(cov) and all(
                       _overlap(ball_of(s), c) for srow, crow in zip(stored_cov, cov)
                       for s, c in zip(srow, crow)),
                   "a stored covariance entry is disjoint from the recomputed one")
    d = question.dimension
    dens = orthant_enclosure(var, tau, signs=[tuple([1] * d)], prec=prec)[tuple([1] * d)]
    lo, hi = dens.enclosure.lower, dens.enclosure.upper
    s_lo, s_hi = cert.lower, cert.upper
    report.add("density: stored enclosure contains the recomputed one", s_lo <= lo and hi <= s_hi,
               f"stored [{cert.answer['enclosure']['lower']}, {cert.answer['enclosure']['upper']}], "
               f"recomputed [{float(lo):.17g}, {float(hi):.17g}]")
    stored_budget = {e["name"]: e for e in cert.error_budget}
    names = [e["name"] for e in cert.error_budget]
    report.add("error budget: the same terms, once each, in the same order",
               names == [e.name for e in dens.budget], f"stored {names}")
    for e in dens.budget:
        st = stored_budget.get(e.name)
        ok = st is not None and _q(Fraction(st["bound"])) >= arb(e.bound.upper()) \
            and st["description"] == e.description
        report.add(f"error bound '{e.name}' and its description", ok,
                   f"stored {st['bound'] if st else 'missing'}, recomputed {e.bound_float:.3e}")
    a = cert.answer
    from .evidence import exact_ends

    extra = sorted(set(a) - set(expected_a) - {"enclosure", "engine_ball", "mean", "variance",
                                               "covariance"})
    report.add("answer: no unexpected field", not extra, f"unexpected field(s) {extra}")
    eb = ball_of(a["engine_ball"], "engine ball")
    el, eh = exact_ends(eb)
    report.add("answer: engine ball inside the stored enclosure and meets the recomputed one",
               s_lo <= el and eh <= s_hi and _overlap(eb, dens.ball),
               "the stored engine ball is outside the enclosure or disjoint from the recomputed one")
    report.add("answer: variance is the first diagonal entry of the covariance",
               thaw(a["variance"]) == thaw(stored_cov[0][0]) if stored_cov else False,
               "the stored variance is not the covariance's first entry")
    expected_p = {k: v for k, v in dens.parameters.items() if k in params}
    report.add("parameters: exactly the fields an ordering's certificate records",
               set(params) == set(ORDER_PARAMETERS),
               f"unexpected {sorted(set(params) - set(ORDER_PARAMETERS))[:4]}, "
               f"missing {sorted(set(ORDER_PARAMETERS) - set(params))[:4]}")
    expected_p.update({"digits_requested": digits, "density_target_width": repr(tau),
                       "target_width": f"1e-{digits}",
                       "zeros_used": sum(len(zs) for _, _, zs, _ in group_data),
                       "primitive_l_functions": sorted(f"{lf['conductor']}.{lf['label']}"
                                                       for _, sg, _, _ in group_data
                                                       for lf in sg["l_functions"])})
    pdiff = sorted(k for k in expected_p if thaw(params.get(k)) != _plain(expected_p[k]))
    report.add("parameters: the engine's parameters re-derived by the re-run, target, zeros and "
               "L-functions", not pdiff,
               "; ".join(f"{k}: stored {thaw(params.get(k))!r}, re-derived {_plain(expected_p[k])!r}"
                         for k in pdiff[:4]))
    report.add("answer: certified digits follow from the stored enclosure",
               a["certified_digits"] == certified_digits(s_lo, s_hi),
               f"stored {a['certified_digits']!r}, implied {certified_digits(s_lo, s_hi)!r}")
    met = s_hi - s_lo <= Fraction(1, 10**digits)
    report.add("answer: target_met flag", bool(a["target_met"]) == met,
               f"stored {a['target_met']}, width {float(s_hi - s_lo):.3e} vs 1e-{digits}")
    cons = params.get("consistency", ())
    report.add("consistency checks recorded with the certificate all passed",
               all(c.get("ok") for c in cons), "a recorded consistency check failed")
    _verify_hypotheses(cert, report, group_data, prec)


#: the parameters of an ordering's certificate (the engine's, the plan's, the target, checks)
ORDER_PARAMETERS = ("dimension", "half_periods", "box_radius_Xi", "box_half_widths_K",
                    "frequency_vectors", "frequency_vectors_in_box", "direction_patches",
                    "tail_exponent_J", "groups", "direct_weights", "moments_available",
                    "working_precision_bits", "variances", "covariance", "fallback_frequencies",
                    "bessel_evaluations", "xi_max", "target_width", "isolation_height_factor",
                    "zero_enclosure_width", "moments", "primitive_l_functions", "zeros_used",
                    "computed_with", "digits_requested", "density_target_width", "consistency")


def _plain(v):
    """A value as it reads back from JSON (tuples as lists)."""
    return json.loads(json.dumps(v, default=str))


def verify_family(data: dict, source: str) -> list:
    """Reports for an ``order-family`` document: each certificate, then the family's checks.

    The family report recomputes, from the verified certificates' stored enclosures, that
    the orderings are exactly the r! orderings of the classes and that their enclosures sum
    to an interval containing 1 (the pairwise marginal checks are shown as recorded; each
    certificate's own verification re-checks that none failed).
    """
    from itertools import permutations

    from .verify import VerifyReport

    certs = [Certificate.from_dict(c, f"{source}: ordering {i + 1}")
             for i, c in enumerate(data["certificates"])]
    reports = [verify_order_certificate(c) for c in certs]
    fam = VerifyReport(f"orderings of {', '.join(map(str, data['classes']))} mod {data['modulus']}")
    want = sorted(permutations(int(c) for c in data["classes"]))
    have = sorted(tuple(c.question["classes"]) for c in certs)
    fam.add("family: exactly the r! orderings of the classes", have == want and all(
        c.question["modulus"] == data["modulus"] for c in certs), f"stored {have}")
    lo = sum((c.lower for c in certs), Fraction(0))
    hi = sum((c.upper for c in certs), Fraction(0))
    fam.add("family: the stored enclosures sum to an interval containing 1", lo <= 1 <= hi,
            f"sum in [{float(lo):.12f}, {float(hi):.12f}]")
    fam.add("family: every ordering's certificate verified", all(r.ok for r in reports),
            "see the certificates' reports")
    return reports + [fam]
