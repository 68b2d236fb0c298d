"""Evidence of an ``ecq-race`` certificate re-derived independently of the recount.

``verify`` recounts an ``ecq-race`` certificate with the same pipeline that made it
(:mod:`.ecq`).  These checks do not share that pipeline's code for the quantities the
evidence rests on:

* **traces**: a_p = p + 1 - #E~(F_p) for every prime p below :data:`SMALL_P` by a
  literal count of the projective points of the reduced minimal model (a double loop
  over x and y: the singular point of a bad fibre is counted, which gives a_p = 1, -1, 0
  for split, non-split and additive reduction), compared with the a_p the L-function of
  the recount uses (fast point counts, :mod:`certify.source.ectraces`) and, at the bad
  primes, with the stored reduction types;
* **root number**: for a semistable curve, eps = -prod_{p | N} (-a_p) (w_inf = -1 and
  w_p = -a_p at multiplicative p), with a_p at each p | N counted by the Legendre symbol
  of the completed square (all p here are below the conductor limit), compared with
  every stored root number; for other curves the product of the stored local root
  numbers and w_inf = -1 must be the stored global one;
* **rank**: for rank 0, Lambda(1) = (sqrt N / 2 pi) L(E, 1) with
  L(E, 1) = (1 + eps) sum_n a_n/n exp(-2 pi n / sqrt N); for rank 1 (eps = -1),
  Lambda'(1) = (sqrt N / 2 pi) 2 sum_n a_n/n E_1(2 pi n / sqrt N); a_n from the counted
  a_p (multiplicative, the Hecke recursion at good p), the tail bounded by |a_n| <= d(n)
  sqrt n <= 2n (so |a_n/n| <= 2) and E_1(x) <= exp(-x)/x.  The enclosure must meet the
  stored central coefficient and exclude 0 (so the certified order is re-proved);
* **zero-count evidence**: the sentences that state how many zeros were isolated to
  which height, and the argument-principle count when one was asked for, must state the
  stored zero list and heights (the recount then re-proves the count itself).

References: "The arithmetic of elliptic curves", Graduate Texts in Mathematics 106
(1986), appendix C, section 16 (root numbers of multiplicative reduction); "A course in
computational algebraic number theory", Graduate Texts in Mathematics 138 (1993),
section 7.5.3 (the series for L(E, 1) and L'(E, 1)).
"""

from __future__ import annotations

import math
import re

from ..arith import arb, workprec
from .model import ball_of

SMALL_P = 100  # primes below this: a_p by the literal double loop
MAX_TERMS = 5000  # the L(E, 1) series: at most this many terms (conductor <= 10^5 needs < 3600)


def _primes(n: int) -> list[int]:
    sieve = bytearray([1]) * (n + 1)
    sieve[:2] = b"\x00\x00"
    for i in range(2, int(n ** 0.5) + 1):
        if sieve[i]:
            sieve[i * i::i] = bytearray(len(sieve[i * i::i]))
    return [i for i in range(n + 1) if sieve[i]]


def points_brute(model, p: int) -> int:
    """#E~(F_p): projective points of the reduction of ``model`` mod p (literal double loop)."""
    a1, a2, a3, a4, a6 = (x % p for x in model)
    n = 1  # the point at infinity
    for x in range(p):
        rhs = (x * x * x + a2 * x * x + a4 * x + a6) % p
        for y in range(p):
            if (y * y + a1 * x * y + a3 * y - rhs) % p == 0:
                n += 1
    return n


def points_legendre(model, p: int) -> int:
    """#E~(F_p) for an odd prime p: (2y + a1 x + a3)^2 = 4 f(x) + (a1 x + a3)^2, so each x
    contributes 1 + (D(x) / p) affine points (Euler's criterion)."""
    a1, a2, a3, a4, a6 = (x % p for x in model)
    n = 1
    e = (p - 1) // 2
    for x in range(p):
        d = (4 * (x * x * x + a2 * x * x + a4 * x + a6) + (a1 * x + a3) ** 2) % p
        if d == 0:
            n += 1
        else:
            n += 2 if pow(d, e, p) == 1 else 0
    return n


def trace(model, p: int) -> int:
    """a_p = p + 1 - #E~(F_p) of the (minimal) model, counted without the fast code."""
    count = points_brute(model, p) if p < SMALL_P or p == 2 else points_legendre(model, p)
    return p + 1 - count


def _an(model, bad: set, M: int) -> list[int]:
    """a_0..a_M from the counted a_p (a_0 = 0)."""
    a = [0] * (M + 1)
    if M >= 1:
        a[1] = 1
    spf = list(range(M + 1))
    for i in range(2, int(M ** 0.5) + 1):
        if spf[i] == i:
            for j in range(i * i, M + 1, i):
                if spf[j] == j:
                    spf[j] = i
    ap = {}
    for n in range(2, M + 1):
        p = spf[n]
        m, k = n, 0
        while m % p == 0:
            m //= p
            k += 1
        if m > 1:
            a[n] = a[m] * a[n // m]
            continue
        if p not in ap:
            ap[p] = trace(model, p)
        if k == 1:
            a[n] = ap[p]
        elif p in bad:
            a[n] = ap[p] * a[n // p]
        else:
            a[n] = ap[p] * a[n // p] - p * a[n // (p * p)]
    return a


def central_derivative(model, conductor: int, bad: set, eps: int, order: int, prec: int):
    """An enclosure of Lambda^(order)(1)/order! for order 0 (eps = +1) or 1 (eps = -1), with
    the number of series terms used; None when the series would need too many terms."""
    with workprec(prec + 20):
        c = 2 * arb.pi() / arb(conductor).sqrt()
        cf = 2 * math.pi / math.sqrt(conductor)
        M = int(math.ceil((prec + 10) * math.log(2) / cf)) + 2
        if M > MAX_TERMS:
            return None, M
        a = _an(model, bad, M)
        s = arb(0)
        for n in range(1, M + 1):
            if a[n]:
                x = c * n
                s += arb(a[n]) / n * (x.neg().exp() if order == 0 else x.expint(arb(1)))
        q = (-c * (M + 1)).exp() / (1 - (-c).exp())
        tail = 2 * q if order == 0 else 2 * q / (c * (M + 1))
        s += arb(0, tail.upper())
        factor = (1 + eps) if order == 0 else 2
        value = factor * s * arb(conductor).sqrt() / (2 * arb.pi())
        return value, M


def _overlap(a: arb, b: arb) -> bool:
    return not (a.upper() < b.lower() or b.upper() < a.lower())


def check_ecq_evidence(cert, E, report) -> bool:
    """Add the independent checks of the module docstring to ``report``; True if all pass.

    ``E`` is the curve rebuilt from the stored a-invariants (minimal model, conductor and
    bad primes by Tate's algorithm); nothing else is taken from the recount."""
    sp = cert.spectrum
    params = cert.parameters
    model = tuple(int(x) for x in E.minimal)
    N = int(E.conductor)
    bad = set(int(p) for p in E.bad_primes)
    ok = True
    # -- traces for small p, and the reduction types at the bad primes
    from ..source.ell_l import EllipticL

    small = [p for p in _primes(SMALL_P)]
    counted = {p: trace(model, p) for p in small}
    fast = EllipticL(E, eps=1).an(SMALL_P)
    wrong = [p for p in small if fast[p] != counted[p]]
    ok &= report.add(f"E/Q evidence: a_p for the {len(small)} primes p < {SMALL_P} by a literal "
                     "point count on the minimal model equal those of the L-function",
                     not wrong, f"differ at p = {wrong[:5]}")
    hasse = [p for p in small if p not in bad and counted[p] ** 2 > 4 * p]
    ok &= report.add("E/Q evidence: |a_p| <= 2 sqrt p at the good primes counted", not hasse,
                     f"fails at p = {hasse[:5]}")
    for p in bad:
        counted.setdefault(p, trace(model, p))
    kinds = {1: "split", -1: "nonsplit", 0: "additive"}
    stored_local = {int(d["p"]): d for d in sp["curve"]["local_data"]}
    mismatch = []
    for p in sorted(bad):
        d = stored_local.get(p)
        expected = kinds.get(counted[p], "?")
        got = d["reduction"] if d is not None else None
        if got != expected or (counted[p] != 0) != (N % (p * p) != 0):
            mismatch.append(f"p = {p}: counted a_p = {counted[p]}, stored {got!r}")
    if set(stored_local) != bad:
        mismatch.append(f"stored bad primes {sorted(stored_local)}, counted {sorted(bad)}")
    ok &= report.add("E/Q evidence: reduction type at each bad prime from the counted a_p "
                     "(1 split, -1 non-split, 0 additive)", not mismatch, "; ".join(mismatch[:3]))
    # -- root number
    ar = sp["analytic_rank"]
    stored_eps = {ar.get("root_number"), params.get("root_number")}
    if N == math.prod(bad):  # semistable
        eps = -math.prod(-counted[p] for p in bad)
        how = "-prod_{p | N} (-a_p) from the counted a_p (semistable)"
    else:
        w = [d.get("root_number") for d in sp["curve"]["local_data"]]
        if all(x in (1, -1) for x in w):
            eps = -math.prod(w)
            how = "w_inf prod w_p from the stored local root numbers (not semistable)"
        else:  # no local formula: the recount re-decides it by the functional equation
            eps = ar.get("root_number") if len(stored_eps) == 1 else None
            how = "the same in every stored field (decided by the functional equation)"
    ok &= report.add(f"E/Q evidence: root number {how}",
                     eps in (1, -1) and stored_eps == {eps},
                     f"stored {sorted(map(str, stored_eps))}, re-derived {eps}")
    # -- the rank evidence
    r = ar.get("value")
    if ar.get("certified") and r in (0, 1) and eps is not None:
        cs = ar.get("central_coefficients", [])
        prec = 80
        val, M = central_derivative(model, N, bad, eps, r, prec)
        if val is None:
            ok &= report.add("E/Q evidence: the central value by an independent series", False,
                             f"{M} terms needed (limit {MAX_TERMS})")
        else:
            parity_ok = (r % 2 == 0) == (eps == 1)
            st = ball_of(cs[r], "central coefficient") if len(cs) == r + 1 else None
            good = (parity_ok and st is not None and val.rad() < arb(2) ** -40 and
                    not val.contains(0) and not st.contains(0) and st.rad() < arb(2) ** -30
                    and _overlap(st, val))
            what = "Lambda(1) = (sqrt N/2 pi) L(E, 1)" if r == 0 else "Lambda'(1)"
            ok &= report.add(f"E/Q evidence: rank {r} re-proved: {what} by the series over the "
                             f"counted a_n ({M} terms) excludes 0 and meets the stored value",
                             good, f"stored {st.str(8) if st is not None else None}, "
                             f"re-derived {val.str(8)}, root number {eps}")
    # -- the zero-count evidence states the stored zeros and heights
    grh = [h for h in cert.hypotheses if h.get("name") == "GRH"]
    texts = [e.get("text", "") for e in grh[0]["evidence"]] if len(grh) == 1 else []
    zeros = [ball_of(z) for z in sp["zeros"]]
    H = float(sp["isolation_height"])
    first = texts[0] if texts else ""
    m = re.match(r"(\d+) zeros of L\(E, s\) certified on the critical line .* up to height (\S+)$",
                 first)
    good = bool(m) and int(m.group(1)) == len(zeros) and m.group(2) == f"{H:g}"
    ok &= report.add("E/Q evidence: the zeros-on-the-line sentence states the stored zero list "
                     "and isolation height", good, f"stored sentence {first[:80]!r}, "
                     f"{len(zeros)} zeros stored to height {H:g}")
    counts = [t for t in texts if t.startswith("GRH ")]
    gh = float(params.get("grh_height", 0.0))
    if gh > 0 or counts:
        good = len(counts) == 1 and gh > 0
        m = re.match(r"GRH verified to height (\S+) .*: the (\d+) zeros with ", counts[0]) \
            if good else None
        if m:
            T = float(m.group(1))
            found = sum(1 for z in zeros if float(z.mid()) < T)
            good = gh * (1 - 1e-5) <= T <= gh + 0.21 and int(m.group(2)) == found
        elif good:
            # a count that failed says so ("not verified"); the recount must say the same
            good = not counts[0].startswith("GRH verified")
        ok &= report.add("E/Q evidence: one zero-count sentence, at the stored GRH height, "
                         "counting the stored zeros below it", good,
                         f"grh_height {gh:g}; sentences {[c[:60] for c in counts][:2]}")
    return bool(ok)
