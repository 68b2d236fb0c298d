"""Benchmark: re-verifying a certificate against computing it (cold).

For each race: the time of the original computation (race engine with an
empty spectrum store), of building the certificate's evidence (the LLL
search refines 10 ordinates; the argument-principle zero counts), of
``verify`` on the written JSON, and the ratios.  Also the size of the JSON and the Hardy Z evaluations of each side.

Run: python3 bench/bench_verify.py [--quick]
     python3 bench/bench_verify.py --moduli [11,101,211]   (large moduli: race vs verify)

``--moduli`` certifies delta(q;2,1) at width 1e-10 for each q (cold spectrum store) and
prints the race time, the time to build the certificate's evidence, the time of
``verify`` on the JSON and the part of it spent in the zero counts (the argument
principle for every character of a conductor at once; the power sums and central values
come from one Hurwitz jet per class and a DFT).  Measured on the shared 2-core machine on
2026-12-03 (load average 4.4 to 5.9, other sessions running), ``certify verify`` of the
certificates written by ``certify race Q 2 1 --json`` (width 1e-10), before (commit
5471284: one L-function at a time) and after (this script's table):

    q    L-functions  race s  verify s before  verify s after  of which zero counts s
    11        9        0.42       1.22            0.43              0.24
    101      99        1.58     145.8             3.59              2.01
    211     209        2.64     601.7             7.42              4.20

(race s: the race's own total stored in the certificate; after: ``--moduli 11,101,211``,
load 4.6.  Writing the certificate (``race --json``, evidence included) of q = 101 took
39 s before and 5.6 s after: the builder counts zeros the same batched way.)
"""

from __future__ import annotations

import json
import sys
import time

from certify.certificate.build import certificate_from_result
from certify.certificate.model import Certificate
from certify.certificate.verify import verify_certificate
from certify.race.question import residue_race, two_way
from certify.races import certify_race
from certify.spectrum.spectrum import SpectrumStore

CASES = [
    (two_way(4, 3, 1), 12),
    (two_way(4, 3, 1), 20),
    (two_way(3, 2, 1), 12),
    (two_way(5, 2, 1), 12),
    (residue_race(8), 12),
    (two_way(7, 3, 1), 10),
    (two_way(13, 2, 1), 8),
    (two_way(4, 3, 1), 30),
]


def large_moduli(moduli):
    """Race, evidence and verify times of delta(q;2,1) at width 1e-10 for large moduli."""
    import certify.certificate.zerocount as zc

    print(f"{'q':>5}{'L-fns':>7}{'zeros':>7}{'race s':>9}{'evidence s':>12}{'verify s':>10}"
          f"{'counts s':>10}{'verify/race':>13}  ok")
    for q in moduli:
        store = SpectrumStore()
        t0 = time.perf_counter()
        result = certify_race(two_way(q, 2, 1), 10, store=store)
        t1 = time.perf_counter()
        cert = certificate_from_result(result, store)
        t2 = time.perf_counter()
        back = Certificate.from_dict(json.loads(cert.to_json()))
        spent = {"counts": 0.0}
        orig = zc.zero_counts

        def timed(requests, _orig=orig):
            t = time.perf_counter()
            try:
                return _orig(requests)
            finally:
                spent["counts"] += time.perf_counter() - t

        zc.zero_counts = timed
        try:
            t3 = time.perf_counter()
            rep = verify_certificate(back)
            t4 = time.perf_counter()
        finally:
            zc.zero_counts = orig
        race, verify = t1 - t0, t4 - t3
        print(f"{q:>5}{len(result.parameters['primitive_l_functions']):>7}"
              f"{result.parameters['zeros_used']:>7}{race:>9.2f}{t2 - t1:>12.2f}{verify:>10.2f}"
              f"{spent['counts']:>10.2f}{verify / race:>13.1f}  {rep.ok}")


def main(argv):
    if "--moduli" in argv:
        i = argv.index("--moduli")
        arg = argv[i + 1] if i + 1 < len(argv) else "11,101,211"
        large_moduli([int(x) for x in arg.split(",")])
        return
    cases = CASES[:3] if "--quick" in argv else CASES
    print(f"{'race':<16}{'digits':>7}{'compute s':>11}{'evidence s':>11}{'verify s':>10}"
          f"{'ratio':>8}{'ratio2':>8}{'Z calls':>9}{'Z verify':>9}{'zeros':>7}{'JSON kB':>9}  ok")
    print("  ratio = compute / verify; ratio2 = (compute + evidence) / verify, the whole "
          "making of the certificate")
    ratios, ratios2 = [], []
    for q, d in cases:
        store = SpectrumStore()
        t0 = time.perf_counter()
        result = certify_race(q, d, store=store)
        t1 = time.perf_counter()
        cert = certificate_from_result(result, store)
        t2 = time.perf_counter()
        text = cert.to_json()
        back = Certificate.from_dict(json.loads(text))
        t3 = time.perf_counter()
        rep = verify_certificate(back)
        t4 = time.perf_counter()
        compute, verify = t1 - t0, t4 - t3
        ratios.append(compute / verify)
        ratios2.append((compute + t2 - t1) / verify)
        print(f"{q.label:<16}{d:>7}{compute:>11.2f}{t2 - t1:>11.2f}{verify:>10.2f}"
              f"{compute / verify:>8.1f}{(compute + t2 - t1) / verify:>8.1f}"
              f"{result.parameters['hardy_z_evaluations']:>9}"
              f"{rep.z_evaluations:>9}{result.parameters['zeros_used']:>7}"
              f"{len(text) / 1024:>9.1f}  {rep.ok}")
    for name, r in (("compute/verify", ratios), ("(compute+evidence)/verify", ratios2)):
        r.sort()
        print(f"median ratio {name}: {r[len(r) // 2]:.1f} (min {r[0]:.1f}, max {r[-1]:.1f})")


if __name__ == "__main__":
    main(sys.argv[1:])
