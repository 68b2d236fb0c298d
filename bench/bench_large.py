"""Benchmark for large moduli (not a test): batched moments, the smoothed Hardy
function, races against q, and the distinct laws of a table.

Usage:  python bench/bench_large.py [--quick] [--races 101,211,401,809,997]

Figures printed: seconds (wall clock; say whether the machine was loaded),
characters, zeros used, Z evaluations, enclosure width.
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


def bench_races(moduli, digits=8):
    print(f"# two-way races delta(q;2,1), width <= 1e-{digits}, cold store")
    for q in moduli:
        t0 = time.time()
        r = certify_race(two_way(q, 2, 1), digits, store=SpectrumStore())
        dt = time.time() - t0
        p = r.parameters
        print(f"q {q:>5}  {dt:8.1f} s  width {float(r.density.width):.2e}  met {r.target_met}  "
              f"L-functions {len(p['primitive_l_functions']):>4}  zeros {p['zeros_used']:>4}  "
              f"Z-evals {p['hardy_z_evaluations']:>5}  spectra {r.timings['spectra']:.1f} s  "
              f"density {r.timings['density']:.1f} s  delta in [{r.density.lower_str(9)}, "
              f"{r.density.upper_str(9)}]", flush=True)


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
    args = ap.parse_args()
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
