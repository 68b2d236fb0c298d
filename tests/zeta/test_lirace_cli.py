"""`certify lirace`, and the li race through certificate, verify, check and claims files."""

import json
from fractions import Fraction

import pytest

from certify.certificate.referee import parse_race, parse_value
from certify.cli import main
from certify.errors import BadInput


def test_lirace_screen(capsys):
    assert main(["lirace", "--sig-digits", "6"]) == 0
    out = capsys.readouterr().out
    assert "delta(pi<li)" in out and "pi(x) < li(x)" in out
    assert "1 - delta in [2.6299" in out and "significant digits certified: 2.6299" in out
    assert "RH:" in out and "LI:" in out and "Conditional result" in out
    assert "sign changes found there, so RH holds to that height" in out
    for term in ("aliasing", "frequency truncation", "residual zeros", "rounding"):
        assert term in out


def test_lirace_json_stdout(capsys):
    # --json writes the certificate of the final round (one shape for every command)
    assert main(["lirace", "pi>li", "-s", "8", "--json", "-"]) == 0
    d = json.loads(capsys.readouterr().out)
    assert d["kind"] == "dirichlet-race"
    assert d["question"]["label"] == "delta(pi>li)" and d["question"]["modulus"] == 1
    assert [h["name"] for h in d["hypotheses"]] == ["RH", "LI"]
    assert all(h["status"] == "assumed" and h["evidence"] for h in d["hypotheses"])
    assert len(d["error_budget"]) == 4 and d["parameters"]["zeros_used"] > 0
    s = d["answer"]["small_side"]
    assert s["name"] == "delta" and s["significant_digits"] >= 8
    lo, hi = Fraction(s["lower"]), Fraction(s["upper"])
    # published: delta(pi>li) ~ 2.6e-7 ("Chebyshev's bias", Experimental Mathematics 3 (1994))
    assert lo <= Fraction(263, 10**9) <= hi + Fraction(1, 10**9)
    # both are outward roundings of the same proven interval: they overlap, and the
    # small side is narrow relative to its size
    enc = d["answer"]["enclosure"]
    assert lo <= Fraction(enc["upper"]) and Fraction(enc["lower"]) <= hi
    assert (hi - lo) / lo < Fraction(1, 10**8)
    assert d["answer"]["mean"] == "-1"
    rh = next(e for e in d["hypotheses"][0]["evidence"] if e["kind"] == "zero-count")["data"]
    assert rh["verified"] and rh["count"] == rh["sign_changes"] > 20


def test_lirace_json_file_and_absolute_digits(tmp_path, capsys):
    path = tmp_path / "li.json"
    assert main(["lirace", "gt", "--digits", "9", "--json", str(path)]) == 0
    d = json.loads(path.read_text())
    assert Fraction(d["answer"]["target_width"]) == Fraction(1, 10**9) and d["answer"]["target_met"]
    assert "delta(pi>li)" in capsys.readouterr().out
    assert main(["verify", str(path)]) == 0


@pytest.mark.parametrize("argv", [["lirace", "pi=li"], ["lirace", "-s", "0"], ["lirace", "-s", "51"],
                                  ["lirace", "-s", "x"], ["lirace", "-s", "5", "-d", "5"],
                                  ["lirace", "-d", "61"], ["lirace", "--bogus"],
                                  ["lirace", "lt", "gt"]])
def test_lirace_bad_input(argv, capsys):
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert err.startswith("certify: error: ") and err.count("\n") == 1 and "Traceback" not in err


def test_parse_race_and_scientific_claims():
    assert parse_race("delta(pi<li)").label == "delta(pi<li)"
    assert parse_race("δ( pi > li )").label == "delta(pi>li)"
    with pytest.raises(BadInput):
        parse_race("delta(pi<=li)")
    lo, hi, meaning, _ = parse_value("2.63e-7")
    assert (lo, hi) == (Fraction("2.625e-7"), Fraction("2.635e-7")) and "3 significant" in meaning
    lo, hi, meaning, _ = parse_value("2.6e-7...")
    assert (lo, hi) == (Fraction("2.6e-7"), Fraction("2.7e-7")) and "truncation" in meaning
    with pytest.raises(BadInput):
        parse_value("2.6e-7e3")


def test_check_published_value(capsys):
    """"Chebyshev's bias", Experimental Mathematics 3 (1994) prints 0.99999973: consistent as a
    truncation; as a rounding it is refuted (the value is 0.9999997370...)."""
    assert main(["check", "delta(pi<li)", "--claim", "0.99999973..."]) == 0
    assert "CONSISTENT" in capsys.readouterr().out
    assert main(["check", "delta(pi<li)", "--claim", "0.99999973"]) == 10
    assert "REFUTED" in capsys.readouterr().out
    assert main(["check", "delta(pi>li)", "--claim", "2.6e-7"]) == 0
    assert main(["check", "delta(pi>li)", "--claim", "2.64e-7"]) == 10


def test_certificate_verify_and_tamper(tmp_path, capsys):
    assert main(["certificate", "delta(pi<li)", "--digits", "12", "--out", str(tmp_path),
                 "--formats", "json,md"]) == 0
    path = tmp_path / "delta_pi_lt_li.json"
    md = (tmp_path / "delta_pi_lt_li.md").read_text()
    assert "RH — assumed" in md and "zeta(s)" in md and "1 - delta" in md
    d = json.loads(path.read_text())
    assert d["question"]["kind"] == "pi<li" and d["answer"]["small_side"]["name"] == "1 - delta"
    assert [h["name"] for h in d["hypotheses"]] == ["RH", "LI"]
    assert any(e["kind"] == "zero-count" and e["data"].get("verified")
               for e in d["hypotheses"][0]["evidence"])
    assert main(["verify", str(path)]) == 0
    assert "VERIFIED" in capsys.readouterr().out
    # a reader who edits the small side's digits is caught
    d["answer"]["small_side"]["certified"] = "2.63e-7"
    bad = tmp_path / "tampered.json"
    bad.write_text(json.dumps(d))
    assert main(["verify", str(bad)]) == 4
    assert "small side" in capsys.readouterr().out
    # and so is one who swaps the direction of the race
    d = json.loads(path.read_text())
    d["question"]["kind"] = "pi>li"
    bad.write_text(json.dumps(d))
    assert main(["verify", str(bad)]) == 4


def test_claims_file_with_li_lines(tmp_path, capsys):
    claims = tmp_path / "li.claims"
    claims.write_text("# the 1994 values\n"
                      "delta(pi<li) = 0.99999973...   # truncated\n"
                      "delta(pi>li) = 2.6e-7\n")
    assert main(["claims", str(claims), "--out", str(tmp_path)]) == 0
    assert "2 claims: 2 consistent" in capsys.readouterr().out
    report = (tmp_path / "li-report.json").read_text()
    assert "delta(pi<li)" in report and "delta(pi>li)" in report
    claims.write_text("delta(pi<li) = 0.9999997\ndelta(pi<>li) = 0.5\n")
    assert main(["claims", str(claims), "--out", str(tmp_path)]) == 2


def test_lirace_writes_a_certificate_that_verifies(tmp_path, capsys):
    assert main(["lirace", "-s", "12", "--certificate", str(tmp_path)]) == 0
    out = capsys.readouterr().out
    path = tmp_path / "delta_pi_lt_li.json"
    assert f"wrote json      {path}" in out
    d = json.loads(path.read_text())
    assert d["answer"]["small_side"]["significant_digits"] >= 12
    assert main(["verify", str(path)]) == 0
    assert main(["lirace", "--certificate", str(tmp_path), "--formats", "pdf"]) == 2
