"""Dirichlet L-functions of large conductor by a smoothed approximate functional equation.

For a primitive character chi mod q of parity kappa put w = (s + kappa)/2,
x_n = pi n^2 / q and

    Lambda(s, chi) = (q/pi)^w Gamma(w) L(s, chi),
    f(s, n) = n^kappa x_n^(-w) Gamma(w, x_n) = n^kappa int_1^oo e^(-x_n u) u^(w-1) du.

Splitting the Mellin integral of the theta series at 1 gives, exactly
(docs/method.md, section 3b),

    Lambda(s, chi) = sum_{n>=1} chi(n) f(s, n) + eps sum_{n>=1} conj(chi(n)) f(1 - s, n),

eps = tau(chi) / (i^kappa sqrt(q)) the root number (|eps| = 1; eps = 1 for real chi).
The terms decay like exp(-pi n^2 / q), so about sqrt(q) terms suffice: the
cost grows like the square root of the conductor, against the conductor for
the Hurwitz-zeta sum.  Truncation after N terms is bounded rigorously: for
Re w <= 1, |f(s, n)| <= n^kappa e^(-x_n) / x_n, and the ratio of consecutive
bounds is at most rho = exp(-pi (2N + 3)/q) beyond N, so the tail is at most
(N+1)^kappa e^(-x_{N+1}) / (x_{N+1} (1 - rho)), added to the ball.

On the critical line s = 1/2 + it one has f(1 - s, n) = conj f(s, n), so with
A(t) = sum chi(n) f(s, n), Lambda = A + eps conj(A) and

    Y(t) = 2 Re(eps^(-1/2) A(t)) = eps^(-1/2) Lambda(1/2 + it)

is real; Y(t) = P(t) Z(t) with P(t) = (q/pi)^((1/2+kappa)/2) |Gamma(w)| > 0 and Z
the Hardy function, so Y and Z have the same signs.
"""

from __future__ import annotations

import math

from flint import dirichlet_char

from ..arith import acb, arb, current_prec, workprec

# conductors from which the smoothed sum is used for Hardy Z (measured, bench/bench_large.py)
AFE_MIN_CONDUCTOR = 300


class SmoothedL:
    """Lambda(s, chi) and the Hardy function of a primitive character by the smoothed sum."""

    def __init__(self, conductor: int, label: int, parity: int | None = None,
                 values=None, root_number: acb | None = None):
        self.q = conductor
        self.label = label
        self._chi = None
        self.parity = parity if parity is not None else int(self.chi.parity())
        self._values = values  # callable n -> acb (chi(n)), or None
        self._vals: list = [acb(0)]
        self._vals_prec = 0
        self._eps = root_number

    @property
    def chi(self):
        if self._chi is None:
            self._chi = dirichlet_char(self.q, self.label)
        return self._chi

    def value(self, n: int) -> acb:
        # chi(n) is a ball at the precision it was computed at: a cache filled at a lower
        # precision would cap the accuracy of every later sum (refinements ask for more)
        p = current_prec()
        if p > self._vals_prec:
            self._vals, self._vals_prec = [acb(0)], p
        while len(self._vals) <= n:
            m = len(self._vals)
            self._vals.append(self._values(m) if self._values is not None else self.chi(m))
        return self._vals[n]

    def root_number(self, prec: int) -> acb:
        """eps = tau(chi) / (i^kappa sqrt q), tau(chi) = sum_a chi(a) e(a/q) (computed once)."""
        if self._eps is None or self._eps.rad() > arb(2) ** (-prec + 8):
            with workprec(prec + 20):
                q = self.q
                tau = acb(0)
                for a in range(1, q):
                    if math.gcd(a, q) == 1:
                        tau += self.value(a) * acb.exp_pi_i(acb(2 * a) / q)
                ik = acb(0, 1) if self.parity else acb(1)
                self._eps = tau / (ik * arb(q).sqrt())
        return self._eps

    def terms(self, s: acb, prec: int, extra_bits: float = 0.0) -> tuple[int, arb]:
        """(N, tail bound) so that sum_{n > N} |f(s, n)| <= tail < 2^-(prec + extra_bits)."""
        q = self.q
        need = (prec + extra_bits) * math.log(2) + 10
        N = max(1, int(math.sqrt(q * need / math.pi)) + 1)
        with workprec(prec + 20):
            rw = (s.real + self.parity) / 2
            if not (rw <= 1):
                raise ValueError("smoothed sum: tail bound needs Re (s + kappa)/2 <= 1")
            x1 = arb.pi() * (N + 1) ** 2 / q
            rho = (-arb.pi() * (2 * N + 3) / q).exp()
            tail = arb(N + 1) ** self.parity * (-x1).exp() / (x1 * (1 - rho))
        return N, arb(tail.upper())

    def partial(self, s: acb, prec: int, extra_bits: float = 0.0) -> acb:
        """sum_{n>=1} chi(n) f(s, n), with the truncation bound in the ball."""
        N, tail = self.terms(s, prec, extra_bits)
        with workprec(prec):
            w = (s + self.parity) / 2
            total = acb(0)
            for n in range(1, N + 1):
                c = self.value(n)
                if c == 0:
                    continue
                x = arb.pi() * n * n / self.q
                f = (-w * x.log()).exp() * acb(x).gamma_upper(w)
                if self.parity:
                    f *= n
                total += c * f
            return total + acb(arb(0, tail), arb(0, tail))

    def hardy_y(self, t: arb, prec: int) -> arb:
        """Y(t) = 2 Re(eps^(-1/2) A(t)): real, with the signs of Z(t, chi)."""
        tf = abs(float(t.mid()))
        extra = math.pi * tf / 4 / math.log(2) + 4
        p = prec + int(extra) + 10
        with workprec(p):
            s = acb(arb(1) / 2, t)
            A = self.partial(s, p, extra)
            eps = self.root_number(p)
            return 2 * (A / eps.sqrt()).real

    def hardy_z(self, t: arb, prec: int) -> arb:
        """Z(t, chi) = Y(t) / P(t), P(t) = (q/pi)^((1/2+kappa)/2) |Gamma((1/2+it+kappa)/2)| > 0."""
        tf = abs(float(t.mid()))
        p = prec + int(math.pi * tf / 4 / math.log(2)) + 14
        with workprec(p):
            y = self.hardy_y(t, prec)
            w = acb(arb(1) / 2 + self.parity, t) / 2
            P = (arb(self.q) / arb.pi()) ** w.real * abs(w.gamma())
            return y / P

    def lambda_value(self, s: acb, prec: int) -> acb:
        """Lambda(s, chi) for 0 <= Re s <= 1 (both sums)."""
        with workprec(prec + 10):
            A = self.partial(s, prec + 10)
            B = self.conj_partial(1 - s, prec + 10)
            return A + self.root_number(prec + 10) * B

    def conj_partial(self, s: acb, prec: int) -> acb:
        N, tail = self.terms(s, prec)
        with workprec(prec):
            w = (s + self.parity) / 2
            total = acb(0)
            for n in range(1, N + 1):
                c = self.value(n)
                if c == 0:
                    continue
                x = arb.pi() * n * n / self.q
                f = (-w * x.log()).exp() * acb(x).gamma_upper(w)
                if self.parity:
                    f *= n
                total += c.conjugate() * f
            return total + acb(arb(0, tail), arb(0, tail))

    def central_value(self, prec: int = 64) -> acb:
        """L(1/2, chi) = Lambda(1/2) / ((q/pi)^w Gamma(w)), w = (1/2 + kappa)/2."""
        with workprec(prec + 20):
            half = acb(1) / 2
            lam = self.lambda_value(half, prec + 20)
            w = (half + self.parity) / 2
            return lam / ((arb(self.q) / arb.pi()) ** w.real * w.gamma())
