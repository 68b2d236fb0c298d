"""The argument-principle count by the smoothed functional equation
(certify.certificate.zerocount_afe, docs/method.md section 3e) against independent counts:
Arb's boxes of L (certify.certificate.zerocount, the other contour path), the sign changes
of the Hardy Z-function, mpmath's Dirichlet L-values (a general-purpose library), and the
explicit bound for N(T, chi) of "Counting zeros of Dirichlet L-functions", Math. Comp. 90
(2021)."""

import math
import random
from fractions import Fraction

import mpmath
import pytest
from flint import acb, arb, dirichlet_char

from certify.arith import workprec
from certify.certificate.evidence import exact_ends
from certify.certificate.zerocount import count_height, count_zeros_many, zero_counts
from certify.certificate.zerocount_afe import count_zeros_smoothed
from certify.spectrum.afe import SmoothedL
from certify.spectrum.zeros import find_zeros


def _real_primitive(q: int):
    """The labels of the real primitive characters mod q (n^2 = 1 mod q, n != 1)."""
    return [n for n in range(2, q) if n * n % q == 1 and math.gcd(n, q) == 1
            and dirichlet_char(q, n).is_primitive()]


def _random_real_characters(rng, lo: int, hi: int, count: int):
    out = []
    while len(out) < count:
        q = rng.randrange(lo, hi + 1)
        labels = _real_primitive(q)
        if labels:
            out.append((q, rng.choice(labels)))
    return out


def test_disc_encloses_lambda_from_arb_and_mpmath():
    """SmoothedL.disc: the polynomial plus its error bound contains Lambda(s, chi) from
    Arb's L (Hurwitz sums) at points of the disc, on and off the real axis, even and odd,
    real and complex characters; and the error bound is small."""
    for q, n in ((101, 100), (103, 102), (103, 2), (40, 3)):
        chi = dirichlet_char(q, n)
        if not chi.is_primitive():
            continue
        k = int(chi.parity())
        sm = SmoothedL(q, n, k)
        with workprec(128):
            for c, r in ((acb(arb(5) / 4, 7), arb(3) / 4), (acb(arb(3) / 4), arb(1) / 4)):
                cs, E = sm.disc(c, r, 40, 3 * r, 128, 80, real=bool(chi.is_real()))
                assert E < arb(10) ** -12
                for e in (-r, r, acb(0, 1) * r * arb(3) / 5, acb(r / 3, -r / 2)):
                    e = acb(e)
                    v = acb(0)
                    for cc in reversed(cs):
                        v = v * e + cc
                    v += acb(arb(0, E), arb(0, E))
                    s = c + e
                    w = (s + k) / 2
                    ref = (arb(q) / arb.pi()) ** w * w.gamma() * chi.l(s)
                    assert v.overlaps(ref)
                    assert abs(v - ref) < arb(10) ** -10
                    assert v.rad() < 1e-10
    # one value against mpmath (independent: its Hurwitz zeta sums)
    q, n = 101, 100
    sm = SmoothedL(q, n, 0)
    with workprec(128):
        c = acb(arb(5) / 4, 3)
        cs, E = sm.disc(c, arb(3) / 4, 40, arb(9) / 4, 128, 80, real=True)
        e = acb(arb(-1) / 2, arb(1) / 5)
        v = acb(0)
        for cc in reversed(cs):
            v = v * e + cc
    chi = dirichlet_char(q, n)
    vals = [int(round(float(chi(m).real))) if math.gcd(m, q) == 1 else 0 for m in range(q)]
    mpmath.mp.dps = 30
    s = mpmath.mpc(0.75, 3.2)
    w = s / 2
    ref = (mpmath.mpf(q) / mpmath.pi) ** w * mpmath.gamma(w) * mpmath.dirichlet(s, vals)
    assert abs(complex(v.real.mid(), v.imag.mid()) - complex(ref)) < 1e-15 + float(E.upper())


def test_smoothed_count_equals_arb_boxes_on_random_small_characters():
    """Random primitive characters (real and complex, even and odd) of conductors 3..200 at
    random heights: the smoothed count equals Arb's box count wherever both decide."""
    rng = random.Random(20261203)
    agreed = 0
    for _ in range(12):
        q = rng.randrange(3, 201)
        labels = [n for n in range(1, q) if math.gcd(n, q) == 1
                  and dirichlet_char(q, n).is_primitive()]
        if not labels:
            continue
        n = rng.choice(labels)
        p = int(dirichlet_char(q, n).parity())
        T = Fraction(rng.randrange(20, 160), 10)
        arb_count = count_zeros_many(q, {n: (p, T)})[n]
        try:
            ours = count_zeros_smoothed(q, n, p, T)[0]
        except Exception:  # noqa: BLE001 - a height too close to a zero: undecided by both paths
            ours = None
        if arb_count is None or ours is None:
            continue
        assert ours == arb_count, (q, n, T)
        agreed += 1
    assert agreed >= 8


@pytest.mark.slow
def test_smoothed_count_equals_arb_boxes_on_random_real_characters_300_to_3000():
    """Many random real primitive characters of conductors in [300, 3000] at random heights:
    the two contour paths (Arb's boxes of L, cost ~ q; smoothed discs of Lambda, cost
    ~ sqrt q) give the same count wherever both decide."""
    rng = random.Random(3000)
    agreed = 0
    for q, n in _random_real_characters(rng, 300, 3000, 8):
        p = int(dirichlet_char(q, n).parity())
        T = Fraction(rng.randrange(10, 50), 10)
        arb_count = count_zeros_many(q, {n: (p, T)})[n]
        try:
            ours = count_zeros_smoothed(q, n, p, T)[0]
        except Exception:  # noqa: BLE001
            ours = None
        if arb_count is None or ours is None:
            continue
        assert ours == arb_count, (q, n, T)
        agreed += 1
    assert agreed >= 6


def _mpmath_sign_changes(q: int, n: int, T: float, step: float) -> int:
    """Sign changes of Lambda(1/2 + it) = (q/pi)^w Gamma(w) L(1/2 + it), real for a real
    character, on a grid of 0 < t < T by mpmath (no rigour: an independent count)."""
    chi = dirichlet_char(q, n)
    k = int(chi.parity())
    vals = [int(round(float(chi(m).real))) if math.gcd(m, q) == 1 else 0 for m in range(q)]
    mpmath.mp.dps = 20
    signs = []
    t = step / 2
    while t < T:
        s = mpmath.mpc(0.5, t)
        w = (s + k) / 2
        v = (mpmath.mpf(q) / mpmath.pi) ** w * mpmath.gamma(w) * mpmath.dirichlet(s, vals)
        assert abs(v.imag) < 1e-8 * (1 + abs(v.real))
        signs.append(v.real > 0)
        t += step
    return sum(1 for a, b in zip(signs, signs[1:]) if a != b)


def test_smoothed_count_equals_mpmath_sign_changes_on_small_real_characters():
    """The real characters of conductors 5, 8 and 11 (even and odd): the smoothed count to
    height 41/4 equals the sign changes of Lambda on the critical line from mpmath."""
    for q in (5, 8, 11):
        for n in _real_primitive(q):
            p = int(dirichlet_char(q, n).parity())
            T = Fraction(41, 4)
            ours = count_zeros_smoothed(q, n, p, T)[0]
            assert ours == _mpmath_sign_changes(q, n, float(T), 0.08), (q, n)
            assert ours >= 1


def _asymptotic_check(q: int, n: int, T: Fraction, N: int) -> None:
    """|N(T, chi) - (T/pi log(qT/(2 pi e)) - chi(-1)/4)| <= 0.22737 l + 2 log(1 + l) - 0.5,
    l = log(q(T+2)/(2 pi)) > 1.567, T >= 5/7 ("Counting zeros of Dirichlet L-functions",
    Math. Comp. 90 (2021)); there N(T, chi) counts |gamma| <= T, which for a real character
    (zeros symmetric about the real axis, none at gamma = 0 since our contour passed there)
    is 2 N."""
    chi = dirichlet_char(q, n)
    Tf = float(T)
    ell = math.log(q * (Tf + 2) / (2 * math.pi))
    assert Tf >= 5 / 7 and ell > 1.567
    sign = -1 if chi.parity() else 1
    main = Tf / math.pi * math.log(q * Tf / (2 * math.pi * math.e)) - sign / 4
    assert abs(2 * N - main) <= 0.22737 * ell + 2 * math.log(1 + ell) - 0.5


@pytest.mark.slow
@pytest.mark.parametrize("q,height", [(10007, 7.0), (1000003, 3.5)])
def test_large_conductor_count_equals_sign_changes_and_the_explicit_bound(q, height):
    """A real character of conductor about 10^4 and one about 10^6 (primes, Legendre symbol,
    odd): the smoothed count at a height midway between two sign changes of Z equals the
    number of sign changes below it, and obeys the explicit bound for N(T, chi)."""
    n = q - 1
    zl = find_zeros(q, n, height, 1e-6)
    ends = sorted(exact_ends(z) for z in zl.zeros)
    assert len(ends) >= 3
    T = count_height(ends)
    found = sum(1 for lo, hi in ends if hi < T)
    N = count_zeros_smoothed(q, n, int(dirichlet_char(q, n).parity()), T)[0]
    assert N == found
    _asymptotic_check(q, n, T, N)
    # and through the certificate's entry point (the path above MAX_COUNT_CONDUCTOR)
    assert zero_counts([(q, n, 1, T)]) == {(q, n): N}


def test_an_undecided_count_is_not_established_never_a_guess(monkeypatch):
    """With the disc error bound inflated (every piece's enclosure then contains 0) the count
    cannot be decided: zero_counts returns None above the old cap and the certificate's
    evidence says "not established" (fail closed)."""
    from certify.certificate import zerocount_afe
    from certify.certificate.build import _zero_count_evidence
    from certify.errors import PrecisionExhausted

    real_disc = SmoothedL.disc

    def blurred(self, *args, **kwargs):
        cs, E = real_disc(self, *args, **kwargs)
        return cs, E + arb(10) ** 12

    monkeypatch.setattr(SmoothedL, "disc", blurred)
    with pytest.raises(PrecisionExhausted):
        count_zeros_smoothed(3001, 3000, 0, Fraction(3))
    assert zerocount_afe.count_zeros_smoothed_retry(3001, 3000, 0, Fraction(3)) is None
    assert zero_counts([(3001, 3000, 0, Fraction(3))]) == {(3001, 3000): None}
    item = _zero_count_evidence({"conductor": 3001, "label": 3000, "parity": 0}, [], "3")
    assert item["data"] == {"established": False, "height": "3"}
    assert "not established" in item["text"]


@pytest.mark.parametrize("q", [3001, pytest.param(10007, marks=pytest.mark.slow)])
def test_complex_characters_above_the_old_cap_count_their_sign_changes(q):
    """Complex characters of prime conductors 3001 and 10007 (above the conductor where Arb's
    boxes are used): at a height midway between two sign changes of Z, the smoothed count,
    also through the certificate's entry point, equals the number of sign changes below it
    (two random characters of order > 2 each; the Gauss sum enters here, not for real ones)."""
    import random

    rng = random.Random(q)
    done = 0
    while done < 2:
        n = rng.randrange(2, q - 1)
        chi = dirichlet_char(q, n)
        if chi.order() <= 2:
            continue
        ends = sorted(exact_ends(z) for z in find_zeros(q, n, 4.0, 1e-6).zeros)
        assert len(ends) >= 2
        T = (ends[-2][1] + ends[-1][0]) / 2
        found = sum(1 for lo, hi in ends if hi < T)
        parity = int(chi.parity())
        N = count_zeros_smoothed(q, n, parity, T)[0]
        assert N == found
        assert zero_counts([(q, n, parity, T)]) == {(q, n): N}
        done += 1
