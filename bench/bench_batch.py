"""Benchmark: every two-way race and every residue race for 3 <= q <= Q, width <= 1e-D.

Runs the batch three times:

* cold   -- an empty spectra cache and an empty output folder;
* warm   -- the cache the cold run filled, a new output folder (every race is
            certified again; only the spectra come from the cache);
* resume -- the warm run's output folder again (nothing left to do).

Prints wall times, the cost per modulus against phi(q) and q, and where the
time goes: zeros (Hardy Z sign changes and refinement), exact power sums
(moments), L(1/2), and in the races the density sums against the rest
(planning, residual checks, result assembly).

Usage: python3 bench/bench_batch.py [--max-q 30] [--digits 8] [--workers 2] [--keep DIR]
                                    [--symmetries] [--warm-from FILLED_CACHE]
With ``--warm-from`` the cold run is skipped: a copy of that filled cache is used (the
way the q <= 100 warm table of issue 14 is measured:
``--max-q 100 --symmetries --warm-from C``).  CPU times include the worker processes.
Not a test: prints figures.  Targets (issue 6): cold < 30 min, warm < 1 min on 2 cores
(q <= 30); issue 14: q <= 100 with --symmetries cold < 1 hour, warm < 5 min.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from certify.batch.run import run_batch  # noqa: E402


def _load():
    try:
        return os.getloadavg()
    except OSError:
        return (float("nan"),) * 3


def _cpu() -> float:
    """CPU seconds of this process and of its finished children (the worker processes)."""
    t = os.times()
    return t.user + t.system + t.children_user + t.children_system


def main() -> int:
    ap = argparse.ArgumentParser()
    ap.add_argument("--max-q", type=int, default=30)
    ap.add_argument("--min-q", type=int, default=3)
    ap.add_argument("--digits", type=int, default=8)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--keep", help="folder to keep cache and outputs in (default: a temp folder)")
    ap.add_argument("--symmetries", action="store_true",
                    help="one race per distinct law, rows read by the exact symmetries")
    ap.add_argument("--warm-from", help="a filled spectra cache: copied, and the cold run skipped")
    args = ap.parse_args()
    base = args.keep or tempfile.mkdtemp(prefix="bench_batch_")
    os.makedirs(base, exist_ok=True)
    cache = os.path.join(base, "spectra.sqlite")
    for suffix in ("", "-wal", "-shm"):
        if os.path.exists(cache + suffix):
            os.remove(cache + suffix)
    if args.warm_from:
        import shutil

        shutil.copy(args.warm_from, cache)
    moduli = list(range(args.min_q, args.max_q + 1))
    print(f"batch benchmark: q = {moduli[0]}..{moduli[-1]}, width <= 1e-{args.digits}, "
          f"{args.workers} workers, cpu count {os.cpu_count()}, load average {_load()[0]:.2f}")
    runs = {}
    plan = (("cold", "out-cold"), ("warm", "out-warm"), ("resume", "out-warm"))
    if args.warm_from:
        plan = plan[1:]
    for name, out in plan:
        t0, c0 = time.time(), _cpu()
        s = run_batch(moduli, args.digits, os.path.join(base, out), workers=args.workers,
                      cache_path=cache, progress=False, command_line="bench_batch",
                      symmetries=args.symmetries)
        wall, cpu = time.time() - t0, _cpu() - c0
        runs[name] = (wall, s)
        ts = s["timings_seconds"]
        print(f"{name:>6}: {wall:8.1f} s wall, {cpu:8.1f} CPU-s  (plan {ts.get('plan', 0):.1f}, spectra "
              f"{ts.get('spectra', 0):.1f}, races {ts.get('races', 0):.1f}, tables "
              f"{ts.get('tables', 0):.1f}); races {s['races']} ({s['races_run']} run, "
              f"{s['races_reused']} reused); spectra {s['spectra']}; not met {s['not_met']}, "
              f"failures {len(s['failures'])}; load {_load()[0]:.2f}")
    if "cold" not in runs:
        print(f"\nfiles in {base}")
        return 0
    cold = runs["cold"][1]
    warm = runs["warm"][1]
    # where the time goes
    pc = cold["per_conductor"]
    z = sum(d["zeros_s"] for d in pc.values())
    m = sum(d["moments_s"] for d in pc.values())
    c = sum(d["central_s"] for d in pc.values())
    zc = sum(d["z_calls"] for d in pc.values())
    print(f"\ncold spectra (CPU seconds summed over workers): zeros {z:.1f} s "
          f"({zc} Hardy Z evaluations), moments {m:.1f} s, L(1/2) {c:.1f} s "
          f"(plus {cold['timings_seconds'].get('plan', 0):.1f} s planning in the coordinator, "
          "which computes the first power sums and L(1/2))")
    for name, s in (("cold", cold), ("warm", warm)):
        pm = s["per_modulus"].values()
        dens = sum(d["density_s"] for d in pm)
        rsp = sum(d["race_spectra_s"] for d in pm)
        tot = sum(d["total_s"] for d in pm)
        zr = sum(d["z_calls_in_races"] for d in pm)
        print(f"{name} races (CPU seconds summed over workers): density sums {dens:.1f} s, "
              f"spectra in races {rsp:.1f} s (views, residual checks, and zeros/moments past "
              f"the plan: {zr} Hardy Z evaluations, {s['spectra']['extended_by_races']} "
              f"extensions stored), rest (planning, results) {tot - dens - rsp:.1f} s, "
              f"total {tot:.1f} s")
    print("\ncost per modulus (warm races; cold spectra of the characters of conductor q):")
    print(f"{'q':>3} {'phi':>4} {'races':>6} {'race s':>8} {'ms/race':>8} {'s/phi^2':>8} "
          f"{'spectra s':>9} {'chars':>5} {'s/char':>7} {'zeros':>6}")
    for qs, d in sorted(warm["per_modulus"].items(), key=lambda kv: int(kv[0])):
        q, phi = int(qs), d["phi"]
        own = pc.get(qs, {"zeros_s": 0, "moments_s": 0, "central_s": 0, "characters": 0, "zeros": 0})
        sp_s = own["zeros_s"] + own["moments_s"] + own["central_s"]
        nchar = own["characters"]
        print(f"{q:>3} {phi:>4} {d['races']:>6} {d['total_s']:>8.2f} "
              f"{1000 * d['total_s'] / max(d['races'], 1):>8.1f} {d['total_s'] / phi**2:>8.4f} "
              f"{sp_s:>9.2f} {nchar:>5} {sp_s / max(nchar, 1):>7.2f} {own['zeros']:>6}")
    # fits: race seconds ~ A phi^a, spectra per character ~ B q^b
    import numpy as np

    xs, ys = [], []
    for qs, d in warm["per_modulus"].items():
        if d["races"] and d["total_s"] > 0:
            xs.append(math.log(d["phi"]))
            ys.append(math.log(d["total_s"]))
    if len(xs) > 2:
        a, b = np.polyfit(xs, ys, 1)
        print(f"\nfit: race time for modulus q ~ {math.exp(b):.3g} * phi(q)^{a:.2f} s")
    xs, ys = [], []
    for qs, own in pc.items():
        if own["characters"]:
            xs.append(math.log(int(qs)))
            ys.append(math.log((own["zeros_s"] + own["moments_s"] + own["central_s"])
                               / own["characters"]))
    if len(xs) > 2:
        a, b = np.polyfit(xs, ys, 1)
        print(f"fit: spectrum time per primitive character of conductor q ~ {math.exp(b):.3g} * q^{a:.2f} s")
    with open(os.path.join(base, "bench_summary.json"), "w") as fh:
        json.dump({k: {"wall": v[0], "summary": v[1]} for k, v in runs.items()}, fh, indent=1)
    print(f"\nfiles in {base}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
