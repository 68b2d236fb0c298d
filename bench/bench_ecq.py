"""Benchmark: elliptic curves over Q (issue 12).

Run:  python3 bench/bench_ecq.py [--quick] [--skip-traces] [--traces-bound X]

Prints, for each curve: conductor, rank report, the certified density and its
width, zeros used, isolation height, Z evaluations (requested and computed),
wall and CPU time and the load average (the machine is shared: CPU time is
the comparable figure); then the time to compute a_p for every prime below 10^7 for the curve of
conductor 11.  Targets: width <= 1e-10 for conductors <= 400 in under a minute
each; a conductor near 10^4 at width <= 1e-6 in under 10 minutes; all a_p for
p < 10^7 in under 10 minutes.  Times depend on the load of the machine.
"""

from __future__ import annotations

import argparse
import os
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from certify.ecrace import certify_ec_race  # noqa: E402
from certify.source.ectraces import traces_upto  # noqa: E402
from certify.source.ellcurve import curve_from_ainvs  # noqa: E402

# a-invariants from memory: conductors 11, 37, 389, 5077 (ranks 0..3) and a
# semistable curve y^2 + xy = x^3 + 5 of conductor 10805 = 5 * 2161
CURVES = [([0, -1, 1, -10, -20], 10), ([0, 0, 1, -1, 0], 10), ([0, 1, 1, -2, 0], 10),
          ([0, 0, 1, -7, 6], 10), ([1, 0, 0, 0, 5], 6)]


def _zero_counters():
    """Count Hardy Z values computed (memo hits excluded) across EllipticL instances."""
    import certify.source.ell_l as ell_l

    made = []
    orig = ell_l.EllipticL.__init__

    def init(self, *a, **k):
        orig(self, *a, **k)
        made.append(self)

    ell_l.EllipticL.__init__ = init
    return made


MADE = _zero_counters()


def bench_curve(a, digits):
    MADE.clear()
    t0, c0, l0 = time.perf_counter(), time.process_time(), os.getloadavg()[0]
    r = certify_ec_race(a, digits)
    dt, dc, l1 = time.perf_counter() - t0, time.process_time() - c0, os.getloadavg()[0]
    d = r.density
    p = r.parameters
    print(f"N = {r.curve.conductor:6d}  {r.rank.statement():<58s}  mean {str(r.mean):>3s}  "
          f"P(X>0) in [{d.lower_str(d.places())}, {d.upper_str(d.places())}]  "
          f"width {float(d.width):.1e} (target 1e-{digits}{'' if r.target_met else ' NOT met'})")
    print(f"          zeros {p['zeros_used']} to height {p['isolation_height']:.1f}, "
          f"{p['hardy_z_evaluations']} Z requests ({sum(L.z_computed for L in MADE)} computed), "
          f"{p['moments']} moments; wall {dt:.1f} s, CPU {dc:.1f} s, load {l0:.1f}->{l1:.1f}; "
          f"stages (wall) {r.timings}", flush=True)
    return r.curve.conductor, dc


def bench_traces(bound):
    E = curve_from_ainvs([0, -1, 1, -10, -20])
    t0, c0 = time.perf_counter(), time.process_time()
    ps, ap = traces_upto(E, bound)
    dt, dc = time.perf_counter() - t0, time.process_time() - c0
    ok = bool(((ap.astype(float) ** 2) <= 4 * ps).all())
    print(f"a_p for all {ps.size} primes p <= {bound:.0e} (conductor 11): wall {dt:.1f} s, CPU "
          f"{dc:.1f} s, load {os.getloadavg()[0]:.1f}; Hasse's bound holds for every p: {ok}",
          flush=True)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--quick", action="store_true", help="lower targets (digits 6, 4) and bound 10^6")
    ap.add_argument("--skip-traces", action="store_true")
    ap.add_argument("--traces-bound", type=int, default=10**7)
    ap.add_argument("--only", type=int, default=None, help="only the curve of this conductor")
    args = ap.parse_args()
    rows = []
    for a, d in CURVES:
        if args.only is not None and curve_from_ainvs(a).conductor != args.only:
            continue
        rows.append(bench_curve(a, min(d, 6) if args.quick else d))
    print("CPU time against conductor (log-log slope between consecutive curves; the first "
          "four at the same target):")
    import math

    for (n1, t1), (n2, t2) in zip(rows[:3], rows[1:4]):
        print(f"  N {n1} -> {n2}: CPU x{t2 / t1:.2f}, slope {math.log(t2 / t1) / math.log(n2 / n1):.2f}")
    if not args.skip_traces:
        bench_traces(10**6 if args.quick else args.traces_bound)


if __name__ == "__main__":
    main()
