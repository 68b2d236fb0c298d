"""Benchmark: the coordinator's re-check of the spectra the workers compute (issue 10).

Runs ``certify table`` cold (no cache) over 3 <= q <= Q at width 1e-D and prints,
from ``batch.json``: the spectra computed by the workers, the seconds the
coordinator spent re-checking them (power sums and L(1/2) re-derived per character,
every zero's sign change re-certified), the spectra phase and the whole run, with
the coordinator's CPU time and the load average.

Usage: python3 bench/bench_worker_recheck.py [--max-q 20] [--digits 8] [--workers 2]
Not a test: prints figures.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from certify.batch.run import run_batch  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--max-q", type=int, default=20)
    ap.add_argument("--digits", type=int, default=8)
    ap.add_argument("--workers", type=int, default=2)
    a = ap.parse_args()
    load0 = os.getloadavg()
    with tempfile.TemporaryDirectory() as tmp:
        t0, c0 = time.time(), time.process_time()
        s = run_batch(list(range(3, a.max_q + 1)), a.digits, os.path.join(tmp, "out"),
                      workers=a.workers, use_cache=False, progress=False)
        wall, cpu = time.time() - t0, time.process_time() - c0
    sp, t = s["spectra"], s["timings_seconds"]
    wr = sp["worker_recheck"]
    print(f"table --moduli 3-{a.max_q} --digits {a.digits} --workers {a.workers} --no-cache")
    print(f"  races {s['races']}; spectra computed by workers {sp['computed']}")
    print(f"  worker spectra re-checked by the coordinator: {wr['entries']} in {wr['seconds']:.2f} s wall, "
          f"{wr['cpu_seconds']:.2f} s CPU ({1000 * wr['cpu_seconds'] / max(wr['entries'], 1):.1f} ms CPU "
          f"each), refused {wr['refused']}")
    print(f"  spectra phase {t['spectra']:.1f} s wall; races phase {t['races']:.1f} s; total "
          f"{t['total']:.1f} s wall; coordinator CPU {cpu:.1f} s")
    print(f"  re-check share: {100 * wr['seconds'] / max(t['total'], 1e-9):.1f}% of the run's wall time")
    print(f"  load average before {load0[0]:.2f}, after {os.getloadavg()[0]:.2f}")
    print(json.dumps({"worker_recheck": wr, "timings": t, "cpu_coordinator": round(cpu, 2)}))


if __name__ == "__main__":
    main()
