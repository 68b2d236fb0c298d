"""Benchmark for large moduli (not a test): batched moments, the smoothed Hardy
function, races against q, and the distinct laws of a table.

Usage:  python bench/bench_large.py [--quick] [--races 101,211,401,809,997]

Figures printed: seconds (wall clock and CPU, with the load average: the machine
is shared), characters, zeros used, Z evaluations, enclosure width.  Races run
each in a fresh interpreter (cold).  ``--races-only`` prints just the race table.
"""

from __future__ import annotations

import argparse
import math
import os
import platform
import time

from flint import dirichlet_char

from certify.arith import arb, workprec
from certify.batch.symmetry import base_modulus, distinct_two_way
from certify.race.question import two_way
from certify.races import certify_race
from certify.source.dirichlet import reduced_residues
from certify.spectrum.afe import SmoothedL
from certify.spectrum.moments import conductor_power_sums, zero_power_sums
from certify.spectrum.spectrum import SpectrumStore


def primitive_labels(q):
    return [n for n in range(1, q) if math.gcd(n, q) == 1 and dirichlet_char(q, n).is_primitive()]


def bench_moments(moduli, K=20, bits=120):
    print(f"# moments S_1..S_{K} to 2^-{bits}: all primitive characters of q at once "
          "(Hurwitz jets + DFT) against one character at a time")
    for q in moduli:
        labels = primitive_labels(q)
        t0 = time.time()
        conductor_power_sums(q, labels, K, bits)
        tb = time.time() - t0
        some = labels[:3]
        t0 = time.time()
        for n in some:
            zero_power_sums(q, n, int(dirichlet_char(q, n).parity()), K, bits)
        ts = (time.time() - t0) / len(some)
        print(f"q {q:>5}  characters {len(labels):>4}  batch {tb:7.2f} s  one character {ts:7.3f} s  "
              f"-> batching pays from {max(1, math.ceil(tb / ts))} characters", flush=True)


def bench_hardy(moduli, prec=96):
    print(f"# Hardy Z at t = 1.5, 4 ({prec} bits): smoothed sum (cost ~ sqrt q) against Arb")
    for q in moduli:
        n = next(m for m in primitive_labels(q))
        S = SmoothedL(q, n)
        chi = dirichlet_char(q, n)
        ts = [1.5, 4.0]
        t0 = time.time()
        for t in ts:
            S.hardy_y(arb(t), prec)
        ta = (time.time() - t0) / len(ts)
        t0 = time.time()
        with workprec(prec):
            for t in ts:
                chi.hardy_z(arb(t))
        tz = (time.time() - t0) / len(ts)
        print(f"q {q:>5}  smoothed {ta * 1e3:8.1f} ms  Arb {tz * 1e3:8.1f} ms", flush=True)


def _nonresidue(q):
    """The least class that is not a square mod q (coprime to q), or None."""
    squares = {x * x % q for x in range(q) if math.gcd(x, q) == 1}
    return next((a for a in range(2, q) if math.gcd(a, q) == 1 and a not in squares), None)


def _one_race(q, a, b, digits):
    """Child process: certify one race cold and print its figures as JSON (one line)."""
    import json

    c0, t0 = time.process_time(), time.time()
    r = certify_race(two_way(q, a, b), digits, store=SpectrumStore())
    p = r.parameters
    print(json.dumps({
        "inner_wall": time.time() - t0, "inner_cpu": time.process_time() - c0,
        "width": float(r.density.width), "met": bool(r.target_met),
        "lower": r.density.lower_str(10), "upper": r.density.upper_str(10),
        "l_functions": len(p["primitive_l_functions"]), "zeros": p["zeros_used"],
        "z_evals": p["hardy_z_evaluations"], "terms": p["terms"],
        "truncation": p.get("truncation", ""), "exact": r.exact is not None}))


def bench_races(moduli, digits=8):
    """Each race in a fresh interpreter (cold: imports, moments, zeros, no cache), timed from
    outside: wall clock, and CPU (user + sys) of the child from getrusage."""
    import json
    import resource
    import subprocess
    import sys

    print(f"# two-way races, width <= 1e-{digits}, each cold in a fresh process (imports included); "
          "CPU = user + sys of the child")
    print(f"# {'q':>5} {'race':>12} {'wall s':>7} {'CPU s':>6} {'load':>5} {'L-fns':>5} "
          f"{'zeros':>5} {'Z-ev':>5} {'terms':>5}  enclosure")
    rows = []
    for q in moduli:
        races = [(2, 1)]
        n = _nonresidue(q)
        if n is not None and n != 2:
            races.append((n, 1))  # (q;2,1) is exactly 1/2 when 2 is a square mod q
        for a, b in races:
            before = resource.getrusage(resource.RUSAGE_CHILDREN)
            load0 = os.getloadavg()[0]
            t0 = time.time()
            out = subprocess.run([sys.executable, __file__, "--one", f"{q},{a},{b},{digits}"],
                                 capture_output=True, text=True, check=True)
            wall = time.time() - t0
            after = resource.getrusage(resource.RUSAGE_CHILDREN)
            cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
            load = (load0 + os.getloadavg()[0]) / 2
            d = json.loads(out.stdout.strip().splitlines()[-1])
            rows.append((q, a, b, wall, cpu, load, d))
            print(f"  {q:>5} {f'({q};{a},{b})':>12} {wall:7.1f} {cpu:6.1f} {load:5.1f} "
                  f"{d['l_functions']:>5} {d['zeros']:>5} {d['z_evals']:>5} {d['terms']:>5}  "
                  f"[{d['lower']}, {d['upper']}] width {d['width']:.2e} met {d['met']}"
                  + ("  (exactly 1/2: mean 0)" if d["exact"] else ""), flush=True)
    worst = max(rows, key=lambda r: r[4]) if rows else None
    if worst:
        print(f"# slowest by CPU: ({worst[0]};{worst[1]},{worst[2]}) {worst[4]:.1f} s CPU, "
              f"{worst[3]:.1f} s wall at load {worst[5]:.1f} on {os.cpu_count()} cores")


def bench_laws(qmax=100):
    pairs = sum(len(reduced_residues(q)) * (len(reduced_residues(q)) - 1) // 2
                for q in range(3, qmax + 1))
    laws = sum(len(distinct_two_way(q)) for q in range(3, qmax + 1) if base_modulus(q) == q)
    print(f"# q <= {qmax}: {pairs} two-way races a < b, {laws} distinct laws after the exact "
          "symmetries (squares, inverses, reversal, q = 2m ~ m)")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true")
    ap.add_argument("--races", default="101,211,401,809,997")
    ap.add_argument("--races-only", action="store_true", help="only the race timings")
    ap.add_argument("--one", help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.one:
        q, a, b, d = (int(x) for x in args.one.split(","))
        _one_race(q, a, b, d)
        return
    if args.races_only:
        print(f"# load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
        bench_races([int(x) for x in args.races.split(",") if x])
        print(f"# load average at the end {os.getloadavg()[0]:.1f}")
        return
    print(f"# certify large-moduli benchmark; {platform.machine()}, python "
          f"{platform.python_version()}; load average {os.getloadavg()[0]:.1f} "
          f"on {os.cpu_count()} cores")
    bench_laws()
    conductor_power_sums(5, [2], 2, 40)  # warm-up: imports (sympy) outside the timings
    bench_moments([13, 61, 101] if args.quick else [13, 61, 101, 211, 401])
    bench_hardy([101, 401] if args.quick else [61, 101, 211, 401, 997])
    races = [int(x) for x in args.races.split(",") if x]
    bench_races(races[:1] if args.quick else races)
    print(f"# load average at the end {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    main()
