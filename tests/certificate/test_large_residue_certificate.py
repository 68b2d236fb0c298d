"""A residue race of a modulus above 2000 (built from the factorisation of q, no class
weights stored) writes a certificate that the schema accepts and `verify` re-checks."""

import json

import jsonschema
import pytest

from certify.certificate.schema import load_schema
from certify.cli import main


@pytest.mark.slow
def test_structure_residue_certificate_validates_and_verifies(tmp_path, capsys):
    out = tmp_path / "r.json"
    # 2005 = 5 * 401: three real characters (conductors 5, 401, 2005), mean 4
    assert main(["residues", "2005", "--digits", "4", "--json", str(out), "--no-progress"]) == 0
    d = json.loads(out.read_text())
    jsonschema.Draft202012Validator(load_schema()).validate(d)
    assert d["question"]["weights"] == [] and d["question"]["modulus"] == 2005
    # the argument-principle count is established for every L-function (conductors 401 and
    # 2005 by the smoothed sum, docs/method.md section 3e) and equals the sign changes
    counts = [e for h in d["hypotheses"] for e in h["evidence"] if e["kind"] == "zero-count"]
    assert len(counts) == 3
    assert all(e["data"]["established"] and e["data"]["verified"] for e in counts)
    assert main(["verify", str(out), "--no-progress"]) == 0
    # one class weight alone is no residue race: the schema refuses it
    d["question"]["weights"] = [{"class": 1, "weight": "-1"}]
    try:
        jsonschema.Draft202012Validator(load_schema()).validate(d)
    except jsonschema.ValidationError:
        pass
    else:
        raise AssertionError("a residue race with a single weight passed the schema")


@pytest.mark.slow
def test_residue_certificate_above_conductor_3000_carries_the_count_and_tamper_is_caught(
        tmp_path, capsys):
    """3027 = 3 * 1009: the real character of conductor 3027 is above the old cap of the
    argument-principle count (Arb's boxes, cost ~ q): its count is now established by the
    smoothed sum, verify re-derives it, and an edited count or an edited "not established"
    is rejected."""
    import copy

    from certify.certificate.build import evidence_text
    from certify.certificate.model import Certificate
    from certify.certificate.verify import verify_certificate

    out = tmp_path / "r.json"
    assert main(["residues", "3027", "--digits", "4", "--json", str(out), "--no-progress"]) == 0
    d = json.loads(out.read_text())
    counts = {e["l_function"]: e for h in d["hypotheses"] for e in h["evidence"]
              if e["kind"] == "zero-count"}
    big = counts["3027.3026"]
    assert big["data"]["established"] and big["data"]["verified"] and big["data"]["count"] >= 1
    assert "verified to height" in big["text"]
    assert all(e["data"]["established"] for e in counts.values())
    assert verify_certificate(Certificate.from_dict(copy.deepcopy(d))).ok
    name = ("GRH evidence for L(s, chi_{3027,3026}): argument-principle count, no zero missing "
            "below the isolation height")
    # the stored count changed (its sentence regenerated, so only the recount can tell)
    t = copy.deepcopy(d)
    e = next(e for h in t["hypotheses"] for e in h["evidence"]
             if e["kind"] == "zero-count" and e["l_function"] == "3027.3026")
    e["data"]["count"] += 1
    e["data"]["verified"] = e["data"]["count"] == e["data"]["sign_changes"]
    e["text"] = evidence_text(e)
    rep = verify_certificate(Certificate.from_dict(t))
    assert not rep.ok and name in [c.name for c in rep.failures]
    # "not established" where the recount establishes it: rejected too (it is re-derived)
    t = copy.deepcopy(d)
    e = next(e for h in t["hypotheses"] for e in h["evidence"]
             if e["kind"] == "zero-count" and e["l_function"] == "3027.3026")
    e["data"] = {"established": False, "height": e["data"]["height"]}
    e["text"] = evidence_text(e)
    rep = verify_certificate(Certificate.from_dict(t))
    assert not rep.ok and name in [c.name for c in rep.failures]
