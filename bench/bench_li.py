"""Benchmark of the race pi(x) against li(x) (not a test): time, digits, zeros used.

Usage:  python bench/bench_li.py [--sig 5,10,15,20,30,40,50] [--direction 'pi<li']

Each case starts cold (a fresh spectrum store: the zeros of zeta and its
moments are computed again), and is planned for S significant digits of the
small side 1 - delta(pi<li) = delta(pi>li) ~ 2.63e-7.  Printed per case: wall
time, the significant digits asked and certified, the absolute digits of the
final round, zeros of zeta used, Hardy Z evaluations, the split between
spectra and density sums, and the certified small side.

Target of issue 13: 10 significant digits in under 5 minutes; 20 is the aim.
"""

from __future__ import annotations

import argparse
import platform
import time

from certify.lirace import certify_li_race, small_side_text
from certify.spectrum.spectrum import SpectrumStore


def run(direction: str, sig: int):
    store = SpectrumStore()
    t0 = time.time()
    r = certify_li_race(direction, sig_digits=sig, store=store)
    dt = time.time() - t0
    k, _ = r.significant
    print(f"sig {sig:>3}  {dt:8.2f} s  certified {k:>3} sig. digits  met {str(r.sig_target_met):<5}  "
          f"abs digits {r.digits_requested:>3}  zeros {r.parameters['zeros_used']:>4}  "
          f"Z-evals {r.parameters['hardy_z_evaluations']:>6}  "
          f"spectra {r.timings['spectra']:.2f} s  density {r.timings['density']:.2f} s  "
          f"rounds {[d for d, _, _ in r.rounds]}", flush=True)
    print(f"         {small_side_text(r)}", flush=True)
    return dt, r


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--sig", default="5,10,15,20,30,40,50",
                    help="comma-separated significant digits to ask for")
    ap.add_argument("--direction", default="pi<li")
    args = ap.parse_args()
    sigs = [int(s) for s in args.sig.split(",") if s.strip()]
    print(f"# certify lirace benchmark on {platform.processor() or platform.machine()}, "
          f"python {platform.python_version()}; cold store per case")
    print("# target: 10 significant digits of 1 - delta(pi<li) in < 5 min; 20 is the aim")
    total = 0.0
    for s in sigs:
        dt, _ = run(args.direction, s)
        total += dt
    print(f"# total {total:.1f} s")


if __name__ == "__main__":
    main()
