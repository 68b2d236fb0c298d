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

    def disc(self, centre: acb, radius: arb, order: int, rho0: arb, prec: int,
             tail_bits: float, real: bool = False) -> tuple[list, arb]:
        """(c, E): |Lambda(centre + e, chi) - sum_{j<order} c_j e^j| <= E for every complex
        |e| <= radius (docs/method.md, section 3e).

        The c_j are the Taylor coefficients of the first N terms of both sums (Arb series in
        e, rigorous balls); E bounds the Taylor remainder of those terms by the Cauchy-type
        estimate with the majorant on the circle of radius ``rho0`` (> radius) and the terms
        n > N uniformly over the disc, N chosen for a tail below 2^-tail_bits.  ``real``:
        the character is real (root number 1, no Gauss sum).
        """
        from flint import acb_series

        from ..arith import series_cap
        from ..errors import PrecisionExhausted

        q, k = self.q, self.parity
        need = tail_bits * math.log(2) + 10
        N = max(2, int(math.sqrt(q * need / math.pi)) + 2)
        with workprec(prec):
            r = arb(radius)
            R = arb(rho0)
            if not (r < R):
                raise ValueError("smoothed disc: rho0 must exceed the radius")
            half = arb(1) / 2
            w0 = (centre + k) / 2
            v0 = (1 - centre + k) / 2
            eps = acb(1) if real else self.root_number(prec)
            aA = acb(w0.real + R / 2)
            aB = acb(v0.real + R / 2)
            pi_q = arb.pi() / q
            with series_cap(order):
                wa = acb_series([w0, acb(half)])
                wb = acb_series([v0, acb(-half)])
                ga, gb = wa.gamma(), wb.gamma()
                A = acb_series([acb(0)])
                B = acb_series([acb(0)])
                maj = arb(0)
                for n in range(1, N + 1):
                    c = self.value(n)
                    if c == 0:
                        continue
                    x = pi_q * n * n
                    ta = _scaled_gamma_upper(wa, x, ga)
                    tb = _scaled_gamma_upper(wb, x, gb)
                    lx = acb(x.log())
                    m = ((-aA * lx).exp() * acb(x).gamma_upper(aA)).real + \
                        ((-aB * lx).exp() * acb(x).gamma_upper(aB)).real
                    if k:
                        ta, tb, m = ta * n, tb * n, m * n
                    A += ta * c
                    B += tb * c.conjugate()
                    maj += m
                cs = (A + B * eps).coeffs()
            cs = cs + [acb(0)] * (order - len(cs))
            # terms n > N over the whole disc: |f| <= n^k e^(-x_n) / (x_n - m), u^m <= e^(m(u-1))
            mexp = max(w0.real, v0.real) + r / 2 - 1
            mexp = mexp if mexp > 0 else arb(0)
            x1 = pi_q * (N + 1) ** 2
            rho = arb((N + 2) / arb(N + 1)) ** k * (-arb.pi() * (2 * N + 3) / q).exp()
            if not (x1 > mexp and rho < 1):
                raise PrecisionExhausted("not certified: smoothed disc tail bound does not apply")
            tail = 2 * arb(N + 1) ** k * (-x1).exp() / ((x1 - mexp) * (1 - rho))
            ratio = r / R
            E = ratio ** order / (1 - ratio) * maj + tail
            return cs[:order], arb(E.upper())

    def central_value(self, prec: int = 64) -> acb:
        """L(1/2, chi) = Lambda(1/2) / ((q/pi)^w Gamma(w)), w = (1/2 + kappa)/2."""
        with workprec(prec + 20):
            half = acb(1) / 2
            lam = self.lambda_value(half, prec + 20)
            w = (half + self.parity) / 2
            return lam / ((arb(self.q) / arb.pi()) ** w.real * w.gamma())


# --- Taylor jets at s = 1 of a real character by the smoothed sum (docs/method.md, 3d) -----

# conductors from which the jets at s = 1 and L(1/2) of a real character come from the
# smoothed sum rather than Arb's Hurwitz sums (measured, bench/bench_huge_residue.py)
JET_AFE_MIN_CONDUCTOR = 3000


def _scaled_gamma_upper(w, x: arb, gamma_w):
    """x^(-w) Gamma(w, x) as a series in w (w a power series with constant term > 0).

    Gamma(w, x) = Gamma(w) - gamma(w, x) and x^(-w) gamma(w, x) = e^(-x)/w 1F1(1; w + 1; x);
    ``gamma_w`` is the series Gamma(w) (shared by all n).
    """
    from flint import acb_series

    lx = x.log()
    one = acb_series([acb(1)])
    h = acb_series.hypgeom([one], [w + 1], acb_series([acb(x)]))
    return (-(w * lx)).exp() * gamma_w - h * (-x).exp() / w


class RealJet:
    """c_1..c_K of log Lambda(1 + e, chi) for a real primitive character by the smoothed sum.

    For real primitive chi the root number is 1 (the quadratic Gauss sum), so

        Lambda(1 + e) = sum_n chi(n) n^kappa [g_a(e) + g_b(e)],
        g_a(e) = x^(-w) Gamma(w, x),  w = (1 + kappa)/2 + e/2,
        g_b(e) = x^(-w') Gamma(w', x), w' = kappa/2 - e/2,  x = pi n^2 / q,

    each a power series in e (Gamma(w') for w' = -e/2 through
    Gamma(w', x) = (Gamma(w' + 1, x) - x^w' e^(-x)) / w').  The coefficient of e^j in
    each term is n^kappa int_1^oo e^(-xu) u^(c - 1) (+-log u / 2)^j / j! du with c <= 1,
    at most n^kappa int_1^oo e^(-xu) u^(1/2) du <= n^kappa e^(-x) (1/x + 1/(2 x^2)) for
    every j (y^j / j! <= e^y); the tail beyond N is bounded as for the values
    (docs/method.md, section 3d) and added to every coefficient.
    """

    def __init__(self, conductor: int, label: int, parity: int, values=None):
        self.q = conductor
        self.label = label
        self.parity = parity
        self.values = values

    def tail(self, N: int, prec: int) -> arb:
        """Upper bound of sum_{n > N} 2 n^kappa e^(-x_n) (1/x_n + 1/(2 x_n^2)), or raise."""
        q, k = self.q, self.parity
        with workprec(prec + 20):
            x1 = arb.pi() * (N + 1) ** 2 / q
            rho = arb((N + 2) / arb(N + 1)) ** k * (-arb.pi() * (2 * N + 3) / q).exp()
            if not (rho < 1):
                raise ValueError("smoothed jet: the tail ratio is not below 1")
            b = 2 * arb(N + 1) ** k * (-x1).exp() * (1 / x1 + 1 / (2 * x1 * x1))
            return arb((b / (1 - rho)).upper())

    def lambda_series(self, count: int, prec: int):
        """The series Lambda(1 + e) to order e^count (balls include the truncation)."""
        from flint import acb_series, dirichlet_char

        from ..arith import series_cap

        q, k = self.q, self.parity
        need = prec * math.log(2) + 10
        N = max(2, int(math.sqrt(q * need / math.pi)) + 2)
        chi = dirichlet_char(q, self.label) if self.values is None else None
        length = count + 2
        with workprec(prec), series_cap(length):
            half = arb(1) / 2
            wa = acb_series([acb((1 + k) * half), acb(half)])
            ga = wa.gamma()
            if k == 1:
                wb = acb_series([acb(half), acb(-half)])
                gb = wb.gamma()
            else:
                wb = acb_series([acb(1), acb(-half)])  # w' + 1
                gb = wb.gamma()
            total = acb_series([acb(0)])
            pi_q = arb.pi() / q
            for n in range(1, N + 1):
                c = self.values(n) if self.values is not None else chi(n)
                if c == 0:
                    continue
                x = pi_q * n * n
                term = _scaled_gamma_upper(wa, x, ga)
                other = _scaled_gamma_upper(wb, x, gb)
                if k == 0:
                    # x^(-w') Gamma(w', x) = (x g_1 - e^(-x)) / w', w' = -e/2: the constant term
                    # of x g_1 - e^(-x) is Gamma(1, x) - e^(-x) = 0 exactly
                    cs = (other * x).coeffs()
                    cs = cs + [acb(0)] * (length - len(cs))
                    other = acb_series([-2 * cs[j + 1] for j in range(length - 1)])
                if k:
                    term = term * n
                    other = other * n
                total += (term + other) * c
            tail = self.tail(N, prec)
            cs = total.coeffs()
            cs = cs + [acb(0)] * (count + 1 - len(cs))
            return [cs[j] + acb(arb(0, tail)) for j in range(count + 1)]

    def log_lambda_jet(self, count: int, prec: int) -> list:
        """c_1..c_count of log Lambda(1 + e) (the constant of Lambda does not matter)."""
        from flint import acb_series

        from ..arith import series_cap
        from ..errors import PrecisionExhausted

        cs = self.lambda_series(count, prec)
        with workprec(prec), series_cap(count + 1):
            if not (cs[0].real > 0):
                raise PrecisionExhausted(
                    f"not certified: Lambda(1, chi_{{{self.q},{self.label}}}) = {cs[0].str(5)} "
                    "is not proved positive at this precision")
            lg = acb_series(cs).log().coeffs()
            lg = lg + [acb(0)] * (count + 1 - len(lg))
            return [acb(c.real) for c in lg[1:count + 1]]
