"""Cost estimates made from the input alone, before any work starts.

Each estimate is an upper estimate computed in well under a second from the
numbers given on the command line (moduli, classes, field order, degrees);
the commands compare it with the stated limits
(:class:`certify.commands.options.Limits`) and refuse in one line beyond
them.

* A race modulo q needs the L-functions of the characters chi with
  W(chi) = sum_a w_a chi(a) != 0: at most phi(q) - 1 for a two-way or
  weighted race, at most the number of non-trivial real characters
  (2^r - 1, r the 2-rank of the unit group) for the residue race, where W
  vanishes on every complex character.
* A table over moduli Q runs sum_q phi(q)(phi(q) - 1)/2 two-way races and one
  residue race per modulus, plus the extra races.
* A curve y^2 = x^3 + A x + B over F_q(t) has deg L <= max(3 deg A, 2 deg B) - 2
  (deg N <= deg Delta + 2, the conductor exponent at a finite place being at
  most the valuation of Delta and at infinity at most 2, and deg L = deg N - 4),
  and its L-polynomial comes from point counts over F_{q^k} for k up to about
  deg L / 2 + 1.  When that bound is over the limit and the degrees are
  modest, the exact deg L (from the conductor, cheap to compute) is used.
  A quadratic twist by f of degree d adds at most 2d + 2 to deg L (additive
  reduction at the places dividing f, and possibly at infinity).

Memory is a rough upper estimate: a planned race item measured 0.5 KB
(tracemalloc, 14948 races for q <= 60) and its result kept for the tables
a few KB, so 6 KB per race; 0.3 MB per primitive spectrum (zeros, brackets,
power sums as balls) is an allowance, not a measurement.
"""

from __future__ import annotations

import math

KB_PER_RACE = 6.0
MB_PER_SPECTRUM = 0.3


def _factor(q: int) -> dict[int, int]:
    from sympy import factorint

    return {int(p): int(e) for p, e in factorint(int(q)).items()}


def phi(q: int) -> int:
    f = _factor(q)
    out = 1
    for p, e in f.items():
        out *= (p - 1) * p ** (e - 1)
    return out


def real_characters(q: int) -> int:
    """Number of real characters mod q (the order of the unit group's 2-torsion quotient)."""
    f = _factor(q)
    r = sum(1 for p in f if p != 2)
    e2 = f.get(2, 0)
    r += 0 if e2 <= 1 else (1 if e2 == 2 else 2)
    return 2 ** r


def race_l_functions(q: int, kind: str) -> int:
    """Upper estimate of the L-functions a race modulo q needs."""
    if kind == "residues":
        return real_characters(q) - 1
    return phi(q) - 1


def table_estimate(moduli, kinds, extra=()) -> dict:
    """{'races', 'l-functions', 'conductor', 'memory-mb'} of a table, from the moduli alone."""
    races = len(extra)
    for q in moduli:
        f = phi(q)
        if "two-way" in kinds:
            races += f * (f - 1) // 2
        if "residues" in kinds:
            races += 1
    all_q = sorted({*moduli, *[(it.modulus if hasattr(it, "modulus") else it.question.modulus)
                               for it in extra]})
    return {"races": races, "l-functions": None, "conductor": max(all_q or [0]),
            "memory-mb": races * KB_PER_RACE / 1024, "moduli": all_q}


def primitive_characters(d: int) -> int:
    """Number of primitive characters of conductor d (multiplicative)."""
    out = 1
    for p, e in _factor(d).items():
        if p == 2:
            out *= 0 if e == 1 else (1 if e == 2 else 2 ** (e - 2))
        else:
            out *= (p - 2) if e == 1 else (p - 1) ** 2 * p ** (e - 2)
    return out


def distinct_l_functions(moduli) -> int:
    """Primitive L-functions (non-trivial) serving every character mod each q of ``moduli``."""
    from sympy import divisors

    conductors = set()
    for q in moduli:
        conductors.update(d for d in divisors(int(q)) if d >= 3)
    return sum(primitive_characters(d) for d in conductors)


def curve_l_degree_bound(deg_a: int, deg_b: int) -> int:
    """Upper bound max(3 deg A, 2 deg B) - 2 of deg L(E, u), from the degrees of A and B."""
    return max(3 * max(deg_a, 0), 2 * max(deg_b, 0), 4) - 2


def curve_field_size(q: int, deg_l: int) -> int:
    """The largest field F_{q^k} whose point counts L(E, u) of degree deg_l needs: k = deg_l // 2 + 1.

    (The functional equation gives the upper half of the coefficients; the
    driver counts points up to degree N - j, j the largest index below N/2
    with l_j != 0, typically floor(N/2) + 1.  Confirming degrees are skipped
    beyond the field table's limit.)
    """
    return q ** (max(deg_l, 0) // 2 + 1)


def twist_members(q: int, n: int, d: int) -> int:
    """Monic square-free polynomials of degree d over F_{q^n}: Q^d - Q^(d-1) (d >= 2), Q (d = 1)."""
    Q = q ** n
    return Q if d == 1 else Q ** d - Q ** (d - 1)


# -- races over Q of a single L-function: zeros to isolate, primes to count ------------

J01 = 2.404825557695773


def zero_count_estimate(height: float, conductor: int = 1, degree: int = 1) -> int:
    """Estimated number of zeros with 0 < gamma <= height (the main term of N(T), plus 1).

    Degree 1 (zeta, conductor 1): (T/2 pi) log(T/2 pi e) + 7/8.  Degree 2 (L(E, s),
    conductor N): (T/pi) log(sqrt(N) T / 2 pi e) + 1.  Planning only: the count is
    what decides how long a zero search runs, not a bound anything certified rests on.
    """
    T = max(float(height), 1.0)
    if degree == 1:
        main = T / (2 * math.pi) * math.log(max(T * conductor / (2 * math.pi * math.e), 1.0)) + 7 / 8
    else:
        main = T / math.pi * math.log(max(math.sqrt(conductor) * T / (2 * math.pi * math.e), 1.0)) + 1
    return int(math.ceil(max(main, 0.0)))


def ec_race_estimate(conductor: int, digits: int) -> dict:
    """{'zeros', 'height'} an elliptic-curve race over Q will isolate (the driver's first plan).

    The driver plans the frequency range with the exact variance of the limit law;
    here the variance is taken from the model ordinates (sum 2/(1/4 + gamma^2)) and
    the mean as 1 (rank 0): the same planning function, from the conductor alone.
    """
    import numpy as np

    from ..ecrace import _model_ordinates, plan_xi

    gam = np.asarray(_model_ordinates(int(conductor), 3000.0))
    V = float((2 / (0.25 + gam * gam)).sum()) if gam.size else 1.0
    xi = plan_xi(int(conductor), V, 1.0, 10.0 ** (-int(digits)))
    height = max(6.0, 2.2 * 2 * xi / J01)
    return {"height": height, "zeros": zero_count_estimate(height, conductor, 2)}


def li_race_estimate(digits: int, kind: str = "pi<li") -> dict:
    """{'zeros', 'height'} of zeta's zeros the race of pi(x) against li(x) isolates at width 10^-digits.

    The first-round plan of the race driver (its frequency range and height factor,
    :class:`certify.races.RacePlan`) with the exact variance 2 + gamma_E - log 4 pi
    of the limit law.
    """
    from ..race.question import mean_of, prime_vs_li, spectral_groups
    from ..races import PLAN_HEIGHT_FACTOR, RacePlan, plan_frequency_range

    question = prime_vs_li(kind)
    groups = spectral_groups(question)
    V = 2 + 0.5772156649015329 - math.log(4 * math.pi)
    mu = float(mean_of(question))
    tau = 10.0 ** (-int(digits))
    xi = plan_frequency_range(groups, V, mu, tau, height_factor=PLAN_HEIGHT_FACTOR)
    s = max(float(g.scale.mid()) for g in groups)
    height = RacePlan.height_factor * s * xi / J01
    return {"height": height, "zeros": zero_count_estimate(height, 1, 1)}


def prime_count_bound(x: int) -> int:
    """An upper bound for pi(x): 1.25506 x / log x for x > 1 (a proven inequality,
    Illinois Journal of Mathematics 6 (1962)), computed in floating point with a margin."""
    x = int(x)
    if x < 17:
        return 6
    return int(1.25506 * x / math.log(x) * (1 + 1e-9)) + 1
