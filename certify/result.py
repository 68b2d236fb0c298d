"""Values carried by every result: hypotheses, error terms, enclosures.

These are plain frozen dataclasses so that renderers and certificates can be
built on a result without recomputing anything.  Balls stay as ``arb``
here; the certificate layer turns them into exact strings.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any

from .arith import arb, certified_digits, decimal_down, decimal_up, lower_fraction, upper_fraction

CAUTION = (
    "Conditional result: this enclosure is proven only under the hypotheses listed "
    "(such as GRH and LI); certify gathers evidence for them but does not prove them."
)


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
        return float(self.bound.upper())

    def as_dict(self) -> dict:
        """JSON form: the bound as a decimal string (an upper bound, 3 significant digits)."""
        return {"name": self.name, "bound": f"{self.bound_float:.3e}", "description": self.description}


@dataclass(frozen=True)
class Enclosure:
    """A proven interval [lower, upper] for a real number (exact rationals)."""

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
        w = self.width
        p = 4
        while p < 80 and Fraction(1, 10**p) > w / 100:
            p += 1
        return p


@dataclass(frozen=True)
class DensityEnclosure:
    """What the density engine returns: the enclosure and its itemised budget."""

    enclosure: Enclosure
    budget: tuple[ErrorTerm, ...]
    parameters: dict[str, Any]
    ball: arb
