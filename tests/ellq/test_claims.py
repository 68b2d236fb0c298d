"""Curve claims: `certify check` and claims files with delta(E[a1,a2,a3,a4,a6]>0) lines."""

import json
import random

import pytest

from certify.certificate.referee import Claim, parse_claim_line, parse_race, parse_value, referee
from certify.cli import main
from certify.ecrace import certify_ec_race
from certify.errors import BadInput

E11 = [0, -1, 1, -10, -20]  # conductor 11 (a-invariants from memory)


def test_parse_curve_races():
    r = parse_race("delta(E[0,-1,1,-10,-20]>0)")
    assert (r.kind, r.ainvs, r.side) == ("ecq-trace-sum", tuple(E11), ">0")
    assert parse_race(" delta( E[0, -1, 1, -10, -20] < 0 ) ").side == "<0"
    assert parse_race("delta(E[0,-1,1,-10,-20])").side == ">0"  # the side defaults to >0
    assert parse_race(r.label) == r  # the label reads back


@pytest.mark.parametrize("line", [
    "delta(E[0,0,0,0,0]>0) = 0.5",          # singular
    "delta(E[0,0,0,-3,2]>0) = 0.5",         # singular (a node)
    "delta(E[0,1/2,0,0,1]>0) = 0.5",        # not integers
    "delta(E[1,2,3]>0) = 0.5",              # three invariants
    "delta(E[0,-1,1,-10,-20]=0) = 0.5",     # no such side
    "delta(E[" + "9" * 50 + ",0,0,0,1]>0) = 0.5",  # absurd size
    "delta(E[0,-1,1,-10,-20]>0) = 1.5",     # not a density
])
def test_bad_curve_claim_lines_are_one_line_errors(line):
    with pytest.raises(BadInput) as exc:
        parse_claim_line(line)
    assert "\n" not in str(exc.value)


def _claim(race_text, value):
    lo, hi, meaning, places = parse_value(value)
    return Claim(parse_race(race_text), value, lo, hi, meaning, places)


def test_curve_claims_consistent_refuted_and_complement():
    """A rounding of the certified value is consistent, a neighbour 1e-3 away refuted; the side
    <0 is decided against 1 - delta(>0) (random digit counts)."""
    rng = random.Random(4)
    r = certify_ec_race(E11, 6)
    mid = (r.density.lower + r.density.upper) / 2
    places = rng.choice([3, 4])
    text = f"{float(mid):.{places}f}"
    v = referee(_claim("delta(E[0,-1,1,-10,-20]>0)", text), 3, 8)
    assert v.verdict == "consistent" and v.lower <= mid <= v.upper
    off = f"{float(mid) + 10 ** -places:.{places}f}"
    assert referee(_claim("delta(E[0,-1,1,-10,-20]>0)", off), 3, 8).verdict == "refuted"
    neg = f"{1 - float(mid):.{places}f}"
    w = referee(_claim("delta(E[0,-1,1,-10,-20]<0)", neg), 3, 8)
    assert w.verdict == "consistent" and w.lower <= 1 - mid <= w.upper
    # at equal targets the two sides' enclosures are exact complements
    a = referee(_claim("delta(E[0,-1,1,-10,-20]>0)", "[0, 1]"), 3, 3)
    b = referee(_claim("delta(E[0,-1,1,-10,-20]<0)", "[0, 1]"), 3, 3)
    assert (b.lower, b.upper) == (1 - a.upper, 1 - a.lower)


def test_claims_file_with_curve_lines_and_bad_lines(tmp_path, capsys):
    f = tmp_path / "paper.claims"
    f.write_text("# curves\n"
                 "delta(E[0,-1,1,-10,-20]>0) = 0.977   # Table 3\n"
                 "delta(E[0,0,0,0,0]>0) = 0.5           # singular: a bad line\n"
                 "delta(E[0,-1,1,-10,-20]<0) = 0.1      # refuted\n")
    rc = main(["claims", str(f), "--out", str(tmp_path / "out"), "--max-digits", "6",
               "--start-digits", "3", "--certificates"])
    out = capsys.readouterr()
    assert rc == 10  # a claim refuted
    assert f"{f}:3:" in out.err and "singular" in out.err
    rep = json.loads((tmp_path / "out" / "paper-report.json").read_text())
    verdicts = [c["verdict"] for c in rep["claims"]]
    assert verdicts == ["consistent", "refuted"] and len(rep["bad_lines"]) == 1


def test_check_command_writes_a_curve_certificate_that_verifies(tmp_path, capsys):
    assert main(["check", "delta(E[0,-1,1,-10,-20]>0)", "--claim", "0.98", "--start-digits", "2",
                 "--max-digits", "4", "--out", str(tmp_path)]) == 0
    assert "CONSISTENT" in capsys.readouterr().out
    files = sorted(p.name for p in tmp_path.iterdir() if p.suffix == ".json")
    assert len(files) == 1
    assert main(["verify", str(tmp_path / files[0])]) == 0
    assert main(["check", "delta(E[0,0,0,0,0]>0)", "--claim", "0.5"]) == 2
    assert "singular" in capsys.readouterr().err
