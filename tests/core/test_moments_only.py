"""Races in which many characters carry only their exact moments (docs/method.md, section 5b).

The plan (certify.races.RacePlan.request) gives a group no isolation height when the
moments alone bound its largest residual weight (reach * min_k T_k^(1/(2k)) <= 1) or when
its reach 3.4 c xi_max / j01 is below 1/2; such a group enters the engine only through
its exact power sums (Rayleigh expansion, Lemma B of section 4c).  Its enclosure must
contain the value computed with zeros isolated for every character (the plan's
``few_zeros`` switch off: every group isolates its zeros to height >= 4), and be narrow.
"""

import pytest

import certify.races as races
from certify.race.question import two_way
from certify.spectrum.spectrum import SpectrumStore


@pytest.mark.slow
def test_moments_only_groups_contain_the_all_zeros_value(monkeypatch):
    question = two_way(101, 2, 1)  # 2 is not a square mod 101: mean -2, not 1/2
    few = races.certify_race(question, 8, store=SpectrumStore())
    moments_only = [g for g in few.groups if not g.zeros]
    # many characters carry only moments (27 of the 50 groups when measured)
    assert len(moments_only) >= len(few.groups) // 3, len(moments_only)
    assert all(g.height == 0.0 for g in moments_only)
    assert few.target_met and few.density.width <= 1e-8

    plan = races.plan_race

    def every_group_isolates(*args, **kwargs):
        p = plan(*args, **kwargs)
        p.few_zeros = False  # heights raised to at least 4: zeros isolated for every group
        return p

    monkeypatch.setattr(races, "plan_race", every_group_isolates)
    full = races.certify_race(question, 10, store=SpectrumStore())
    assert all(g.zeros for g in full.groups)
    assert full.parameters["zeros_used"] > 3 * few.parameters["zeros_used"]
    assert full.density.width <= 1e-10
    # the moments-only enclosure contains the (100 times narrower) all-zeros one
    assert few.density.lower <= full.density.lower and full.density.upper <= few.density.upper
    assert few.density.lower > 0.5  # and it is not the trivial 1/2 of a symmetric law
