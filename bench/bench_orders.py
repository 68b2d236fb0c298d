"""Benchmark of races among three (or four) classes (not a test): time, widths, zeros.

Usage:
    python bench/bench_orders.py                 # every ordering of 3 classes, q <= 30, width 1e-6
    python bench/bench_orders.py --targets       # mod 8 and mod 12 three-way races at width 1e-8
    python bench/bench_orders.py --four          # four classes: mod 5 (all orderings), mod 8
    options: --qmax Q  --digits D  --json PATH

Every ordering of every triple is certified: the triples are grouped in orbits
under multiplication by the squares mod q and inversion a -> 1/a, which leave
the limit law unchanged (docs/method.md, 10.1; tested in tests/core/test_orders.py);
one triple per orbit is computed (its three chains, each giving an ordering and
its reverse) and the densities of the others are those of the corresponding
orderings.  For each computed triple the six enclosures must sum to an interval
containing 1 and the pairwise marginals must meet the two-way densities; any
failure is printed.  One spectrum store per modulus (spectra shared by its triples).
"""

from __future__ import annotations

import argparse
import json
import platform
import time
from itertools import combinations

from certify.orders import certify_chain, certify_orderings
from certify.race.order import ordering
from certify.race.question import quadratic_residues
from certify.source.dirichlet import reduced_residues
from certify.spectrum.spectrum import SpectrumStore


def orbits(q: int, r: int = 3):
    """Representatives of the r-subsets of reduced classes under squares and inversion."""
    seen, reps = set(), []
    sq = quadratic_residues(q)
    for t in combinations(reduced_residues(q), r):
        if t in seen:
            continue
        orbit = set()
        for s in sq:
            for inv in (False, True):
                orbit.add(tuple(sorted(((pow(a, -1, q) if inv else a) * s) % q for a in t)))
        seen |= orbit
        reps.append((t, len(orbit)))
    return reps


def sweep(qmin: int, qmax: int, digits: int, out: dict) -> None:
    t_all = time.time()
    total_orderings = total_computed = failures = 0
    worst = 0.0
    for q in range(qmin, qmax + 1):
        reps = orbits(q)
        if not reps or len(reduced_residues(q)) < 3:
            continue
        store = SpectrumStore()
        t0 = time.time()
        q_worst, zeros = 0.0, 0
        for t, size in reps:
            fam = certify_orderings(q, t, digits, store=store)
            total_computed += 6
            total_orderings += 6 * size
            for r in fam.results:
                q_worst = max(q_worst, float(r.density.width))
                zeros = max(zeros, r.parameters["zeros_used"])
                if not r.target_met:
                    failures += 1
                    print(f"  target NOT met: {r.question.label} width {float(r.density.width):.2e}")
            for c in fam.checks:
                if not c.ok:
                    failures += 1
                    print(f"  CONSISTENCY FAILURE mod {q} {t}: {c.name} {c.lower}..{c.upper} vs {c.reference}")
            out.setdefault("densities", {}).update(
                {r.question.label: [f"{float(r.density.lower):.10f}", f"{float(r.density.upper):.10f}"]
                 for r in fam.results})
        dt = time.time() - t0
        worst = max(worst, q_worst)
        n_tri = sum(s for _, s in reps)
        print(f"q={q:>3}: {n_tri:>5} triples in {len(reps):>4} orbits, {6 * n_tri:>6} orderings "
              f"({6 * len(reps)} computed); widest {q_worst:.2e}; zeros <= {zeros}; {dt:8.1f} s",
              flush=True)
        out.setdefault("per_modulus", []).append({"q": q, "triples": n_tri, "orbits": len(reps),
                                                 "seconds": round(dt, 1), "widest": q_worst})
    total = time.time() - t_all
    print(f"TOTAL: {total_orderings} orderings of three classes for {qmin} <= q <= {qmax} certified "
          f"({total_computed} computed, the rest by exact symmetry), widest {worst:.2e}, "
          f"failures {failures}, {total:.1f} s", flush=True)
    out["total"] = {"orderings": total_orderings, "computed": total_computed, "widest": worst,
                    "failures": failures, "seconds": round(total, 1), "digits": digits}


def targets(out: dict) -> None:
    for q, cls in [(8, (3, 5, 7)), (8, (1, 3, 5)), (12, (5, 7, 11)), (12, (1, 5, 7))]:
        store = SpectrumStore()
        t0 = time.time()
        fam = certify_orderings(q, cls, 8, store=store)
        dt = time.time() - t0
        print(f"mod {q} classes {cls}: all 6 orderings at 1e-8 in {dt:.1f} s (cold), "
              f"consistent {fam.ok}", flush=True)
        for r in fam.results:
            print(f"   {r.question.label:<18} [{float(r.density.lower):.11f}, {float(r.density.upper):.11f}] "
                  f"width {float(r.density.width):.1e} vectors {r.parameters['frequency_vectors']} "
                  f"zeros {r.parameters['zeros_used']}")
        out.setdefault("targets", []).append({"q": q, "classes": list(cls), "seconds": round(dt, 1),
                                              "consistent": fam.ok})


def four(out: dict, digits: int) -> None:
    for q, cls, every in [(5, (1, 2, 3, 4), True), (8, (1, 3, 5, 7), False), (12, (1, 5, 7, 11), False)]:
        store = SpectrumStore()
        t0 = time.time()
        if every:
            fam = certify_orderings(q, cls, digits, store=store)
            res, ok = fam.results, fam.ok
        else:
            res = certify_chain(ordering(q, *cls), digits, store=store)
            ok = None
        dt = time.time() - t0
        print(f"four classes mod {q} {cls}: {len(res)} orderings at 1e-{digits} in {dt:.1f} s; "
              f"consistent {ok}", flush=True)
        for r in res:
            print(f"   {r.question.label:<20} [{float(r.density.lower):.9f}, {float(r.density.upper):.9f}] "
                  f"vectors {r.parameters['frequency_vectors']} of {r.parameters['frequency_vectors_in_box']}")
        out.setdefault("four", []).append({"q": q, "seconds": round(dt, 1)})


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--qmin", type=int, default=3)
    ap.add_argument("--qmax", type=int, default=30)
    ap.add_argument("--digits", type=int, default=6)
    ap.add_argument("--targets", action="store_true")
    ap.add_argument("--four", action="store_true")
    ap.add_argument("--json")
    args = ap.parse_args()
    print(f"# certify orderings benchmark, python {platform.python_version()}, "
          f"{time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())} (shared machine: timings under load)")
    out: dict = {}
    if args.targets:
        targets(out)
    elif args.four:
        four(out, args.digits)
    else:
        sweep(args.qmin, args.qmax, args.digits, out)
    if args.json:
        with open(args.json, "w") as fh:
            json.dump(out, fh, indent=1)


if __name__ == "__main__":
    main()
