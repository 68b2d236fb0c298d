"""The race of pi(x) against li(x): a certified density planned for a relative target.

Under RH and LI for zeta, (log x / sqrt x)(pi(x) - li(x)) has the limit law of
X = -1 + sum_{gamma > 0} (2 / |rho|) cos Theta_gamma (docs/method.md, section 9),
so delta(pi>li) = P(X > 0) is tiny (about 2.6e-7) and delta(pi<li) = 1 - delta(pi>li).
The interesting number is that small side, and it is asked for with a number
of *significant* digits: 10 significant digits of 2.6e-7 need an absolute
width of about 2.6e-17.

:func:`certify_li_race` runs the driver of races over Q (the same spectrum
layer, residual checks and density engine, zeta being the L-function of
conductor 1) first at a modest absolute target to locate the small side,
then at the absolute target that the relative one implies, and again with
two more digits in the rare case where the enclosure straddles a digit
boundary.  The result is a :class:`LiRaceResult`, a
:class:`~certify.races.RaceResult` (so certificates, verify and the referee
check take it as it is) that also carries the small side and its certified
significant digits.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from fractions import Fraction

from .arith import certified_significant, sci_text as sci
from .errors import BadInput
from .race.question import prime_vs_li
from .races import MAX_DIGITS, RaceResult, certify_race
from .spectrum.spectrum import SpectrumStore

DEFAULT_SIG_DIGITS = 10
MAX_SIG_DIGITS = 50
LOCATE_DIGITS = 10  # first absolute target: enough to see the small side to a few digits


def _sci_down(v: Fraction, sig: int) -> str:
    return sci(v, sig, up=False)


def _sci_up(v: Fraction, sig: int) -> str:
    return sci(v, sig, up=True)


@dataclass(frozen=True)
class LiRaceResult(RaceResult):
    """A :class:`RaceResult` of the li race, with its small side.

    Attributes (beyond RaceResult)
    ------------------------------
    small_name : str
        ``"delta"`` when the density itself is the small side (pi>li), else
        ``"1 - delta"``.
    small_lower, small_upper : Fraction
        Proven enclosure of min(delta, 1 - delta).
    sig_digits_requested : int
        Significant digits asked for the small side (0 if only an absolute
        width was asked).
    rounds : tuple
        (absolute digits, seconds, zeros used) of each round.
    """

    small_name: str = ""
    small_lower: Fraction = Fraction(0)
    small_upper: Fraction = Fraction(0)
    sig_digits_requested: int = 0
    rounds: tuple = ()

    @property
    def significant(self) -> tuple[int, str]:
        """(k, text): the significant digits of the small side common to its whole enclosure."""
        return certified_significant(self.small_lower, self.small_upper)

    @property
    def sig_target_met(self) -> bool:
        if not self.sig_digits_requested:
            return self.target_met
        return self.significant[0] >= self.sig_digits_requested

    def small_side_strings(self, sig: int | None = None) -> tuple[str, str]:
        """The small side's enclosure in scientific notation, rounded outward."""
        k = self.significant[0]
        sig = sig or max(k + 2, 3)
        return _sci_down(self.small_lower, sig), _sci_up(self.small_upper, sig)

    def __repr__(self) -> str:
        k, text = self.significant
        lo, hi = self.small_side_strings()
        return (f"<LiRaceResult {self.question.label}: {self.small_name} in [{lo}, {hi}] "
                f"({k} significant digits: {text or '-'}); conditional on RH and LI>")

    def to_dict(self) -> dict:
        out = super().to_dict()
        k, text = self.significant
        lo, hi = self.small_side_strings()
        out["small_side"] = {
            "name": self.small_name,
            "lower": lo,
            "upper": hi,
            "relative_width": _sci_up((self.small_upper - self.small_lower) / self.small_lower, 3)
            if self.small_lower > 0 else "inf",
            "significant_digits": k,
            "certified": text,
            "significant_digits_requested": self.sig_digits_requested,
            "target_met": self.sig_target_met,
        }
        out["rounds"] = [{"digits": d, "seconds": round(s, 3), "zeros_used": z}
                         for d, s, z in self.rounds]
        return out


def _small_side(result: RaceResult) -> tuple[str, Fraction, Fraction]:
    lo, hi = result.density.lower, result.density.upper
    if hi < Fraction(1, 2):
        return "delta", lo, hi
    if lo > Fraction(1, 2):
        return "1 - delta", 1 - hi, 1 - lo
    # cannot happen for this race at any sensible target; keep the density itself
    return "delta", lo, hi


def _check_int(value, what: str, lo: int, hi: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        if isinstance(value, str) and value.strip().lstrip("+").isdigit():
            value = int(value)
        else:
            raise BadInput(f"{what} must be an integer, got {value!r}")
    if not lo <= value <= hi:
        raise BadInput(f"{what} must lie in {lo}..{hi} (got {value})")
    return value


def digits_for(small_lower: Fraction, sig_digits: int) -> int:
    """Absolute digits D so that a width 10^-D is a relative width <= 10^-(sig+1) of the small side.

    Planning only: the result is judged by the digits actually common to the enclosure.
    """
    if small_lower <= 0:
        return MAX_DIGITS
    e = math.floor(math.log10(float(small_lower)))  # small_lower >= 10^e
    return min(MAX_DIGITS, sig_digits + 1 - e)


def certify_li_race(direction: str = "pi<li", sig_digits: int | None = DEFAULT_SIG_DIGITS,
                    digits: int | None = None, store: SpectrumStore | None = None,
                    command_line: str = "", max_rounds: int = 4) -> LiRaceResult:
    """Certify delta(pi>li) or delta(pi<li); plan for ``sig_digits`` significant digits of the small side.

    Parameters
    ----------
    direction : {"pi<li", "pi>li"}
    sig_digits : int, optional
        Significant digits wanted for min(delta, 1 - delta) (1..50).
    digits : int, optional
        Instead of ``sig_digits``: an absolute target width 10^-digits for delta.
    store : SpectrumStore, optional
        Zeros and moments of zeta, shared across rounds and calls.

    Returns
    -------
    LiRaceResult
        If the target cannot be reached, the best certified enclosure with
        ``sig_target_met`` False.

    Assumptions
    -----------
    RH and LI for zeta; both are listed in the result with their evidence.
    """
    question = prime_vs_li(direction)
    if digits is not None:
        digits = _check_int(digits, "digits", 1, MAX_DIGITS)
        sig = 0
    else:
        sig = _check_int(sig_digits if sig_digits is not None else DEFAULT_SIG_DIGITS,
                         "significant digits", 1, MAX_SIG_DIGITS)
    store = store if store is not None else SpectrumStore()
    t0 = time.time()
    rounds = []

    def run(d: int) -> RaceResult:
        t = time.time()
        r = certify_race(question, d, store=store, command_line=command_line)
        rounds.append((d, time.time() - t, r.parameters.get("zeros_used", 0)))
        return r

    if sig == 0:
        result = run(digits)
    else:
        d = LOCATE_DIGITS
        result = run(d)
        for _ in range(max_rounds - 1):
            _, lo, hi = _small_side(result)
            if certified_significant(lo, hi)[0] >= sig:
                break
            want = digits_for(lo, sig)
            d = max(want, d + 2) if want <= d else want
            if d > MAX_DIGITS or (rounds and rounds[-1][0] >= MAX_DIGITS):
                break
            result = run(min(d, MAX_DIGITS))
    name, lo, hi = _small_side(result)
    timings = dict(result.timings)
    timings["total"] = round(time.time() - t0, 3)
    fields = {f: getattr(result, f) for f in RaceResult.__dataclass_fields__}
    fields["timings"] = timings
    return LiRaceResult(**fields, small_name=name, small_lower=lo, small_upper=hi,
                        sig_digits_requested=sig, rounds=tuple(rounds))


def small_side_text(result: LiRaceResult) -> str:
    """One line: the small side with its certified significant digits, rounded outward."""
    k, text = result.significant
    lo, hi = result.small_side_strings()
    return f"{result.small_name} in [{lo}, {hi}]; {k} significant digits certified: {text or '-'}"


__all__ = ["LiRaceResult", "certify_li_race", "digits_for", "small_side_text",
           "DEFAULT_SIG_DIGITS", "MAX_SIG_DIGITS"]
