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


# -- the observed race (ecrace --observe X --json): a labelled, uncertified section ---------------

@pytest.fixture(scope="module")
def observed(tmp_path_factory):
    from certify.cli import main

    d = tmp_path_factory.mktemp("observed")
    assert main(["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--observe", "2000",
                 "--json", str(d / "o.json")]) == 0
    assert main(["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--observe", "0",
                 "--json", str(d / "n.json")]) == 0
    return json.loads((d / "o.json").read_text()), json.loads((d / "n.json").read_text())


def test_observation_present_when_asked_and_absent_otherwise(observed):
    from certify.certificate.ecq_evidence import _primes, trace

    o, n = observed
    validate_document(o)
    assert "observation" not in n["spectrum"] and "observe" not in n["parameters"]
    assert "--observe 0" in n["provenance"]["command_line"]
    rec = o["spectrum"]["observation"]
    assert rec["label"].startswith("observed data, not certified") and "not part" not in rec["label"]
    assert "no part of the proven enclosure" in rec["label"]
    assert o["parameters"]["observe"] == 2000 and "--observe 2000" in o["provenance"]["command_line"]
    # the exact counts against a_p by the literal point count of the verifier's evidence module
    # (Legendre symbols of the completed square; not the fast traces the observation uses)
    model = tuple(o["spectrum"]["curve"]["minimal_model"])
    aps = [trace(model, p) for p in _primes(2000)]
    assert rec["primes"] == len(aps) == 303  # pi(2000) = 303
    assert rec["primes_with_a_p_positive"] == sum(a > 0 for a in aps)
    assert rec["primes_with_a_p_negative"] == sum(a < 0 for a in aps)
    assert rec["primes_with_a_p_zero"] == sum(a == 0 for a in aps)
    # the normalised sum at the bound, recomputed here in plain floating point
    import math

    s = sum(a / math.sqrt(p) for a, p in zip(aps, _primes(2000)))
    assert abs(rec["normalised_sum_at_bound"] - s * math.log(2000) / math.sqrt(2000)) < 1e-5
    # the answer does not depend on it: the same enclosure with and without the observation
    assert o["answer"] == n["answer"]


def test_observation_rendered_in_every_format(observed, tmp_path):
    from certify.render import render_latex, render_latex_fragment, render_markdown

    o, n = observed
    co, cn = Certificate.from_dict(o), Certificate.from_dict(n)
    for render in (render_markdown, render_latex, render_latex_fragment):
        text = render(co, "o.json")
        assert "Observed data (not certified)" in text and "no part of the proven enclosure" in text
        assert "Observed data" not in render(cn, "n.json")
    md = render_markdown(co, "o.json")
    rec = o["spectrum"]["observation"]
    assert f"{rec['primes_with_a_p_positive']} with a_p > 0" in md


@pytest.mark.parametrize("name", ["positive count", "share", "bound", "label", "removed",
                                  "parameter removed", "bound too large", "added to the unobserved"])
def test_tampered_observation_rejected(observed, tmp_path, name):
    from certify.cli import main

    o, n = observed
    d = json.loads(json.dumps(n if name == "added to the unobserved" else o))
    rec = d["spectrum"].get("observation")
    if name == "positive count":
        rec["primes_with_a_p_positive"] += 1
        rec["primes_with_a_p_zero"] -= 1
    elif name == "share":
        rec["share_of_log_scale_positive"] = 0.999
    elif name == "bound":
        rec["bound"] = 3000
    elif name == "label":
        rec["label"] = "certified observation"
    elif name == "removed":
        del d["spectrum"]["observation"]
    elif name == "parameter removed":
        del d["parameters"]["observe"]
    elif name == "bound too large":
        d["parameters"]["observe"] = 10**9
    else:
        d["spectrum"]["observation"] = o["spectrum"]["observation"]
    p = tmp_path / "t.json"
    p.write_text(json.dumps(d))
    assert main(["verify", str(p)]) != 0


def test_observation_above_the_verify_limit_refused_before_work(tmp_path, capsys):
    from certify.cli import main

    assert main(["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--observe", "2000000",
                 "--json", str(tmp_path / "o.json")]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and "1000000" in err
    assert not (tmp_path / "o.json").exists()


def test_schema_lists_every_evidence_kind_with_exactly_its_fields():
    from certify.certificate.ecq_items import FIELDS
    from certify.certificate.schema import load_schema

    d = load_schema()["$defs"]["ecq_evidence"]
    assert d["properties"]["kind"]["enum"] == list(FIELDS)
    for cond in d["allOf"]:
        kind = cond["if"]["properties"]["kind"]["const"]
        data = cond["then"]["properties"]["data"]
        assert data["required"] == list(FIELDS[kind]) and data["additionalProperties"] is False


def test_verifier_itself_refuses_unknown_and_missing_fields():
    """Beside the schema: the verifier's own check fails an item with a field added or removed
    (the certificate built in memory, never validated against the schema)."""
    r, cert = certify_ecq([0, -1, 1, -10, -20], 2)
    for edit in ("added", "removed"):
        d = json.loads(cert.to_json())
        data = d["hypotheses"][0]["evidence"][0]["data"]
        if edit == "added":
            data["checked_by"] = "hand"
        else:
            data.pop("height")
        from certify.certificate.model import SECTIONS
        from certify.certificate.verify import VerifyReport
        from certify.certificate.ecq_evidence import check_ecq_evidence
        from certify.source.ellcurve import curve_from_ainvs

        # the constructor directly: no schema in the way
        tampered = Certificate(**{k: d[k] for k in SECTIONS}, kind=d["kind"],
                               schema_version=d["schema_version"])
        rep = VerifyReport("t")
        assert not check_ecq_evidence(tampered, curve_from_ainvs([0, -1, 1, -10, -20]), rep)
        names = [c.name for c in rep.failures]
        assert any("exactly the fields of that kind" in n for n in names), names
