"""Real characters of a huge smooth modulus by the smoothed functional equation (not a test).

Usage:  python bench/bench_residue_huge.py [q]      (default q = 4849845 = 3*5*7*11*13*17*19)

For the residue race mod q only the real characters carry weight (W(chi) = 0
for the others).  For odd squarefree q they are the Jacobi symbols (./d), d | q,
d > 1, of conductor d.  This prints, for each, L(1/2, chi_d) by the smoothed sum
(docs/method.md, section 3b; cost ~ sqrt d), checked against Arb's Hurwitz-sum
value for the small conductors, and the total time.  The race itself is
certified by bench/bench_huge_residue.py (jets at s = 1 by the smoothed sum,
docs/method.md, section 3d).
"""

from __future__ import annotations

import itertools
import os
import sys
import time

from flint import dirichlet_char
from sympy import factorint
from sympy import jacobi_symbol

from certify.arith import acb, workprec
from certify.spectrum.afe import SmoothedL


def real_character(d: int) -> SmoothedL:
    """(./d) for odd squarefree d, as a smoothed L-function (root number 1)."""
    parity = 0 if d % 4 == 1 else 1
    return SmoothedL(d, d - 1, parity, values=lambda n: acb(int(jacobi_symbol(n, d))),
                     root_number=acb(1))


def main():
    q = int(sys.argv[1]) if len(sys.argv) > 1 else 4849845
    f = factorint(q)
    if q % 2 == 0 or any(e > 1 for e in f.values()):
        raise SystemExit("this benchmark takes an odd squarefree modulus")
    ps = sorted(f)
    print(f"# q = {q} = {'*'.join(map(str, ps))}: {2 ** len(ps) - 1} non-trivial real characters; "
          f"load average {os.getloadavg()[0]:.1f} on {os.cpu_count()} cores")
    t_all = time.time()
    worst = None
    for r in range(1, len(ps) + 1):
        for sub in itertools.combinations(ps, r):
            d = 1
            for p in sub:
                d *= p
            t0 = time.time()
            with workprec(64):
                cv = real_character(d).central_value(64)
            dt = time.time() - t0
            check = ""
            if d < 3000:
                with workprec(64):
                    ref = dirichlet_char(d, d - 1).l(acb(1) / 2)
                check = "  overlaps Arb" if cv.overlaps(ref) else "  DISAGREES WITH ARB"
            excl = "excludes 0" if not cv.real.contains(0) else "CONTAINS 0"
            if worst is None or abs(float(cv.real.mid())) < worst[1]:
                worst = (d, abs(float(cv.real.mid())))
            print(f"d {d:>8}  L(1/2) = {cv.real.str(10)}  ({excl}; {dt:6.2f} s){check}", flush=True)
    print(f"# total {time.time() - t_all:.1f} s; smallest |L(1/2)| at d = {worst[0]} ({worst[1]:.4g})")


if __name__ == "__main__":
    main()
