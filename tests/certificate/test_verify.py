"""verify: passes on what certify writes, fails on tampered copies."""

import copy
from fractions import Fraction

import pytest

from certify.certificate.model import Certificate
from certify.certificate.verify import verify_certificate


def _verify(d):
    return verify_certificate(Certificate.from_dict(d))


def _bump_digit(s: str, after_point: int) -> str:
    i = s.index(".") + after_point
    return s[:i] + str((int(s[i]) + 1) % 10) + s[i + 1:]


def test_verify_passes_on_written_certificates(cert_4_3_1, more_certs):
    for cert in [cert_4_3_1[1], *more_certs]:
        rep = verify_certificate(cert)
        assert rep.ok, [(c.name, c.detail) for c in rep.failures]
        names = " ".join(c.name for c in rep.checks)
        for what in ("zeros re-certified", "moments recomputed", "residual sums",
                     "stored enclosure contains", "error bound", "final sum", "hypothesis GRH",
                     "hypothesis LI", "integer-relation search", "argument-principle count"):
            assert what in names


def test_verify_does_fewer_z_evaluations_than_the_computation(cert_4_3_1):
    result, cert = cert_4_3_1
    rep = verify_certificate(cert)
    assert rep.z_evaluations < result.parameters["hardy_z_evaluations"] / 2


@pytest.fixture
def data(cert_4_3_1):
    return copy.deepcopy(cert_4_3_1[1].to_dict())


def _failed(rep):
    assert not rep.ok
    return " | ".join(f"{c.name}: {c.detail}" for c in rep.failures)


def test_fails_with_one_digit_of_one_zero_changed(data):
    z = data["spectrum"]["groups"][0]["zeros"][7]
    z["mid"] = _bump_digit(z["mid"], 9)
    assert "no certified sign change" in _failed(_verify(data))


def test_fails_with_a_moment_changed(data):
    t = data["spectrum"]["groups"][0]["moments"]["target_sums"][3]
    t["mid"] = _bump_digit(t["mid"], 12)
    assert "do not contain the recomputed" in _failed(_verify(data))


@pytest.mark.parametrize("name", ["GRH", "LI"])
def test_fails_with_a_hypothesis_removed(data, name):
    data["hypotheses"] = [h for h in data["hypotheses"] if h["name"] != name]
    assert f"{name} is missing" in _failed(_verify(data))


def test_fails_with_the_enclosure_narrowed(data):
    e = data["answer"]["enclosure"]
    lo, hi = Fraction(e["lower"]), Fraction(e["upper"])
    places = len(e["lower"].split(".")[1])
    # move the lower end up by a tenth of the width: still a valid-looking interval
    from certify.arith import decimal_up

    e["lower"] = decimal_up(lo + (hi - lo) / 10, places)
    assert "short by" in _failed(_verify(data))


def test_fails_with_an_error_bound_lowered(data):
    data["error_budget"][0]["bound"] = "1.00e-30"
    assert "error bound 'aliasing'" in _failed(_verify(data))


def test_fails_with_inflated_digits_or_a_proven_hypothesis(data):
    d2 = copy.deepcopy(data)
    d2["answer"]["certified_digits"] += "7"
    assert "certified digits" in _failed(_verify(d2))
    data["hypotheses"][1]["status"] = "theorem"
    assert "does not prove LI" in _failed(_verify(data))


def test_fails_with_a_zero_removed(data):
    del data["spectrum"]["groups"][0]["zeros"][2]
    # the density (and the zero count in the evidence) no longer match
    assert not _verify(data).ok


def test_fails_with_a_relation_search_ordinate_changed(data):
    li = next(h for h in data["hypotheses"] if h["name"] == "LI")
    ev = next(e for e in li["evidence"] if e["kind"] == "integer-relation-search")
    o = ev["data"]["ordinates"][1]
    o["mid"] = _bump_digit(o["mid"], 20)
    assert not _verify(data).ok


@pytest.mark.slow
def test_verify_passes_on_every_race_to_modulus_12():
    """Every two-way and residue race for q <= 12: the certificate verifies (6 digits)."""
    import math

    from certify.certificate.build import certify_with_certificate
    from certify.race.question import residue_race, two_way
    from certify.spectrum.spectrum import SpectrumStore

    store = SpectrumStore()
    for q in range(3, 13):
        classes = [a for a in range(1, q) if math.gcd(a, q) == 1]
        races = [two_way(q, a, b) for a in classes for b in classes if a < b]
        races.append(residue_race(q))
        for race in races:
            cert = certify_with_certificate(race, 6, store=store)[1]
            rep = verify_certificate(Certificate.from_dict(cert.to_dict()))
            assert rep.ok, (race.label, [(c.name, c.detail) for c in rep.failures])
