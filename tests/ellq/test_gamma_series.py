"""Gamma(s, x) as a power series in s by the expansion at x = oo (jets of L(E, s)).

Checked against mpmath's incomplete gamma (an independent code path) for the
value and the first derivative in s, and against Arb's hypergeometric route for
every coefficient; random centres, points and precisions.
"""

import random

import mpmath

from certify.arith import acb, acb_series, arb, series_cap, workprec
from certify.source.ell_l import _upper_gamma_series, _upper_gamma_series_asym


def test_asymptotic_series_contains_independent_values():
    rng = random.Random(12)
    done = 0
    while done < 12:
        wp = rng.choice([120, 200, 320])
        cr, ci = rng.choice([0.5, 1.0, 1.5, 1.25]), rng.choice([0.0, 2.5, 9.0])
        xv = rng.uniform(40, 200)
        L = rng.randint(3, 24)
        with workprec(wp), series_cap(L):
            c = acb(cr, ci)
            x = arb(xv)
            s = acb_series([c, acb(1)])
            a = _upper_gamma_series_asym(s, c, x, L, wp)
            if a is None:
                continue
            h = _upper_gamma_series(s, x)
            co = a.coeffs()
            assert all(u.overlaps(v) for u, v in zip(co, h.coeffs()))
            # absolute accuracy close to the working precision
            assert all(max(u.real.rad(), u.imag.rad()) < arb(2) ** (-wp + 16) for u in co)
        mpmath.mp.prec = wp + 40
        s0 = mpmath.mpc(cr, ci)
        g0 = mpmath.gammainc(s0, xv)
        g1 = mpmath.diff(lambda z: mpmath.gammainc(z, xv), s0)
        for k, ref in ((0, g0), (1, g1)):
            with workprec(wp + 40):
                r = acb(arb(mpmath.nstr(ref.real, wp // 3 + 10)), arb(mpmath.nstr(ref.imag, wp // 3 + 10)))
                slack = arb(2) ** (-(wp // 3 * 3) + 10) * (1 + abs(r))  # mpmath's own error
                wide = co[k] + acb(arb(0, slack.upper()), arb(0, slack.upper()))
                assert wide.contains(r), (k, co[k], r)
        done += 1


def test_small_x_falls_back():
    with workprec(200), series_cap(8):
        c = acb(1.5)
        assert _upper_gamma_series_asym(acb_series([c, acb(1)]), c, arb(3), 8, 200) is None
