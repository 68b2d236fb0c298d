"""Build a certificate from a race result.

:func:`certify_with_certificate` runs the race engine with its own spectrum
store (so that each isolated zero can be attributed to its L-function),
gathers the evidence for the hypotheses and returns the frozen
:class:`~certify.certificate.model.Certificate`.  Nothing in the certificate
is a float that matters: balls are exact strings, bounds are decimals rounded
up, enclosure ends are decimals rounded outward.
"""

from __future__ import annotations

import hashlib
import json
from fractions import Fraction

from ..arith import certified_digits, certified_significant, decimal_down, decimal_up, workprec
from ..errors import PrecisionExhausted
from ..race.question import RaceQuestion
from ..races import DEFAULT_DIGITS, PUBLISHED_RH, RaceResult, certify_race
from ..result import CAUTION
from ..spectrum.spectrum import SpectrumStore, residual_sums
from .evidence import exact_ends, moment_consequences, refine_ordinate, relation_search
from .model import Certificate, ball_of, ball_record
from .numbers import exact_decimal as _exact_decimal, places_for, sci, sci_bound

#: Ordinates used in the integer-relation search, their enclosure width and the lattice scale.
RELATION_SIZE = 10
RELATION_WIDTH_BITS = 100
RELATION_SCALE_BITS = 96

PUBLISHED_GRH = ("Published interval verifications of GRH, not redone here: Math. Comp. 61 "
                 "(1993), every conductor < 13 to height 10000; Math. Comp. (2016), every "
                 "primitive character of conductor <= 400000 to a height of order 10^8/q.")

NORMALISATION = ("E(x) = (log x / sqrt x) * phi(q) * sum_a w_a pi(x; q, a); under GRH and LI "
                 "E has the limit law of X = mu + sum_chi sum_{gamma_chi > 0} "
                 "2 |W(chi)| / sqrt(1/4 + gamma^2) cos(Theta), Theta independent uniform, "
                 "W(chi) = sum_a w_a chi(a), mu = -sum_a w_a c(q, a).")

DEFINITION = ("delta = lim_{X -> oo} (1 / log X) * integral over {2 <= x <= X : "
              "sum_a w_a pi(x; q, a) > 0} of dx / x (logarithmic density), which equals "
              "P(X > 0) for the limit law above.")

LI_NORMALISATION = ("E(x) = (log x / sqrt x) * (pi(x) - li(x)); under RH and LI for zeta, E has "
                    "the limit law of X = -1 + sum_{gamma > 0} 2 / sqrt(1/4 + gamma^2) "
                    "cos(Theta), Theta independent uniform, gamma over the positive ordinates "
                    "of the zeros of zeta (the -1 comes from the prime squares). The race "
                    "pi(x) < li(x) is the race of -E, with mean +1.")

LI_DEFINITION = ("delta = lim_{X -> oo} (1 / log X) * integral over {2 <= x <= X : "
                 "pi(x) > li(x) (resp. <)} of dx / x (logarithmic density), which equals "
                 "P(X > 0) (resp. P(X < 0)) for the limit law above; li may be taken from 0 "
                 "or from 2 (a constant difference does not change the density).")


def l_name(conductor: int, label: int) -> str:
    """How an L-function is named in texts: zeta(s) for conductor 1."""
    return "zeta(s)" if conductor == 1 else f"L(s, chi_{{{conductor},{label}}})"


def central_name(conductor: int, label: int) -> str:
    return "zeta(1/2)" if conductor == 1 else f"L(1/2, chi_{{{conductor},{label}}})"


def input_digest(question: RaceQuestion, digits: int) -> str:
    """sha256 of the canonical description of what was asked."""
    payload = json.dumps({"modulus": question.modulus, "kind": question.kind,
                          "weights": [[a, str(w)] for a, w in question.weights],
                          "digits": digits}, sort_keys=True)
    return "sha256:" + hashlib.sha256(payload.encode()).hexdigest()


def reproduce_command(question: RaceQuestion, digits: int) -> str:
    if question.is_li_race:
        return f"certify certificate '{question.label}' --digits {digits}"
    if question.kind == "two-way":
        a, b = question.classes
        return f"certify certificate {question.modulus} {a} {b} --digits {digits}"
    if question.kind == "residues":
        return f"certify certificate {question.modulus} --residues --digits {digits}"
    ws = " ".join(f"{a}:{w}" for a, w in question.weights)
    return f"certify certificate {question.modulus} --weights {ws} --digits {digits}"


def question_record(question: RaceQuestion) -> dict:
    return {
        "kind": question.kind,
        "modulus": question.modulus,
        "classes": list(question.classes),
        "weights": [{"class": a, "weight": str(w)} for a, w in question.weights],
        "label": question.label,
        "statement": question.statement,
        "normalisation": LI_NORMALISATION if question.is_li_race else NORMALISATION,
        "definition": LI_DEFINITION if question.is_li_race else DEFINITION,
    }


def small_side_record(lo: Fraction, hi: Fraction) -> dict:
    """min(delta, 1 - delta) for the stored enclosure [lo, hi] of delta, in scientific notation.

    Its certified significant digits are those common to the whole enclosure; the
    ends are rounded outward (two digits past the certified ones).
    """
    name, a, b = ("delta", lo, hi) if hi < Fraction(1, 2) else ("1 - delta", 1 - hi, 1 - lo)
    k, text = certified_significant(a, b)
    sig = max(k + 2, 3)
    return {"name": name, "lower": sci(a, sig, up=False), "upper": sci(b, sig, up=True),
            "significant_digits": k, "certified": text}


def answer_record(result: RaceResult) -> dict:
    """The enclosure widened outward to printable decimals, with digits and gaps."""
    lo, hi = result.density.lower, result.density.upper
    width = hi - lo
    places = places_for(width)
    # a margin of width/10^6 keeps the stored ends strictly outside the engine's
    # (so a re-computation from re-parsed balls, which may be wider by an ulp, still fits)
    margin = width / 10**6 if width > 0 else Fraction(1, 10 ** (places + 3))
    lower = decimal_down(lo - margin, places)
    upper = decimal_up(hi + margin, places)
    flo, fhi = Fraction(lower), Fraction(upper)
    extra = {"small_side": small_side_record(flo, fhi)} if result.question.is_li_race else {}
    return {**extra, 
        "enclosure": {"lower": lower, "upper": upper},
        "engine_ball": ball_record(result.ball),
        "width": sci(fhi - flo, 3, up=True),
        "certified_digits": certified_digits(flo, fhi),
        "gap_to_half": {"lower": sci(flo - Fraction(1, 2), 4, up=False),
                        "upper": sci(fhi - Fraction(1, 2), 4, up=True)},
        "gap_to_one": {"lower": sci(1 - fhi, 4, up=False), "upper": sci(1 - flo, 4, up=True)},
        "target_width": f"1e-{result.digits_requested}",
        "target_met": bool(fhi - flo <= Fraction(1, 10**result.digits_requested)),
        "mean": str(result.mean),
        "variance": ball_record(result.variance),
        "exact": result.exact.as_dict() if getattr(result, "exact", None) is not None else None,
    }


def _owner_by_sign_change(z, keys) -> int:
    """Index of the L-function in ``keys`` whose Z-function changes sign across ``z``."""
    from ..spectrum.zeros import HardyZ
    from .verify import _sign_change

    lo, hi = exact_ends(z)
    for i, (c, n) in enumerate(keys):
        s_lo, s_hi = _sign_change(HardyZ(c, n), lo, hi, c)
        if s_lo and s_hi and s_lo != s_hi:
            return i
    raise PrecisionExhausted(f"not certified: the zero near {float((lo + hi) / 2):.12g} cannot "
                             "be attributed to an L-function by a sign change")


def _spectrum_record(result: RaceResult, store: SpectrumStore) -> dict:
    groups = []
    for g in result.groups:
        keys = list(g.primitive_keys)
        # each zero's L-function, as the driver recorded it (older results: by a sign change)
        owners = list(g.zero_owners) if len(g.zero_owners) == len(g.zeros) else None
        zeros = []
        for j, z in enumerate(g.zeros):
            li = owners[j] if owners is not None else _owner_by_sign_change(z, keys)
            zeros.append({"l": li, **ball_record(z)})
        sp0 = store.spectra[keys[0]]
        ls = []
        for i, key in enumerate(keys):
            sp = store.spectra[key]
            ls.append({"conductor": key[0], "label": key[1], "parity": sp.parity,
                       "central_value": {"re": ball_record(g.central_values[i].real),
                                         "im": ball_record(g.central_values[i].imag)}})
        groups.append({
            "label": g.label,
            "real": len(keys) == 1,
            "scale": ball_record(g.scale),
            "isolation_height": repr(float(g.height)),
            "l_functions": ls,
            "moments": {"count": len(g.target_sums), "divisor": 2 if len(keys) == 1 else 1,
                        "source_count": len(sp0.power_sums), "source_bits": sp0.power_sum_bits,
                        "target_sums": [ball_record(t) for t in g.target_sums],
                        "residual_sums": [ball_record(r) for r in g.residual]},
            "zeros": zeros,
            "checks": list(g.notes),
        })
    return {"groups": groups}


def _zero_count_evidence(lf: dict, zeros: list) -> dict:
    """GRH to a height for one L-function: argument-principle count against the sign changes."""
    from .zerocount import count_height, count_zeros

    c, n = lf["conductor"], lf["label"]
    key = f"{c}.{n}"
    name = l_name(c, n)
    rh = "RH" if c == 1 else "GRH"
    ends = sorted(exact_ends(ball_of(z)) for z in zeros)
    if len(ends) < 2:
        return {"kind": "zero-count", "l_function": key, "text": f"{name}: too "
                "few zeros for an argument-principle count", "data": {"established": False}}
    T = count_height(ends)
    found = sum(1 for lo, hi in ends if hi < T)
    try:
        N, pieces = count_zeros(c, n, lf["parity"], T)
    except PrecisionExhausted as exc:
        return {"kind": "zero-count", "l_function": key,
                "text": f"{name}: argument-principle count not established ({exc})",
                "data": {"established": False, "height": _exact_decimal(T)}}
    if N == found:
        text = (f"{name}: {rh} verified to height {float(T):.6g}: the argument "
                f"principle counts exactly {N} zeros with 0 < gamma < {float(T):.6g} in the critical "
                f"strip, and {found} sign changes of Z were found there, so all of them lie on the "
                "critical line and are simple")
    else:
        text = (f"{name}: the argument principle counts {N} zeros with "
                f"0 < gamma < {float(T):.6g} but {found} sign changes were found: GRH is NOT "
                "verified to this height")
    return {"kind": "zero-count", "l_function": key, "text": text,
            "data": {"established": True, "height": _exact_decimal(T), "count": N,
                     "sign_changes": found, "verified": N == found}}


def _hypotheses(result: RaceResult, spectrum: dict, relation_size: int) -> list:
    """GRH and LI with structured evidence (each item: kind, text, data)."""
    from ..race.question import riemann_hypothesis_name

    rh = riemann_hypothesis_name(result.question)
    grh_ev, li_ev = [], []
    ordinates = []  # (height, group index, l index, zero ball) for the relation search
    for gi, (g, rec) in enumerate(zip(result.groups, spectrum["groups"])):
        prec = int(result.parameters.get("working_precision_bits", 128))
        # evidence from the stored (re-parsed) balls, exactly as verify will recompute it
        stored_zeros = [ball_of(z) for z in rec["zeros"]]
        with workprec(prec):
            residual = residual_sums(list(g.target_sums), stored_zeros)
        cons = moment_consequences(residual, stored_zeros, prec=max(prec, 128))
        # a relative margin of 1e-9 below the recomputable value, then rounded down
        cons["complete_below"] = cons["complete_below"] * (1 - Fraction(1, 10**9))
        for li, lf in enumerate(rec["l_functions"]):
            c, n = lf["conductor"], lf["label"]
            count = sum(1 for z in rec["zeros"] if z["l"] == li)
            grh_ev.append({
                "kind": "zeros-on-critical-line",
                "l_function": f"{c}.{n}",
                "text": (f"{l_name(c, n)}: {count} zeros on the critical line with ordinates "
                         f"in (0, {float(g.height):.6g}], each certified by a sign change of the "
                         "Hardy Z-function at the two ends of its enclosure"),
                "data": {"conductor": c, "label": n, "zeros": count,
                         "isolation_height": rec["isolation_height"]},
            })
        for li, lf in enumerate(rec["l_functions"]):
            grh_ev.append(_zero_count_evidence(lf, [z for z in rec["zeros"] if z["l"] == li]))
        h = cons["complete_below"]
        grh_ev.append({
            "kind": "moment-completeness",
            "group": g.label,
            "text": (f"{g.label}: assuming {rh}, no ordinate below {float(h):.6g} is missing from "
                     f"the isolated list: a missing one would exceed the exact residual power sum "
                     f"R_{cons['moment_index']} by itself (zeros off the line are not counted; "
                     f"this is not a proof of {rh})"),
            "data": {"complete_below": decimal_down(h, 6), "moment_index": cons["moment_index"]},
        })
        for li, lf in enumerate(rec["l_functions"]):
            c, n = lf["conductor"], lf["label"]
            cv = g.central_values[li]
            li_ev.append({
                "kind": "central-value",
                "l_function": f"{c}.{n}",
                "text": f"{central_name(c, n)} = {cv.str(10)}, an enclosure excluding 0",
                "data": {"re": lf["central_value"]["re"], "im": lf["central_value"]["im"]},
            })
        n_simple = cons["simple"]
        li_ev.append({
            "kind": "simple-zeros",
            "group": g.label,
            "text": (f"{g.label}: each of the {len(g.zeros)} isolated zeros has odd order (a sign "
                     f"change in its own disjoint interval); {n_simple} of them are proven simple "
                     f"assuming {rh}, since a multiple zero would leave two copies in the exact "
                     "residual power sums"),
            "data": {"isolated": len(g.zeros), "proven_simple": n_simple},
        })
        for z in rec["zeros"]:
            ordinates.append((Fraction(z["mid"]), gi, z["l"], z))
    ordinates.sort(key=lambda t: t[0])
    chosen = ordinates[:relation_size]
    if len(chosen) >= 2:
        refined = []  # (L-function record, stored ordinate record, its re-parsed ball)
        for _, gi, li, z in chosen:
            lf = spectrum["groups"][gi]["l_functions"][li]
            zb = ball_of(z)
            lo, hi = exact_ends(zb)
            if hi - lo <= Fraction(1, 2**RELATION_WIDTH_BITS):
                rec = {"mid": z["mid"], "rad": z["rad"]}  # already narrow: the stored zero itself
            else:
                rec = ball_record(refine_ordinate(lf["conductor"], lf["label"], zb,
                                                  RELATION_WIDTH_BITS))
            refined.append((lf, rec, ball_of(rec)))
        rs = relation_search([b for _, _, b in refined], RELATION_SCALE_BITS)
        K = rs["size"]
        if rs["candidate"] is None:
            text = (f"integer-relation search (LLL) among the first {K} ordinates: none found; "
                    f"every integer relation among them has Euclidean norm >= "
                    f"{float(rs['norm_lower_bound']):.6g}, so none has all |k_i| <= "
                    f"{rs['coefficient_bound']}")
            if rs["linear_form_lower_bound"] is not None:
                text += (f"; |sum k_i gamma_i| >= {float(rs['linear_form_lower_bound']):.3e} "
                         "for every such non-zero k")
        else:
            text = (f"integer-relation search (LLL) among the first {K} ordinates: candidate "
                    f"relation {rs['candidate']} at this precision (not confirmed, not refuted)")
        li_ev.append({
            "kind": "integer-relation-search",
            "text": text,
            "data": {
                "size": K, "scale_bits": rs["scale_bits"],
                "ordinates": [{"l_function": f"{lf['conductor']}.{lf['label']}", **rec}
                              for lf, rec, _ in refined],
                "norm_lower_bound": decimal_down(rs["norm_lower_bound"], 6),
                "coefficient_bound": rs["coefficient_bound"],
                "linear_form_lower_bound": (None if rs["linear_form_lower_bound"] is None
                                            else sci(rs["linear_form_lower_bound"], 4, up=False)),
                "candidate": rs["candidate"],
            },
        })
    grh_ev.append({"kind": "published-verification",
                   "text": PUBLISHED_RH if rh == "RH" else PUBLISHED_GRH, "data": {}})
    by_name = {h.name: h for h in result.hypotheses}
    out = [
        {"name": rh, "statement": by_name[rh].statement, "status": "assumed",
         "evidence": grh_ev, "reference": by_name[rh].reference},
        {"name": "LI", "statement": by_name["LI"].statement, "status": "assumed",
         "evidence": li_ev, "reference": by_name["LI"].reference},
    ]
    for h in result.hypotheses:
        if h.name not in (rh, "LI"):
            out.append({"name": h.name, "statement": h.statement, "status": h.status,
                        "evidence": [{"kind": "note", "text": e, "data": {}} for e in h.evidence],
                        "reference": h.reference})
    return out


def certificate_from_result(result: RaceResult, store: SpectrumStore,
                            relation_size: int = RELATION_SIZE) -> Certificate:
    """The certificate of a race result computed with ``store``."""
    spectrum = _spectrum_record(result, store)
    params = {k: v for k, v in result.parameters.items()}
    params["digits_requested"] = result.digits_requested
    params["density_target_width"] = repr(10.0 ** (-result.digits_requested))
    prov = dict(result.provenance)
    if not prov.get("command_line"):
        prov["command_line"] = reproduce_command(result.question, result.digits_requested)
    prov["input_digest"] = input_digest(result.question, result.digits_requested)
    prov["timings_seconds"] = dict(result.timings)
    budget = [{"name": e.name, "bound": sci_bound(e.bound, 3), "description": e.description}
              for e in result.budget]
    refs = list(result.references) + [
        "Lattice reduction: A. K. Lenstra, H. W. Lenstra and L. Lovasz, Factoring polynomials "
        "with rational coefficients, Mathematische Annalen 261 (1982).",
    ]
    return Certificate(
        question=question_record(result.question),
        answer=answer_record(result),
        hypotheses=_hypotheses(result, spectrum, relation_size),
        error_budget=budget,
        parameters=params,
        spectrum=spectrum,
        provenance=prov,
        references=refs,
        caution=(getattr(result, "caution", "") or CAUTION) + " Re-check this file with `certify verify`.",
    )


def certify_with_certificate(question: RaceQuestion, digits: int = DEFAULT_DIGITS,
                             store: SpectrumStore | None = None, command_line: str = ""
                             ) -> tuple[RaceResult, Certificate]:
    """Run the race engine and build the certificate of its result."""
    store = store if store is not None else SpectrumStore()
    result = certify_race(question, digits, store=store, command_line=command_line)
    return result, certificate_from_result(result, store)
