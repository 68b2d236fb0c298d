"""Evidence for the hypotheses, computed so that ``verify`` can recompute it.

* :func:`moment_consequences` -- from the exact residual power sums R_k of a
  spectral group (docs/certificates.md, "Evidence"): assuming GRH, no ordinate
  below ``h_k = sqrt(R_k^(-1/k) - 1/4)`` is missing from the isolated list
  (a missing one would contribute more than R_k by itself), and an isolated
  zero gamma is simple when ``2 (1/4 + gamma^2)^(-k) > R_k`` for some k (a
  sign change proves odd order, so a multiple zero leaves at least two copies
  in the residual).
* :func:`relation_search` -- an integer-relation search among ordinates by
  lattice reduction (``fmpz_mat.lll``), giving a certified lower bound on the
  Euclidean norm of any integer relation.
* :func:`refine_ordinate` -- a narrower enclosure of an isolated zero (for the
  relation search), certified by sign changes of the Hardy Z-function.
"""

from __future__ import annotations

import math
from fractions import Fraction

from flint import fmpz_mat

from ..arith import arb, arb_to_fraction, lower_fraction, workprec
from ..errors import PrecisionExhausted
from ..spectrum.zeros import HardyZ, refine


def _arb_q(x: Fraction) -> arb:
    """An exact rational as a ball (exact when dyadic and the precision suffices)."""
    with workprec(max(64, x.numerator.bit_length() + x.denominator.bit_length() + 8)):
        return arb(x.numerator) / x.denominator


def exact_ends(x: arb) -> tuple[Fraction, Fraction]:
    """The exact endpoints mid -/+ rad of a ball, whatever the ambient precision.

    (``arb.lower()`` rounds to the working precision; this does not.)
    """
    mid = arb_to_fraction(x)
    rad = arb_to_fraction(arb(x.rad()))
    return mid - rad, mid + rad


def moment_consequences(residual: list, zeros: list, prec: int = 128) -> dict:
    """Completeness height and simple zeros implied by residual sums (assuming GRH).

    Parameters
    ----------
    residual : list of arb
        R_1..R_K, the power sums of the ordinates *not* in ``zeros``.
    zeros : list of arb
        The isolated ordinates (each a certified sign change, disjoint balls).

    Returns
    -------
    dict
        ``complete_below`` (a Fraction h: assuming GRH every ordinate of the
        group below h is in ``zeros``; 0 if nothing follows), ``moment_index``
        (the k giving it) and ``simple`` (how many of ``zeros`` are proven
        simple) and ``simple_below`` (every isolated zero below this ordinate
        is proven simple).
    """
    best_h, best_k = Fraction(0), 0
    with workprec(prec):
        for k, R in enumerate(residual, start=1):
            up = arb(R.upper())
            if not (up > 0):
                continue
            # h^2 = R_k^(-1/k) - 1/4, rounded down
            h2 = 1 / up.root(k) - arb(1) / 4
            if h2 > 0:
                h = lower_fraction(h2.sqrt())
                if h > best_h:
                    best_h, best_k = h, k
        simple = 0
        simple_below = None
        for g in sorted(zeros, key=lambda z: float(z.mid())):
            q_hi = arb(1) / 4 + _arb_q(exact_ends(g)[1]) ** 2
            proven = False
            for k, R in enumerate(residual, start=1):
                if 2 / q_hi**k > arb(R.upper()):
                    proven = True
                    break
            if proven:
                simple += 1
            elif simple_below is None:
                simple_below = exact_ends(g)[0]
    return {"complete_below": best_h, "moment_index": best_k, "simple": simple,
            "simple_below": simple_below}


def refine_ordinate(conductor: int, label: int, zero: arb, width_bits: int) -> arb:
    """An enclosure of width <= 2^-width_bits of the zero of Z(t, chi) inside ``zero``.

    The sign change at the two ends of ``zero`` is re-certified first, so the
    result rests on Arb evaluations only.
    """
    z = HardyZ(conductor, label)
    lo, hi = exact_ends(zero)
    t = float(hi)
    prec = max(64, width_bits // 2 + 24 + int(math.log2(2 + conductor * (t + 2))))
    s_lo = z.sign(_arb_q(lo), prec, 8 * prec)[0]
    s_hi = z.sign(_arb_q(hi), prec, 8 * prec)[0]
    if s_lo == 0 or s_hi == 0 or s_lo == s_hi:
        raise PrecisionExhausted(
            f"not certified: no sign change of Z(t, chi_{{{conductor},{label}}}) "
            f"across [{float(lo):.15g}, {float(hi):.15g}]")
    return refine(z, lo, hi, s_lo, 2.0 ** (-width_bits))


def relation_search(ordinates: list, scale_bits: int) -> dict:
    """Search for integer relations sum k_i gamma_i = 0 among ``ordinates`` by LLL.

    The lattice has basis rows (e_i, c_i) with c_i = round(2^scale_bits mid(gamma_i)).
    For an exact relation k the lattice vector sum k_i b_i has squared norm at most
    |k|^2 (1 + K e^2), e = 1/2 + 2^scale_bits max rad(gamma_i); every non-zero
    lattice vector has squared norm at least m = min_i |b*_i|^2 (Gram-Schmidt
    of the reduced basis, any basis).  So every relation has
    |k| >= sqrt(m / (1 + K e^2)).

    Returns
    -------
    dict
        ``size`` K, ``scale_bits``, ``gram_schmidt_min_sq`` (exact m as a string),
        ``norm_lower_bound`` (Fraction, rounded down), ``coefficient_bound``
        (every relation with all |k_i| <= B is excluded; 0 if none),
        ``linear_form_lower_bound`` (|sum k_i gamma_i| >= this for every
        non-zero k with |k_i| <= B; a Fraction or None), and ``candidate``
        (the shortest vector's coefficients when it could be a relation, else None).
    """
    K = len(ordinates)
    if K < 2:
        raise ValueError("need at least two ordinates")
    S = 1 << scale_bits
    rows = []
    rad = Fraction(0)
    for i, g in enumerate(ordinates):
        lo, hi = exact_ends(g)
        c = round(Fraction(S) * ((lo + hi) / 2))
        rad = max(rad, (hi - lo) / 2)
        rows.append([1 if j == i else 0 for j in range(K)] + [c])
    red = fmpz_mat(rows).lll()
    basis = [[int(red[i, j]) for j in range(K + 1)] for i in range(K)]
    # exact Gram-Schmidt squared norms
    ortho: list[list[Fraction]] = []
    norms: list[Fraction] = []
    for b in basis:
        v = [Fraction(x) for x in b]
        for u, nu in zip(ortho, norms):
            mu = sum(x * y for x, y in zip(v, u)) / nu
            v = [x - mu * y for x, y in zip(v, u)]
        ortho.append(v)
        norms.append(sum(x * x for x in v))
    m = min(norms)
    # |c_i - S gamma_i| <= |c_i - S mid_i| + S rad <= 1/2 + S rad (mid_i exact)
    e = Fraction(1, 2) + S * rad
    with workprec(128):
        bound_sq = _arb_q(m) / (1 + K * _arb_q(e) ** 2)
        norm_lb = lower_fraction(bound_sq.sqrt())
        coeff_bound = 0
        if norm_lb > 0:
            # largest integer B with B sqrt(K) < norm_lb
            B = int(norm_lb / math.sqrt(K))
            while B > 0 and B * B * K >= norm_lb * norm_lb:
                B -= 1
            coeff_bound = B
        linear = None
        if coeff_bound > 0:
            rest = _arb_q(m) - K * coeff_bound**2
            if rest > 0:
                val = (rest.sqrt() - K * coeff_bound * _arb_q(e)) / S
                if val > 0:
                    linear = lower_fraction(val)
    b1 = basis[0]
    candidate = None
    if norm_lb < 1 or coeff_bound == 0:
        k = b1[:K]
        if abs(b1[K]) <= sum(abs(x) for x in k) * e:
            candidate = k
    return {"size": K, "scale_bits": scale_bits, "gram_schmidt_min_sq": str(m),
            "norm_lower_bound": norm_lb, "coefficient_bound": coeff_bound,
            "linear_form_lower_bound": linear, "candidate": candidate,
            "shortest_vector": b1}
