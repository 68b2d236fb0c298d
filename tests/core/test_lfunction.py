"""The shared analytic L-function interface: the Dirichlet path through it is unchanged."""

import math

import pytest

from certify.arith import arb, workprec
from certify.spectrum.lfunction import (AnalyticL, mean_spacing_of, noncentral_power_sums,
                                        positive_ordinate_sums, zero_power_sums_of)
from certify.spectrum.moments import DirichletL, zero_power_sums
from certify.spectrum.spectrum import count_bound_window
from certify.spectrum.zeros import HardyZ, find_zeros, find_zeros_of, mean_spacing


@pytest.mark.parametrize("q,label", [(4, 3), (5, 2), (7, 3)])
def test_generic_zero_path_matches_dirichlet(q, label):
    a = find_zeros(q, label, 25.0, 1e-12)
    b = find_zeros_of(DirichletL(q, label), 25.0, 1e-12)
    assert len(a.zeros) == len(b.zeros) > 0
    for x, y in zip(a.zeros, b.zeros):
        assert x.overlaps(y) and x.rad() < 1e-12
    assert a.z_calls == b.z_calls


def test_generic_power_sums_match_and_central_removal():
    with workprec(200):
        S = zero_power_sums(4, 3, 1, 6, 120)
        G = zero_power_sums_of(DirichletL(4, 3, 1), 6, 120)
        for s, g in zip(S, G):
            assert s.overlaps(g) and s.rad() < 2.0**-120
        # removing r central zeros subtracts exactly r 4^m
        N = noncentral_power_sums(G, 2)
        for m, (g, n) in enumerate(zip(G, N), start=1):
            assert (g - n - 2 * 4**m).contains(0) and (g - n - 2 * 4**m).rad() < 1e-30
        # chi_{4,3} is real: positive ordinates carry half
        P = positive_ordinate_sums(DirichletL(4, 3, 1), G)
        assert (2 * P[0] - G[0]).contains(0)
    with pytest.raises(ValueError):
        positive_ordinate_sums(DirichletL(5, 2), G)  # complex character


def test_degree_one_defaults_unchanged():
    for q in (3, 4, 101, 1009):
        for t in (0.5, 3.0, 100.0, 1000.0):
            assert mean_spacing(q, t) == mean_spacing_of(q, 1, t)
    # degree 2 density is (1/pi) log(sqrt(N) t / 2pi): spacing pi / log(...)
    assert math.isclose(mean_spacing_of(11, 2, 100.0), math.pi / math.log(math.sqrt(11) * 100 / (2 * math.pi)))
    e1, _ = count_bound_window(4, 50.0)
    assert math.isclose(e1, (math.log(4 * 50 / (2 * math.pi)) + 1) / (2 * math.pi * 50))


class _Toy(AnalyticL):
    """A degree-1 'L-function' whose Z is cos(t log 2): zeros at (k + 1/2) pi / log 2."""

    name = "toy"
    conductor = 1

    def hardy_z(self, t, prec):
        with workprec(prec):
            return (t * arb(2).log()).cos()


def test_any_analytic_l_gets_certified_sign_changes():
    zl = find_zeros_of(_Toy(), 20.0, 1e-15)
    expected = [(k + 0.5) * math.pi / math.log(2) for k in range(10)]
    expected = [e for e in expected if e < 20]
    assert len(zl.zeros) == len(expected)
    for z, e in zip(zl.zeros, expected):
        assert z.contains(arb(e).mid()) or abs(float(z.mid()) - e) < 1e-12
        assert z.rad() < 1e-15
    assert isinstance(HardyZ.of(_Toy()).value(arb(1), 64), arb)
