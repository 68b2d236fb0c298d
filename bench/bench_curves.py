"""Benchmark: one curve's L-polynomial of degree 12 over F_5, and a family of 500 twists.

Run:  python3 bench/bench_curves.py [--figure PATH] [--quick]

Prints wall-clock times and sizes.  Targets (issue 5): the L-polynomial in under
10 s; a family of at least 500 twists over a small field in under 10 minutes.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from certify.curves.family import plot_families, twist_family  # noqa: E402
from certify.curves.lpoly import l_polynomial  # noqa: E402
from certify.curves.model import make_curve  # noqa: E402
from certify.curves.race import trace_race  # noqa: E402

# y^2 = x^3 + t f^2 x + (2t^3 + 3) f^3 with f = t^4 + 2: a degree-4 twist of a rational
# elliptic surface over F_5; deg N = 16, deg L = 12.
A12 = "t*(t^4 + 2)^2"
B12 = "(2*t^3 + 3)*(t^4 + 2)^3"


def bench_curve():
    t0 = time.perf_counter()
    E = make_curve(5, A12, B12)
    t1 = time.perf_counter()
    L = l_polynomial(E, confirm=1)
    t2 = time.perf_counter()
    R = trace_race(E, L, "cumulative", 1e-10)
    t3 = time.perf_counter()
    print(f"curve over F_5: y^2 = x^3 + ({A12}) x + ({B12})")
    print(f"  conductor degree {E.conductor_degree}, deg L = {L.degree}, eps = {L.sign:+d}, rank {L.rank}")
    print(f"  L(E, u) = {L.as_text()}")
    print(f"  point counts of degrees 1..{L.degrees_used}, confirmed by degree(s) {list(L.degrees_confirmed)}; "
          f"max ||gamma| - q| = {L.max_modulus_error:.1e}")
    print(f"  model {t1 - t0:.3f} s; L-polynomial (cold tables) {t2 - t1:.2f} s   [target < 10 s]")
    d = R.density
    print(f"  trace-race density [{d.lower_str(12)}, {d.upper_str(12)}] width {float(d.width):.1e}; "
          f"{len(R.variable.weights)} non-torsion angles; {t3 - t2:.2f} s")
    return t2 - t1


def bench_family(figure: str | None, quick: bool):
    q, A, B, d = 5, "t", "2*t^3 + 3", 4
    sample = 40 if quick else None
    t0 = time.perf_counter()
    R = twist_family(q, A, B, d, sample=sample, seed=1, target_width=1e-3, c=1.0)
    dt = time.perf_counter() - t0
    s = R.summary()
    print(f"family: twists of y^2 = x^3 + {A} x + {B} over F_{q} by monic square-free f of degree {d}")
    print(f"  members {s['members']} (population {s['population']}), certified {s['certified']}, "
          f"time {dt:.1f} s ({dt / max(1, s['members']):.3f} s per member)   [target < 600 s for >= 500]")
    print(f"  deg L of members: {sorted(set(m.l_degree for m in R.members))}; ranks {s['rank_counts']}")
    print(f"  members whose angles satisfy relations (orbit-closure engine): {s['relation_case']}; "
          f"enclosures wider than 0.01: {s['wide_enclosures_over_0.01']}")
    if s["mean"]:
        print(f"  mean density [{s['mean']['lower']}, {s['mean']['upper']}], spread {s['spread']:.4f}")
        w = s["share_within_c_over_d_of_half"]
        print(f"  share within {w['radius']:.3g} of 1/2: [{w['lower']:.3f}, {w['upper']:.3f}]")
        widths = [float(m.density.width) for m in R.certified]
        print(f"  member enclosure widths: max {max(widths):.1e}, median {sorted(widths)[len(widths) // 2]:.1e}")
    bad = [m for m in R.members if m.density is None]
    if bad:
        print(f"  not certified: {len(bad)} (e.g. {bad[0].f}: {bad[0].status[:110]})")
    print("  histogram counts (20 bins on [0,1]):", list(s["histogram"]["counts"]))
    if figure:
        ok = plot_families([R], figure)
        print(f"  figure: {figure if ok else 'matplotlib missing'}")
    return dt, s["members"]


def bench_growth():
    """The distribution as the twist degree grows (whole families, d = 1..3)."""
    print("distribution as d grows (whole families, y^2 = x^3 + t x + 2t^3 + 3 over F_5, c = 1):")
    print("   d  members  relation-case  mean density               spread   share within 1/d of 1/2   seconds")
    for d in (1, 2, 3):
        t0 = time.perf_counter()
        R = twist_family(5, "t", "2*t^3 + 3", d, target_width=1e-3, c=1.0)
        s = R.summary()
        w = s["share_within_c_over_d_of_half"]
        print(f"  {d:2d}  {s['members']:7d}  {s['relation_case']:13d}  [{s['mean']['lower']}, {s['mean']['upper']}]"
              f"  {s['spread']:.4f}   [{w['lower']:.3f}, {w['upper']:.3f}]              {time.perf_counter() - t0:.1f}")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--figure", default=None, help="write the family histogram here (PNG)")
    ap.add_argument("--quick", action="store_true", help="a 40-member sample instead of the whole family")
    args = ap.parse_args()
    bench_curve()
    bench_growth()
    bench_family(args.figure, args.quick)


if __name__ == "__main__":
    main()
