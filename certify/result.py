"""Values carried by every result: hypotheses, error terms, enclosures.

These are plain frozen dataclasses so that renderers and certificates can be
built on a result without recomputing anything.  Balls stay as ``arb``
here; the certificate layer turns them into exact strings.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from .arith import (arb, bound_text, certified_digits, decimal_down, decimal_up, fraction_text,
                    interval_text, lower_fraction, places_for_width, sci_interval_text, sci_up,
                    upper_float, upper_fraction)

CAUTION = (
    "Conditional result: this enclosure is proven only under the hypotheses listed "
    "(such as GRH and LI); certify gathers evidence for them but does not prove them."
)  # generic form; a result's own caution comes from caution_text(its hypotheses)


@dataclass(frozen=True)
class Hypothesis:
    """A hypothesis a result rests on, with the evidence gathered for it.

    ``status`` is one of ``"assumed"`` (not proven; evidence only),
    ``"theorem"`` (a proven theorem, cited in ``reference``) or
    ``"verified"`` (checked by this computation, in full, for what ``statement`` says).
    """

    name: str
    statement: str
    status: str
    evidence: tuple[str, ...] = ()
    reference: str = ""
    data: dict = field(default_factory=dict, compare=False, hash=False)

    def as_dict(self) -> dict:
        """JSON form used by every result's ``to_dict``/``as_dict``."""
        return {"name": self.name, "statement": self.statement, "status": self.status,
                "evidence": list(self.evidence), "reference": self.reference}


@dataclass(frozen=True)
class ErrorTerm:
    """One named term of an error budget: |term| <= bound (an arb upper bound)."""

    name: str
    bound: arb
    description: str

    @property
    def bound_float(self) -> float:
        """A float >= the bound (for planning and comparisons; print with :meth:`bound_text`)."""
        return upper_float(self.bound)

    def bound_text(self, sig: int = 3) -> str:
        """The bound as printed everywhere: rounded up to ``sig`` significant digits."""
        return bound_text(self.bound, sig)

    def as_dict(self) -> dict:
        """JSON form: the bound as a decimal string (an upper bound, 3 significant digits)."""
        return {"name": self.name, "bound": self.bound_text(3), "description": self.description}


@dataclass(frozen=True)
class Enclosure:
    """A proven interval [lower, upper] for a real number (exact rationals).

    Decimal strings (documented attributes, for notebooks and reports):
    ``lower_decimal`` (rounded down), ``upper_decimal`` (rounded up),
    ``width_decimal`` (rounded up), ``digits_decimal`` (certified digits).

    Examples
    --------
    >>> from fractions import Fraction
    >>> e = Enclosure(Fraction(99591, 100000), Fraction(99593, 100000))
    >>> e.lower_decimal, e.upper_decimal, e.digits_decimal
    ('0.9959100', '0.9959300', '0.9959')
    """

    lower: Fraction
    upper: Fraction

    @classmethod
    def from_arb(cls, x: arb) -> "Enclosure":
        # An unbounded or astronomically wide ball cannot be an answer, and its exact
        # conversion would exhaust memory: refuse it (fail closed).
        if not x.is_finite() or x.rad() > 2**64 or abs(x.mid()) > 2**64:
            from .errors import PrecisionExhausted

            raise PrecisionExhausted(f"not certified: the enclosure {x.str(5)} is unbounded")
        return cls(lower_fraction(x), upper_fraction(x))

    @property
    def width(self) -> Fraction:
        return self.upper - self.lower

    @property
    def mid(self) -> Fraction:
        return (self.lower + self.upper) / 2

    def contains(self, value) -> bool:
        v = Fraction(value)
        return self.lower <= v <= self.upper

    def digits(self) -> str:
        """The decimal digits common to every point of the enclosure."""
        return certified_digits(self.lower, self.upper)

    def lower_str(self, places: int) -> str:
        return decimal_down(self.lower, places)

    def upper_str(self, places: int) -> str:
        return decimal_up(self.upper, places)

    def places(self) -> int:
        """Decimal places enough to show the width: two past its leading digit (4..80)."""
        return places_for_width(self.width)

    @property
    def lower_decimal(self) -> str:
        """The lower end as a decimal string, rounded down, with enough places to show the width."""
        return self.lower_str(self.places())

    @property
    def upper_decimal(self) -> str:
        """The upper end as a decimal string, rounded up, with enough places to show the width."""
        return self.upper_str(self.places())

    @property
    def width_decimal(self) -> str:
        """The width in scientific notation, rounded up."""
        return self.width_text()

    @property
    def digits_decimal(self) -> str:
        """The certified digits (common to every point of the enclosure), as a string."""
        return self.digits()

    def interval_text(self, places: int | None = None) -> str:
        """``[lower, upper]`` in fixed point, rounded outward (contains the enclosure)."""
        return interval_text(self.lower, self.upper, self.places() if places is None else places)

    def sci_text(self) -> str:
        """``[lower, upper]`` in scientific notation, rounded outward."""
        return sci_interval_text(self.lower, self.upper)

    def width_text(self, sig: int = 3) -> str:
        """The width rounded up."""
        return sci_up(self.width, sig)

    def one_minus(self) -> "Enclosure":
        """The enclosure of 1 - x."""
        return Enclosure(1 - self.upper, 1 - self.lower)

    def minus(self, c) -> "Enclosure":
        """The enclosure of x - c (c exact)."""
        c = Fraction(c)
        return Enclosure(self.lower - c, self.upper - c)


@dataclass(frozen=True)
class ExactValue:
    """A density known exactly, with the reason (a proof in docs/, not a numerical fit).

    Examples: 1/2 for a race whose limit law is symmetric about 0
    (docs/method.md, section 1b); a rational value from a finite closure or a
    periodic limit (function fields, curves).  A result carrying one still
    carries the numerical enclosure that was computed, which must contain it.
    """

    value: Fraction
    reason: str

    def text(self) -> str:
        return fraction_text(self.value)

    def as_dict(self) -> dict:
        return {"value": self.text(), "reason": self.reason,
                "error_budget": "none: the value is exact (the budget listed belongs to the "
                                "numerical enclosure computed as a cross-check)"}


@dataclass(frozen=True)
class DensityEnclosure:
    """What the density engine returns: the enclosure and its itemised budget."""

    enclosure: Enclosure
    budget: tuple[ErrorTerm, ...]
    parameters: dict[str, Any]
    ball: arb
    exact: ExactValue | None = None


# ---------------------------------------------------------------------------
# How a density is shown: one set of functions for every command and renderer
# ---------------------------------------------------------------------------

NEAR_ONE = Fraction(99, 100)
NEAR_ZERO = Fraction(1, 100)
NEAR_HALF = Fraction(1, 100)


def caution_text(hypotheses=(), extra: str = "") -> str:
    """The caution for a result: names the hypotheses it actually assumes.

    A hypothesis with status ``"assumed"`` makes the result conditional; one
    that is a ``"theorem"`` or was ``"verified"`` in full by the computation
    does not.  With nothing assumed the caution says so.
    """
    assumed = [h.name for h in hypotheses if h.status == "assumed"]
    if not assumed:
        text = ("Unconditional result: no hypothesis is assumed (each one listed is a theorem "
                "or was verified in full by this computation).")
    else:
        names = assumed[0] if len(assumed) == 1 else ", ".join(assumed[:-1]) + " and " + assumed[-1]
        them = "it" if len(assumed) == 1 else "them"
        text = (f"Conditional result: this result is proven only under {names} (listed with "
                f"the evidence gathered); certify gathers evidence for {them} but does not "
                f"prove {them}.")
    return text + (" " + extra if extra else "")


def headline_text(label: str, enclosure: Enclosure, exact: ExactValue | None = None,
                  target_met: bool = True, target: str = "") -> str:
    """The first line shown for a density: never a digit that is not proven.

    * exact value known: ``label = 1/2 exactly (reason)``;
    * otherwise, if at least one decimal digit is common to the whole
      enclosure: ``label = 0.99592...`` (truncated digits, then ``...``);
    * otherwise the enclosure itself, rounded outward: ``label in [lo, hi]``.
    A target not met is said on the same line.
    """
    if exact is not None:
        if not enclosure.contains(exact.value):
            raise ValueError("the exact value lies outside the computed enclosure")
        return f"{label} = {exact.text()} exactly ({exact.reason})"
    d = enclosure.digits()
    if "." in d and len(d.split(".", 1)[1]) >= 1:
        head = f"{label} = {d}...   (digits common to the whole enclosure)"
    else:
        head = f"{label} in {enclosure.interval_text()}   (no decimal digit is certified)"
    if not target_met:
        head += f"   [target{' ' + target if target else ''} NOT met]"
    return head


def auxiliary_intervals(enclosure: Enclosure, symbol: str = "delta") -> list[tuple[str, str]]:
    """(name, interval text) for the quantities worth a line: 1 - x near 1, x near 0, x - 1/2."""
    out = []
    half = Fraction(1, 2)
    if enclosure.lower >= NEAR_ONE and enclosure.upper < 1:
        out.append((f"1 - {symbol}", enclosure.one_minus().sci_text()))
    if enclosure.upper <= NEAR_ZERO and enclosure.lower > 0:
        out.append((symbol, enclosure.sci_text()))
    if enclosure.lower >= half - NEAR_HALF and enclosure.upper <= half + NEAR_HALF:
        g = enclosure.minus(half)
        out.append((f"{symbol} - 1/2", g.sci_text() if g.lower != g.upper else "0"))
    return out


def density_lines(label: str, enclosure: Enclosure, exact: ExactValue | None = None,
                  target_met: bool = True, target: str = "", symbol: str = "delta",
                  statement: str = "") -> list[str]:
    """The lines every screen prints for a density (headline, enclosure, auxiliaries)."""
    lines = [headline_text(label, enclosure, exact, target_met, target)]
    if statement:
        lines.append(f"  {statement}")
    if exact is not None:
        if enclosure.width == 0:
            lines.append("  error budget: none, the value is exact")
        else:
            lines.append(f"  numerical cross-check  {enclosure.interval_text()} contains "
                         f"{exact.text()}   (width <= {enclosure.width_text()}); no error "
                         "budget applies to the exact value")
        return lines
    lines.append(f"  enclosure  {enclosure.interval_text()}   width <= {enclosure.width_text()}")
    for name, text in auxiliary_intervals(enclosure, symbol):
        lines.append(f"  {name:<10} in {text}")
    return lines


class NotebookDisplay:
    """Mixin of every result class: displays as a table in Jupyter (``_repr_html_``) and
    as the enclosure in LaTeX (``_repr_latex_``); see :mod:`certify.render.notebook`."""

    def _repr_html_(self) -> str:
        from .render.notebook import result_html

        return result_html(self)

    def _repr_latex_(self) -> str:
        from .render.notebook import result_latex

        return result_latex(self)

