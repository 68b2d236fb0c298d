"""Exact power sums of all zeros of a primitive Dirichlet L-function.

For primitive chi mod q of parity kappa, write
Lambda(s, chi) = (q/pi)^(s/2) Gamma((s+kappa)/2) L(s, chi) and
log Lambda(1 + x, chi) = sum_k c_k x^k.  Then (docs/method.md, section 2)

    S_m(chi) = sum_rho (rho (1 - rho))^(-m)
             = sum_{j=1}^{m} C(2m-j-1, m-1) * 2 (-1)^(j-1) * j * Re c_j,

the sum running over all non-trivial zeros with multiplicity.  Under GRH
rho (1 - rho) = 1/4 + gamma^2, so S_m = sum_gamma (1/4 + gamma^2)^(-m) over
all ordinates (positive and negative).

The Riemann zeta function is the character of conductor 1 (label 1, even):
there Lambda is replaced by the entire function
xi(s) = s(s-1)/2 pi^(-s/2) Gamma(s/2) zeta(s), whose zeros are exactly the
non-trivial zeros of zeta, and the same formula holds with c_k the (real)
coefficients of log xi(1 + x) (docs/method.md, section 2b).

The coefficients come from python-flint's power series of L(s, chi) (for
zeta: of the deflated series zeta(s) - 1/(s - 1)) and of log Gamma; the alternating sum loses about m * log2(m) bits, so the
working precision is raised accordingly and the output radii checked.
"""

from __future__ import annotations

import math

from flint import acb_series, dirichlet_char, dirichlet_group

from ..arith import acb, arb, series_cap, workprec
from ..errors import PrecisionExhausted
from ..source.dirichlet import factor, primitive_root
from .lfunction import AnalyticL, power_sums, zero_power_sums_of


def is_zeta(conductor: int) -> bool:
    """Whether the primitive character of this conductor is trivial (L = zeta)."""
    return conductor == 1


def log_xi_coefficients(count: int, prec: int):
    """Balls for c_1..c_count of log xi(1 + x), xi(s) = s(s-1)/2 pi^(-s/2) Gamma(s/2) zeta(s).

    With D(x) = zeta(1 + x) - 1/x (Arb's deflated zeta series),
    (s - 1) zeta(s) = 1 + x D(x), so

        log xi(1 + x) = log(1 + x D(x)) + log((1 + x)/2) - ((1 + x)/2) log pi
                        + log Gamma((1 + x)/2).
    """
    with workprec(prec), series_cap(count + 1):
        x = acb_series([acb(1), acb(1)])  # s = 1 + x
        deflated = acb_series.zeta(x, deflate=1)
        pole_free = acb_series([acb(1)]) + acb_series([acb(0), acb(1)]) * deflated
        log_z = pole_free.log()
        log_g = acb_series([acb(1) / 2, acb(1) / 2]).lgamma()
        log_pi = arb.pi().log()
        coeffs = []
        for k in range(1, count + 1):
            ck = log_z.coeffs()[k] + log_g.coeffs()[k]
            ck += acb((-1) ** (k + 1)) / k  # log(1 + x); log(1/2) is the constant term
            if k == 1:
                ck -= log_pi / 2
            coeffs.append(ck)
        return coeffs


def log_lambda_coefficients(conductor: int, label: int, parity: int, count: int, prec: int):
    """Balls for c_1..c_count of log Lambda(1 + x, chi) (chi primitive; log xi for zeta)."""
    if is_zeta(conductor):
        return ZetaL().log_lambda_jet(count, prec)
    chi = dirichlet_char(conductor, label)
    with workprec(prec), series_cap(count + 1):
        x = acb_series([acb(1), acb(1)])  # s = 1 + x
        log_l = acb_series.dirichlet_l(x, chi).log()
        half = acb_series([acb(1 + parity) / 2, acb(1) / 2])  # (s + kappa)/2
        log_g = half.lgamma()
        lin = (arb(conductor) / arb.pi()).log() / 2  # (s/2) log(q/pi): x-coefficient
        coeffs = []
        for k in range(1, count + 1):
            ck = log_l.coeffs()[k] + log_g.coeffs()[k]
            if k == 1:
                ck += lin
            coeffs.append(ck)
        return coeffs


def power_sums_from_coefficients(re_c: list[arb], count: int) -> list[arb]:
    """S_1..S_count from Re c_1..Re c_count by the binomial formula."""
    return power_sums(re_c, count)


class DirichletL(AnalyticL):
    """L(s, chi) for a primitive character, as an :class:`AnalyticL`."""

    degree = 1
    central_order = 0

    def __init__(self, conductor: int, label: int, parity: int | None = None):
        self.conductor = conductor
        self.label = label
        self.key = (conductor, label)
        self.name = f"L(s, chi_{{{conductor},{label}}})"
        self._parity = parity
        self._chi = None

    @property
    def chi(self):
        if self._chi is None:
            self._chi = dirichlet_char(self.conductor, self.label)
        return self._chi

    @property
    def parity(self) -> int:
        if self._parity is None:
            self._parity = int(self.chi.parity())
        return self._parity

    @property
    def self_dual(self) -> bool:
        return int(self.chi.order()) <= 2

    def hardy_z(self, t: arb, prec: int) -> arb:
        """Z(t, chi) by Arb (Hurwitz sums, cost ~ q), or for a large conductor a real
        function with the same signs by the smoothed sum (cost ~ sqrt q; afe.py)."""
        from .afe import AFE_MIN_CONDUCTOR, SmoothedL

        hit = _grid_lookup(self.key, t, prec)
        if hit is not None:
            return hit
        if self.conductor >= AFE_MIN_CONDUCTOR:
            if getattr(self, "_smoothed", None) is None:
                # a real primitive character has root number 1 (the quadratic Gauss sum
                # is i^kappa sqrt q), which spares the Gauss sum of cost q
                eps = acb(1) if self.self_dual else None
                self._smoothed = SmoothedL(self.conductor, self.label, self.parity,
                                           root_number=eps)
            return self._smoothed.hardy_z(t, prec)
        with workprec(prec):
            return self.chi.hardy_z(t).real

    def log_lambda_jet(self, count: int, prec: int) -> list:
        from .afe import JET_AFE_MIN_CONDUCTOR, RealJet

        if self.conductor >= JET_AFE_MIN_CONDUCTOR and self.self_dual:
            return RealJet(self.conductor, self.label, self.parity).log_lambda_jet(count, prec)
        return log_lambda_coefficients(self.conductor, self.label, self.parity, count, prec)


class ZetaL(AnalyticL):
    """The Riemann zeta function as an :class:`AnalyticL` (the character of conductor 1).

    Lambda is xi(s) = s(s-1)/2 pi^(-s/2) Gamma(s/2) zeta(s), entire of order 1
    with xi(1 - s) = xi(s) (docs/method.md, section 2b); Z(t) is Arb's Hardy
    Z-function of the trivial character mod 1, e^{i theta(t)} zeta(1/2 + i t).
    """

    name = "zeta(s)"
    key = (1, 1)
    conductor = 1
    label = 1
    parity = 0
    degree = 1
    self_dual = True
    central_order = 0

    def __init__(self):
        self._chi = None

    @property
    def chi(self):
        if self._chi is None:
            self._chi = dirichlet_char(1, 1)
        return self._chi

    def hardy_z(self, t: arb, prec: int) -> arb:
        """Z(t, chi) by Arb (Hurwitz sums, cost ~ q), or for a large conductor a real
        function with the same signs by the smoothed sum (cost ~ sqrt q; afe.py)."""
        from .afe import AFE_MIN_CONDUCTOR, SmoothedL

        hit = _grid_lookup(self.key, t, prec)
        if hit is not None:
            return hit
        if self.conductor >= AFE_MIN_CONDUCTOR:
            if getattr(self, "_smoothed", None) is None:
                self._smoothed = SmoothedL(self.conductor, self.label, self.parity)
            return self._smoothed.hardy_z(t, prec)
        with workprec(prec):
            return self.chi.hardy_z(t).real

    def log_lambda_jet(self, count: int, prec: int) -> list:
        return log_xi_coefficients(count, prec)


def analytic_l(conductor: int, label: int, parity: int | None = None) -> AnalyticL:
    """The AnalyticL of a primitive character: zeta for conductor 1, else L(s, chi)."""
    if is_zeta(conductor):
        return ZetaL()
    return DirichletL(conductor, label, parity)


def zero_power_sums(conductor: int, label: int, parity: int, count: int,
                    abs_accuracy_bits: int = 100, max_prec: int = 20000) -> list[arb]:
    """Enclosures of S_1..S_count for the primitive character chi_{conductor,label}.

    Raises precision until the radius of S_m is below 2^-abs_accuracy_bits,
    or raises PrecisionExhausted (the generic :func:`zero_power_sums_of`).
    """
    return zero_power_sums_of(analytic_l(conductor, label, parity), count,
                              abs_accuracy_bits, max_prec)


def central_value(conductor: int, label: int, prec: int = 64) -> acb:
    """An enclosure of L(1/2, chi) (zeta(1/2) for conductor 1: Arb's L of the trivial character)."""
    from .afe import JET_AFE_MIN_CONDUCTOR, SmoothedL

    chi = dirichlet_char(conductor, label)
    if conductor >= JET_AFE_MIN_CONDUCTOR and int(chi.order()) <= 2:
        # the smoothed sum (cost ~ sqrt q); root number 1 for a real primitive character
        return SmoothedL(conductor, label, int(chi.parity()),
                         root_number=acb(1)).central_value(prec)
    with workprec(prec):
        return chi.l(acb(1) / 2)


# --- every character of a conductor at once (docs/method.md, section 2c) ---------------

def _group_axes(q: int):
    """The unit group mod q as a product of cyclic axes.

    Returns (axes, logs): ``axes`` is a list of (generator mod q, order) and
    ``logs`` maps each reduced class a to its exponent vector, so that
    a = prod g_j^{l_j} mod q.  The axes are the cyclic factors of the prime
    powers of q (two for 2^e with e >= 3: -1 and 5), generators lifted by CRT.
    """
    parts = []  # (p^e, [(generator mod p^e, order)])
    for p, e in sorted(factor(q).items()):
        pe = p ** e
        if p == 2:
            if e == 1:
                continue
            gens = [(pe - 1, 2)] + ([(5, 2 ** (e - 2))] if e >= 3 else [])
        else:
            gens = [(primitive_root(p, e), pe // p * (p - 1))]
        parts.append((pe, gens))
    axes = []
    tables = []  # per prime power: dict residue -> exponent tuple (over its own gens)
    for pe, gens in parts:
        rest = q // pe
        for g, n in gens:
            # lift g mod pe to q: g mod pe, 1 mod rest
            lift = (g * rest * pow(rest, -1, pe) + pe * pow(pe, -1, rest)) % q if rest > 1 else g % q
            axes.append((lift, n))
        table = {}
        if len(gens) == 1:
            g, n = gens[0]
            x = 1
            for l in range(n):
                table[x] = (l,)
                x = x * g % pe
        else:
            (g0, n0), (g1, n1) = gens
            y = 1
            for l1 in range(n1):
                table[y] = (0, l1)
                table[(pe - y) % pe] = (1, l1)
                y = y * g1 % pe
        tables.append((pe, table))
    logs = {}
    for a in range(1, q):
        if math.gcd(a, q) != 1:
            continue
        vec = []
        for pe, table in tables:
            vec.extend(table[a % pe])
        logs[a] = tuple(vec)
    return axes, logs


def _group_dft(vectors: list, axes) -> list:
    """Multi-dimensional DFT of arrays indexed by exponent vectors (mixed radix).

    ``vectors`` is a list of flat lists in mixed-radix order (first axis
    slowest); returns transformed lists: entry k holds
    sum_l prod_j exp(-2 pi i k_j l_j / n_j) v_l.
    """
    orders = [n for _, n in axes]
    out = []
    for v in vectors:
        v = list(v)
        stride = 1
        for n in reversed(orders):
            block = stride * n
            for start in range(0, len(v), block):
                for off in range(stride):
                    idx = [start + off + stride * i for i in range(n)]
                    w = acb.dft([v[i] for i in idx]) if n > 1 else [v[idx[0]]]
                    for i, val in zip(idx, w):
                        v[i] = val
            stride = block
        out.append(v)
    return out


def conductor_jets(conductor: int, count: int, prec: int, labels=None) -> dict:
    """Taylor data at s = 1 and central values of every primitive character mod ``conductor``.

    L(s, chi) = q^{-s} sum_a chi(a) zeta(s, a/q) for chi mod q (a over reduced
    classes).  For non-principal chi the pole of zeta(s, a/q) at s = 1 cancels
    (sum_a chi(a) = 0), so the deflated Hurwitz series zeta(s, a/q) - 1/(s-1)
    may be used; one Hurwitz jet per class and one DFT over the character
    group give every L(1 + x, chi) at once (docs/method.md, section 2c).

    Returns {label: (c_1..c_count of log Lambda(1 + x, chi), L(1/2, chi))} for
    the primitive labels (all of them, or those in ``labels``).
    """
    q = conductor
    axes, logs = _group_axes(q)
    orders = [n for _, n in axes]
    size = 1
    for n in orders:
        size *= n
    with workprec(prec), series_cap(count + 1):
        x = acb_series([acb(1), acb(1)])
        flat = [[acb(0)] * size for _ in range(count + 2)]
        for a, vec in logs.items():
            idx = 0
            for l, n in zip(vec, orders):
                idx = idx * n + l
            z = acb_series.zeta(x, acb(a) / q, deflate=1).coeffs()
            z = z + [acb(0)] * (count + 1 - len(z))
            for k in range(count + 1):
                flat[k][idx] = z[k]
            flat[count + 1][idx] = acb_series.zeta(acb_series([acb(1) / 2]), acb(a) / q).coeffs()[0]
        trans = _group_dft(flat, axes)
        g = dirichlet_group(q)
        expo = int(g.exponent())
        wanted = None if labels is None else set(labels)
        out = {}
        mlog = arb(q).log()
        # q^{-(1+x)} = q^{-1} exp(-x log q)
        qfac = acb_series([acb(0), acb(-mlog)]).exp() / q
        for n in range(1, q):
            if math.gcd(n, q) != 1 or (wanted is not None and n not in wanted):
                continue
            chi = dirichlet_char(q, n)
            if not chi.is_primitive():
                continue
            idx = 0
            for (gen, order) in axes:
                m = int(chi.chi_exponent(gen)) * order // expo
                idx = idx * order + (-m) % order
            lser = qfac * acb_series([trans[k][idx] for k in range(count + 1)])
            central = trans[count + 1][idx] / arb(q).sqrt()
            out[n] = (_log_lambda_from_l(lser, q, int(chi.parity()), count), central)
        return out


def _log_lambda_from_l(l_series, conductor: int, parity: int, count: int) -> list:
    """c_1..c_count of log Lambda(1 + x) from the series L(1 + x, chi) (current precision)."""
    log_l = l_series.log()
    half = acb_series([acb(1 + parity) / 2, acb(1) / 2])
    log_g = half.lgamma()
    lin = (arb(conductor) / arb.pi()).log() / 2
    cl, cg = log_l.coeffs(), log_g.coeffs()
    out = []
    for k in range(1, count + 1):
        ck = cl[k] + cg[k]
        if k == 1:
            ck += lin
        out.append(ck)
    return out


def conductor_power_sums(conductor: int, labels, count: int, abs_accuracy_bits: int = 100,
                         max_prec: int = 20000) -> dict:
    """{label: (S_1..S_count, L(1/2, chi))} for primitive characters mod ``conductor``, batched.

    Same accuracy contract as :func:`zero_power_sums`: precision is doubled
    until every S_m of every requested label has radius below 2^-abs_accuracy_bits.
    """
    labels = sorted(set(labels))
    need = abs_accuracy_bits
    prec = need + 3 * count + 64 + int(math.log2(conductor + 1))
    while prec <= max_prec:
        with workprec(prec):
            data = conductor_jets(conductor, count, prec, labels)
            out = {}
            ok = True
            for n in labels:
                cs, cv = data[n]
                sums = power_sums_from_coefficients([c.real for c in cs], count)
                if not all(s.is_finite() and s.rad() < arb(2) ** (-need) for s in sums):
                    ok = False
                    break
                out[n] = (sums, cv)
            if ok:
                return out
        prec *= 2
    raise PrecisionExhausted(
        f"not certified: zero power sums of the characters mod {conductor} "
        f"could not be enclosed to 2^-{need} below {max_prec} bits")


# measured crossover (bench/bench_large.py, loaded machine): the batch for all characters
# of q = 61, 101, 211 costs about 3 one-character computations, so batching pays from
# about 4 characters of one conductor.
BATCH_MIN_CHARACTERS = 4


def prefer_batch(conductor: int, wanted: int) -> bool:
    """Whether to compute ``wanted`` characters of ``conductor`` by the batched path."""
    return conductor >= 3 and wanted >= BATCH_MIN_CHARACTERS


# --- Hardy Z of every character of a conductor on a common grid (docs/method.md, 3c) ----------

_GRID: dict = {}  # (conductor, label) -> {t (float): (prec, Z ball)}
_GRID_MAX = 400000


def _grid_lookup(key, t: arb, prec: int):
    d = _GRID.get(key)
    if not d or t.rad() != 0:
        return None
    hit = d.get(float(t.mid()))
    if hit is not None and hit[0] >= prec:
        return hit[1]
    return None


def grid_points(conductor: int, height: float, fraction: float = 0.25) -> list[float]:
    """The zero-search grid from 0 (as :func:`certify.spectrum.zeros.locate` walks it)."""
    from .lfunction import mean_spacing_of

    pts = [0.0]
    a = 0.0
    while a < height:
        a = a + fraction * mean_spacing_of(conductor, 1, a)
        pts.append(a)
    return pts


def round_height_to_grid(conductor: int, height: float, fraction: float = 0.25) -> float:
    """The first grid point at or above ``height`` (0 stays 0)."""
    if height <= 0:
        return 0.0
    return grid_points(conductor, height, fraction)[-1]


def hardy_grid(conductor: int, labels, height: float, fraction: float = 0.25, prec: int = 64) -> int:
    """Z(t, chi) for every label at every grid point up to ``height``, in one pass per point.

    L(1/2 + it, chi) = q^(-s) sum_a chi(a) zeta(s, a/q) for all chi by one Hurwitz value per
    class and one DFT (section 2c); the root numbers eps = tau(chi)/(i^kappa sqrt q) by the
    DFT of e(a/q); then Z = Re(eps^(-1/2) (q/pi)^(it/2) Gamma(w)/|Gamma(w)| L), w = (1/2+it+kappa)/2
    (docs/method.md, section 3c).  Values are kept for :meth:`DirichletL.hardy_z`.
    Returns the number of grid points evaluated.
    """
    q = conductor
    labels = [n for n in labels]
    if len(_GRID) > _GRID_MAX:
        _GRID.clear()
    pts = [t for t in grid_points(q, height, fraction)
           if any(float(t) not in _GRID.get((q, n), {}) for n in labels)]
    if not pts:
        return 0
    axes, logs = _group_axes(q)
    orders = [n for _, n in axes]
    size = math.prod(orders)
    index = {}
    for a, vec in logs.items():
        idx = 0
        for l, n in zip(vec, orders):
            idx = idx * n + l
        index[a] = idx
    expo = int(dirichlet_group(q).exponent())
    where = {}
    for n in labels:
        chi = dirichlet_char(q, n)
        idx = 0
        for (gen, order) in axes:
            m = int(chi.chi_exponent(gen)) * order // expo
            idx = idx * order + (-m) % order
        where[n] = (idx, int(chi.parity()))
    p = prec + 16 + int(math.log2(q))
    with workprec(p):
        g = [acb(0)] * size
        for a, idx in index.items():
            g[idx] = acb.exp_pi_i(acb(2 * a) / q)
        tau = _group_dft([g], axes)[0]
        sq = arb(q).sqrt()
        inv_sqrt_eps = {}
        for n, (idx, par) in where.items():
            ik = acb(0, 1) if par else acb(1)
            inv_sqrt_eps[n] = 1 / (tau[idx] / (ik * sq)).sqrt()
        logq_pi = (arb(q) / arb.pi()).log()
        for t in pts:
            tt = arb(t)  # a float is an exact dyadic number
            s = acb(arb(1) / 2, tt)
            v = [acb(0)] * size
            for a, idx in index.items():
                v[idx] = s.zeta(acb(a) / q)
            Lq = _group_dft([v], axes)[0]
            qs = (-s * arb(q).log()).exp()
            rot = acb.exp_pi_i(acb(0, 0) + acb(tt * logq_pi / 2) / arb.pi())
            for n, (idx, par) in where.items():
                w = acb(arb(1) / 2 + par, tt) / 2
                gw = w.gamma()
                z = (inv_sqrt_eps[n] * rot * gw / abs(gw) * qs * Lq[idx]).real
                _GRID.setdefault((q, n), {})[float(t)] = (prec, z)
    return len(pts)
