"""Build a certificate from a race result.

:func:`certify_with_certificate` runs the race engine with its own spectrum
store (so that each isolated zero can be attributed to its L-function),
gathers the evidence for the hypotheses and returns the frozen
:class:`~certify.certificate.model.Certificate`.  Nothing in the certificate
is a float that matters: balls are exact strings, bounds are decimals rounded
up, enclosure ends are decimals rounded outward.
"""

from __future__ import annotations

import functools
import hashlib
import math
import json
from fractions import Fraction

from ..arith import (ball_strings, certified_digits, certified_significant, decimal_down,
                     decimal_up, sci_down, workprec)
from ..errors import PrecisionExhausted
from ..race.question import RaceQuestion
from ..races import DEFAULT_DIGITS, PUBLISHED_RH, RaceResult, certify_race
from ..result import CAUTION
from ..spectrum.spectrum import SpectrumStore, residual_sums
from .evidence import exact_ends, moment_consequences, refine_ordinate, relation_search
from .model import Certificate, ball_of, ball_record
from .numbers import places_for, sci, sci_bound

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
    return {
        **extra,
        "enclosure": {"lower": lower, "upper": upper},
        "engine_ball": ball_record(result.ball),
        **answer_fields(flo, fhi, result.digits_requested),
        "mean": str(result.mean),
        "variance": ball_record(result.variance),
        "exact": result.exact.as_dict() if getattr(result, "exact", None) is not None else None,
    }


def answer_fields(flo: Fraction, fhi: Fraction, digits: int) -> dict:
    """The answer's derived fields, from the stored enclosure ends and the target alone."""
    return {
        "width": sci(fhi - flo, 3, up=True),
        "certified_digits": certified_digits(flo, fhi),
        "gap_to_half": {"lower": sci(flo - Fraction(1, 2), 4, up=False),
                        "upper": sci(fhi - Fraction(1, 2), 4, up=True)},
        "gap_to_one": {"lower": sci(1 - fhi, 4, up=False), "upper": sci(1 - flo, 4, up=True)},
        "target_width": f"1e-{digits}",
        "target_met": bool(fhi - flo <= Fraction(1, 10**digits)),
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


# ---------------------------------------------------------------- canonical texts
# Every sentence a document shows is a function of stored data: the builder and
# ``verify`` call the same functions, so a rewritten sentence cannot pass verify,
# and renderers show the regenerated text, never the stored one.

LI_STATEMENT = ("The positive ordinates of the zeros of these L-functions (one ordinate set per "
                "character, conjugates counted apart) are linearly independent over Q.")

LATTICE_REFERENCE = ("Lattice reduction: Factoring polynomials with rational coefficients, "
                     "Mathematische Annalen 261 (1982).")


ZETA_RH_STATEMENT = "The Riemann hypothesis: every non-trivial zero of zeta(s) has real part 1/2."
ZETA_LI_STATEMENT = ("The positive ordinates of the non-trivial zeros of zeta(s) are linearly "
                     "independent over Q.")


def certificate_caution(rh: str = "GRH") -> str:
    """The fixed caution of a race certificate over Q: it rests on (G)RH and LI, assumed."""
    from ..result import Hypothesis, caution_text

    hyps = (Hypothesis(rh, "", "assumed"), Hypothesis("LI", "", "assumed"))
    return caution_text(hyps) + " Re-check this file with `certify verify`."


def hypothesis_statements(spectrum, rh: str = "GRH") -> dict:
    """{name: statement} of the two hypotheses a race over Q rests on, from its L-functions."""
    if rh == "RH":
        return {"RH": ZETA_RH_STATEMENT, "LI": ZETA_LI_STATEMENT}
    keys = sorted({(lf["conductor"], lf["label"]) for g in spectrum["groups"]
                   for lf in g["l_functions"]})
    names = ", ".join(f"L(s, chi_{{{c},{n}}})" for (c, n) in keys)
    return {"GRH": f"The generalised Riemann hypothesis for {names}: every non-trivial zero has "
                   "real part 1/2.",
            "LI": LI_STATEMENT}


def grh_statement(spectrum) -> str:
    return hypothesis_statements(spectrum)["GRH"]


def _g(x) -> str:
    """A height or lower bound in a sentence: rounded down (the sentence then claims less)."""
    return _g_text(str(x))


@functools.lru_cache(maxsize=1 << 14)
def _g_text(x: str) -> str:
    return decimal_down(Fraction(x), 4)


def evidence_text(item, rh: str = "GRH") -> str:
    """The sentence of one evidence item, regenerated from its kind, keys and data only
    (``rh`` is "RH" for the zeta race, "GRH" otherwise: the question says which)."""
    kind, d = item["kind"], item["data"]
    key = item.get("l_function", "")
    c, _, n = key.partition(".")
    L = l_name(int(c), int(n)) if c.isdigit() and n.isdigit() else f"L(s, chi_{{{c},{n}}})"
    if kind == "zeros-on-critical-line":
        return (f"{L}: {d['zeros']} zeros on the critical line with ordinates in "
                f"(0, {_g(d['isolation_height'])}], each certified by a sign change of the "
                "Hardy Z-function at the two ends of its enclosure")
    if kind == "zero-count":
        if not d.get("established"):
            return f"{L}: argument-principle count to the isolation height not established"
        T, Tx = _g(d["height"]), str(d["height"])
        if d["verified"]:
            return (f"{L}: {rh} verified to height {T}: the argument principle counts exactly "
                    f"{d['count']} zeros with 0 < gamma < {Tx} in the critical strip, and "
                    f"{d['sign_changes']} sign changes of Z were found there, so all of them lie "
                    "on the critical line, are simple, and none is missing from the list")
        return (f"{L}: the argument principle counts {d['count']} zeros with 0 < gamma < {Tx} but "
                f"{d['sign_changes']} sign changes were found: {rh} is NOT verified to this height")
    if kind == "moment-completeness":
        return (f"{item['group']}: assuming {rh}, no ordinate below {_g(d['complete_below'])} is "
                f"missing from the isolated list: a missing one would exceed the exact residual "
                f"power sum R_{d['moment_index']} by itself (zeros off the line are not counted; "
                f"this is not a proof of {rh})")
    if kind == "published-verification":
        return PUBLISHED_RH if rh == "RH" else PUBLISHED_GRH
    if kind == "central-value":
        from ..arith import acb

        v = acb(ball_of(d["re"]), ball_of(d["im"]))
        return f"{central_name(int(c), int(n))} = {v.str(10)}, an enclosure excluding 0"
    if kind == "simple-zeros":
        return (f"{item['group']}: each of the {d['isolated']} isolated zeros has odd order (a sign "
                f"change in its own disjoint interval); {d['proven_simple']} of them are proven "
                f"simple assuming {rh}, since a multiple zero would leave two copies in the exact "
                "residual power sums")
    if kind == "integer-relation-search":
        K = d["size"]
        if d["candidate"] is None:
            text = (f"integer-relation search (LLL) among the first {K} ordinates: none found; "
                    f"every integer relation among them has Euclidean norm >= "
                    f"{sci_down(Fraction(d['norm_lower_bound']), 6)}, so none has all |k_i| <= "
                    f"{d['coefficient_bound']}")
            if d["linear_form_lower_bound"] is not None:
                text += (f"; |sum k_i gamma_i| >= {sci_down(Fraction(d['linear_form_lower_bound']), 3)} "
                         "for every such non-zero k")
            return text
        return (f"integer-relation search (LLL) among the first {K} ordinates: candidate "
                f"relation {list(d['candidate'])} at this precision (not confirmed, not refuted)")
    raise ValueError(f"unknown evidence kind {kind!r}")


def _item(kind: str, data: dict, rh: str = "GRH", **keys) -> dict:
    item = {"kind": kind, **keys, "data": data}
    item["text"] = evidence_text(item, rh)
    return {"kind": kind, **keys, "text": item["text"], "data": data}


@functools.lru_cache(maxsize=4096)
def _refined(c: int, n: int, mid: str, rad: str, bits: int) -> dict:
    """The stored ordinate (mid, rad) of L(s, chi_{c,n}) refined to 2^-bits (memoised per
    process, for the same reason as :func:`_memo_counts`)."""
    return ball_record(refine_ordinate(c, n, ball_of({"mid": mid, "rad": rad}), bits))


_RELATIONS: dict = {}  # stored ordinate strings -> relation search, per process


def _memo_relation_search(key: tuple, balls: list) -> dict:
    """:func:`relation_search` of the ordinates ``balls`` (whose stored strings are ``key``),
    memoised per process: the rows of a table mostly search the same lowest ordinates
    (a deterministic function of them; verify searches again on its own)."""
    got = _RELATIONS.get(key)
    if got is None:
        got = relation_search(balls, RELATION_SCALE_BITS)
        if len(_RELATIONS) > 4096:
            _RELATIONS.clear()
        _RELATIONS[key] = got
    return dict(got)


_COUNTS: dict = {}  # (conductor, label, parity, height) -> N or None, per process


def _memo_counts(requests) -> dict:
    """:func:`zerocount.zero_counts` of ``requests``, memoised per process: a table writes
    one certificate per row and the rows of one modulus share their L-functions and
    isolation heights, so each count is proven once per worker instead of once per row
    (a count is a deterministic function of its arguments; verify recounts on its own)."""
    from .zerocount import zero_counts

    keys = [(int(c), int(n), int(p), Fraction(h)) for c, n, p, h in requests]
    todo = {k for k in keys if k not in _COUNTS}
    # a top edge costs one Hurwitz jet per class of the conductor whatever the number of
    # characters it serves: count every primitive character of a small conductor at a
    # height asked for, so the following rows of the table find their counts here
    for c, h in {(k[0], k[3]) for k in todo}:
        if c <= _EVERY_LABEL_MAX:
            todo |= {k for k in _primitive_keys(c, h) if k not in _COUNTS}
    # zero_counts takes one height per L-function: one call per height
    by_height: dict = {}
    for k in sorted(todo):
        by_height.setdefault(k[3], []).append(k)
    for h, ks in sorted(by_height.items()):
        got = zero_counts(ks, memo=True)
        for k in ks:
            _COUNTS[k] = got[(k[0], k[1])]
    return {(k[0], k[1]): _COUNTS[k] for k in keys}


_EVERY_LABEL_MAX = 400  # as zerocount._BOTTOM_ALL_MAX


@functools.lru_cache(maxsize=1024)
def _primitive_labels(c: int) -> tuple:
    from flint import dirichlet_char

    return tuple((n, int(dirichlet_char(c, n).parity())) for n in range(1, c)
                 if math.gcd(n, c) == 1 and dirichlet_char(c, n).is_primitive())


def _primitive_keys(c: int, h: Fraction) -> list:
    return [(c, n, p, h) for n, p in _primitive_labels(c)]


def _zero_count_evidence(lf: dict, zeros: list, height: str, rh: str = "GRH",
                         counts: dict | None = None) -> dict:
    """GRH to the isolation height for one L-function: argument-principle count against the
    sign changes (so no zero below the height is missing, on or off the line).

    ``counts`` holds the counts of :func:`zerocount.zero_counts` (every character of a
    conductor counted at once); without it this L-function is counted alone."""
    c, n = lf["conductor"], lf["label"]
    key = f"{c}.{n}"
    T = Fraction(height)
    ends = sorted(exact_ends(ball_of(z)) for z in zeros)
    found = sum(1 for lo, hi in ends if hi < T)
    if counts is None or (c, n) not in counts:
        counts = _memo_counts([(c, n, lf["parity"], T)])
    N = counts[(c, n)]
    if N is None:
        return _item("zero-count", {"established": False, "height": height}, rh, l_function=key)
    return _item("zero-count", {"established": True, "height": height, "count": N,
                                "sign_changes": found, "verified": N == found}, rh,
                 l_function=key)


_CONSEQUENCES: dict = {}  # stored group data -> moment consequences, per process


def _group_consequences(rec: dict, g, prec: int) -> dict:
    """What the exact moments say about a group's stored zeros (completeness height, simple
    zeros), from the stored (re-parsed) balls, exactly as verify will recompute it.

    Memoised per process on the stored strings (the races of one modulus share their
    groups): a deterministic function of its arguments, recomputed by verify on its own."""
    key = (tuple((z["mid"], z["rad"]) for z in rec["zeros"]),
           tuple(ball_strings(t) for t in g.target_sums), prec)
    got = _CONSEQUENCES.get(key)
    if got is None:
        stored_zeros = [ball_of(z) for z in rec["zeros"]]
        with workprec(prec):
            residual = residual_sums(list(g.target_sums), stored_zeros)
        got = moment_consequences(residual, stored_zeros, prec=max(prec, 128))
        # a relative margin of 1e-9 below the recomputable value, then rounded down
        got["complete_below"] = got["complete_below"] * (1 - Fraction(1, 10**9))
        if len(_CONSEQUENCES) > 20000:
            _CONSEQUENCES.clear()
        _CONSEQUENCES[key] = got
    return dict(got)


def _hypotheses(result: RaceResult, spectrum: dict, relation_size: int) -> list:
    """GRH (RH for zeta) and LI with structured evidence (each item: kind, text, data)."""
    from ..race.question import riemann_hypothesis_name

    rh = riemann_hypothesis_name(result.question)
    grh_ev, li_ev = [], []
    ordinates = []  # (height, group index, l index, zero ball) for the relation search
    counts = _memo_counts([(lf["conductor"], lf["label"], lf["parity"], rec["isolation_height"])
                          for rec in spectrum["groups"] for lf in rec["l_functions"]])
    for gi, (g, rec) in enumerate(zip(result.groups, spectrum["groups"])):
        prec = int(result.parameters.get("working_precision_bits", 128))
        cons = _group_consequences(rec, g, prec)
        for li, lf in enumerate(rec["l_functions"]):
            c, n = lf["conductor"], lf["label"]
            count = sum(1 for z in rec["zeros"] if z["l"] == li)
            grh_ev.append(_item("zeros-on-critical-line",
                                {"conductor": c, "label": n, "zeros": count,
                                 "isolation_height": rec["isolation_height"]},
                                rh, l_function=f"{c}.{n}"))
        for li, lf in enumerate(rec["l_functions"]):
            grh_ev.append(_zero_count_evidence(lf, [z for z in rec["zeros"] if z["l"] == li],
                                               rec["isolation_height"], rh, counts))
        grh_ev.append(_item("moment-completeness",
                            {"complete_below": decimal_down(cons["complete_below"], 6),
                             "moment_index": cons["moment_index"]}, rh, group=g.label))
        for li, lf in enumerate(rec["l_functions"]):
            c, n = lf["conductor"], lf["label"]
            li_ev.append(_item("central-value", {"re": lf["central_value"]["re"],
                                                 "im": lf["central_value"]["im"]},
                               rh, l_function=f"{c}.{n}"))
        li_ev.append(_item("simple-zeros", {"isolated": len(g.zeros),
                                            "proven_simple": cons["simple"]}, rh, group=g.label))
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
                rec = dict(_refined(lf["conductor"], lf["label"], z["mid"], z["rad"],
                                    RELATION_WIDTH_BITS))
            refined.append((lf, rec, ball_of(rec)))
        rs = _memo_relation_search(tuple((rec["mid"], rec["rad"]) for _, rec, _ in refined),
                                   [b for _, _, b in refined])
        li_ev.append(_item("integer-relation-search", {
            "size": rs["size"], "scale_bits": rs["scale_bits"],
            "ordinates": [{"l_function": f"{lf['conductor']}.{lf['label']}", **rec}
                          for lf, rec, _ in refined],
            "norm_lower_bound": decimal_down(rs["norm_lower_bound"], 6),
            "coefficient_bound": rs["coefficient_bound"],
            "linear_form_lower_bound": (None if rs["linear_form_lower_bound"] is None
                                        else sci(rs["linear_form_lower_bound"], 4, up=False)),
            "candidate": rs["candidate"],
        }))
    grh_ev.append(_item("published-verification", {}, rh))
    st = hypothesis_statements(spectrum, rh)
    return [
        {"name": rh, "statement": st[rh], "status": "assumed", "evidence": grh_ev, "reference": ""},
        {"name": "LI", "statement": st["LI"], "status": "assumed", "evidence": li_ev,
         "reference": ""},
    ]


def certificate_parameters(result: RaceResult) -> dict:
    params = {k: v for k, v in result.parameters.items()}
    params["digits_requested"] = result.digits_requested
    params["density_target_width"] = repr(10.0 ** (-result.digits_requested))
    return params


def certificate_references() -> list:
    from ..races import REFERENCES

    return list(REFERENCES) + [LATTICE_REFERENCE]


def riemann_hypothesis_name(question) -> str:
    from ..race.question import riemann_hypothesis_name as name

    return name(question)


def certificate_from_result(result: RaceResult, store: SpectrumStore,
                            relation_size: int = RELATION_SIZE) -> Certificate:
    """The certificate of a race result computed with ``store``."""
    return Certificate(**_sections(result, store, relation_size))


def certificate_document(result: RaceResult, store: SpectrumStore,
                         relation_size: int = RELATION_SIZE) -> dict:
    """``certificate_from_result(result, store).to_dict()`` without the frozen copy.

    A table writes one certificate per row: the document is built once, as plain data,
    and serialised at once (the frozen and thawed copies of ~10^5 values each cost more
    than the rest of the row's certificate)."""
    from .model import SCHEMA_ID, SCHEMA_VERSION, SECTIONS

    sections = _sections(result, store, relation_size)
    doc = {"schema": SCHEMA_ID, "schema_version": SCHEMA_VERSION, "kind": "dirichlet-race"}
    for name in SECTIONS:
        doc[name] = sections[name]
    # serialised, this is the JSON of to_dict (tuples become lists, keys strings); the values
    # may be shared with per-process memos, so the caller serialises it and does not edit it
    return doc


def _sections(result: RaceResult, store: SpectrumStore, relation_size: int) -> dict:
    spectrum = _spectrum_record(result, store)
    params = certificate_parameters(result)
    prov = dict(result.provenance)
    if not prov.get("command_line"):
        prov["command_line"] = reproduce_command(result.question, result.digits_requested)
    prov["input_digest"] = input_digest(result.question, result.digits_requested)
    prov["timings_seconds"] = dict(result.timings)
    budget = [{"name": e.name, "bound": sci_bound(e.bound, 3), "description": e.description}
              for e in result.budget]
    refs = certificate_references()
    return dict(
        question=question_record(result.question),
        answer=answer_record(result),
        hypotheses=_hypotheses(result, spectrum, relation_size),
        error_budget=budget,
        parameters=params,
        spectrum=spectrum,
        provenance=prov,
        references=refs,
        caution=certificate_caution(riemann_hypothesis_name(result.question)),
    )


def certify_with_certificate(question: RaceQuestion, digits: int = DEFAULT_DIGITS,
                             store: SpectrumStore | None = None, command_line: str = ""
                             ) -> tuple[RaceResult, Certificate]:
    """Run the race engine and build the certificate of its result."""
    store = store if store is not None else SpectrumStore()
    result = certify_race(question, digits, store=store, command_line=command_line)
    return result, certificate_from_result(result, store)
