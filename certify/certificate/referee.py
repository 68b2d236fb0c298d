"""The referee's check: is a claimed density consistent with a certified enclosure?

A claim is a race and a value.  The value is read as the set of numbers it
stands for:

* a decimal ``0.9959`` -- every number that rounds to it at the printed
  places, ``[0.99585, 0.99595]``;
* a decimal with a trailing ``...`` -- a truncation: ``0.9959...`` stands
  for ``[0.9959, 0.9960]``;
* an interval ``[0.9958, 0.9960]`` -- itself;
* scientific notation ``2.63e-7`` -- rounded at its last significant digit,
  ``[2.625e-7, 2.635e-7]`` (``2.63e-7...``: truncated, ``[2.63e-7, 2.64e-7]``),
  for the tiny densities of the race of pi(x) against li(x).

With E the certified enclosure (under GRH and LI) and C the claim's set:
E inside C -- **consistent** (every value the enclosure allows prints as the
claim); E and C disjoint -- **refuted**, by the distance between them;
otherwise **undecided** at this precision, and the check raises the digits
itself (reusing the spectra) up to a limit.

Claims files hold one claim per line: ``RACE = VALUE``, where RACE is
``delta(q;a,b)``, ``delta(q;N,R)`` (non-residues against residues),
``weighted(q; a:w, b:w, ...)``, ``delta(pi>li)`` or ``delta(pi<li)``, or a curve over Q
``delta(E[a1,a2,a3,a4,a6]>0)`` / ``delta(E[...]<0)`` (the density of x with
sum_{p <= x} a_p/sqrt(p) > 0, resp. < 0; docs/elliptic_curves_q.md); ``#`` starts a
comment, blank lines are skipped.  See docs/certificates.md.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from fractions import Fraction

from ..errors import BadInput, PrecisionExhausted
from ..race.question import (RaceQuestion, parse_weight_items, prime_vs_li, residue_race, two_way,
                             weighted)
from ..orders import MAX_ORDER_DIGITS, certify_order
from ..races import MAX_DIGITS, RaceResult, certify_race
from ..spectrum.spectrum import SpectrumStore
from .numbers import interval_str, sci

CONSISTENT, REFUTED, UNDECIDED = "consistent", "refuted", "undecided"
START_DIGITS = 6
MAX_REFEREE_DIGITS = 30

_DEC = r"[+-]?(?:\d+\.?\d*|\.\d+)"


@dataclass(frozen=True)
class Claim:
    """A claimed value of a race density.

    Attributes
    ----------
    race : RaceQuestion
    text : str
        The value as written.
    lower, upper : Fraction
        The set of numbers the claim stands for.
    meaning : str
        How the text was read (rounded / truncated / interval).
    places : int
        Decimal places printed (0 for an interval).
    source : str
        ``FILE:LINE`` for a claim from a file, else "".
    note : str
        The comment on the claim's line.
    """

    race: RaceQuestion
    text: str
    lower: Fraction
    upper: Fraction
    meaning: str
    places: int = 0
    source: str = ""
    note: str = ""


@dataclass(frozen=True)
class RefereeVerdict:
    """The outcome of checking one claim."""

    claim: Claim
    verdict: str
    lower: Fraction | None
    upper: Fraction | None
    margin: Fraction | None  # refuted: distance from the enclosure to the claim
    digits_tried: tuple
    reason: str = ""
    result: RaceResult | None = field(default=None, compare=False, repr=False)
    certificate: object = field(default=None, compare=False, repr=False)

    def summary(self) -> str:
        c = self.claim
        enc = (interval_str(self.lower, self.upper)
               if self.lower is not None else "(no enclosure)")
        head = f"{c.race.label} = {c.text}: {self.verdict.upper()}"
        if self.verdict == REFUTED:
            side = "below" if self.upper < c.lower else "above"
            return (f"{head} -- the certified enclosure {enc} lies {side} every value the claim "
                    f"allows ({c.meaning} [{_plain(c.lower)}, {_plain(c.upper)}]), "
                    f"by {sci(self.margin, 3, up=False)}")
        if self.verdict == CONSISTENT:
            return (f"{head} -- the certified enclosure {enc} lies inside {c.meaning} "
                    f"[{_plain(c.lower)}, {_plain(c.upper)}]")
        return f"{head} -- {self.reason}"


def _plain(v: Fraction) -> str:
    """A short exact decimal for claim ends (they are decimals by construction)."""
    den = v.denominator
    k = 0
    while den % 10 == 0 or den % 2 == 0 or den % 5 == 0:
        if den % 10 == 0:
            den //= 10
        elif den % 2 == 0:
            den //= 2
        else:
            den //= 5
        k += 1
    if den != 1:
        return f"{float(v):.17g}"
    p = max(k, 1)
    s = f"{abs(v.numerator) * 10**p // v.denominator}".rjust(p + 1, "0")
    out = (("-" if v < 0 else "") + s[:-p] + "." + s[-p:]).rstrip("0")
    return out[:-1] if out.endswith(".") else out


def parse_value(text: str) -> tuple[Fraction, Fraction, str, int]:
    """(lower, upper, meaning, places) of a claimed value; BadInput if malformed.

    A density lies in [0, 1]: a value (or an interval end) outside it is refused as such.
    """
    t = text.strip()
    if len(t) > 120:
        raise BadInput(f"claimed value of {len(t)} characters: give at most 100 decimal places "
                       "(certify cannot decide more digits than its precision ceiling)")
    lo, hi, meaning, places = _parse_value(t)
    if meaning == "the interval":
        stated = (lo, hi)
    elif meaning.startswith("the truncation"):
        stated = (lo if lo >= 0 else hi,)  # the printed number itself
    else:
        stated = ((lo + hi) / 2,)
    if any(v < 0 or v > 1 for v in stated):
        raise BadInput(f"claimed value {t!r} lies outside [0, 1]; a density is between 0 and 1")
    return lo, hi, meaning, places


def _parse_value(t: str) -> tuple[Fraction, Fraction, str, int]:
    m = re.fullmatch(r"\[\s*(" + _DEC + r")\s*,\s*(" + _DEC + r")\s*\]", t)
    if m:
        lo, hi = Fraction(m.group(1)), Fraction(m.group(2))
        if lo > hi:
            raise BadInput(f"interval {t!r} has its ends in the wrong order")
        return lo, hi, "the interval", 0
    m = re.fullmatch(r"(" + _DEC + r")[eE]([+-]?\d{1,4})(\.\.\.|…)?", t)
    if m:
        num, exp = m.group(1), int(m.group(2))
        places = len(num.split(".", 1)[1]) if "." in num else 0
        v = Fraction(num) * Fraction(10) ** exp
        ulp = Fraction(1, 10**places) * Fraction(10) ** exp
        sig = len(num.lstrip("+-").replace(".", "").lstrip("0")) or 1
        if m.group(3):
            lo, hi = (v, v + ulp) if v >= 0 else (v - ulp, v)
            return lo, hi, f"the truncation to {sig} significant digits", max(places - exp, 0)
        return (v - ulp / 2, v + ulp / 2, f"the values rounding to it at {sig} significant digits",
                max(places - exp, 0))
    m = re.fullmatch(r"(" + _DEC + r")(\.\.\.|…)?", t)
    if not m:
        raise BadInput(f"claimed value {t!r} is not a decimal (0.9959), a truncated decimal "
                       "(0.9959...), scientific notation (2.63e-7) or an interval ([0.9958, 0.9960])")
    num = m.group(1)
    places = len(num.split(".", 1)[1]) if "." in num else 0
    v = Fraction(num)
    ulp = Fraction(1, 10**places)
    if m.group(2):
        if v >= 0:
            return v, v + ulp, f"the truncation to {places} places", places
        return v - ulp, v, f"the truncation to {places} places", places
    return v - ulp / 2, v + ulp / 2, f"the values rounding to it at {places} places", places


def parse_race(text: str) -> RaceQuestion:
    """A race from ``delta(q;a,b)``, ``delta(q;N,R)`` or ``weighted(q; a:w, ...)``."""
    t = text.strip().replace(" ", "")
    if len(t) > 400:
        raise BadInput(f"race of {len(t)} characters: too long")
    m = re.fullmatch(r"(?:delta|δ)\(E(\[[^\]]*\]|\([^)]*\))([<>]0)?\)", t)
    if m:
        from ..ecrace import curve_race

        return curve_race(m.group(1), m.group(2) or ">0")
    m = re.fullmatch(r"(?:delta|δ)\((pi[<>]li)\)", t, flags=re.IGNORECASE)
    if m:
        return prime_vs_li(m.group(1).lower())
    m = re.fullmatch(r"(?:delta|δ)\((\d+);(-?\d+),(-?\d+)\)", t)
    if m:
        return two_way(int(m.group(1)), int(m.group(2)), int(m.group(3)))
    m = re.fullmatch(r"(?:delta|δ)\((\d+);(-?\d+(?:,-?\d+){2,})\)", t)
    if m:  # an ordering of three or more classes
        from ..race.order import ordering

        return ordering(int(m.group(1)), *[int(c) for c in m.group(2).split(",")])
    m = re.fullmatch(r"(?:delta|δ)\((\d+);N,R\)", t)
    if m:
        return residue_race(int(m.group(1)))
    m = re.fullmatch(r"weighted\((\d+);(.+)\)", t)
    if m:
        weights = parse_weight_items(m.group(2).split(","), ":")
        return weighted(int(m.group(1)), weights)
    raise BadInput(f"race {text.strip()[:80]!r} is not delta(q;a,b), delta(q;a,b,c,...), delta(q;N,R), "
                   "weighted(q; a:w, b:w, ...), delta(pi>li), delta(pi<li) or a curve "
                   "delta(E[a1,a2,a3,a4,a6]>0)")


def parse_claim_line(line: str, source: str = "") -> Claim | None:
    """One line of a claims file: a Claim, or None for a blank/comment line."""
    body, _, note = line.partition("#")
    body = body.strip()
    if not body:
        return None
    if body.count("=") != 1:
        raise BadInput("expected RACE = VALUE, e.g. delta(4;3,1) = 0.9959")
    race_text, value_text = body.split("=")
    race = parse_race(race_text)
    lo, hi, meaning, places = parse_value(value_text)
    return Claim(race, value_text.strip(), lo, hi, meaning, places, source, note.strip())


def read_claims(path: str, display: str | None = None) -> tuple[list[Claim], list[str]]:
    """All claims of a file, and the one-line errors ``FILE:LINE: ...`` of its bad lines.

    ``display`` is the file name used in messages and sources (default ``path``).
    """
    from ..io import read_text_lines

    lines = read_text_lines(path, path)
    name = display or path
    claims, errors = [], []
    for no, line in enumerate(lines, start=1):
        try:
            c = parse_claim_line(line, f"{name}:{no}")
        except BadInput as exc:
            errors.append(f"{name}:{no}: {exc}")
            continue
        if c is not None:
            claims.append(c)
    if not claims and not errors:
        errors.append(f"{name}:1: no claims in the file (expected lines RACE = VALUE)")
    return claims, errors


def decide(lo: Fraction, hi: Fraction, claim: Claim) -> tuple[str, Fraction | None]:
    """Verdict for an enclosure [lo, hi] against the claim, and the refuting margin."""
    if claim.lower <= lo and hi <= claim.upper:
        return CONSISTENT, None
    if hi < claim.lower:
        return REFUTED, claim.lower - hi
    if lo > claim.upper:
        return REFUTED, lo - claim.upper
    return UNDECIDED, None


def _next_digits(d: int, lo: Fraction, hi: Fraction, claim: Claim) -> int:
    """Digits likely to separate the enclosure from the claim's ends that fall inside it."""
    mid = (lo + hi) / 2
    inside = [b for b in (claim.lower, claim.upper) if lo <= b <= hi]
    dist = min((abs(b - mid) for b in inside), default=Fraction(0))
    want = d + 3
    if dist > 0:
        want = max(d + 2, math.ceil(-math.log10(float(dist))) + 1)
    return want


def _is_ordering(race) -> bool:
    return getattr(race, "kind", "") == "ordering"


def _is_curve(race) -> bool:
    return getattr(race, "kind", "") == "ecq-trace-sum"


def _enclosure(race, result) -> tuple:
    """(lower, upper) of the claimed side from a result."""
    if _is_curve(race):
        return race.enclosure(result)
    return result.density.lower, result.density.upper


def _certify(race, digits: int, store):
    """The race's certified density: the line engine, the orthant engine for an ordering,
    or the trace race of a curve over Q."""
    if _is_curve(race):
        from ..ecrace import MAX_CLAIM_DIGITS, certify_ec_race

        return certify_ec_race(race.ainvs, min(digits, MAX_CLAIM_DIGITS))
    if _is_ordering(race):
        return certify_order(race, min(digits, MAX_ORDER_DIGITS), store=store)
    return certify_race(race, digits, store=store)


def _curve_max_digits() -> int:
    from ..ecrace import MAX_CLAIM_DIGITS

    return MAX_CLAIM_DIGITS


def referee(claim: Claim, start_digits: int = START_DIGITS, max_digits: int = MAX_REFEREE_DIGITS,
            store: SpectrumStore | None = None, with_certificate: bool = False) -> RefereeVerdict:
    """Check ``claim``, raising the precision until it is decided or ``max_digits`` is reached.

    Parameters
    ----------
    claim : Claim
    start_digits : int
        First target (width 10^-start_digits).
    max_digits : int
        Ceiling of the automatic refinement (at most certify's MAX_DIGITS).
    store : SpectrumStore, optional
        Spectra shared across rounds and claims.
    with_certificate : bool
        Also build the certificate of the deciding computation.
    """
    if not (1 <= start_digits <= MAX_DIGITS) or not (1 <= max_digits <= MAX_DIGITS):
        raise BadInput(f"digits must lie in 1..{MAX_DIGITS}")
    store = store if store is not None else SpectrumStore()
    d = min(start_digits, max_digits)
    tried = []
    result = None
    reason = ""
    while True:
        tried.append(d)
        try:
            result = _certify(claim.race, d, store)
        except PrecisionExhausted as exc:
            reason = f"not decided: {exc}"
            break
        lo, hi = _enclosure(claim.race, result)
        verdict, margin = decide(lo, hi, claim)
        if verdict != UNDECIDED:
            cert = None
            if with_certificate:
                if _is_curve(claim.race):
                    from .ecq import ecq_certificate

                    cert = ecq_certificate(result, 0.0, result.timings.get("total", 0.0))
                elif _is_ordering(claim.race):
                    from .order import order_certificate

                    cert = order_certificate(result, store)
                else:
                    from .build import certificate_from_result

                    cert = certificate_from_result(result, store)
            return RefereeVerdict(claim, verdict, lo, hi, margin, tuple(tried), "", result, cert)
        if _is_curve(claim.race) and d >= _curve_max_digits():
            reason = (f"undecided at {d} digits (the limit for curves): the certified enclosure "
                      f"{interval_str(lo, hi)} straddles an end of the claim")
            break
        if _is_ordering(claim.race) and d >= MAX_ORDER_DIGITS:
            reason = (f"undecided at {d} digits (the limit for orderings): the certified enclosure "
                      f"{interval_str(lo, hi)} straddles an end of the claim")
            break
        if d >= max_digits:
            reason = (f"undecided at {d} digits (the limit): the certified enclosure "
                      f"{interval_str(lo, hi)} straddles an end of the claim")
            break
        d = min(max_digits, _next_digits(d, lo, hi, claim))
        if _is_curve(claim.race):
            d = min(d, _curve_max_digits())
    lo, hi = _enclosure(claim.race, result) if result else (None, None)
    return RefereeVerdict(claim, UNDECIDED, lo, hi, None, tuple(tried), reason, result, None)
