"""The residue race of a huge smooth modulus, certified (not a test).

Usage:  python bench/bench_huge_residue.py [q] [--digits D]
        (default q = 4849845 = 3*5*7*11*13*17*19, D = 11)

The race is built from the factorisation of q (docs/method.md, section 1d: the
2^k - 1 real characters, mean 2^k); jets at s = 1, L(1/2) and Hardy Z of the
real characters of conductor >= 3000 come from the smoothed functional
equation (sections 3b, 3d; cost ~ sqrt(conductor) each).

Figures printed: seconds (wall clock and CPU of this process, with the load
average: the machine is shared), L-functions, zeros used, Z evaluations, the
enclosure of delta and of 1 - delta in scientific notation, and for q = 4849845
the comparison with the published density 0.999999928 ("Highly biased prime
number races", Algebra & Number Theory 8 (2014); asymptotic method, 9 decimals).
"""

from __future__ import annotations

import argparse
import os
import time
from fractions import Fraction

from certify.arith import sci_down, sci_up
from certify.race.question import residue_race
from certify.races import certify_race

PUBLISHED = {4849845: "0.999999928"}  # 9 decimals: the true value within 5e-10


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("q", nargs="?", type=int, default=4849845)
    ap.add_argument("--digits", type=int, default=11)
    args = ap.parse_args()
    q = args.q
    question = residue_race(q)
    st = question.structure
    print(f"# residue race mod {q}: "
          + (f"{len(st.characters)} real characters, mean {st.mean}"
             if st is not None else "class-by-class question")
          + f"; target width 1e-{args.digits}; load average {os.getloadavg()[0]:.1f} "
          f"on {os.cpu_count()} cores", flush=True)
    w0, c0 = time.time(), time.process_time()
    r = certify_race(question, args.digits)
    wall, cpu = time.time() - w0, time.process_time() - c0
    d = r.density
    p = r.parameters
    om_lo, om_hi = 1 - d.upper, 1 - d.lower
    print(f"time            {wall:.1f} s wall, {cpu:.1f} s CPU (load average now "
          f"{os.getloadavg()[0]:.1f})")
    print(f"L-functions     {len(p['primitive_l_functions'])}")
    print(f"zeros used      {p['zeros_used']}")
    print(f"Z evaluations   {p['hardy_z_evaluations']}")
    print(f"moments         {p['moments']}")
    print(f"delta           [{d.lower_str(d.places())}, {d.upper_str(d.places())}]  "
          f"(width <= {d.width_text()}, target met: {r.target_met})")
    print(f"1 - delta       [{sci_down(om_lo, 6)}, {sci_up(om_hi, 6)}]")
    mid = (om_lo + om_hi) / 2
    for sig in range(8, 0, -1):
        if sci_down(om_lo, sig) == sci_down(om_hi, sig):
            print(f"1 - delta       = {sci_down(om_lo, sig)}...  ({sig} significant digits "
                  "common to every point of the enclosure)")
            break
    else:
        print(f"1 - delta       ~ {float(mid):.4e} (no significant digit common to the enclosure)")
    if q in PUBLISHED:
        pub = Fraction(PUBLISHED[q])
        lo, hi = pub - Fraction(5, 10**10), pub + Fraction(5, 10**10)
        agree = d.lower <= hi and d.upper >= lo
        print(f"published       {PUBLISHED[q]} (9 decimals; \"Highly biased prime number races\", Algebra & "
              f"Number Theory 8 (2014)): {'agrees' if agree else 'DISAGREES'} "
              f"(enclosure {'meets' if agree else 'misses'} [{float(lo):.10f}, {float(hi):.10f}])")


if __name__ == "__main__":
    main()
