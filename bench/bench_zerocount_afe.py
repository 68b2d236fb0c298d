"""Time of the argument-principle zero count against the conductor (not a test).

Usage:  python bench/bench_zerocount_afe.py [--heights 1.5,4] [--conductors ...] [--arb-max 3000]

One real primitive character per conductor (prime conductors: the Legendre symbol,
label q - 1; 4849845 = 3*5*7*11*13*17*19: the real character of the residue race,
label q - 1), counted to each height by the smoothed sum (docs/method.md, section 3e;
certify.certificate.zerocount_afe) and, up to ``--arb-max``, by Arb's boxes of L
(certify.certificate.zerocount, the batched path that zero_counts uses below 3000).
Residue races use isolation heights of a few units for their large conductors (the
certificate of the race mod 4849845 stores heights 0 to about 5).

Figures printed: CPU seconds of each count, the count N(T), the pieces of the horizontal
edges, the load average (the machine is shared).
"""

from __future__ import annotations

import argparse
import os
import time
from fractions import Fraction

from flint import dirichlet_char

from certify.certificate.zerocount import count_zeros_many
from certify.certificate.zerocount_afe import count_zeros_smoothed
from certify.errors import PrecisionExhausted


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--heights", default="1.5,4")
    ap.add_argument("--conductors", default="1009,10007,100003,1000003,4849845")
    ap.add_argument("--arb-max", type=int, default=3000)
    args = ap.parse_args()
    heights = [Fraction(h) for h in args.heights.split(",")]
    print(f"# zero count: one real character per conductor; load average "
          f"{os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    print(f"{'conductor':>10} {'T':>5} {'N':>4} {'smoothed s':>11} {'pieces':>7} {'Arb boxes s':>12}")
    for q in map(int, args.conductors.split(",")):
        n = q - 1
        chi = dirichlet_char(q, n)
        if not (chi.is_primitive() and chi.is_real()):
            print(f"{q:>10}: label {n} is not a real primitive character, skipped")
            continue
        p = int(chi.parity())
        for T in heights:
            t0 = time.process_time()
            try:
                N, pieces = count_zeros_smoothed(q, n, p, T)
            except PrecisionExhausted:
                try:
                    N, pieces = count_zeros_smoothed(q, n, p, T, bits=48)
                except PrecisionExhausted:
                    N, pieces = None, 0
            ts = time.process_time() - t0
            ta = ""
            if q <= args.arb_max:
                t0 = time.process_time()
                Na = count_zeros_many(q, {n: (p, T)})[n]
                ta = f"{time.process_time() - t0:.2f}" + ("" if Na == N else f" (N={Na}!)")
            print(f"{q:>10} {float(T):>5.2f} {str(N):>4} {ts:>11.2f} {pieces:>7} {ta:>12}",
                  flush=True)


if __name__ == "__main__":
    main()
