"""`certify table --curves FILE`: rows ranked by bias, certificates that verify, bad input."""

import csv
import json
from fractions import Fraction

import pytest

from certify.cli import main
from certify.source.ellcurve import transform

E11, E37 = [0, -1, 1, -10, -20], [0, 0, 1, -1, 0]  # a-invariants from memory


@pytest.fixture(scope="module")
def table(tmp_path_factory):
    d = tmp_path_factory.mktemp("curves")
    other = list(transform(E11, 1, 0, 0))  # another model of the same curve
    f = d / "curves.txt"
    f.write_text("# two curves and another model of the first\n"
                 f"{E37}   # rank 1\n{E11}  # rank 0\n{other}\n")
    out = d / "out"
    assert main(["table", "--curves", str(f), "--digits", "3", "--out", str(out), "-j", "1"]) == 0
    return f, out, other


def test_rows_ranked_by_bias_from_their_certificates(table):
    f, out, other = table
    rows = list(csv.DictReader(open(out / "table.csv")))
    assert len(rows) == 3
    bias = []
    for r in rows:
        cert = json.loads((out / r["certificate"]).read_text())
        e = cert["answer"]["enclosure"]
        assert (r["lower"], r["upper"]) == (e["lower"], e["upper"])
        assert cert["question"]["ainvs"] == json.loads(r["ainvs"])
        mid = (Fraction(e["lower"]) + Fraction(e["upper"])) / 2
        bias.append(abs(mid - Fraction(1, 2)))
        assert r["conditional_on"].startswith("GRH and LI")
    assert bias == sorted(bias, reverse=True)
    # the two models of one curve: one law, the same enclosure (computed on the minimal model)
    n11 = [(r["lower"], r["upper"], r["minimal_model"]) for r in rows if r["conductor"] == "11"]
    assert len(n11) == 2 and n11[0] == n11[1]
    md = (out / "table.md").read_text()
    tex = (out / "table.tex").read_text()
    assert "GRH" in md and "LI" in md and md.count("certificates/") >= 3
    assert r"\begin{longtable}" in tex and "sha256=" in tex


def test_table_index_verifies_and_tampering_fails(table, tmp_path):
    f, out, _ = table
    assert main(["verify", str(out / "table.json")]) == 0
    idx = json.loads((out / "table.json").read_text())
    idx["rows"][0]["lower"] = "0.5"
    bad = out / "tampered.json"
    bad.write_text(json.dumps(idx))
    try:
        assert main(["verify", str(bad)]) == 4
    finally:
        bad.unlink()


def test_rerun_reuses_certificates(table, capsys):
    f, out, _ = table
    assert main(["table", "--curves", str(f), "--digits", "3", "--out", str(out), "-j", "1"]) == 0
    assert "0 certified now, 3 certificates reused" in capsys.readouterr().out


@pytest.mark.parametrize("text,extra,msg", [
    ("[0,0,0,0,0]\n", [], "singular"),
    ("[0,-1,1,-10,-20]\n[1,2]\n", [], ":2:"),
    ("# nothing\n", [], "no curve"),
    ("[0,-1,1,-10,-20]\n", ["--moduli", "3-5"], "without --moduli"),
    ("[0,-1,1,-10,-20]\n", ["--digits", "13"], "at most 12"),
])
def test_bad_curve_tables_are_one_line_errors(tmp_path, capsys, text, extra, msg):
    f = tmp_path / "c.txt"
    f.write_text(text)
    assert main(["table", "--curves", str(f), "--out", str(tmp_path / "o")] + extra) == 2
    err = capsys.readouterr().err
    assert msg in err and "Traceback" not in err
