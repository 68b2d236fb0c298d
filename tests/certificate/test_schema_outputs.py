"""One JSON Schema (certify/data/certify-v2.schema.json) validates the --json output of every
command and every certificate; every document carries the same envelope."""

import json

import jsonschema
import pytest

from certify.certificate.schema import load_schema
from certify.cli import main


def _validate(text: str) -> dict:
    d = json.loads(text)
    jsonschema.Draft202012Validator(load_schema()).validate(d)
    assert d["schema"] == "certify/certificate" and d["schema_version"] == 2
    return d


CERTIFICATE_COMMANDS = {
    "race": (["race", "4", "3", "1", "--digits", "6"], "dirichlet-race"),
    "residues": (["residues", "8", "--digits", "5"], "dirichlet-race"),
    "weighted": (["weighted", "5", "1:1", "4:1", "2:-1", "3:-1", "--digits", "5"], "dirichlet-race"),
    "ffrace": (["ffrace", "3", "t^2+1", "t+1", "1", "--digits", "5", "--leaders", "5"], "ffield-race"),
    "curve": (["curve", "5", "t", "t^2 + 1"], "curve-race"),
}


@pytest.mark.parametrize("name", list(CERTIFICATE_COMMANDS))
def test_result_commands_write_certificates(name, tmp_path, capsys):
    argv, kind = CERTIFICATE_COMMANDS[name]
    out = tmp_path / "r.json"
    assert main(argv + ["--json", str(out)]) == 0
    d = _validate(out.read_text())
    assert d["kind"] == kind
    # the same shape for every setting: question, answer with enclosure and digits, ...
    for section in ("question", "answer", "hypotheses", "error_budget", "parameters", "spectrum",
                    "provenance", "references", "caution"):
        assert section in d
    assert {"lower", "upper"} == set(d["answer"]["enclosure"])
    # and verify accepts what the command wrote, with --json in the same schema
    capsys.readouterr()
    assert main(["verify", str(out), "--json", "-"]) == 0
    rep = _validate(capsys.readouterr().out)
    assert rep["kind"] == "verify-report" and rep["ok"]


def test_report_commands_share_the_envelope(tmp_path, capsys):
    assert main(["fflpoly", "3", "t^2+1", "--json", "-"]) == 0
    assert _validate(capsys.readouterr().out)["kind"] == "l-polynomials"
    assert main(["check", "4", "3", "1", "--claim", "0.9959", "--max-digits", "6",
                 "--json", "-"]) == 0
    assert _validate(capsys.readouterr().out)["kind"] == "referee-report"
    claims = tmp_path / "p.claims"
    claims.write_text("delta(4;3,1) = 0.9959\n")
    assert main(["claims", str(claims), "--out", str(tmp_path), "--max-digits", "6",
                 "--json", "-"]) == 0
    assert _validate(capsys.readouterr().out)["kind"] == "referee-report"
    # one twist degree: the certificate itself; several: a bundle of certificates
    assert main(["twists", "5", "t", "t^2 + 1", "--degrees", "1", "--json", "-"]) == 0
    assert _validate(capsys.readouterr().out)["kind"] == "twist-family-race"
    assert main(["twists", "5", "t", "t^2 + 1", "--degrees", "1,2", "--json", "-"]) == 0
    b = _validate(capsys.readouterr().out)
    assert b["kind"] == "twist-family" and all(c["kind"] == "twist-family-race" for c in b["certificates"])


def test_written_certificate_files_validate(tmp_path):
    assert main(["certificate", "4", "3", "1", "--digits", "6", "--out", str(tmp_path),
                 "--formats", "json"]) == 0
    _validate((tmp_path / "delta_4_3_1.json").read_text())


@pytest.mark.slow
def test_slow_commands_share_the_envelope(tmp_path, capsys):
    assert main(["lirace", "pi>li", "--sig-digits", "5", "--json", "-"]) in (0, 5)
    assert _validate(capsys.readouterr().out)["kind"] == "dirichlet-race"
    assert main(["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--json", "-"]) in (0, 5)
    assert _validate(capsys.readouterr().out)["kind"] == "ecq-race"
    assert main(["table", "--moduli", "3-5", "--digits", "5", "--out", str(tmp_path / "t"),
                 "--json", "-", "--no-cache"]) == 0
    assert _validate(capsys.readouterr().out)["kind"] == "batch-report"
