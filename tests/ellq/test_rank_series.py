"""The independent series for the central derivatives of L(E, s), ranks 0 to 3.

Lambda^(k)(1)/k! = (1 + eps (-1)^k) (sqrt N / 2 pi) sum_n a_n/n G_k(2 pi n / sqrt N)
(docs/method.md, "Central derivatives of L(E, s)"), computed by
:func:`certify.certificate.ecq_evidence.central_derivative` in Arb.  Checked here against

* mpmath: G_r by numerical integration of its defining integral, and the whole series
  summed in mpmath with a_n from this file's own point counts (Legendre symbols and the
  Hecke recursion written below, not the package's code);
* published values, from memory (not looked up; the mpmath check above is the
  independent one): L''(E, 1)/2! = 0.759316500288427 for the curve of conductor 389
  (rank 2) and L'''(E, 1)/3! = 1.73184990011930 for the curve of conductor 5077 (rank 3),
  the latter the curve of "On the conjecture of Birch and Swinnerton-Dyer for an elliptic
  curve of rank 3", Math. Comp. 44 (1985).

Every check: containment of the independent value and a maximum width.
"""

import math

import mpmath
import pytest

from certify.arith import arb, workprec
from certify.certificate.ecq_evidence import central_derivative, g_function
from certify.source.ellcurve import curve_from_ainvs

CURVE_389 = [0, 1, 1, -2, 0]  # rank 2, root number +1
CURVE_5077 = [0, 0, 1, -7, 6]  # rank 3, root number -1


def _contains(ball: arb, value, slack: float = 0.0) -> bool:
    lo = float(ball.mid()) - float(ball.rad()) - slack
    hi = float(ball.mid()) + float(ball.rad()) + slack
    return lo <= float(value) <= hi


def _g_mpmath(r: int, x: float):
    """G_r(x) = (1/(r-1)!) int_1^oo exp(-x y) (log y)^(r-1) dy/y by mpmath quadrature (r >= 1);
    G_0(x) = exp(-x)."""
    if r == 0:
        return mpmath.exp(-x)
    # y = 1 + u, exp(-x) taken out (the integrand then has no tiny scale for quadrature to miss)
    f = lambda u: mpmath.exp(-x * u) * mpmath.log1p(u) ** (r - 1) / (1 + u)  # noqa: E731
    pts = sorted({0, 1 / x, 10 / x, 1}) + [mpmath.inf]
    return mpmath.exp(-x) * mpmath.quad(f, pts) / mpmath.factorial(r - 1)


@pytest.mark.parametrize("r", [1, 2, 3])
@pytest.mark.parametrize("x", [0.03, 0.5, 3.0, 25.0, 60.0])
def test_g_function_against_quadrature(r, x):
    with mpmath.workdps(30):
        ref = _g_mpmath(r, x)
    with workprec(120):
        g = g_function(r, arb(x), 100)
    # width: 2^-60 of the value, or 2^-95 absolutely where the value itself is tiny (the
    # expansion is cut at an absolute 2^-(prec + 10); absolute accuracy is what the sum needs)
    assert g.rad() < max(abs(g.mid()) * arb(2) ** -60, arb(2) ** -95)
    assert _contains(g, ref, float(abs(ref)) * 1e-25)


def _an_independent(ainvs, M):
    """a_1..a_M by Legendre-symbol point counts on the given (minimal) model and the Hecke
    recursion; the conductors here are prime, so p | N means a_p = +-1 and a_(p^k) = a_p^k."""
    a1, a2, a3, a4, a6 = ainvs

    def ap(p):
        if p == 2:
            n = 1 + sum(1 for x in range(2) for y in range(2)
                        if (y * y + a1 * x * y + a3 * y - x ** 3 - a2 * x * x - a4 * x - a6) % 2 == 0)
            return 3 - n
        s = 0
        for x in range(p):
            d = (4 * (x ** 3 + a2 * x * x + a4 * x + a6) + (a1 * x + a3) ** 2) % p
            s += 0 if d == 0 else (1 if pow(d, (p - 1) // 2, p) == 1 else -1)
        return -s

    N = {(0, 1, 1, -2, 0): 389, (0, 0, 1, -7, 6): 5077}[tuple(ainvs)]
    a = [0] * (M + 1)
    a[1] = 1
    for n in range(2, M + 1):
        p = next(q for q in range(2, n + 1) if n % q == 0)
        m, k = n, 0
        while m % p == 0:
            m //= p
            k += 1
        if m > 1:
            a[n] = a[m] * a[n // m]
        elif k == 1:
            a[n] = ap(p)
        elif N % p == 0:
            a[n] = a[p] * a[n // p]
        else:
            a[n] = a[p] * a[n // p] - p * a[n // (p * p)]
    return N, a


def _series_mpmath(ainvs, r: int, eps: int):
    """Lambda^(r)(1)/r! summed in mpmath (quadrature for G_r), to about 1e-14."""
    N0 = {(0, 1, 1, -2, 0): 389, (0, 0, 1, -7, 6): 5077}[tuple(ainvs)]
    c = 2 * math.pi / math.sqrt(N0)
    M = int(36 / c) + 1  # G_r(x) < exp(-x)/x^r: the terms beyond x = 36 are below 1e-16
    N, a = _an_independent(ainvs, M)
    with mpmath.workdps(25):
        s = mpmath.mpf(0)
        for n in range(1, M + 1):
            if a[n]:
                s += mpmath.mpf(a[n]) / n * _g_mpmath(r, c * n)
        return (1 + eps * (-1) ** r) * s * mpmath.sqrt(N) / (2 * mpmath.pi), N


def _ours(ainvs, eps, r):
    E = curve_from_ainvs(ainvs)
    assert tuple(E.minimal) == tuple(ainvs)
    return central_derivative(tuple(E.minimal), E.conductor, set(E.bad_primes), eps, r, 80)


def test_rank_2_curve_389_second_derivative():
    val, M = _ours(CURVE_389, 1, 2)
    assert val.rad() < arb(2) ** -60 and not val.contains(0)
    ref, N = _series_mpmath(CURVE_389, 2, 1)
    assert _contains(val, ref, 1e-12)
    # L''(E, 1)/2! = (2 pi/sqrt N) Lambda''(1)/2! when L(E, 1) = 0 (the rank is 2)
    with workprec(100):
        l2 = val * 2 * arb.pi() / arb(N).sqrt()
    assert _contains(l2, 0.759316500288427, 1e-14)  # published value, from memory
    # the lower derivative of the same parity: a small ball containing 0 (consistent with rank 2,
    # no proof that it vanishes)
    low, _ = _ours(CURVE_389, 1, 0)
    assert low.contains(0) and low.rad() < arb(2) ** -60
    ref0, _ = _series_mpmath(CURVE_389, 0, 1)
    assert abs(ref0) < 1e-12


def test_rank_3_curve_5077_third_derivative():
    val, M = _ours(CURVE_5077, -1, 3)
    assert val.rad() < arb(2) ** -55 and not val.contains(0)
    with workprec(100):
        l3 = val * 2 * arb.pi() / arb(5077).sqrt()
    assert _contains(l3, 1.73184990011930, 1e-13)  # published value, from memory
    low, _ = _ours(CURVE_5077, -1, 1)
    assert low.contains(0) and low.rad() < arb(2) ** -55


@pytest.mark.slow
def test_rank_3_curve_5077_against_mpmath():
    val, _ = _ours(CURVE_5077, -1, 3)
    ref, _ = _series_mpmath(CURVE_5077, 3, -1)
    assert _contains(val, ref, 1e-11)
    ref1, _ = _series_mpmath(CURVE_5077, 1, -1)
    assert abs(ref1) < 1e-11


def test_the_other_parity_is_exactly_zero_and_rank_1_unchanged():
    # eps = +1 and k odd: the factor 1 + eps (-1)^k is 0, the value exactly 0
    val, _ = _ours(CURVE_389, 1, 1)
    assert val.mid() == 0 and val.rad() == 0
    # rank 1 (conductor 37): Lambda'(1) = (sqrt N/2 pi) L'(E, 1), L'(E, 1) = 0.305999773834052
    # (published value, from memory)
    E = curve_from_ainvs([0, 0, 1, -1, 0])
    v, _ = central_derivative(tuple(E.minimal), E.conductor, set(E.bad_primes), -1, 1, 80)
    with workprec(100):
        l1 = v * 2 * arb.pi() / arb(37).sqrt()
    assert l1.rad() < arb(2) ** -60 and _contains(l1, 0.305999773834052, 1e-14)


@pytest.mark.slow
@pytest.mark.parametrize("ainvs,r", [(CURVE_389, 2), (CURVE_5077, 3)])
def test_certificate_of_a_rank_2_or_3_curve_says_what_is_proven(tmp_path, ainvs, r):
    import json

    from certify.cli import main

    p = tmp_path / "e.json"
    assert main(["ecrace", "[" + ",".join(map(str, ainvs)) + "]", "--digits", "2", "--observe", "0",
                 "--json", str(p)]) == 0
    d = json.loads(p.read_text())
    proof = next(e for e in d["spectrum"]["evidence"] if e["kind"] == "rank-proof")
    t = proof["text"]
    assert t.startswith(f"analytic rank <= {r} proven from Lambda^({r})(1) != 0")
    assert "vanishing is not proven numerically" in t
    assert proof["data"]["rank"] == r and len(proof["data"]["lower"]) == 1
    rank_h = next(h for h in d["hypotheses"] if h["name"] == "rank")
    if r == 3:  # a published proof applies to this curve: cited as such
        assert rank_h["status"] == "theorem" and "Math. Comp. 44 (1985)" in proof["data"]["published"]
    else:
        assert rank_h["status"] == "assumed" and proof["data"]["published"] == ""
    assert main(["verify", str(p)]) == 0
    # a lower derivative claimed to exclude 0 (its sentence regenerated): rejected
    from certify.certificate.ecq_items import sentence

    low = proof["data"]["lower"][0]["value"]
    low.update(mid="0.001", rad="1e-30")
    proof["text"] = sentence("rank-proof", proof["data"])
    p.write_text(json.dumps(d))
    assert main(["verify", str(p)]) != 0
