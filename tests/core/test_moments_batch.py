"""Batched jets (Hurwitz jets at a/q and a DFT over the character group) against
the one-character path and against mpmath."""

import math
import random

import mpmath
import pytest
from flint import dirichlet_char

from certify.spectrum.moments import (_group_axes, central_value, conductor_power_sums,
                                      zero_power_sums)
from certify.spectrum.spectrum import SpectrumStore


def _primitive_labels(q):
    return [n for n in range(1, q) if math.gcd(n, q) == 1 and dirichlet_char(q, n).is_primitive()]


@pytest.mark.parametrize("seed", range(4))
def test_batch_agrees_with_single_character_path(seed):
    """Random conductors (a different draw per seed): every S_m and L(1/2) ball overlaps."""
    rng = random.Random(1000 + seed)
    cands = [q for q in range(3, 70) if _primitive_labels(q)]
    for q in rng.sample(cands, 3):
        labels = _primitive_labels(q)
        pick = rng.sample(labels, min(2, len(labels)))
        batch = conductor_power_sums(q, labels, 6, 60)
        for n in pick:
            par = int(dirichlet_char(q, n).parity())
            single = zero_power_sums(q, n, par, 6, 60)
            sums, cv = batch[n]
            assert all(a.overlaps(b) for a, b in zip(single, sums)), (q, n)
            assert all(s.rad() < 2.0 ** -60 for s in sums)
            assert cv.overlaps(central_value(q, n)), (q, n)


@pytest.mark.parametrize("q", [8, 9, 16, 24, 45, 63])
def test_group_axes_generate_the_unit_group(q):
    """Exponent vectors are a bijection onto the product of the axes (exact check)."""
    axes, logs = _group_axes(q)
    size = math.prod(n for _, n in axes)
    assert size == sum(1 for a in range(1, q) if math.gcd(a, q) == 1)
    assert len(set(logs.values())) == size
    for a, vec in logs.items():
        x = 1
        for (g, _), l in zip(axes, vec):
            x = x * pow(g, l, q) % q
        assert x == a


@pytest.mark.parametrize("q,n", [(7, 3), (11, 2), (20, 3)])
def test_batched_central_value_against_mpmath(q, n):
    """L(1/2, chi) from the batch contains mpmath's Hurwitz-sum value (independent)."""
    chi = dirichlet_char(q, n)
    vals = [complex(chi(a).mid().real.mid().__float__(), float(chi(a).mid().imag.mid()))
            if math.gcd(a, q) == 1 else 0 for a in range(q)]
    mpmath.mp.dps = 30
    ref = mpmath.dirichlet(mpmath.mpf(1) / 2, vals)
    mpmath.mp.dps = 15
    cv = conductor_power_sums(q, [n], 2, 40)[n][1]
    assert abs(complex(float(cv.real.mid()), float(cv.imag.mid())) - complex(ref)) < 1e-12
    assert float(cv.real.rad()) < 1e-15


def test_store_prefetch_serves_get():
    """After prefetch, get() takes the batched power sums (no one-character recomputation)."""
    st = SpectrumStore()
    labels = _primitive_labels(13)
    done = st.prefetch([(13, n, 5, 50) for n in labels])
    assert done == len(labels)
    sp = st.get(13, 2, int(dirichlet_char(13, 2).parity()), 0.0, 1e-3, 5, 50)
    assert sp.power_sums is st.batched[(13, 2)][0]
    single = zero_power_sums(13, 2, int(dirichlet_char(13, 2).parity()), 5, 50)
    assert all(a.overlaps(b) for a, b in zip(single, sp.power_sums))


@pytest.mark.parametrize("seed", range(3))
def test_batched_grid_values_agree_with_arb_hardy_z(seed):
    """Z(t, chi) on the common grid (Hurwitz values + DFT) overlaps Arb's hardy_z,
    for random conductors and every primitive character of each."""
    from flint import arb

    from certify.arith import workprec
    from certify.spectrum.moments import _GRID, grid_points, hardy_grid, round_height_to_grid

    rng = random.Random(500 + seed)
    for q in rng.sample([q for q in range(5, 60) if len(_primitive_labels(q)) >= 2], 2):
        labels = _primitive_labels(q)
        h = round_height_to_grid(q, 3.0)
        assert h >= 3.0 and h in grid_points(q, 3.0)
        hardy_grid(q, labels, h)
        with workprec(64):
            for n in rng.sample(labels, min(3, len(labels))):
                vals = _GRID[(q, n)]
                assert set(grid_points(q, h)) <= set(vals)
                for t, (_, z) in vals.items():
                    ref = dirichlet_char(q, n).hardy_z(arb(t)).real
                    assert z.overlaps(ref), (q, n, t)
                    assert float(z.rad()) < 1e-10
