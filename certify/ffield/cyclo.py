"""Exact arithmetic in the cyclotomic ring Z[zeta_o].

An element is an ``fmpz_poly`` in zeta reduced modulo the cyclotomic
polynomial Phi_o, so equality is equality of reduced polynomials and an
element is a rational integer exactly when its reduced form is constant.
"""

from __future__ import annotations

import functools

from flint import acb, fmpz_poly

from ..arith import arb, workprec

__all__ = ["CycloRing", "cyclo_ring"]


class CycloRing:
    """Z[zeta_o] with zeta_o = exp(2 pi i / o)."""

    def __init__(self, o: int):
        if o < 1:
            raise ValueError("order must be >= 1")
        self.o = int(o)
        self.phi = fmpz_poly.cyclotomic(self.o)
        self.zero = fmpz_poly([])
        self.one = fmpz_poly([1])

    def reduce(self, p: fmpz_poly) -> fmpz_poly:
        return p % self.phi if p.degree() >= self.phi.degree() else p

    def zeta_power(self, j: int) -> fmpz_poly:
        j %= self.o
        return self.reduce(fmpz_poly([0] * j + [1]))

    def from_counts(self, counts) -> fmpz_poly:
        """sum_j counts[j] zeta^j for j = 0 .. o-1."""
        return self.reduce(fmpz_poly([int(c) for c in counts]))

    def mul(self, a: fmpz_poly, b: fmpz_poly) -> fmpz_poly:
        return self.reduce(a * b)

    def conj(self, a: fmpz_poly) -> fmpz_poly:
        """Complex conjugate: zeta -> zeta^(-1)."""
        cs = a.coeffs()
        out = [0] * self.o
        for j, c in enumerate(cs):
            out[(-j) % self.o] += int(c)
        return self.reduce(fmpz_poly(out))

    def galois(self, a: fmpz_poly, k: int) -> fmpz_poly:
        """zeta -> zeta^k (k coprime to o)."""
        cs = a.coeffs()
        out = [0] * self.o
        for j, c in enumerate(cs):
            out[(j * k) % self.o] += int(c)
        return self.reduce(fmpz_poly(out))

    def as_integer(self, a: fmpz_poly):
        """The rational integer equal to a, or None if a is not one."""
        if a.degree() <= 0:
            return int(a.coeffs()[0]) if a.degree() == 0 else 0
        return None

    @functools.lru_cache(maxsize=None)
    def _zeta_ball(self, prec: int) -> acb:
        with workprec(prec):
            return acb(arb(2) / self.o).exp_pi_i()

    def to_acb(self, a: fmpz_poly, prec: int) -> acb:
        """An enclosure of the complex number a(zeta_o)."""
        with workprec(prec):
            z = self._zeta_ball(prec)
            s = acb(0)
            for c in reversed(a.coeffs()):
                s = s * z + acb(int(c))
            return s


@functools.lru_cache(maxsize=256)
def cyclo_ring(o: int) -> CycloRing:
    return CycloRing(o)

