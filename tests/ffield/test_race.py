"""Race densities in F_q[t]: certified enclosures against exact-count frequencies.

Tolerance.  The empirical frequency over X <= N differs from the density by
(i) the X where the exact sign differs from the sign of the limit function
G(X v) (the o(1) terms: prime powers of order >= 3, unit-modulus roots,
the 1/X corrections of the cumulative sum) and (ii) the discrepancy of the
Kronecker sequence {X v} for the set {G > 0}.  Part (i) is checked directly
below (few disagreements, all at small X or near G = 0).  For (ii), when the
orbit closure is finite the sequence is periodic and the error is at most
period / N; for a closure of dimension d the discrepancy of a Kronecker
sequence with badly approximable angles is O((log N)^d / N) (Kuipers and
Niederreiter, Uniform Distribution of Sequences, 1974, ch. 2), which is below
1e-2 for N = 2000 and d <= 5 with constant ~1; we use 0.02 at N = 2000 and 0.005 at
N = 10^5 (slow test) and report the observed gaps in the assertion messages.
"""

import cmath
import math

import numpy as np
import pytest

from certify.errors import PrecisionExhausted
from certify.ffield.race import (
    certify_ffrace, empirical_frequency, exact_race_values, parse_race, residue_leader_report, residue_race,
)


def _limit_signs(res, N, q, mode):
    """Signs of the limit function G at X = 1..N, in floating point (a check, not a proof)."""
    mu0 = float(res.mu0.mid())
    mupi = float(res.mupi.mid())
    pts = [p for p in res.points if p.kind == "complex"]
    out = []
    for X in range(1, N + 1):
        g = mu0 + mupi * (-1) ** X
        for i, p in enumerate(pts, start=1):
            alpha = complex(float(p.alpha.real.mid()), float(p.alpha.imag.mid()))
            A = complex(float(p.A.real.mid()), float(p.A.imag.mid()))
            kap = 1 if mode == "degree" else 1 / (1 - alpha.conjugate() / q)
            g += (-2 * A * kap * cmath.exp(1j * X * cmath.phase(alpha))).real
        out.append(g)
    return out


def _check(res, G, wd, qn, N, tol, max_disagree):
    vals = exact_race_values(G, wd, N, qn)
    assert all(isinstance(v, int) for v in vals)
    emp = float(empirical_frequency(vals, qn.mode))
    lo, hi = float(res.density.lower), float(res.density.upper)
    gap = max(lo - emp, emp - hi, 0)
    assert gap <= tol, f"empirical {emp} vs [{lo}, {hi}]"
    # the exact signs follow the limit function from moderate X on
    lim = _limit_signs(res, N, qn.q, qn.mode)
    cum = 0
    bad = []
    for X, (v, g) in enumerate(zip(vals, lim), start=1):
        cum += v
        s = cum if qn.mode == "cumulative" else v
        if X >= 30 and (s > 0) != (g > 0) and abs(g) > 1e-6:
            bad.append(X)
    assert len(bad) <= max_disagree, bad[:20]
    return emp


@pytest.mark.parametrize("mode", ["cumulative", "degree"])
def test_relation_example_two_angles(mode):
    # q = 3, m = t^2 + 1: the inverse roots of the odd characters satisfy theta_1 + theta_2 = pi
    qn, G, wd = parse_race(3, "t^2+1", ["t+1", "1"], None, mode)
    res = certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=30)
    assert res.case == "relations"
    assert res.relations and res.closure.dim == 1 and res.closure.n_components == 2
    assert float(res.density.width) <= 1e-10
    assert res.density.lower > 0.5  # non-square t+1 ahead of the square 1 more often
    _check(res, G, wd, qn, 2000, 0.02, 5)


def test_relation_example_rational_angle_exact_density():
    # q = 3, m = t^3 + 2t + 1 (irreducible): the quadratic character's L-polynomial has
    # theta = pi/6 exactly (relation 6 theta = pi), so the orbit closure is finite
    qn, G, wd = residue_race(3, "t^3+2*t+1", "cumulative")
    res = certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=20)
    assert res.case == "relations" and res.closure.dim == 0
    assert res.density.width == 0
    dens = res.density.lower
    # periodic sign pattern (period 12): the frequency over 1200 degrees is within 12/1200
    vals = exact_race_values(G, wd, 1200, qn)
    emp = empirical_frequency(vals, "cumulative")
    assert abs(emp - dens) <= 0.01
    assert dens.denominator in (1, 2, 3, 4, 6, 12)
    # the prescribed-degree race has G = 0 at a point of this finite closure: refused
    qn, G, wd = residue_race(3, "t^3+2*t+1", "degree")
    with pytest.raises(PrecisionExhausted, match="vanishes identically"):
        certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=0)


def test_relation_example_real_roots():
    # q = 9, m = t^2 + t: Jacobi-sum roots, including alpha = 3 and alpha = -3 (real roots)
    qn, G, wd = parse_race(9, "t^2+t", ["z", "1"], None, "cumulative")
    res = certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=20)
    kinds = {p.kind for p in res.points}
    assert {"plus", "minus"} <= kinds
    assert res.case == "relations"
    _check(res, G, wd, qn, 1500, 0.02, 5)


def test_li_example_uses_density_engine():
    # q = 5, m = t^7 + t + 3: residue race; LLL finds no relation among 5 angles and pi
    qn, G, wd = residue_race(5, "t^7+t+3", "cumulative")
    res = certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=10)
    assert res.case == "LI"
    assert "engine" in res.parameters["method"]
    assert float(res.density.width) <= 1e-10
    assert any(h.name == "LI" and h.status == "assumed" for h in res.hypotheses)
    _check(res, G, wd, qn, 1500, 0.02, 10)


@pytest.mark.slow
@pytest.mark.parametrize("case", ["relation", "li"])
def test_empirical_frequency_to_1e5(case):
    if case == "relation":
        qn, G, wd = parse_race(3, "t^2+1", ["t+1", "1"], None, "cumulative")
    else:
        qn, G, wd = residue_race(5, "t^7+t+3", "cumulative")
    res = certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=0)
    _check(res, G, wd, qn, 100000, 0.005, 50)


def test_leaders_from_exact_counts():
    qn, G, wd = parse_race(3, "t^2+1", ["t+1", "1"], None, "degree")
    res = certify_ffrace(qn, G, wd, target_width=1e-6, leader_bound=40)
    L = res.leaders
    vals = exact_race_values(G, wd, 40, qn)
    # leader per degree = sign of pi(n; t+1) - pi(n; 1)
    for n, v in enumerate(vals, start=1):
        expect = "t+1" if v > 0 else ("1" if v < 0 else "tie")
        assert L.leaders[n - 1] == expect
    first = next((n for n in range(2, 41) if L.leaders[n - 1] != "tie"
                  and L.leaders[n - 2] != "tie" and L.leaders[n - 1] != L.leaders[n - 2]), None)
    assert L.first_change is None or L.first_change <= 40
    assert sum(len(v) for v in L.degrees_led.values()) + L.leaders.count("tie") == 40
    if first is not None:
        assert L.first_change <= first


def test_degenerate_race_fails_closed():
    # q = 9, m = t^2 + t: these two classes see no root of modulus 3 and c_2 = 0, so the
    # limit function vanishes identically; nothing can be certified and the output says so
    for mode in ("cumulative", "degree"):
        qn, G, wd = parse_race(9, "t^2+t", ["z*t + (2*z+1)", "(2*z+2)*t + (z+2)"], None, mode)
        with pytest.raises(PrecisionExhausted, match="vanishes identically"):
            certify_ffrace(qn, G, wd, target_width=1e-6, leader_bound=0)


@pytest.mark.parametrize("mode", ["degree", "cumulative"])
def test_residue_leaders_follow_the_certified_statistic(mode):
    # q = 3, m = t (t + 1): the units form (Z/2)^2, one square class and three non-square
    # classes, so the certified race is R = pi(non-residues) - 3 pi(residues) (each class weighs
    # the same); the raw counts would give the non-residues the lead almost always
    qn, G, wd = residue_race(3, "t*(t+1)", mode)
    assert sorted(qn.weights) == [-3, 1]
    rep = residue_leader_report(G, wd, 30, mode)   # what ffrace --residues prints
    vals = exact_race_values(G, wd, 30, qn)
    stat = list(np.cumsum(vals)) if mode == "cumulative" else vals
    expect = ["non-residues" if v > 0 else ("residues" if v < 0 else "tie") for v in stat]
    assert list(rep.leaders) == expect
