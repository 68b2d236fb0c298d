"""Benchmarks for certify.ffield (prints figures; not a test).

1. All characters mod m with q^deg m <= 10^6: the group structure with exact
   discrete logarithms of every unit, then the order, parity and conductor of
   every character (vectorised).  Target: under 10 s per modulus.
2. Exact L-polynomials with certified inverse roots and the Weil check for every
   character of smaller moduli, and the cost of one L-polynomial at q^deg m ~ 10^6.
3. Densities to width <= 1e-10 (relation cases by box subdivision, LI case by the
   shared density engine).

Run: python3 bench/bench_ffield.py [--quick]
"""

from __future__ import annotations

import sys
import time

from certify.ffield.characters import CharacterGroup, character_table
from certify.ffield.lpoly import l_polynomial, weil_check
from certify.ffield.poly import finite_field, parse_monic
from certify.errors import CertifyError
from certify.ffield.race import certify_ffrace, parse_race, residue_race

ALL_CHARS = [
    (2, "t^19+t^5+t^2+t+1"),  # irreducible: cyclic of prime order 2^19 - 1
    (2, "t^20"),              # a 2-group of rank 10 (q^M = 2^20, just above 10^6)
    (3, "t^12"),
    (9, "t^6+z"),
    (31, "t^4+3"),
    (101, "t^3+t+2"),         # q^M = 1030301, just above 10^6
    (997, "t^2+t+3"),
]

L_ALL = [(3, "t^2*(t+1)^2"), (5, "t^4+2"), (4, "(t+z)^3*t^2"), (7, "t^4+t+3"), (2, "t^13")]

DENSITIES = [
    ("relation: q=3, t^2+1, t+1 vs 1", lambda: parse_race(3, "t^2+1", ["t+1", "1"], None, "cumulative")),
    ("relation, real roots: q=9, t^2+t, z vs 1", lambda: parse_race(9, "t^2+t", ["z", "1"], None, "cumulative")),
    ("relation, rational angle: q=3, t^3+2t+1, residues, cumulative",
     lambda: residue_race(3, "t^3+2*t+1", "cumulative")),
    # G vanishes at a point of this finite closure: refused (the sign there is not decided)
    ("relation, rational angle: q=3, t^3+2t+1, residues, degree",
     lambda: residue_race(3, "t^3+2*t+1", "degree")),
    ("LI: q=5, t^7+t+3, residues, cumulative", lambda: residue_race(5, "t^7+t+3", "cumulative")),
    ("LI: q=5, t^7+t+3, residues, degree", lambda: residue_race(5, "t^7+t+3", "degree")),
    # issue 9: these ran 4-15 minutes in silence; now each stops with the limit named
    ("limits: q=2, t^6+t+1, t vs 1", lambda: parse_race(2, "t^6+t+1", ["t", "1"], None, "cumulative")),
    ("limits: q=7, t^2+1, t+3 vs 2", lambda: parse_race(7, "t^2+1", ["t+3", "2"], None, "cumulative")),
    ("limits: q=3, t^4+t+2, t vs 1, degree", lambda: parse_race(3, "t^4+t+2", ["t", "1"], None, "degree")),
]


def bench_all_characters(cases):
    print("== all characters mod m (group + exact logs + order/parity/conductor of every character)")
    for q, mt in cases:
        F = finite_field(q)
        m = parse_monic(mt, F)
        t0 = time.perf_counter()
        G = CharacterGroup(F, m)
        t1 = time.perf_counter()
        T = character_table(G)
        t2 = time.perf_counter()
        n_prim = int((T.conductor_degrees() == G.M).sum())
        print(f"  q={q:<4} m={mt:<18} q^M={q ** m.degree():>8}  phi={G.order:>8}  "
              f"{'x'.join(map(str, G.invariants)) if len(G.invariants) < 6 else str(len(G.invariants)) + ' factors'}"
              f"  group {t1 - t0:5.2f} s  table {t2 - t1:5.2f} s  total {t2 - t0:5.2f} s"
              f"  (primitive: {n_prim}, even: {int(T.even.sum())})")
        # one L-polynomial at this size
        chi = G.character([1] + [0] * (len(G.invariants) - 1))
        t3 = time.perf_counter()
        L = l_polynomial(chi)
        rep = weil_check(L)
        t4 = time.perf_counter()
        print(f"      one L-polynomial (degree {L.degree}) with certified roots and Weil check: "
              f"{t4 - t3:.3f} s, ok={rep.ok}")


def bench_all_l_polynomials(cases):
    print("== exact L-polynomials + certified inverse roots + Weil check for every character")
    for q, mt in cases:
        F = finite_field(q)
        m = parse_monic(mt, F)
        t0 = time.perf_counter()
        G = CharacterGroup(F, m)
        ok = 0
        n = 0
        for chi in G.characters():
            if chi.is_trivial():
                continue
            rep = weil_check(l_polynomial(chi))
            ok += rep.ok
            n += 1
        t1 = time.perf_counter()
        print(f"  q={q:<3} m={mt:<14} characters {n:>5}  Weil/degree checks passed {ok:>5}  {t1 - t0:6.2f} s")


def bench_densities(target=1e-10):
    print(f"== densities to width <= {target:g}")
    for name, make in DENSITIES:
        qn, G, wd = make()
        t0 = time.perf_counter()
        try:
            res = certify_ffrace(qn, G, wd, target_width=target, leader_bound=0)
        except CertifyError as exc:
            print(f"  {name:<52} {str(exc)[:110]}...  {time.perf_counter() - t0:6.2f} s")
            continue
        t1 = time.perf_counter()
        d = res.density
        print(f"  {name:<52} [{d.lower_str(14)}, {d.upper_str(14)}] width {float(d.width):.2e} "
              f"{'met' if res.target_met else 'NOT met'}  {t1 - t0:6.2f} s  ({res.case}; "
              f"{res.parameters['method']})")


def main(argv):
    quick = "--quick" in argv
    bench_all_characters(ALL_CHARS[:3] if quick else ALL_CHARS)
    bench_all_l_polynomials(L_ALL[:2] if quick else L_ALL)
    bench_densities()


if __name__ == "__main__":
    main(sys.argv[1:])
