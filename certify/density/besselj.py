"""Facts about J_0 used by the density engine, each checked in interval arithmetic.

* Rayleigh sums sigma_k = sum_n j_{0,n}^(-2k): exact rationals, from
  log J_0(x) = -sum_k sigma_k x^(2k) / k  (|x| < j_{0,1}).
* An enclosure of j_{0,1}, the first positive zero of J_0, certified by a sign
  change of J_0 (that no zero of J_0 lies in (0, 2.4048) is classical:
  A Treatise on the Theory of Bessel Functions, Cambridge University Press 1944, section 15.3).
* For k >= 2, sigma_k j_{0,1}^(2k) = 1 + sum_{n >= 2} (j_{0,1}/j_{0,n})^(2k)
  decreases in k, so sigma_k <= C j_{0,1}^(-2k) with C = sigma_2 j_{0,1}^4.
* |J_0(x)| <= sqrt(2 / (pi x)) for x > 0, because x (J_0^2 + Y_0^2)(x)
  increases to 2/pi (A Treatise on the Theory of Bessel Functions, 1944, section 13.74).
"""

from __future__ import annotations

from fractions import Fraction
from functools import lru_cache
from math import factorial

from ..arith import arb, workprec
from ..errors import PrecisionExhausted


_SIGMA: list[Fraction] = []
_J0_COEFFS: list[Fraction] = []
_LOG_COEFFS: list[Fraction] = [Fraction(0)]


def _extend_sigma(count: int) -> None:
    """Extend the exact table of sigma_k to k = count.

    With J_0(x) = sum_j a_j z^j, z = x^2, a_j = (-1)^j / (4^j j!^2), and
    g = log J_0 = sum g_k z^k: J g' = J' gives k g_k = k a_k - sum_{i<k} i g_i a_{k-i};
    then sigma_k = -k g_k.
    """
    while len(_J0_COEFFS) <= count:
        j = len(_J0_COEFFS)
        _J0_COEFFS.append(Fraction((-1) ** j, 4**j * factorial(j) ** 2))
    a, g = _J0_COEFFS, _LOG_COEFFS
    while len(g) <= count:
        k = len(g)
        s = k * a[k]
        for i in range(1, k):
            s -= i * g[i] * a[k - i]
        g.append(s / k)
        _SIGMA.append(-k * g[k])


def rayleigh_sigma(k: int) -> Fraction:
    """sigma_k = sum_n j_{0,n}^(-2k), exactly (k >= 1)."""
    if k < 1:
        raise ValueError("k >= 1")
    if k > len(_SIGMA):
        _extend_sigma(k)
    return _SIGMA[k - 1]


J01_LO = Fraction(24048255576, 10**10)
J01_HI = Fraction(24048255577, 10**10)


@lru_cache(maxsize=1)
def check_j01() -> tuple[Fraction, Fraction]:
    """Certify J_0(J01_LO) > 0 > J_0(J01_HI); returns the bracket of j_{0,1}."""
    with workprec(128):
        lo = arb(J01_LO.numerator) / J01_LO.denominator
        hi = arb(J01_HI.numerator) / J01_HI.denominator
        if not (lo.bessel_j(0) > 0 and hi.bessel_j(0) < 0):
            raise PrecisionExhausted("not certified: the enclosure of j_{0,1} failed")
    return J01_LO, J01_HI


def tail_constant() -> Fraction:
    """C >= sigma_k j_{0,1}^(2k) for every k >= 2 (rational upper bound)."""
    _, hi = check_j01()
    return rayleigh_sigma(2) * hi**4
