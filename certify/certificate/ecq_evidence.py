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
  stored central coefficient and exclude 0 (so the certified order is re-proved); for
  rank 2 or 3 (not certified) the same series with G_r (:func:`g_function`,
  docs/method.md section 11) must give Lambda^(r)(1)/r! excluding 0 (rank <= r
  re-proved) and the lower coefficients of r's parity as balls containing 0 (which
  does not prove that they vanish);
* **structured items**: every evidence item (:mod:`.ecq_items`) has a known kind, exactly
  its fields and the sentence generated from them; the items of ``spectrum.evidence``
  are re-derived here field by field;
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

from ..arith import arb, workprec
from ..errors import BadInput, CertifyError
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


def gamma_jet_coefficient(r: int, logx: arb, prec: int) -> arb:
    """h_r: the coefficient of s^r in x^(-s) Gamma(1 + s) = exp(sum_k b_k s^k), where
    b_1 = -(gamma + log x) and b_k = (-1)^k zeta(k)/k for k >= 2 (the Taylor series of
    log Gamma(1 + s)); the exponential by h_n = (1/n) sum_{k=1}^n k b_k h_(n-k)."""
    with workprec(prec):
        b = [arb(0), -(arb.const_euler() + logx)]
        b += [(arb(k).zeta() / k) * (1 if k % 2 == 0 else -1) for k in range(2, r + 1)]
        h = [arb(1)]
        for n in range(1, r + 1):
            h.append(sum((k * b[k] * h[n - k] for k in range(1, n + 1)), arb(0)) / n)
        return h[r]


def g_function(r: int, x: arb, prec: int) -> arb:
    """G_r(x) = (1/(r-1)!) int_1^oo exp(-x y) (log y)^(r-1) dy/y for r >= 1, G_0(x) = exp(-x).

    For r >= 2 by the convergent expansion (docs/method.md, "Central derivatives of L(E, s)")

        G_r(x) = h_r + sum_{n >= 1} (-1)^(n+r) x^n / (n! n^r),

    h_r the coefficient of s^r in x^(-s) Gamma(1 + s); the series is cut where its terms have
    fallen below 2^-(prec + 10) and its tail is bounded by x^(K+1)/(K+1)! / (1 - x/(K+2)).  The
    working precision is raised by about x log2(e) bits (the terms reach e^x before they cancel).
    """
    if r == 0:
        with workprec(prec):
            return x.neg().exp()
    if r == 1:
        with workprec(prec):
            return x.expint(arb(1))
    xf = float(x.mid())
    wp = prec + int(1.5 * xf) + 30
    with workprec(wp):
        h = gamma_jet_coefficient(r, x.log(), wp)
        s = arb(0)
        term = arb(1)  # x^n / n!
        n = 0
        while True:
            n += 1
            term = term * x / n
            s += (term / arb(n) ** r) * (1 if (n + r) % 2 == 0 else -1)
            if n + 2 > 2 * xf and term < arb(2) ** -(prec + 10):
                break
        # tail: sum_{m > n} x^m/m! <= x^(n+1)/(n+1)! / (1 - x/(n+2)) (1/m^r <= 1)
        nxt = term * x / (n + 1)
        tail = nxt / (1 - x / (n + 2))
        s += arb(0, tail.upper())
        return h + s


def g_tail(r: int, c: arb, M: int) -> arb:
    """A bound on sum_{n > M} |a_n/n| G_r(c n): |a_n/n| <= d(n)/sqrt(n) <= 2 and
    G_r(x) <= exp(-x)/x^r (log y <= y - 1, 1/y <= 1), a geometric series."""
    q = (-c * (M + 1)).exp() / (1 - (-c).exp())
    return 2 * q / (c * (M + 1)) ** r


def central_derivative(model, conductor: int, bad: set, eps: int, order: int, prec: int):
    """An enclosure of Lambda^(order)(1)/order! and the number of series terms used, by

        Lambda^(k)(1)/k! = (1 + eps (-1)^k) (sqrt N / 2 pi) sum_n a_n/n G_k(2 pi n / sqrt N)

    (docs/method.md: exact for every k; 0 when eps (-1)^k = -1); None when the series would
    need more than MAX_TERMS terms."""
    cf = 2 * math.pi / math.sqrt(conductor)
    M = int(math.ceil((prec + 10) * math.log(2) / cf)) + 2
    if M > MAX_TERMS:
        return None, M
    # the expansion of G_r (r >= 2) loses about x log2(e) bits to cancellation: its argument
    # c n must be known to that many more bits than the result
    extra = int(1.5 * cf * M) + 30 if order >= 2 else 0
    with workprec(prec + 20 + extra):
        c = 2 * arb.pi() / arb(conductor).sqrt()
    with workprec(prec + 20):
        a = _an(model, bad, M)
        s = arb(0)
        small = arb(2) ** -(prec + 30)
        for n in range(1, M + 1):
            if a[n]:
                with workprec(prec + 20 + extra):
                    x = c * n  # exact to the bits the expansion needs
                # where the bound 0 <= G_r(x) <= exp(-x)/x^r is already negligible, use it
                if order >= 2 and n * cf > 20:
                    with workprec(prec + 20):
                        bound = (-x).exp() / x ** order
                    if bound < small:
                        s += arb(a[n]) / n * arb(0, bound.upper())
                        continue
                s += arb(a[n]) / n * g_function(order, x, prec + 20)
        s += arb(0, g_tail(order, c, M).upper())
        factor = 1 + eps * (-1) ** order
        value = factor * s * arb(conductor).sqrt() / (2 * arb.pi())
        return value, M


def _overlap(a: arb, b: arb) -> bool:
    return not (a.upper() < b.lower() or b.upper() < a.lower())


def check_ecq_evidence(cert, E, report) -> bool:
    """Add the independent checks of the module docstring to ``report``; True if all pass.

    ``E`` is the curve rebuilt from the stored a-invariants (minimal model, conductor and
    bad primes by Tate's algorithm); nothing else is taken from the recount."""
    from .model import thaw

    whole = thaw(cert.to_dict())
    sp = whole["spectrum"]
    params = whole["parameters"]
    hyps = whole["hypotheses"]
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
    # -- the rank: Lambda^(r)(1)/r! by the independent series excludes 0 and meets the stored
    # coefficient; for r >= 2 the lower coefficients of r's parity are balls containing 0
    r = ar.get("value")
    cs = ar.get("central_coefficients", [])
    if r in (0, 1, 2, 3) and eps is not None:
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
                    and _overlap(st, val) and bool(ar.get("certified")) == (r <= 1))
            lows = []
            for k in range(r % 2, r, 2):
                v, _ = central_derivative(model, N, bad, eps, k, prec)
                sk = ball_of(cs[k], "central coefficient") if len(cs) == r + 1 else None
                lows.append(f"k = {k}: {v.str(5, radius=True)}")
                good = good and sk is not None and v.contains(0) and sk.contains(0) and _overlap(sk, v)
            what = ("Lambda(1) = (sqrt N/2 pi) L(E, 1)" if r == 0 else
                    "Lambda'(1)" if r == 1 else f"Lambda^({r})(1)/{r}! (rank <= {r}; the lower "
                    f"derivatives of its parity contain 0, which does not prove that they vanish)")
            ok &= report.add(f"E/Q evidence: rank {'' if r <= 1 else '<= '}{r} re-proved: {what} by the "
                             f"series over the counted a_n ({M} terms) excludes 0 and meets the stored "
                             "value", good,
                             f"stored {st.str(8) if st is not None else None}, re-derived {val.str(8)}, "
                             f"root number {eps}; lower: {'; '.join(lows) or 'none'}")
    # -- every evidence item: a known kind, exactly its fields, the sentence generated from them
    from .ecq_items import sentence

    def problem(e) -> str:
        if not isinstance(e, dict) or set(e) != {"kind", "text", "data"}:
            return f"fields {sorted(e) if isinstance(e, dict) else type(e).__name__}"
        try:
            text = sentence(e["kind"], e["data"])
        except (ValueError, TypeError, KeyError, BadInput) as exc:
            return str(exc)[:100]
        return "" if e["text"] == text else "the sentence is not the one generated from its data"

    wrong = [f"{h.get('name')} item {i + 1}: {problem(e)}" for h in hyps
             for i, e in enumerate(h.get("evidence", [])) if problem(e)]
    ok &= report.add("E/Q evidence: every hypothesis's evidence item has a known kind, exactly the "
                     "fields of that kind and the sentence generated from them", not wrong,
                     "; ".join(wrong[:3]))
    # -- the independent items (spectrum.evidence) re-derived here and compared field by field
    from ..ecrace import RANK3_REFERENCE, RANK3_THEOREM_MODEL
    from .ecq_items import independent_items

    stored = sp.get("evidence")
    published = RANK3_REFERENCE if (r == 3 and model == RANK3_THEOREM_MODEL) else ""
    try:
        fresh = independent_items(model, N, bad, eps, r if r in (0, 1, 2, 3) else None,
                                  stored_local, published)
        diffs = _item_differences(stored, fresh, problem)
    except CertifyError as exc:
        diffs = [str(exc)[:120]]
    ok &= report.add("E/Q evidence: the independent items (a_p table, the bound |a_p| <= 2 sqrt p, "
                     "reduction types, root number, rank proof) re-derived field by field, each sentence "
                     "generated from its fields", not diffs, "; ".join(diffs[:3]))
    # -- the zero-count evidence states the stored zeros and heights
    grh = [h for h in hyps if h.get("name") == "GRH"]
    items = [e for e in grh[0]["evidence"] if isinstance(e, dict)] if len(grh) == 1 else []
    zeros = [ball_of(z) for z in sp["zeros"]]
    H = float(sp["isolation_height"])
    first = items[0] if items else {}
    fd = first.get("data") if isinstance(first.get("data"), dict) else {}
    good = (first.get("kind") == "zeros-on-line" and fd.get("zeros") == len(zeros)
            and fd.get("height") == f"{H:g}")
    ok &= report.add("E/Q evidence: the zeros-on-the-line item states the stored zero list "
                     "and isolation height", good, f"stored data {str(fd)[:80]}, "
                     f"{len(zeros)} zeros stored to height {H:g}")
    res = [e for e in items if e.get("kind") in ("residual-sums", "residual-sums-moments-only")]
    rs = sp["residual_sums"]
    want = {"l_function": f"L(E, s), conductor {N}", "moments": len(rs), "height": f"{H:g}",
            "first": ball_of(rs[0]).str(6) if rs else None}
    if res and res[0]["kind"] == "residual-sums-moments-only":
        want.pop("height")  # nothing isolated: no height (and then no zero may be stored)
        want["zeros"] = len(zeros) == 0
    good = len(res) == 1 and all((res[0]["data"].get(k) == v) if k != "zeros" else v
                                 for k, v in want.items())
    ok &= report.add("E/Q evidence: the residual-sums item states the stored residual sums, "
                     "conductor and height", good, f"stored {str(res[0]['data'] if res else None)[:100]}")
    rn = [e for e in items if e.get("kind") == "root-number"]
    good = len(rn) == 1 and rn[0]["data"].get("value") == ar.get("root_number")
    ok &= report.add("E/Q evidence: the root-number item states the stored root number", good,
                     f"stored {str(rn[0]['data'] if rn else None)[:80]}")
    counts = [e for e in items if str(e.get("kind", "")).startswith("zero-count")]
    gh = float(params.get("grh_height", 0.0))
    if gh > 0 or counts:
        good = len(counts) == 1 and gh > 0
        if good and counts[0]["kind"] == "zero-count":
            d = counts[0]["data"]
            try:
                T = float(d["height"])
            except (TypeError, ValueError):
                T = float("nan")
            found = sum(1 for z in zeros if float(z.mid()) < T)
            good = gh * (1 - 1e-5) <= T <= gh + 0.21 and d.get("zeros") == found
        # a count that failed says so (zero-count-failed or -mismatch); the recount must agree
        ok &= report.add("E/Q evidence: one zero-count item, at the stored GRH height, "
                         "counting the stored zeros below it", good,
                         f"grh_height {gh:g}; items {[c.get('kind') for c in counts][:2]}")
    none = [e for e in items if e.get("kind") == "no-zero-count"]
    ok &= report.add("E/Q evidence: the no-count caveat exactly when no zero count was asked for",
                     (len(none) == 1) == (gh == 0 and not counts) and len(none) <= 1,
                     f"{len(none)} caveat(s), grh_height {gh:g}")
    return bool(ok)


def _is_ball(x) -> bool:
    return isinstance(x, dict) and set(x) == {"mid", "rad"}


def _same(stored, fresh) -> bool:
    """Equal, except balls: they must meet and the stored one be at most four times as wide."""
    from fractions import Fraction

    if _is_ball(fresh):
        if not _is_ball(stored):
            return False
        sb, fb = ball_of(stored, "evidence ball"), ball_of(fresh, "evidence ball")
        return _overlap(sb, fb) and Fraction(stored["rad"]) <= 4 * Fraction(fresh["rad"]) + Fraction(1, 2**200)
    if isinstance(fresh, dict):
        return isinstance(stored, dict) and list(stored) == list(fresh) and all(
            _same(stored[k], fresh[k]) for k in fresh)
    if isinstance(fresh, list):
        return isinstance(stored, list) and len(stored) == len(fresh) and all(
            _same(a, b) for a, b in zip(stored, fresh))
    return type(stored) is type(fresh) and stored == fresh


def _item_differences(stored, fresh: list, problem) -> list:
    if not isinstance(stored, list):
        return ["spectrum.evidence is missing or not a list"]
    kinds = [e.get("kind") if isinstance(e, dict) else None for e in stored]
    want = [e["kind"] for e in fresh]
    if kinds != want:
        return [f"stored items {kinds}, re-derived {want}"]
    out = []
    for s, f in zip(stored, fresh):
        p = problem(s)
        if p:
            out.append(f"{f['kind']}: {p}")
        elif not _same(s["data"], f["data"]):
            out.append(f"{f['kind']}: stored data {str(s['data'])[:80]} differ from the re-derived "
                       f"{str(f['data'])[:80]}")
    return out
