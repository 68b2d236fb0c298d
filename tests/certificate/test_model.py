"""The certificate model: exact balls, immutability, versions, schema."""

import copy
import dataclasses
import json
from fractions import Fraction

import jsonschema
import pytest
from hypothesis import given, strategies as st

from certify.arith import ball_from_strings
from certify.certificate.evidence import exact_ends
from certify.certificate.model import (SCHEMA_VERSION, Certificate, read_certificate,
                                       write_certificate)
from certify.certificate.numbers import sci
from certify.certificate.schema import load_schema
from certify.errors import BadInput


def test_round_trip_is_exact(cert_4_3_1, tmp_path):
    _, cert = cert_4_3_1
    path = tmp_path / "c.json"
    write_certificate(cert, str(path))
    back = read_certificate(str(path))
    assert back.to_dict() == cert.to_dict()
    assert json.loads(path.read_text())["schema_version"] == SCHEMA_VERSION


def test_balls_parse_back_containing_the_original(cert_4_3_1):
    result, cert = cert_4_3_1
    stored = cert.spectrum["groups"][0]["zeros"]
    assert len(stored) == len(result.groups[0].zeros) > 10
    for rec, z in zip(stored, result.groups[0].zeros):
        b = ball_from_strings(rec["mid"], rec["rad"])
        lo, hi = exact_ends(b)
        zlo, zhi = exact_ends(z)
        assert lo <= zlo and zhi <= hi  # contains the original
        assert hi - lo <= 2 * (zhi - zlo) + Fraction(1, 10**40)  # and no wider than needed
        assert Fraction(rec["mid"]) == (zlo + zhi) / 2  # the midpoint is exact


def test_certificate_is_immutable(cert_4_3_1):
    _, cert = cert_4_3_1
    with pytest.raises(dataclasses.FrozenInstanceError):
        cert.caution = "nothing to see"
    with pytest.raises(TypeError):
        cert.answer["enclosure"]["lower"] = "0"
    with pytest.raises(TypeError):
        cert.hypotheses[0]["status"] = "verified"


def test_enclosure_contains_published_value_and_is_narrow(cert_4_3_1):
    # "Chebyshev's bias", Experimental Mathematics 3 (1994): delta(4;3,1) = 0.9959 (4 places printed)
    result, cert = cert_4_3_1
    assert cert.answer["certified_digits"].startswith("0.9959")
    assert cert.upper - cert.lower <= Fraction(1, 10**12)
    # the stored (outward-rounded) enclosure contains the engine's
    assert cert.lower <= result.density.lower and result.density.upper <= cert.upper
    # 1 - delta printed in scientific notation, rounded outward
    g = cert.answer["gap_to_one"]
    assert Fraction(g["lower"]) <= 1 - cert.upper and 1 - cert.lower <= Fraction(g["upper"])


def test_every_certificate_validates_against_the_schema(cert_4_3_1, more_certs):
    schema = load_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    for cert in [cert_4_3_1[1], *more_certs]:
        jsonschema.validate(cert.to_dict(), schema)


def test_schema_rejects_a_float_ball(cert_4_3_1):
    d = copy.deepcopy(cert_4_3_1[1].to_dict())
    d["spectrum"]["groups"][0]["zeros"][0]["mid"] = 6.02
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(d, load_schema())
    with pytest.raises(BadInput, match="schema"):
        Certificate.from_dict(d, "x.json")


def test_question_and_provenance_recorded(cert_4_3_1):
    _, cert = cert_4_3_1
    q = cert.question
    assert (q["modulus"], q["kind"], q["classes"]) == (4, "two-way", (3, 1))
    assert [(w["class"], w["weight"]) for w in q["weights"]] == [(3, "1"), (1, "-1")]
    p = cert.provenance
    assert p["command_line"].startswith("certify ")
    assert p["input_digest"].startswith("sha256:") and len(p["input_digest"]) == 71
    assert p["python_flint"] and p["certify"]


def test_unknown_version_and_malformed_json(tmp_path, cert_4_3_1):
    d = cert_4_3_1[1].to_dict()
    d["schema_version"] = 99
    p = tmp_path / "v99.json"
    p.write_text(json.dumps(d))
    with pytest.raises(BadInput, match=r"v99\.json: unknown schema version 99"):
        read_certificate(str(p))
    bad = tmp_path / "bad.json"
    bad.write_text('{\n "schema": "certify/race-certificate",\n "answer": [1, 2,\n}\n')
    with pytest.raises(BadInput, match=r"bad\.json:4: malformed JSON"):
        read_certificate(str(bad))


@given(st.fractions(min_value=Fraction(-10**6), max_value=Fraction(10**6)).filter(lambda v: v != 0),
       st.integers(min_value=1, max_value=8))
def test_scientific_notation_rounds_outward(v, sig):
    up, down = Fraction(sci(v, sig, up=True)), Fraction(sci(v, sig, up=False))
    assert down <= v <= up
    # within one unit of the last significant digit
    assert up - down <= abs(v) * Fraction(10) ** (1 - sig) * 2


def test_zero_attribution_without_the_store(cert_4_3_1):
    """A zero whose ball is no longer in the store is attributed by a sign change of Z."""
    from certify.certificate.build import _owner_by_sign_change

    result, _ = cert_4_3_1
    z = result.groups[0].zeros[3]
    assert _owner_by_sign_change(z, [(4, 3)]) == 0
    with pytest.raises(Exception, match="cannot be attributed"):
        _owner_by_sign_change(z, [(5, 2)])


def test_batch_document_is_the_certificate_json(cert_4_3_1, more_certs):
    """certificate_document (the plain document a table writes, without the frozen copy)
    serialises to exactly the JSON of the Certificate's to_dict, for every race kind, and
    the compact text a table writes reads back as a certificate that verifies."""
    from certify.certificate.build import certificate_document, certificate_from_result
    from certify.certificate.verify import verify_certificate
    from certify.io import compact_json
    from certify.race.question import residue_race, two_way
    from certify.races import certify_race
    from certify.spectrum.spectrum import SpectrumStore

    for q in (two_way(5, 2, 1), residue_race(8), two_way(7, 3, 1)):
        store = SpectrumStore()
        r = certify_race(q, 6, store=store)
        a = json.dumps(certificate_from_result(r, store).to_dict(), sort_keys=True)
        text = compact_json(certificate_document(r, store))
        assert json.dumps(json.loads(text), sort_keys=True) == a
        back = Certificate.from_dict(json.loads(text))
        assert verify_certificate(back).ok
