"""The argument-principle count for every character of a conductor at once
(certify.certificate.zerocount.count_zeros_many) against independent counts: the
sign changes of each character's own Hardy Z-function (find_zeros, one character at a
time) and the one-character contour count (count_zeros), at heights between zeros."""

from fractions import Fraction

import pytest

from certify.certificate.evidence import exact_ends
from certify.certificate.zerocount import count_zeros, count_zeros_many, zero_counts
from certify.source.dirichlet import primitive_character
from certify.spectrum.zeros import find_zeros


def test_batched_count_equals_sign_changes_mod_13():
    q = 13
    req = {}
    expected = {}
    for i, n in enumerate(range(2, 13)):
        zl = find_zeros(q, n, 20.0, 1e-8)
        ends = sorted(exact_ends(z) for z in zl.zeros)
        # a height between two zeros (the characters get different heights), or 0
        k = 2 + i % 3
        T = (ends[k - 1][1] + ends[k][0]) / 2 if i % 4 else Fraction(0)
        req[n] = (primitive_character(q, n).parity, T)
        expected[n] = sum(1 for lo, hi in ends if hi < T)
    got = count_zeros_many(q, req)
    assert got == expected
    # two characters also by the one-at-a-time contour
    for n in (2, 6):
        p, T = req[n]
        assert T == 0 or count_zeros(q, n, p, T)[0] == got[n]


def test_same_height_shares_the_top_edge_and_agrees_with_one_at_a_time():
    q, T = 11, Fraction(25, 2)
    got = zero_counts([(q, n, primitive_character(q, n).parity, T) for n in range(2, 11)])
    for n in range(2, 11):
        one = count_zeros(q, n, primitive_character(q, n).parity, T)[0]
        assert got[(q, n)] == one
        zl = find_zeros(q, n, 13.0, 1e-8)
        assert one == sum(1 for z in zl.zeros if exact_ends(z)[1] < T)


def test_memoised_bottom_edge_gives_the_sign_change_counts_mod_13():
    """The table's counts (one call per certificate, memo=True) walk the bottom edge once per
    conductor for every character and reuse it: the counts of later calls, for other
    characters and heights, still equal the sign changes of each character's own Z."""
    from certify.certificate import zerocount

    q = 13
    zerocount._BOTTOM.clear()
    calls = [[2, 3], [5, 7], [4, 11]]
    for i, labels in enumerate(calls):
        req, expected = [], {}
        for n in labels:
            zl = find_zeros(q, n, 20.0, 1e-8)
            ends = sorted(exact_ends(z) for z in zl.zeros)
            k = 1 + (i + n) % 3
            T = (ends[k - 1][1] + ends[k][0]) / 2
            req.append((q, n, primitive_character(q, n).parity, T))
            expected[(q, n)] = k
        assert zero_counts(req, memo=True) == expected
        assert len([key for key in zerocount._BOTTOM if key[0] == q]) == 1  # walked once
    assert zerocount._BOTTOM[(q, 64, 20000)][0] == frozenset(range(2, 13))


@pytest.mark.slow
def test_large_modulus_certificate_verifies_and_a_missing_zero_is_caught():
    """delta(101;2,1): 99 L-functions counted by the batched path, in the builder and in
    verify; a zero removed from a group (the isolation height kept) is caught, and a
    count edited in the evidence is caught by the re-derived count alone."""
    import copy
    import json

    from certify.certificate.build import certificate_from_result, evidence_text
    from certify.certificate.model import Certificate
    from certify.certificate.verify import verify_certificate
    from certify.race.question import two_way
    from certify.races import certify_race
    from certify.spectrum.spectrum import SpectrumStore

    store = SpectrumStore()
    result = certify_race(two_way(101, 2, 1), 6, store=store)
    d = json.loads(certificate_from_result(result, store).to_json())
    counts = [e for e in d["hypotheses"][0]["evidence"] if e["kind"] == "zero-count"]
    assert len(counts) == 99 and all(e["data"]["verified"] for e in counts)
    assert verify_certificate(Certificate.from_dict(copy.deepcopy(d))).ok
    # a group with zeros: drop its last zero
    t = copy.deepcopy(d)
    g = next(g for g in t["spectrum"]["groups"] if g["zeros"])
    g["zeros"].pop()
    rep = verify_certificate(Certificate.from_dict(t))
    assert not rep.ok  # (the residual sums see the missing zero first)
    assert any("missing" in c.detail for c in rep.failures)
    # a count edited in the evidence (data and text regenerated would still disagree)
    t = copy.deepcopy(d)
    e = next(e for e in t["hypotheses"][0]["evidence"] if e["kind"] == "zero-count"
             and e["data"]["count"] > 0)
    e["data"]["count"] += 1
    e["text"] = evidence_text(e)  # its sentence regenerated: only the count can tell
    rep = verify_certificate(Certificate.from_dict(t))
    assert [c.name for c in rep.failures] == [
        f"GRH evidence for L(s, chi_{{{e['l_function'].replace('.', ',')}}}): argument-principle "
        "count, no zero missing below the isolation height"]


def test_table_memo_counts_characters_at_different_heights():
    """The per-process memo of a table's certificates (build._memo_counts) counts every
    primitive character of the conductor at each height asked for.  One certificate asks
    for several characters at different heights; later rows ask for the other pairs.
    Each count must equal the character's sign changes below that height (a memo or a
    batch keyed by character alone would give one character one count for all heights)."""
    import random

    from certify.certificate import build

    rng = random.Random(20261203)
    q = 7
    labels = [2, 3, 4, 5, 6]
    ends = {n: sorted(exact_ends(z) for z in find_zeros(q, n, 32.0, 1e-8).zeros) for n in labels}
    parity = {n: primitive_character(q, n).parity for n in labels}
    for _ in range(3):
        n1, n2 = rng.sample(labels, 2)
        k1, k2 = rng.sample(range(2, 8), 2)
        T1 = (ends[n1][k1 - 1][1] + ends[n1][k1][0]) / 2
        T2 = (ends[n2][k2 - 1][1] + ends[n2][k2][0]) / 2
        build._COUNTS.clear()
        got = build._memo_counts([(q, n1, parity[n1], T1), (q, n2, parity[n2], T2)])
        assert got[(q, n1)] == sum(1 for lo, hi in ends[n1] if hi < T1)
        assert got[(q, n2)] == sum(1 for lo, hi in ends[n2] if hi < T2)
        # the other pairs, now read from the memo filled by the first call
        for n, T in ((n1, T2), (n2, T1)):
            if any(lo <= T <= hi for lo, hi in ends[n]):
                continue  # a height inside a zero's enclosure: no count to compare with
            assert build._memo_counts([(q, n, parity[n], T)])[(q, n)] == \
                sum(1 for lo, hi in ends[n] if hi < T)
