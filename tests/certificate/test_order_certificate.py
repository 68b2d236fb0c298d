"""Certificates, verify, referee and claims for orderings of three or more classes."""

import json
from fractions import Fraction

import pytest

from certify.certificate.model import Certificate, read_certificate
from certify.certificate.order import order_certificate
from certify.certificate.referee import parse_race
from certify.certificate.dispatch import verify_any as verify_certificate
from certify.cli import main
from certify.orders import certify_orderings
from certify.race.order import ordering
from certify.spectrum.spectrum import SpectrumStore


@pytest.fixture(scope="module")
def family():
    store = SpectrumStore()
    fam = certify_orderings(8, (3, 5, 7), 4, store=store)
    return fam, store


def test_certificate_round_trip_and_verify(family):
    fam, store = family
    r = fam.result((5, 3, 7))
    cert = order_certificate(r, store, fam.checks)
    back = Certificate.from_dict(json.loads(cert.to_json()))
    assert back.question["kind"] == "ordering" and back.question["classes"] == (5, 3, 7)
    assert len(back.parameters["consistency"]) == 4 and all(c["ok"] for c in back.parameters["consistency"])
    assert back.lower <= r.density.lower and r.density.upper <= back.upper
    rep = verify_certificate(back)
    assert rep.ok, [c for c in rep.checks if not c.ok]
    names = " ".join(c.name for c in rep.checks)
    assert "direction vector" in names and "covariance" in names and "hypotheses: exactly GRH and LI" in names


def test_tampered_certificates_fail(family):
    fam, store = family
    d = order_certificate(fam.result((3, 5, 7)), store, fam.checks).to_dict()
    # an enclosure narrowed past the engine's
    bad = json.loads(json.dumps(d))
    mid = (Fraction(bad["answer"]["enclosure"]["lower"]) + Fraction(bad["answer"]["enclosure"]["upper"])) / 2
    bad["answer"]["enclosure"]["lower"] = str(float(mid))
    assert not verify_certificate(Certificate.from_dict(bad)).ok
    # a direction vector that is not the classes'
    bad = json.loads(json.dumps(d))
    bad["spectrum"]["groups"][0]["vector"][0]["re"]["mid"] = "1.5"
    assert not verify_certificate(Certificate.from_dict(bad)).ok
    # another ordering's question
    bad = json.loads(json.dumps(d))
    bad["question"]["classes"] = [5, 3, 7]
    assert not verify_certificate(Certificate.from_dict(bad)).ok
    # a failed consistency check recorded
    bad = json.loads(json.dumps(d))
    bad["parameters"]["consistency"][0]["ok"] = False
    assert not verify_certificate(Certificate.from_dict(bad)).ok


def test_referee_and_claims_on_orderings(tmp_path, family):
    fam, _ = family
    assert parse_race("delta(8; 3,5,7)") == ordering(8, 3, 5, 7)
    r = fam.result((3, 5, 7))
    # a value inside the enclosure, printed at 4 places, is consistent; one 1e-3 away is refuted
    good = f"{float(r.density.mid):.4f}"
    far = f"{float(r.density.mid) + 1e-3:.4f}"
    assert main(["check", "delta(8;3,5,7)", "--claim", good, "--start-digits", "6"]) == 0
    assert main(["check", "delta(8;3,5,7)", "--claim", far, "--start-digits", "6"]) == 10


@pytest.mark.slow
def test_claims_file_with_orderings(tmp_path, family):
    fam, _ = family
    good = f"{float(fam.result((3, 5, 7)).density.mid):.4f}"
    claims = tmp_path / "c.claims"
    claims.write_text(f"delta(8;3,5,7) = {good[:5]}\ndelta(8;3,5,7,1) = [0.2, 0.3]  # four classes\n")
    out = tmp_path / "out"
    assert main(["claims", str(claims), "--out", str(out), "--certificates",
                 "--start-digits", "3", "--max-digits", "4"]) == 10
    certs = sorted(p for p in out.iterdir() if p.suffix == ".json" and "report" not in p.name)
    assert certs
    assert main(["verify", str(certs[0])]) == 0


def test_cli_order_certificate(tmp_path):
    assert main(["order", "12", "5", "7", "11", "--digits", "4", "--certificate", str(tmp_path)]) == 0
    path = tmp_path / "delta_12_5_7_11.json"
    cert = read_certificate(str(path))
    assert cert.question["label"] == "delta(12;5,7,11)"
    assert verify_certificate(cert).ok


@pytest.mark.slow
def test_family_document_verifies_and_detects_a_missing_ordering(tmp_path):
    path = tmp_path / "fam.json"
    assert main(["order", "5", "1", "2", "4", "--all", "--digits", "3", "--json", str(path)]) == 0
    from certify.certificate.dispatch import verify_paths

    outs = verify_paths([str(path)])
    assert len(outs) == 7 and all(o.report.ok for o in outs)
    data = json.loads(path.read_text())
    data["certificates"] = data["certificates"][:-1]
    path.write_text(json.dumps(data))
    outs = verify_paths([str(path)])
    fam = outs[-1].report
    assert not fam.ok and any("r! orderings" in c.name and not c.ok for c in fam.checks)
