"""Benchmark of the race engine over Q (not a test): time, digits, zeros used.

Usage:  python bench/bench_races.py [--quick]

Each case starts cold (a fresh spectrum store) so the time includes zero
isolation and moments.  Figures printed: wall time, enclosure width, zeros
used, Hardy Z evaluations, and the split between spectra and density sums.
"""

from __future__ import annotations

import argparse
import platform
import time

from certify.race.question import residue_race, two_way
from certify.races import certify_race
from certify.spectrum.spectrum import SpectrumStore


def run(question, digits):
    t0 = time.time()
    r = certify_race(question, digits, store=SpectrumStore())
    dt = time.time() - t0
    print(f"{question.label:<16} digits {digits:>3}  {dt:8.2f} s  width {float(r.density.width):.2e}  "
          f"met {str(r.target_met):<5}  zeros {r.parameters['zeros_used']:>5}  "
          f"L-functions {len(r.parameters['primitive_l_functions']):>3}  "
          f"Z-evals {r.parameters['hardy_z_evaluations']:>6}  "
          f"spectra {r.timings['spectra']:.2f} s  density {r.timings['density']:.2f} s", flush=True)
    return dt, r


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true", help="skip the q <= 100 sweep")
    args = ap.parse_args()
    print(f"# certify race benchmark on {platform.processor() or platform.machine()}, "
          f"python {platform.python_version()}")
    print("# targets: delta(4;3,1), delta(3;2,1) width <= 1e-12 in < 30 s and <= 1e-30 in < 3 min")
    for q, a, b in [(4, 3, 1), (3, 2, 1)]:
        for d in (12, 20, 30, 40):
            run(two_way(q, a, b), d)
    print("# growth with q (two-way races a = non-residue-ish, b = 1; width <= 1e-8; cold)")
    cases = [(5, 2, 1), (8, 3, 1), (12, 11, 1), (24, 23, 1), (30, 7, 1), (60, 7, 1), (64, 3, 1)]
    if not args.quick:
        cases += [(83, 2, 1), (97, 5, 1), (100, 3, 1)]
    for q, a, b in cases:
        run(two_way(q, a, b), 8)
    print("# residue races (width <= 1e-8; cold)")
    for q in (8, 24, 97):
        run(residue_race(q), 8)


if __name__ == "__main__":
    main()
