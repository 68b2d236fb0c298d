"""Evidence for the hypotheses: moment consequences and the integer-relation search."""

from certify.arith import arb, workprec
from certify.certificate.evidence import (exact_ends, moment_consequences, refine_ordinate,
                                          relation_search)
from certify.spectrum.spectrum import residual_sums
from certify.spectrum.zeros import find_zeros


def test_relation_search_finds_a_planted_relation():
    with workprec(200):
        g1 = arb(6) + arb(1) / 47
        g2 = arb(10) + arb(1) / 3
        g3 = g1 + 2 * g2  # exact relation g1 + 2 g2 - g3 = 0 (to 200 bits)
        g4 = arb(2).sqrt() * 7
    out = relation_search([g1, g2, g3, g4], 96)
    k = out["candidate"]
    assert k is not None
    assert k in ([1, 2, -1, 0], [-1, -2, 1, 0])


def test_no_relation_among_true_ordinates(cert_4_3_1):
    result, _ = cert_4_3_1
    zs = [refine_ordinate(4, 3, z, 100) for z in result.groups[0].zeros[:8]]
    out = relation_search(zs, 96)
    assert out["candidate"] is None
    assert out["norm_lower_bound"] > 100
    # the bound is a true lower bound: a concrete small integer vector is not a relation
    with workprec(300):
        s = sum((k * z for k, z in zip([1, -1, 1, -1, 1, -1, 1, -1], zs)), arb(0))
    assert not s.contains(0)


def test_moment_completeness_catches_a_dropped_zero():
    # zeros of L(s, chi_{-4}) to height 40 and the exact sums
    from certify.spectrum.moments import zero_power_sums

    zl = find_zeros(4, 3, 40.0, 1e-20)
    with workprec(200):
        S = zero_power_sums(4, 3, 1, 12, 200)
        T = [s / 2 for s in S]
        full = moment_consequences(residual_sums(T, zl.zeros), zl.zeros, 200)
        dropped = zl.zeros[:5] + zl.zeros[6:]
        part = moment_consequences(residual_sums(T, dropped), dropped, 200)
    first_beyond = find_zeros(4, 3, 50.0, 1e-10).zeros[len(zl.zeros)]
    # independent check: the next zero above the list is not below the claimed completeness height
    assert full["complete_below"] <= exact_ends(first_beyond)[0]
    assert full["complete_below"] > 30
    # with the 6th zero removed, completeness cannot be claimed beyond it
    assert part["complete_below"] <= exact_ends(zl.zeros[5])[1]
    # low zeros are proven simple; the count cannot exceed the list
    assert 0 < full["simple"] <= len(zl.zeros)


def test_argument_count_matches_sign_changes_and_the_counting_function():
    import math
    from fractions import Fraction

    from certify.certificate.zerocount import count_height, count_zeros
    from certify.source.dirichlet import primitive_character

    for c, n in [(4, 3), (5, 2), (5, 4), (8, 5)]:
        zl = find_zeros(c, n, 45.0, 1e-10)
        ends = [exact_ends(z) for z in zl.zeros]
        parity = primitive_character(c, n).parity
        T = count_height(ends)
        N, _ = count_zeros(c, n, parity, T)
        assert N == len(ends) - 1  # every zero below T was found as a sign change
        # independent: N(T, chi) = (T / 2 pi) log(q T / (2 pi e)) + O(log qT)
        # (Riemann-von Mangoldt for Dirichlet L-functions; the window is generous)
        main = float(T) / (2 * math.pi) * math.log(c * float(T) / (2 * math.pi * math.e))
        assert abs(N - main) < 3 + math.log(c * float(T))
        # a lower height between two zeros counts exactly the zeros below it
        T5 = (ends[4][1] + ends[5][0]) / 2
        assert count_zeros(c, n, parity, T5)[0] == 5
        assert isinstance(T5, Fraction)


def test_zero_count_evidence_flags_a_missing_zero():
    from certify.certificate.build import _zero_count_evidence
    from certify.certificate.model import ball_record

    zl = find_zeros(4, 3, 30.0, 1e-10)
    recs = [{"l": 0, **ball_record(z)} for z in zl.zeros]
    lf = {"conductor": 4, "label": 3, "parity": 1}
    # GRH to the isolation height 30: the count there equals the zeros stored below it
    ok = _zero_count_evidence(lf, recs, "30")
    assert ok["data"]["verified"] and ok["data"]["count"] == len(recs)
    bad = _zero_count_evidence(lf, recs[:3] + recs[4:], "30")
    assert bad["data"]["established"] and not bad["data"]["verified"]
    assert "NOT verified" in bad["text"]
