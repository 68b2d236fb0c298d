"""The notebook-facing API: one call per kind of race, returning a RaceResult.

>>> from certify import race
>>> r = race(4, 3, 1, digits=8)            # doctest: +SKIP
>>> r.density.lower < 0.9959 < r.density.upper  # doctest: +SKIP
True
"""

from __future__ import annotations

from .race.question import residue_race as _residue_question
from .race.question import two_way, weighted
from .races import DEFAULT_DIGITS, RaceResult, certify_race
from .spectrum.spectrum import SpectrumStore


def race(q: int, a: int, b: int, digits: int = DEFAULT_DIGITS,
         store: SpectrumStore | None = None) -> RaceResult:
    """delta(q; a, b): density of x with pi(x;q,a) > pi(x;q,b), under GRH and LI."""
    return certify_race(two_way(q, a, b), digits, store=store)


def residue_race(q: int, digits: int = DEFAULT_DIGITS,
                 store: SpectrumStore | None = None) -> RaceResult:
    """Density of x where non-residues mod q lead residues (class-averaged counts)."""
    return certify_race(_residue_question(q), digits, store=store)


def weighted_race(q: int, weights: dict, digits: int = DEFAULT_DIGITS,
                  store: SpectrumStore | None = None) -> RaceResult:
    """Density of x with sum_a w_a pi(x;q,a) > 0 (rational weights summing to zero)."""
    return certify_race(weighted(q, weights), digits, store=store)


def li_race(direction: str = "pi<li", sig_digits: int | None = 10, digits: int | None = None,
            store: SpectrumStore | None = None):
    """Density of x with pi(x) < li(x) (or ``"pi>li"``), under RH and LI for zeta.

    Planned for ``sig_digits`` significant digits of the small side
    (1 - delta(pi<li) = delta(pi>li) ~ 2.63e-7), or for an absolute width
    10^-digits; returns a LiRaceResult (a RaceResult with the small side).
    """
    from .lirace import certify_li_race

    return certify_li_race(direction, sig_digits=sig_digits, digits=digits, store=store)


def order_race(q: int, *classes: int, digits: int = 6, store: SpectrumStore | None = None):
    """delta(q; a_1, ..., a_r): density of x with pi(x;q,a_1) > ... > pi(x;q,a_r) (r >= 2).

    Returns an OrderResult (docs/method.md, section 10), under GRH and LI.
    """
    from .orders import certify_order
    from .race.order import ordering

    return certify_order(ordering(q, *classes), digits, store=store)


def all_orders(q: int, classes, digits: int = 6, store: SpectrumStore | None = None):
    """Every ordering of ``classes`` mod q with the consistency checks (an OrderFamily)."""
    from .orders import certify_orderings

    return certify_orderings(q, tuple(classes), digits, store=store)
