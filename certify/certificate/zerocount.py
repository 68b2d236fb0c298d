"""Counting zeros in the critical strip by the argument principle (GRH to a height).

For a primitive character chi mod q of parity kappa, the completed function
Lambda(s) = (q/pi)^((s+kappa)/2) Gamma((s+kappa)/2) L(s, chi) is entire, its zeros
are the non-trivial zeros of L, and Lambda(1 - conj s, chi) = conj(Lambda(s, chi)/eps)
with |eps| = 1.  Reflecting the left half of the rectangle
[-1, 2] x [0, T] onto the right half gives (docs/certificates.md)

    N(T) = #{rho : 0 < gamma < T} = (1/pi) Delta_C arg Lambda(s),
    C : 1/2 -> 2 -> 2 + iT -> 1/2 + iT,

when Lambda has no zero on C.  Along C:

* the factors (q/pi)^(...) and Gamma(...) have continuous logarithms
  ((s + kappa)/2 stays in Re > 0), so their argument change is the change of
  Im((s+kappa)/2 log(q/pi)) + Im log Gamma((s+kappa)/2) between the ends;
* on the edge Re s = 2, |L - 1| <= zeta(2) - 1 < 0.65, so Re L > 0 and
  the argument change is the difference of principal arguments;
* on the two horizontal edges the change is summed over pieces whose image
  (an Arb box of L over the piece) excludes 0: a convex set missing 0 lies in an
  open half-plane, so on each piece the change is the principal argument of
  L(end) / L(start).  Pieces are halved until that holds.

For zeta (conductor 1) Lambda has poles at s = 0 and 1; the count uses the entire
xi(s) = s(s-1)/2 Lambda(s) instead (docs/method.md, section 2b): xi is real and
positive on the real segment [1/2, 2], so the bottom edge adds nothing, and the
factor s(s-1) adds exactly pi along 2 -> 2 + iT -> 1/2 + iT (arg s goes from 0
to arctan 2T, arg(s-1) from 0 to pi - arctan 2T, both continuously in the
closed upper half-plane).

If N(T) equals the number of zeros found on the critical line below T (each a
sign change of Z, in disjoint intervals), every zero with 0 < gamma < T lies on
the critical line and is simple: GRH holds for L(s, chi) up to height T.
"""

from __future__ import annotations

import math
from fractions import Fraction

from flint import dirichlet_char

from ..arith import acb, arb, workprec
from ..errors import PrecisionExhausted

RIGHT_EDGE = Fraction(2)

# Arb's L(s, chi) on the boxes of the contour costs ~ q per box (Hurwitz sums): above
# this conductor the count uses the smoothed functional equation instead (cost ~ sqrt q
# per disc, :mod:`zerocount_afe`, docs/method.md section 3e); where that fails too the
# certificate records the evidence as not established (GRH stays a hypothesis either way;
# the residual power sums still check that no zero is missing, docs/method.md section 2)
MAX_COUNT_CONDUCTOR = 3000
# from this conductor a request of at most SMOOTHED_MAX_LABELS characters of one conductor
# is counted by the smoothed sum, one character at a time, also below MAX_COUNT_CONDUCTOR
# (measured, bench/bench_zerocount_afe.py: one real character of conductor ~1000 takes
# ~0.3 s there against 3-20 s by Arb's boxes; many characters of one conductor share
# Arb's batched boxes instead)
SMOOTHED_MIN_CONDUCTOR = 300
SMOOTHED_MAX_LABELS = 4


def counted_by_smoothed_sum(conductor: int, labels: int) -> bool:
    """Whether :func:`zero_counts` counts ``labels`` characters of this conductor by the
    smoothed sum (else by Arb's L on boxes)."""
    return conductor > MAX_COUNT_CONDUCTOR or (
        conductor >= SMOOTHED_MIN_CONDUCTOR and labels <= SMOOTHED_MAX_LABELS)


def _q(x: Fraction) -> arb:
    return arb(x.numerator) / x.denominator


class _NearOne:
    """Enclosures of L(s, chi) on boxes around s = 1, where Arb's formula has a removable pole.

    L is entire (chi non-principal).  With M >= |L| on the circle |s - 1| = R
    (covered by boxes that avoid s = 1) and the Taylor coefficients c_k at 1,
    for |h| <= r < R:  |L(1 + h) - sum_{k<K} c_k h^k| <= M (r/R)^K / (1 - r/R)
    (Cauchy's estimate |c_k| <= M / R^k).
    """

    R = Fraction(1)
    K = 40

    def __init__(self, chi):
        from flint import acb_series

        from ..arith import series_cap

        R = _q(self.R)
        m = 24
        chord = 2 * R * (arb.pi() / m).sin()
        M = arb(0)
        for j in range(m):
            w = (acb(2 * j) / m).exp_pi_i() * R + 1  # (acb.exp_pi_i on an arb crashes python-flint)
            box = acb(arb(w.real.mid(), chord.upper()), arb(w.imag.mid(), chord.upper()))
            M = max(M, arb(abs(chi.l(box)).upper()), key=lambda x: float(x.upper()))
        self.M = arb(M.upper())
        with series_cap(self.K):
            ser = acb_series.dirichlet_l(acb_series([acb(1), acb(1)]), chi)
            self.c = [ser.coeffs()[k] if k < len(ser.coeffs()) else acb(0) for k in range(self.K)]

    def box(self, h: acb) -> acb | None:
        """An enclosure of L(1 + h) over the box h, or None if h is too wide."""
        r = abs(h).upper()
        ratio = arb(r) / _q(self.R)
        if not (ratio < arb(1) / 2):
            return None  # also when h is far from 0: the caller evaluates L directly
        v = acb(0)
        for c in reversed(self.c):
            v = v * h + c
        err = self.M * ratio ** self.K / (1 - ratio)
        return v + acb(arb(0, err.upper()), arb(0, err.upper()))


def _l_box(chi, near_one, z: acb) -> acb:
    """L(s, chi) over the box z; through the series at 1 when z is close to s = 1.

    (Near s = 1 Arb's formula, a sum of Hurwitz zeta values with poles that
    cancel, gives wide boxes; the Taylor series does not.)
    """
    if near_one is not None:
        v = near_one.box(z - 1)
        if v is not None:
            return v
    return chi.l(z)


def _horizontal_arg_change(chi, t: Fraction, x0: Fraction, x1: Fraction, max_pieces: int) -> arb:
    """Continuous change of arg L(x + i t) for x from x0 to x1 (t exact)."""
    T = _q(t)
    near_one = _NearOne(chi) if t == 0 and min(x0, x1) <= 1 <= max(x0, x1) else None

    def point(x: Fraction) -> acb:
        return _l_box(chi, near_one, acb(_q(x), T))

    total = arb(0)
    # an initial partition finer near the critical line, where L turns fastest
    lo, hi = min(x0, x1), max(x0, x1)
    cuts = [lo + (hi - lo) * Fraction(k, 16) for k in (0, 1, 2, 3, 4, 6, 8, 12, 16)]
    if x0 > x1:
        cuts.reverse()
    values = [point(x) for x in cuts]
    stack = [(cuts[i], cuts[i + 1], values[i], values[i + 1]) for i in range(len(cuts) - 1)][::-1]
    pieces = 0
    _horizontal_arg_change.pieces = 0
    # process left to right so the pieces tile [x0, x1] in order (order is irrelevant to the sum)
    while stack:
        a, b, fa, fb = stack.pop()
        mid, rad = (a + b) / 2, abs(b - a) / 2
        box = _l_box(chi, near_one, acb(arb(_q(mid), _q(rad)), T))
        if not box.contains(0) and not fa.contains(0) and not fb.contains(0):
            ratio = fb / fa
            if ratio.real > 0 or not (ratio.imag.contains(0)):
                total += ratio.arg()
                pieces += 1
                continue
        if pieces + len(stack) > max_pieces or rad < Fraction(1, 2**40):
            raise PrecisionExhausted(
                f"not certified: L(s, chi) is too close to 0 near {float(mid):.6g} + {float(t):.6g}i "
                "for the argument count")
        m = point(mid)
        stack.append((mid, b, m, fb))
        stack.append((a, mid, fa, m))
    _horizontal_arg_change.pieces = pieces
    return total


def count_height(zero_ends: list) -> Fraction:
    """The counting height for sorted zero enclosures [(lo, hi), ...]: midway between the last two."""
    return (zero_ends[-2][1] + zero_ends[-1][0]) / 2


def count_zeros(conductor: int, label: int, parity: int, height: Fraction, prec: int = 64,
                max_pieces: int = 20000) -> tuple[int, int]:
    """(N, pieces): the number of zeros of L(s, chi) with 0 < gamma < height, rigorously.

    ``pieces`` is the number of pieces of the horizontal edges.

    Raises PrecisionExhausted if a zero lies on the path or the count is not
    an integer to within the enclosure.
    """
    chi = dirichlet_char(conductor, label)
    with workprec(prec):
        T = _q(height)
        a = Fraction(1, 2)
        # bottom edge 1/2 -> 2 and top edge 2 + iT -> 1/2 + iT
        if conductor == 1:
            # xi > 0 on [1/2, 2]: no change on the bottom edge; s(s-1) adds pi on the rest
            d_bottom = arb.pi()
            pieces = 0
        else:
            d_bottom = _horizontal_arg_change(chi, Fraction(0), a, RIGHT_EDGE, max_pieces)
            pieces = _horizontal_arg_change.pieces
        d_top = _horizontal_arg_change(chi, height, RIGHT_EDGE, a, max_pieces)
        pieces += _horizontal_arg_change.pieces
        # right edge: Re L > 0 there, principal arguments
        l0 = chi.l(acb(_q(RIGHT_EDGE), 0))
        l1 = chi.l(acb(_q(RIGHT_EDGE), T))
        if not (l0.real > 0 and l1.real > 0):  # guaranteed by |L - 1| < 0.65; checked anyway
            raise PrecisionExhausted("not certified: Re L(2 + it) > 0 failed")
        d_right = l1.arg() - l0.arg()
        # gamma and exponential factors between s = 1/2 and s = 1/2 + iT
        k = arb(parity)
        s0 = acb(arb(1) / 2 + k, 0) / 2
        s1 = acb(arb(1) / 2 + k, T) / 2
        d_gamma = s1.lgamma().imag - s0.lgamma().imag
        d_exp = T / 2 * (arb(conductor) / arb.pi()).log()
        total = (d_bottom + d_right + d_top + d_gamma + d_exp) / arb.pi()
        n = round(float(total.mid()))
        if not (abs(total - n) < arb(1) / 4):
            raise PrecisionExhausted(f"not certified: the argument count {total.str(8)} is not "
                                     "an integer within its enclosure")
    return n, pieces


# --- every character of a conductor at once (docs/method.md, section 2c) -------------------
# L(s, chi) = q^(-s) sum_a chi(a) zeta(s, a/q): one Hurwitz value per reduced class and one
# DFT over the character group give L(s, chi) for every chi mod q at the point (or box) s.
# The argument count then walks each edge once for all characters that share it: the bottom
# edge (t = 0) is common to every character of the conductor, a top edge to every character
# counted to the same height (the isolation heights lie on the conductor's common grid).
# A piece is accepted or halved per character exactly as in :func:`_horizontal_arg_change`;
# the halves are evaluated once for all characters still active on them.

class _Batch:
    """L(s, chi) for the given labels mod q on a point or a box, all at once."""

    def __init__(self, conductor: int, labels):
        from flint import dirichlet_group

        from ..spectrum.moments import _group_axes

        q = conductor
        self.q = q
        self.axes, logs = _group_axes(q)
        orders = [n for _, n in self.axes]
        self.size = 1
        for n in orders:
            self.size *= n
        self.index = {}
        for a, vec in logs.items():
            idx = 0
            for l, n in zip(vec, orders):
                idx = idx * n + l
            self.index[a] = idx
        expo = int(dirichlet_group(q).exponent())
        self.where = {}
        for n in labels:
            chi = dirichlet_char(q, n)
            idx = 0
            for (gen, order) in self.axes:
                m = int(chi.chi_exponent(gen)) * order // expo
                idx = idx * order + (-m) % order
            self.where[n] = idx
        self.evaluations = 0

    def at(self, z: acb) -> dict:
        """{label: enclosure of L(z, chi)} (z a point or a box; nan where z meets s = 1)."""
        from ..spectrum.moments import _group_dft

        q = self.q
        v = [acb(0)] * self.size
        for a, idx in self.index.items():
            v[idx] = z.zeta(acb(a) / q)
        tr = _group_dft([v], self.axes)[0]
        qs = (-z * arb(q).log()).exp()
        self.evaluations += 1
        return {n: qs * tr[idx] for n, idx in self.where.items()}

    def segment(self, m: acb, r: arb, labels, order: int = 3) -> dict:
        """{label: box containing L(m + h, chi) for every real h with |h| <= r} (m exact).

        Taylor's formula at the exact point m to the order ``order`` - 1 with the
        remainder h^order L^(order)(B)/order! (integral form: the remainder lies in the
        convex box of L^(order)(B)/order!, B the segment as a box).  Arb's Hurwitz zeta
        on a box is wide; multiplied by r^order it is not, so pieces can be long.
        """
        from flint import acb_series

        from ..arith import series_cap
        from ..spectrum.moments import _group_dft

        q = self.q
        B = m + acb(arb(0, r.upper()), 0)
        pt = [[acb(0)] * self.size for _ in range(order)]
        bx = [[acb(0)] * self.size for _ in range(order + 1)]
        with series_cap(order):
            for a, idx in self.index.items():
                cs = acb_series.zeta(acb_series([m, 1]), acb(a) / q).coeffs()
                for k in range(min(order, len(cs))):
                    pt[k][idx] = cs[k]
        with series_cap(order + 1):
            for a, idx in self.index.items():
                cs = acb_series.zeta(acb_series([B, 1]), acb(a) / q).coeffs()
                for k in range(min(order + 1, len(cs))):
                    bx[k][idx] = cs[k]
        tp = _group_dft(pt, self.axes)
        tb = _group_dft(bx, self.axes)
        self.evaluations += 1
        lq = arb(q).log()
        H = arb(0, r.upper())
        out = {}
        with series_cap(order + 1):
            em = acb_series([acb(0), acb(-lq)]).exp()
            qm = (-m * lq).exp()
            qb = (-B * lq).exp()
            for n in labels:
                idx = self.where[n]
                pm = (em * acb_series([tp[k][idx] for k in range(order)])).coeffs()
                pb = (em * acb_series([tb[k][idx] for k in range(order + 1)])).coeffs()
                pm = [qm * (pm[k] if k < len(pm) else acb(0)) for k in range(order)]
                rem = qb * (pb[order] if order < len(pb) else acb(0))
                v = rem
                for c in reversed(pm):
                    v = v * H + c
                out[n] = (v, pm[0])
        return out


class _BatchNearOne:
    """:class:`_NearOne` for every label at once: Taylor coefficients of L(1 + h, chi) from one
    deflated Hurwitz jet per class (sum_a chi(a) = 0 cancels the poles) and a DFT, and the
    Cauchy bound M_chi >= |L| on |s - 1| = R from boxes evaluated for all characters."""

    R = _NearOne.R
    K = _NearOne.K

    def __init__(self, batch: _Batch):
        from flint import acb_series

        from ..arith import series_cap
        from ..spectrum.moments import _group_dft

        q = batch.q
        R = _q(self.R)
        m = 24
        chord = 2 * R * (arb.pi() / m).sin()
        M = {n: arb(0) for n in batch.where}
        for j in range(m):
            w = (acb(2 * j) / m).exp_pi_i() * R + 1
            box = acb(arb(w.real.mid(), chord.upper()), arb(w.imag.mid(), chord.upper()))
            for n, v in batch.at(box).items():
                M[n] = max(M[n], arb(abs(v).upper()), key=lambda x: float(x.upper()))
        self.M = {n: arb(v.upper()) for n, v in M.items()}
        K = self.K
        with series_cap(K):
            x = acb_series([acb(1), acb(1)])
            flat = [[acb(0)] * batch.size for _ in range(K)]
            for a, idx in batch.index.items():
                cs = acb_series.zeta(x, acb(a) / q, deflate=1).coeffs()
                for k in range(min(K, len(cs))):
                    flat[k][idx] = cs[k]
            tr = _group_dft(flat, batch.axes)
            # q^(-(1 + h)) = q^(-1) exp(-h log q)
            qfac = acb_series([acb(0), acb(-arb(q).log())]).exp() / q
            self.c = {}
            for n, idx in batch.where.items():
                ser = (qfac * acb_series([tr[k][idx] for k in range(K)])).coeffs()
                self.c[n] = [ser[k] if k < len(ser) else acb(0) for k in range(K)]

    def box(self, h: acb, labels) -> dict | None:
        r = abs(h).upper()
        ratio = arb(r) / _q(self.R)
        if not (ratio < arb(1) / 2):
            return None
        out = {}
        for n in labels:
            v = acb(0)
            for c in reversed(self.c[n]):
                v = v * h + c
            err = self.M[n] * ratio ** self.K / (1 - ratio)
            out[n] = v + acb(arb(0, err.upper()), arb(0, err.upper()))
        return out


def _batch_values(batch: _Batch, near_one, z: acb, labels) -> dict:
    if near_one is not None:
        v = near_one.box(z - 1, labels)
        if v is not None:
            return v
    vals = batch.at(z)
    return {n: vals[n] for n in labels}


def _batch_horizontal(batch: _Batch, near_one, labels, t: Fraction, x0: Fraction, x1: Fraction,
                      max_pieces: int) -> tuple[dict, set]:
    """({label: continuous change of arg L(x + i t)}, labels that failed) for x from x0 to x1."""
    T = _q(t)

    def point(x: Fraction) -> dict:
        return _batch_values(batch, near_one, acb(_q(x), T), labels)

    total = {n: arb(0) for n in labels}
    failed: set = set()
    lo, hi = min(x0, x1), max(x0, x1)
    cuts = [lo + (hi - lo) * Fraction(k, 16) for k in (0, 1, 2, 3, 4, 6, 8, 12, 16)]
    if x0 > x1:
        cuts.reverse()
    values = [point(x) for x in cuts]
    stack = [(cuts[i], cuts[i + 1], values[i], values[i + 1], tuple(labels))
             for i in range(len(cuts) - 1)][::-1]
    pieces = 0
    while stack:
        a, b, fa, fb, active = stack.pop()
        active = tuple(n for n in active if n not in failed)
        if not active:
            continue
        mid, rad = (a + b) / 2, abs(b - a) / 2
        mval = None
        boxes = near_one.box(acb(arb(_q(mid), _q(rad)), T) - 1, active) if near_one else None
        if boxes is None:
            seg = batch.segment(acb(_q(mid), T), _q(rad), active)
            boxes = {n: v for n, (v, _) in seg.items()}
            mval = {n: c for n, (_, c) in seg.items()}
        still = []
        for n in active:
            box, va, vb = boxes[n], fa[n], fb[n]
            if not box.contains(0) and not va.contains(0) and not vb.contains(0):
                ratio = vb / va
                if ratio.real > 0 or not (ratio.imag.contains(0)):
                    total[n] += ratio.arg()
                    pieces += 1
                    continue
            still.append(n)
        if not still:
            continue
        if pieces + len(stack) > max_pieces * len(labels) or rad < Fraction(1, 2**40):
            failed.update(still)
            continue
        m = ({n: mval[n] for n in still} if mval is not None
             else _batch_values(batch, near_one, acb(_q(mid), T), still))
        fm = {**fa, **m}
        stack.append((mid, b, fm, fb, tuple(still)))
        stack.append((a, mid, fa, fm, tuple(still)))
    return total, failed


_BOTTOM: dict = {}  # (conductor, prec, max_pieces) -> (labels, d_bottom, failed, l0), per process
_BOTTOM_ALL_MAX = 400  # conductors up to this get the bottom edge of every primitive label at once


def _bottom_edge(conductor: int, labels, prec: int, max_pieces: int, memo: bool = False):
    """({label: change of arg L(x, chi) for x from 1/2 to RIGHT_EDGE}, failed labels,
    {label: L(RIGHT_EDGE, chi)}) at the current precision.

    The bottom edge (t = 0) is the same for every height, and its cost is that of the
    conductor (one Hurwitz value per class per point), not of the number of labels: it is
    walked once per process for every primitive character of the conductor (small
    conductors) and memoised, so the many counts of a table (one call per certificate)
    do not walk it again.  The memo holds the result of the same deterministic proof;
    without ``memo`` (verify, which recounts on its own) the edge is walked afresh."""
    if not memo:
        batch = _Batch(conductor, labels)
        d_bottom, failed = _batch_horizontal(batch, _BatchNearOne(batch), labels, Fraction(0),
                                             Fraction(1, 2), RIGHT_EDGE, max_pieces)
        return d_bottom, failed, batch.at(acb(_q(RIGHT_EDGE), 0))
    key = (conductor, prec, max_pieces)
    got = _BOTTOM.get(key)
    if got is not None and set(labels) <= got[0]:
        return got[1], set(got[2]), got[3]
    every = set(labels)
    if conductor <= _BOTTOM_ALL_MAX:
        every |= {n for n in range(1, conductor)
                  if math.gcd(n, conductor) == 1 and dirichlet_char(conductor, n).is_primitive()}
    every = sorted(every)
    batch = _Batch(conductor, every)
    d_bottom, failed = _batch_horizontal(batch, _BatchNearOne(batch), every, Fraction(0),
                                         Fraction(1, 2), RIGHT_EDGE, max_pieces)
    l0 = batch.at(acb(_q(RIGHT_EDGE), 0))
    _BOTTOM[key] = (frozenset(every), d_bottom, frozenset(failed), l0)
    return d_bottom, set(failed), l0


def count_zeros_many(conductor: int, requests: dict, prec: int = 64,
                     max_pieces: int = 20000, memo: bool = False) -> dict:
    """{label: N or None} for ``requests`` = {label: (parity, height)}, all characters mod
    ``conductor`` at once; N = #{rho of L(s, chi): 0 < gamma < height}, rigorously (as
    :func:`count_zeros`), None where this precision did not establish it.

    A height of 0 counts nothing (N = 0, no contour).  Characters counted to the same
    height share the evaluations of their top edge, all share the bottom edge.
    """
    # a height of 0 counts nothing; a negative height is no height (not established)
    out = {n: (0 if Fraction(h) == 0 else None)
           for n, (_, h) in requests.items() if Fraction(h) <= 0}
    todo = {n: (p, Fraction(h)) for n, (p, h) in requests.items() if Fraction(h) > 0}
    if not todo:
        return out
    if conductor == 1:
        for n, (p, h) in todo.items():
            try:
                out[n] = count_zeros(conductor, n, p, h, prec=prec, max_pieces=max_pieces)[0]
            except PrecisionExhausted:
                out[n] = None
        return out
    labels = sorted(todo)
    with workprec(prec):
        batch = _Batch(conductor, labels)
        a = Fraction(1, 2)
        d_bottom, failed, l0 = _bottom_edge(conductor, labels, prec, max_pieces, memo)
        failed &= set(labels)
        by_height: dict = {}
        for n in labels:
            by_height.setdefault(todo[n][1], []).append(n)
        for T_exact, group in sorted(by_height.items()):
            group = [n for n in group if n not in failed]
            if not group:
                continue
            d_top, bad = _batch_horizontal(batch, None, group, T_exact, RIGHT_EDGE, a, max_pieces)
            failed |= bad
            T = _q(T_exact)
            l1 = batch.at(acb(_q(RIGHT_EDGE), T))
            d_exp = T / 2 * (arb(conductor) / arb.pi()).log()
            for n in group:
                if n in failed:
                    continue
                if not (l0[n].real > 0 and l1[n].real > 0):
                    failed.add(n)
                    continue
                d_right = l1[n].arg() - l0[n].arg()
                k = arb(todo[n][0])
                s0 = acb(arb(1) / 2 + k, 0) / 2
                s1 = acb(arb(1) / 2 + k, T) / 2
                d_gamma = s1.lgamma().imag - s0.lgamma().imag
                total = (d_bottom[n] + d_right + d_top[n] + d_gamma + d_exp) / arb.pi()
                N = round(float(total.mid()))
                out[n] = N if abs(total - N) < arb(1) / 4 else None
        for n in failed:
            out[n] = None
    return out


def count_zeros_batched(conductor: int, requests: dict, memo: bool = False) -> dict:
    """{label: N or None}: :func:`count_zeros_many` at 64, 128 and 256 bits, then, for any
    character still undecided, :func:`count_zeros` one character at a time (same precisions)."""
    out = {n: None for n, (_, h) in requests.items() if Fraction(h) < 0}
    left = {n: v for n, v in requests.items() if Fraction(v[1]) >= 0}
    for prec in (64, 128, 256):
        if not left:
            break
        got = count_zeros_many(conductor, left, prec=prec, memo=memo)
        for n, N in got.items():
            if N is not None:
                out[n] = N
                del left[n]
    for n, (p, h) in left.items():
        out[n] = None
        for prec in (64, 128, 256):
            try:
                out[n] = count_zeros(conductor, n, p, Fraction(h), prec=prec)[0]
                break
            except PrecisionExhausted:
                continue
    return out


def zero_counts(requests, memo: bool = False) -> dict:
    """{(conductor, label): N or None} for ``requests`` = [(conductor, label, parity, height)]:
    the characters of each conductor counted together (:func:`count_zeros_batched`); None
    where no precision up to 256 bits established the count.  ``memo``: reuse the bottom
    edges walked earlier in this process (:func:`_bottom_edge`; the table's certificates)."""
    by_cond: dict = {}
    for c, n, p, h in requests:
        by_cond.setdefault(int(c), {})[int(n)] = (int(p), Fraction(h))
    out = {}
    for c, req in sorted(by_cond.items()):
        if counted_by_smoothed_sum(c, len(req)):
            from .zerocount_afe import count_zeros_smoothed_retry

            # one character at a time, cost ~ sqrt(c); None (not established) where it fails
            for n, (p, h) in sorted(req.items()):
                out[(c, n)] = count_zeros_smoothed_retry(c, n, p, h)
            continue
        for n, N in count_zeros_batched(c, req, memo).items():
            out[(c, n)] = N
    return out
