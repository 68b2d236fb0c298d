"""Evidence items of an ``ecq-race`` certificate as structured data beside a generated sentence.

Every evidence item is ``{"kind", "data", "text"}``: ``data`` holds the fields (integers,
lists, strings of decimals, balls as ``{"mid", "rad"}`` records), ``text`` is
:func:`sentence` of them.  ``verify`` checks, for every item, that the kind is known, that
``data`` has exactly the fields of its kind (an unknown or a missing field is a failed
check), that ``text`` is the sentence generated from ``data``, and re-derives ``data``
itself (:mod:`.ecq_evidence` and the recount).

Two families:

* the evidence of the hypotheses (GRH, LI, the rank when it is not certified), written by
  the pipeline (:mod:`certify.ecrace`) as sentences: :func:`structure` reads each back into
  its fields and the certificate is refused (fail closed) unless the sentence generated
  from the fields is the pipeline's sentence, character for character;
* the independent checks (``spectrum.evidence``): the a_p table by a literal point count,
  the bound |a_p| <= 2 sqrt(p), the reduction types, the root number and the rank proof by an independent
  series (:func:`independent_items`).
"""

from __future__ import annotations

import re
from fractions import Fraction

from ..errors import Inconsistent
from .model import ball_of

_BALL = r"\[[^\]]*\]"

#: kind -> the fields of its data, in order
FIELDS = {
    # evidence of GRH
    "zeros-on-line": ("zeros", "height"),
    "residual-sums": ("l_function", "moments", "height", "first", "expected"),
    "residual-sums-moments-only": ("l_function", "moments", "first"),
    "root-number": ("value", "source"),
    "zero-count": ("height", "models", "zeros", "disc_radius", "inside", "assumed_order"),
    "zero-count-failed": ("height", "reason"),
    "zero-count-mismatch": ("height", "outside", "disc_radius", "inside", "zeros", "central_order"),
    "no-zero-count": (),
    # evidence of LI
    "sign-changes": (),
    # evidence of the rank (r >= 2, not certified)
    "lower-derivative": ("order", "value", "radius", "rank"),
    "rank-bound": ("order", "value"),
    "rank-parity": ("root_number", "rank"),
    "rank-theorem": ("rank", "reference"),
    # the independent checks (spectrum.evidence)
    "a_p-table": ("below", "primes", "a_p"),
    "trace-bound": ("good_primes", "largest_ratio"),
    "reduction-types": ("primes", "a_p", "types"),
    "root-number-check": ("value", "method"),
    "rank-proof": ("rank", "root_number", "conductor", "value", "terms", "lower", "published"),
}

NO_COUNT = ("no zero count: GRH is not verified to any height here (the residual sums detect a "
            "missing zero but do not prove its absence); `certify ecrace --grh-height T` counts "
            "the zeros up to T by the argument principle and `certify verify` re-proves that count")
SIGN_CHANGES = ("every isolated zero is a certified sign change in its own disjoint interval "
                "(odd order; simplicity itself is assumed)")
REDUCTION_NAMES = {1: "split", -1: "nonsplit", 0: "additive"}


def _ball_text(rec, digits: int = 10) -> str:
    return ball_of(rec, "evidence ball").str(digits, radius=True)


def _l_derivative(d: dict) -> str:
    """r! (2 pi / sqrt N) times the stored ball of Lambda^(r)(1)/r!, as text (80 bits)."""
    import math

    from ..arith import arb, workprec

    with workprec(80):
        v = ball_of(d["value"], "evidence ball") * math.factorial(d["rank"]) * 2 * arb.pi() \
            / arb(int(d["conductor"])).sqrt()
        return v.str(10, radius=True)


def sentence(kind: str, data: dict) -> str:
    """The sentence of an item; ValueError for an unknown kind or fields not exactly its own."""
    if kind not in FIELDS:
        raise ValueError(f"unknown evidence kind {str(kind)[:40]!r}")
    if not isinstance(data, dict) or list(data) != list(FIELDS[kind]):
        have = sorted(data) if isinstance(data, dict) else type(data).__name__
        raise ValueError(f"evidence {kind}: fields {have}, expected {list(FIELDS[kind])}")
    for f, v in data.items():
        want_int = f in _INT_FIELDS or (f == "value" and kind in ("root-number", "root-number-check"))
        if want_int and (type(v) is not int or abs(v) > 10**9) and not (f == "assumed_order" and v is None):
            raise ValueError(f"evidence {kind}: field {f} is not an integer of at most 10 digits")
    if kind == "rank-proof" and not 0 <= data["rank"] <= 3:
        raise ValueError("evidence rank-proof: rank outside 0..3")
    d = data
    if kind == "zeros-on-line":
        return (f"{d['zeros']} zeros of L(E, s) certified on the critical line Re s = 1 by sign "
                f"changes of the Hardy Z-function up to height {d['height']}")
    if kind == "residual-sums":
        return (f"{d['l_function']}: residual sums R_1..R_{d['moments']} non-negative and consistent "
                f"with no zero missing below T = {d['height']} (R_1 = {d['first']}; expected "
                f"{d['expected']})")
    if kind == "residual-sums-moments-only":
        return (f"{d['l_function']}: no zero isolated (moments only); residual sums "
                f"R_1..R_{d['moments']} non-negative (R_1 = {d['first']})")
    if kind == "root-number":
        return f"root number {d['value']:+d} ({d['source']}); functional equation checked in balls"
    if kind == "zero-count":
        return (f"GRH verified to height {d['height']} by a zero count (argument principle with "
                f"Taylor models, {d['models']} models): the {d['zeros']} zeros with "
                f"{d['disc_radius']} < gamma < {d['height']} are exactly the certified sign changes "
                f"(all simple, on the line), and |s - 1| < {d['disc_radius']} holds exactly "
                f"{d['inside']} zero(s)"
                + ("" if d["assumed_order"] is None
                   else f" (the central zero of the assumed order {d['assumed_order']})"))
    if kind == "zero-count-failed":
        return f"GRH to height {d['height']}: not verified ({d['reason']})"
    if kind == "zero-count-mismatch":
        return (f"GRH to height {d['height']}: NOT verified: the argument principle counts "
                f"{d['outside']} zeros with 0 < gamma < {d['height']} outside |s - 1| <= "
                f"{d['disc_radius']} and {d['inside']} inside, against {d['zeros']} sign changes "
                f"and central order {d['central_order']}")
    if kind == "no-zero-count":
        return NO_COUNT
    if kind == "sign-changes":
        return SIGN_CHANGES
    if kind == "lower-derivative":
        k = d["order"]
        return (f"Lambda^({k})(1)/{k}! = {d['value']} contains 0 (radius {d['radius']}): "
                f"consistent with rank {d['rank']}; vanishing is not proven numerically")
    if kind == "rank-bound":
        k = d["order"]
        return f"Lambda^({k})(1)/{k}! = {d['value']} excludes 0: analytic rank <= {k} proven"
    if kind == "rank-parity":
        return (f"root number {d['root_number']:+d}: Lambda^(k)(1) = 0 for every k of the other "
                f"parity (functional equation); rank = {d['rank']} mod 2 proven")
    if kind == "rank-theorem":
        return f"published proof that this curve has analytic rank {d['rank']}: {d['reference']}"
    if kind == "a_p-table":
        pairs = ", ".join(f"a_{p} = {a}" for p, a in zip(d["primes"], d["a_p"]))
        return (f"a_p for the {len(d['primes'])} primes p < {d['below']} by a literal count of the "
                f"points of the minimal model mod p: {pairs}")
    if kind == "trace-bound":
        return (f"|a_p| <= 2 sqrt(p) at each of the {d['good_primes']} good primes of the table "
                f"(largest a_p^2/(4p): {d['largest_ratio']})")
    if kind == "reduction-types":
        parts = "; ".join(f"p = {p}: {t} (counted a_p = {a})"
                          for p, a, t in zip(d["primes"], d["a_p"], d["types"]))
        return f"reduction type at each bad prime from the counted a_p: {parts}"
    if kind == "root-number-check":
        return f"root number {d['value']:+d} re-derived as {d['method']}"
    if kind == "rank-proof":
        r, eps = d["rank"], d["root_number"]
        head = (f"Lambda^({r})(1)/{r}! = {_ball_text(d['value'])} by the series "
                f"(1 + eps (-1)^r) (sqrt N/2 pi) sum a_n/n G_r(2 pi n/sqrt N) over the counted a_n "
                f"({d['terms']} terms, rigorous tail), root number {eps:+d}")
        if r <= 1:
            return (f"analytic rank {r} proven: {head}; it excludes 0"
                    + ("" if r == 0 else ", and L(E, 1) = 0 by the root number"))
        low = "; ".join(f"Lambda^({x['order']})(1)/{x['order']}! = {_ball_text(x['value'], 5)}"
                        for x in d["lower"])
        text = (f"analytic rank <= {r} proven from Lambda^({r})(1) != 0: {head}; it excludes 0. "
                f"Lambda^(k)(1) for k < {r} of the same parity as {r} contain 0 ({low}): consistent "
                f"with rank {r}; vanishing is not proven numerically. If the rank is {r}, "
                f"L^({r})(E, 1) = {r}! (2 pi/sqrt N) Lambda^({r})(1)/{r}! = {_l_derivative(d)}")
        if d["published"]:
            text += f". That the rank is exactly {r} is a published theorem: {d['published']}"
        return text
    raise ValueError(f"unknown evidence kind {kind!r}")  # pragma: no cover


def item(kind: str, data: dict) -> dict:
    return {"kind": kind, "text": sentence(kind, data), "data": data}


# -- reading the pipeline's sentences back into fields ----------------------------------------

_PATTERNS = [
    ("zeros-on-line", r"(?P<zeros>\d+) zeros of L\(E, s\) certified on the critical line Re s = 1 "
                      r"by sign changes of the Hardy Z-function up to height (?P<height>\S+)"),
    ("residual-sums", r"(?P<l_function>L\(E, s\), conductor \d+): residual sums R_1\.\.R_(?P<moments>\d+) "
                      r"non-negative and consistent with no zero missing below T = (?P<height>\S+) "
                      r"\(R_1 = (?P<first>" + _BALL + r"); expected (?P<expected>\S+)\)"),
    ("residual-sums-moments-only", r"(?P<l_function>L\(E, s\), conductor \d+): no zero isolated "
                                   r"\(moments only\); residual sums R_1\.\.R_(?P<moments>\d+) "
                                   r"non-negative \(R_1 = (?P<first>" + _BALL + r")\)"),
    ("root-number", r"root number (?P<value>[+-]1) \((?P<source>[^()]*(?:\([^()]*\)[^()]*)*)\); "
                    r"functional equation checked in balls"),
    ("zero-count", r"GRH verified to height (?P<height>\S+) by a zero count \(argument principle with "
                   r"Taylor models, (?P<models>\d+) models\): the (?P<zeros>\d+) zeros with "
                   r"(?P<disc_radius>\S+) < gamma < \S+ are exactly the certified sign changes \(all "
                   r"simple, on the line\), and \|s - 1\| < \S+ holds exactly (?P<inside>\d+) zero\(s\)"
                   r"(?: \(the central zero of the assumed order (?P<assumed_order>\d+)\))?"),
    ("zero-count-failed", r"GRH to height (?P<height>\S+): not verified \((?P<reason>.*)\)"),
    ("zero-count-mismatch", r"GRH to height (?P<height>\S+): NOT verified: the argument principle "
                            r"counts (?P<outside>\d+) zeros with 0 < gamma < \S+ outside \|s - 1\| <= "
                            r"(?P<disc_radius>\S+) and (?P<inside>\d+) inside, against (?P<zeros>\d+) "
                            r"sign changes and central order (?P<central_order>\d+)"),
    ("lower-derivative", r"Lambda\^\((?P<order>\d+)\)\(1\)/\d+! = (?P<value>" + _BALL + r") contains 0 "
                         r"\(radius (?P<radius>\S+)\): consistent with rank (?P<rank>\d+); vanishing is "
                         r"not proven numerically"),
    ("rank-bound", r"Lambda\^\((?P<order>\d+)\)\(1\)/\d+! = (?P<value>" + _BALL + r") excludes 0: "
                   r"analytic rank <= \d+ proven"),
    ("rank-parity", r"root number (?P<root_number>[+-]1): Lambda\^\(k\)\(1\) = 0 for every k of the "
                    r"other parity \(functional equation\); rank = (?P<rank>\d+) mod 2 proven"),
    ("rank-theorem", r"published proof that this curve has analytic rank (?P<rank>\d+): (?P<reference>.+)"),
]
_INTS = {"zeros", "moments", "value", "models", "inside", "assumed_order", "outside", "central_order",
         "order", "rank", "root_number"}
_INT_FIELDS = {"zeros", "moments", "models", "inside", "assumed_order", "outside", "central_order",
               "order", "rank", "root_number", "good_primes", "terms", "below", "conductor"}
_TEXT_VALUES = {"lower-derivative", "rank-bound"}  # their "value" is a ball's text


def structure(text: str) -> tuple[str, dict]:
    """(kind, data) of a sentence the pipeline wrote; ValueError if it matches no kind."""
    if text == NO_COUNT:
        return "no-zero-count", {}
    if text == SIGN_CHANGES:
        return "sign-changes", {}
    for kind, pat in _PATTERNS:
        m = re.fullmatch(pat, text)
        if m:
            data = {}
            for f in FIELDS[kind]:
                v = m.group(f)
                if v is not None and f in _INTS and not (f == "value" and kind in _TEXT_VALUES):
                    v = int(v)
                data[f] = v
            return kind, data
    raise ValueError(f"an evidence sentence of no known kind: {text[:80]!r}")


def hypothesis_items(sentences) -> list:
    """The items of a hypothesis's evidence sentences; Inconsistent (fail closed) unless each
    sentence is exactly the one generated from the fields read out of it."""
    out = []
    for t in sentences:
        try:
            kind, data = structure(t)
        except ValueError as exc:
            raise Inconsistent(f"not certified: {exc}") from None
        it = item(kind, data)
        if it["text"] != t:
            raise Inconsistent(f"not certified: the evidence sentence {t[:60]!r} is not the one "
                               "generated from its fields")
        out.append(it)
    return out


def hypothesis_records(hypotheses) -> list:
    """Hypotheses of an ecq race with structured evidence items."""
    return [{"name": h.name, "statement": h.statement, "status": h.status,
             "evidence": hypothesis_items(h.evidence), "reference": h.reference} for h in hypotheses]


# -- the independent checks -------------------------------------------------------------------

def trace_bound_ratio(primes, aps, bad) -> str:
    """The largest a_p^2/(4p) over the good primes, an exact fraction as text."""
    best = max((Fraction(a * a, 4 * p) for p, a in zip(primes, aps) if p not in bad),
               default=Fraction(0))
    return f"{best.numerator}/{best.denominator}"


def independent_items(model, N: int, bad: set, eps, rank: int, stored_local: dict | None,
                      published: str, prec: int = 80) -> list:
    """The items of ``spectrum.evidence`` from computations that do not use the pipeline:
    a_p by a literal point count for p < SMALL_P, the bound |a_p| <= 2 sqrt(p) on them, the reduction type at
    each bad prime, the root number (semistable formula, else the local root numbers) and the
    rank proof by the series of :func:`.ecq_evidence.central_derivative` (every rank)."""
    import math

    from .ecq_evidence import MAX_TERMS, SMALL_P, _primes, central_derivative, trace
    from .model import ball_record

    small = _primes(SMALL_P - 1)
    counted = {p: trace(model, p) for p in small}
    for p in bad:
        counted.setdefault(p, trace(model, p))
    items = [item("a_p-table", {"below": SMALL_P, "primes": small, "a_p": [counted[p] for p in small]}),
             item("trace-bound", {"good_primes": sum(1 for p in small if p not in bad),
                                  "largest_ratio": trace_bound_ratio(small, [counted[p] for p in small], bad)})]
    bp = sorted(bad)
    items.append(item("reduction-types", {"primes": bp, "a_p": [counted[p] for p in bp],
                                          "types": [REDUCTION_NAMES.get(counted[p], "?") for p in bp]}))
    if N == math.prod(bad):
        e = -math.prod(-counted[p] for p in bad)
        method = "minus the product of the -a_p over the primes p dividing N, from the counted a_p (semistable)"
    else:
        w = [d.get("root_number") for d in (stored_local or {}).values()]
        if w and all(x in (1, -1) for x in w):
            e = -math.prod(w)
            method = "minus the product of the local root numbers w_p (w at infinity is -1; not semistable)"
        else:
            e = eps
            method = "the sign of the functional equation (no local formula applies)"
    items.append(item("root-number-check", {"value": int(e), "method": method}))
    if eps in (1, -1) and rank is not None and 0 <= rank <= 3:
        val, M = central_derivative(model, N, bad, eps, rank, prec)
        if val is None:
            raise Inconsistent(f"not certified: the rank series needs {M} terms (limit {MAX_TERMS})")
        if val.contains(0):
            raise Inconsistent(f"not certified: the independent series for Lambda^({rank})(1) does "
                               "not exclude 0")
        lower = []
        for k in range(rank % 2, rank, 2):
            v, _ = central_derivative(model, N, bad, eps, k, prec)
            if not v.contains(0):  # a lower order would have been found first: fail closed
                raise Inconsistent(f"not certified: Lambda^({k})(1) excludes 0 by the independent "
                                   f"series, against the rank {rank}")
            lower.append({"order": k, "value": ball_record(v)})
        items.append(item("rank-proof", {"rank": rank, "root_number": int(eps), "conductor": int(N),
                                         "value": ball_record(val),
                                         "terms": M, "lower": lower, "published": published}))
    return items


__all__ = ["FIELDS", "sentence", "item", "structure", "hypothesis_records", "independent_items"]
