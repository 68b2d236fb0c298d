"""The independent paths verify uses for the evidence of the recount kinds (issue 10).

* L(u, chi) in F_q[t]: the Euler product over monic irreducibles (FLINT's irreducibility
  test, group-ring arithmetic) against the race's character sums over all monic
  polynomials, for random fields, moduli and characters;
* c_n of a curve over F_p(t): a plain double loop over F_(p^n) (FLINT fq_default) against
  the vectorised traces, for random curves;
* a forged point count or coefficient is caught by these paths even when the certificate's
  sentence is regenerated from the forged data.
"""

from __future__ import annotations

import copy
import json
import random

import pytest

from certify.certificate.curves import brute_force_frobenius_sum
from certify.certificate.ffield import euler_product_counts
from certify.curves.model import make_curve
from certify.curves.traces import frobenius_sum
from certify.errors import BadInput
from certify.ffield.characters import character_group
from certify.ffield.lpoly import _coefficient_counts
from certify.ffield.poly import finite_field, poly_from_index


@pytest.mark.parametrize("seed", range(6))
def test_euler_product_gives_the_character_sums(seed):
    rng = random.Random(seed)
    q = rng.choice([2, 3, 4, 5, 7, 9])
    F = finite_field(q)
    deg = rng.choice([2, 3]) if q <= 5 else 2
    m = poly_from_index(rng.randrange(q ** deg, 2 * q ** deg), F)  # a random monic of degree deg
    G = character_group(F, m)
    chars = [c for c in G.characters() if not c.is_trivial()]
    for chi in rng.sample(chars, min(4, len(chars))):
        want = _coefficient_counts(chi)
        got = euler_product_counts(chi, want.shape[0] - 1)
        assert (got == want).all(), (q, str(m), chi.label())


@pytest.mark.parametrize("seed", range(8))
def test_plain_loop_point_counts_match_the_traces(seed):
    rng = random.Random(100 + seed)
    p = rng.choice([5, 7, 11])
    for _ in range(20):
        A = " + ".join(f"{rng.randrange(p)}*t^{i}" for i in range(rng.randrange(1, 4)))
        B = " + ".join(f"{rng.randrange(p)}*t^{i}" for i in range(rng.randrange(2, 5)))
        try:
            E = make_curve(p, A, B)
        except BadInput:
            continue  # singular or isotrivial
        for n in (1, 2) if p < 10 else (1,):
            assert brute_force_frobenius_sum(E, n) == frobenius_sum(E, n), (p, A, B, n)
        return
    pytest.skip("no admissible random curve")


def _verify(d):
    from certify.certificate.dispatch import verify_any
    from certify.certificate.model import Certificate

    return verify_any(Certificate.from_dict(d, "x"))


def test_a_forged_point_count_is_caught_by_the_plain_loop(tmp_path):
    """A consistent forgery: another L-polynomial with the same functional equation, the
    point counts c_n it implies, and every sentence regenerated.  Re-deriving L from the
    stored counts agrees with it; the plain loop over F_5 and F_25 does not."""
    from certify.certificate.curves import check_evidence
    from certify.certificate.model import Certificate
    from certify.certificate.verify import VerifyReport
    from certify.cli import main
    from certify.curves.lpoly import power_sums
    from certify.curves.race import evidence_sentence

    path = tmp_path / "c.json"
    assert main(["curve", "5", "2 + 2*t + 2*t^2 + 4*t^5", "4 + 4*t + t^7 + t^8", "--digits", "3",
                 "--json", str(path)]) == 0
    clean = json.loads(path.read_text())
    assert _verify(clean).ok
    d = copy.deepcopy(clean)
    L = d["spectrum"]["l_polynomial"]
    N, q = len(L["coefficients"]) - 1, 5
    ev = next(h for h in d["hypotheses"] if h["name"] == "Degree and functional equation")["evidence"][0]
    eps = ev["data"]["sign"]
    new = list(L["coefficients"])
    new[1] += 1
    new[N - 1] = eps * q ** (N - 2) * new[1]
    L["coefficients"] = new
    K = len(ev["data"]["frobenius_sums"])
    ev["data"]["frobenius_sums"] = power_sums(new, K)[1:]
    ev["text"] = evidence_sentence(ev["kind"], ev["data"])
    rh = next(h for h in d["hypotheses"] if h["name"].startswith("RH"))["evidence"][0]
    rh["data"]["coefficients"] = new
    rh["text"] = evidence_sentence(rh["kind"], rh["data"])
    rep = VerifyReport("forged")
    check_evidence(Certificate.from_dict(d, "x"), rep)
    failed = [c.name for c in rep.failures]
    assert not any("re-derived from the stored point counts" in n for n in failed)
    assert any("recounted by a plain loop" in n for n in failed), failed
    assert not _verify(d).ok
