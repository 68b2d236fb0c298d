"""Certificates of the trace race over Q (kind ecq-race): schema, round trip, recount, tampering."""

import json

import pytest

from certify.certificate.dispatch import verify_any
from certify.certificate.ecq import certify_ecq
from certify.certificate.model import Certificate, validate_document


def test_certificate_validates_and_round_trips():
    r, cert = certify_ecq([0, -1, 1, -10, -20], 2)
    d = cert.to_dict()
    validate_document(d)
    assert d["kind"] == "ecq-race" and d["question"]["ainvs"] == [0, -1, 1, -10, -20]
    back = Certificate.from_dict(json.loads(cert.to_json()))
    assert back.to_dict() == d


@pytest.mark.slow
def test_recount_verifies_and_tampering_fails():
    r, cert = certify_ecq([0, 0, 1, -1, 0], 3)
    assert verify_any(cert).ok
    d = cert.to_dict()
    # a stored enclosure that no longer contains the recount
    t = json.loads(json.dumps(d))
    t["answer"]["enclosure"]["upper"] = t["answer"]["enclosure"]["lower"]
    assert not verify_any(Certificate.from_dict(t)).ok
    # a moved zero
    t = json.loads(json.dumps(d))
    z = t["spectrum"]["zeros"][0]
    z["mid"] = str(float(z["mid"]) + 0.01)
    assert not verify_any(Certificate.from_dict(t)).ok
