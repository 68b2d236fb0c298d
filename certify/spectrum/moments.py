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

from flint import acb_series, dirichlet_char

from ..arith import acb, arb, series_cap, workprec
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
        with workprec(prec):
            return self.chi.hardy_z(t).real

    def log_lambda_jet(self, count: int, prec: int) -> list:
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
    with workprec(prec):
        return dirichlet_char(conductor, label).l(acb(1) / 2)
