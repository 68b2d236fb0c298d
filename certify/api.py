"""The notebook-facing API: one call per setting (races over Q, the race pi(x) vs li(x),
races in F_q[t], curve races over F_q(t), twist families), certificates of each kind,
their re-verification and the referee's check.  Results display as tables in Jupyter
(``_repr_html_``, ``_repr_latex_``); enclosures expose ``lower_decimal``,
``upper_decimal``, ``width_decimal`` and ``digits_decimal``.

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


# -- every other setting ----------------------------------------------------------

def ffield_race(q, modulus: str, classes=None, weights=None, mode: str = "cumulative",
                digits: int = 10, residues: bool = False, leaders: int = 0):
    """A prime race in F_q[t] modulo ``modulus`` (natural density; Weil proven, LI or the
    completeness of the relations found assumed).

    Examples
    --------
    >>> from certify.api import ffield_race
    >>> r = ffield_race(3, "t^2+1", ["t+1", "1"], digits=8)   # doctest: +SKIP
    >>> r.density.lower_decimal, r.case                         # doctest: +SKIP
    ('0.6287881...', 'relations')
    """
    from .ffield.race import certify_ffrace, parse_race, residue_race as ff_residues

    if residues:
        qn, G, wd = ff_residues(q, modulus, mode)
    else:
        qn, G, wd = parse_race(q, modulus, list(classes or []), weights, mode)
    return certify_ffrace(qn, G, wd, target_width=10.0 ** (-digits), leader_bound=leaders)


def curve_race(q, A: str, B: str, mode: str = "cumulative", digits: int = 8, confirm: int = 1,
               max_boxes: int = 100000):
    """The trace race of y^2 = x^3 + A(t) x + B(t) over F_q(t) (natural density).

    Examples
    --------
    >>> from certify.api import curve_race
    >>> r = curve_race(5, "t", "t^2 + 1")     # doctest: +SKIP
    >>> from fractions import Fraction
    >>> r.density.contains(Fraction(2, 3)), r.rank   # doctest: +SKIP
    (True, 0)
    """
    from .curves.lpoly import l_polynomial
    from .curves.model import make_curve
    from .curves.race import trace_race

    E = make_curve(q, A, B)
    return trace_race(E, l_polynomial(E, confirm=confirm), mode, 10.0 ** (-digits),
                      max_boxes=max_boxes)


def twist_family(q, A: str, B: str, degree: int, extension: int = 1, sample: int | None = None,
                 seed: int = 0, mode: str = "cumulative", digits: int = 3):
    """Densities of the quadratic twists of degree ``degree`` over F_{q^extension}.

    Examples
    --------
    >>> from certify.api import twist_family
    >>> fam = twist_family(5, "t", "t^2 + 1", 1)   # doctest: +SKIP
    >>> fam.summary()["members"]                    # doctest: +SKIP
    5
    """
    from .curves.family import twist_family as family

    return family(q, A, B, degree, n=extension, sample=sample, seed=seed, mode=mode,
                  target_width=10.0 ** (-digits))


def certificate(race_text: str, digits: int = DEFAULT_DIGITS):
    """The certificate of a race over Q given as text ('delta(4;3,1)', 'delta(8;N,R)',
    'weighted(5;1:1,4:1,2:-1,3:-1)', 'delta(pi<li)'): a frozen
    :class:`~certify.certificate.model.Certificate` that :func:`verify` re-checks.

    Examples
    --------
    >>> from certify.api import certificate, verify
    >>> c = certificate("delta(4;3,1)", digits=8)   # doctest: +SKIP
    >>> c.answer["enclosure"]["lower"][:6], verify(c).ok   # doctest: +SKIP
    ('0.9959', True)
    """
    from .certificate.build import certify_with_certificate
    from .certificate.referee import parse_race

    return certify_with_certificate(parse_race(race_text), digits)[1]


def ffield_certificate(q, modulus: str, classes=None, weights=None, mode: str = "cumulative",
                       digits: int = 10, residues: bool = False):
    """The certificate (kind ``ffield-race``) of a race in F_q[t].

    Examples
    --------
    >>> from certify.api import ffield_certificate, verify
    >>> verify(ffield_certificate(3, "t^2+1", ["t+1", "1"], digits=6)).ok   # doctest: +SKIP
    True
    """
    from fractions import Fraction

    from .certificate.ffield import certify_ffield
    from .ffield.race import parse_race, residue_race as ff_residues

    if residues:
        qn, G, wd = ff_residues(q, modulus, mode)
    else:
        qn, G, wd = parse_race(q, modulus, list(classes or []), weights, mode)
    return certify_ffield(qn, G, wd, Fraction(1, 10**digits), leader_bound=0)[1]


def curve_certificate(q, A: str, B: str, mode: str = "cumulative", digits: int = 8,
                      confirm: int = 1):
    """The certificate (kind ``curve-race``) of a curve's trace race over F_q(t).

    Examples
    --------
    >>> from certify.api import curve_certificate, verify
    >>> verify(curve_certificate(5, "t", "t^2 + 1")).ok   # doctest: +SKIP
    True
    """
    from fractions import Fraction

    from .certificate.curves import certify_curve

    return certify_curve(q, A, B, mode, Fraction(1, 10**digits), confirm)[1]


def twist_family_certificate(q, A: str, B: str, degree: int, extension: int = 1,
                             sample: int | None = None, seed: int = 0, mode: str = "cumulative",
                             digits: int = 3, c: float = 1.0):
    """The certificate (kind ``twist-family-race``) of a quadratic-twist family: the mean of the
    members' trace-race densities, every member's L-polynomial and enclosure, the distribution.

    Examples
    --------
    >>> from certify.api import twist_family_certificate, verify
    >>> cert = twist_family_certificate(5, "t", "t^2 + 1", 1)
    >>> cert.answer["exact"], verify(cert).ok
    ('3/10', True)
    """
    from fractions import Fraction

    from .certificate.twists import certify_family

    return certify_family(q, A, B, degree, extension, sample, seed, mode, Fraction(1, 10**digits),
                          c)[1]


def verify(cert_or_path):
    """Re-check a certificate (object or file) from what it stores; returns the report
    (``.ok``, ``.checks``, ``.failures``).

    Examples
    --------
    >>> from certify.api import verify
    >>> verify("tests/certificate/data/delta_4_3_1.json").ok   # doctest: +SKIP
    True
    """
    from .certificate.dispatch import verify_any
    from .certificate.model import read_certificate

    cert = read_certificate(cert_or_path) if isinstance(cert_or_path, str) else cert_or_path
    return verify_any(cert)


def referee(race_text: str, claim: str, max_digits: int = 30):
    """The referee's verdict on a claimed value ('0.9959', '[0.99, 1]', '1 - 4.1e-3').

    Examples
    --------
    >>> from certify.api import referee
    >>> referee("delta(4;3,1)", "0.9959").verdict   # doctest: +SKIP
    'consistent'
    """
    from .certificate.referee import Claim, parse_race, parse_value
    from .certificate.referee import referee as run

    lo, hi, meaning, places = parse_value(claim)
    return run(Claim(parse_race(race_text), claim.strip(), lo, hi, meaning, places),
               max_digits=max_digits)
