"""``certify table`` end to end: outputs, check values, traceability, resume, warm cache."""

import csv
import hashlib
import json
import os
from fractions import Fraction

import pytest

from certify.batch.run import run_batch
from certify.cli import main

MODULI = "3-5"
DIGITS = 6


@pytest.fixture(scope="module")
def table(tmp_path_factory):
    base = tmp_path_factory.mktemp("batch")
    out, cache = str(base / "out"), str(base / "spectra.sqlite")
    rc = main(["table", "--moduli", MODULI, "--digits", str(DIGITS), "--out", out,
               "--cache", cache, "--workers", "1", "--quiet", "--race", "5:N,R", "--race", "5:4,1"])
    return rc, out, cache


def _csv_rows(out):
    with open(os.path.join(out, "table.csv"), encoding="utf-8") as fh:
        lines = [ln for ln in fh if not ln.startswith("#")]
    return list(csv.DictReader(lines))


def test_outputs_and_check_values(table):
    rc, out, _ = table
    assert rc == 0
    for name in ["table.tex", "table.csv", "table.md", "ranking.tex", "ranking.md",
                 "ranking.csv", "batch.json"]:
        assert os.path.getsize(os.path.join(out, name)) > 0
    rows = {r["race"]: r for r in _csv_rows(out)}
    # 1 + 1 + (6 + 1) races, each two-way one also reversed: 2*(1+1+6) + 3 rows
    assert len(rows) == 2 * (1 + 1 + 6) + 3
    # Check values: delta(4;3,1) ~ 0.9959 and delta(3;2,1) ~ 0.999, the digits printed in
    # "Chebyshev's bias", Experimental Mathematics 3 (1994).
    for race, printed in [("delta(4;3,1)", "0.9959"), ("delta(3;2,1)", "0.999")]:
        r = rows[race]
        lo, hi = Fraction(r["lower"]), Fraction(r["upper"])
        assert r["certified_digits"].startswith(printed)
        assert hi - lo <= Fraction(1, 10**DIGITS) and r["target_met"] == "yes"
    # the reverse race is exactly 1 - delta, traced to the same certificate
    fwd, rev = rows["delta(4;1,3)"], rows["delta(4;3,1)"]
    assert Fraction(rev["lower"]) == 1 - Fraction(fwd["upper"])
    assert rev["derived"] == "yes" and rev["result_file"] == fwd["result_file"]
    # mean 0 (1 and 4 both squares mod 5): the law is symmetric and delta = 1/2
    r = rows["delta(5;1,4)"]
    assert Fraction(r["lower"]) <= Fraction(1, 2) <= Fraction(r["upper"])


def test_rows_trace_to_their_result_files(table):
    _, out, _ = table
    for r in _csv_rows(out):
        path = os.path.join(out, r["result_file"])
        with open(path, "rb") as fh:
            data = fh.read()
        assert hashlib.sha256(data).hexdigest() == r["result_sha256"]
        d = json.loads(data)
        if r["derived"] == "no":
            assert d["question"]["label"] == r["race"]
            assert Fraction(d["density"]["lower"]) == Fraction(r["lower"])
        assert [h["name"] for h in d["hypotheses"]] == ["GRH", "LI"]
        assert all(h["status"] == "assumed" for h in d["hypotheses"])
        assert d["batch"]["spectra"]  # the spectra (by digest) the race used
    tex = open(os.path.join(out, "table.tex"), encoding="utf-8").read()
    assert r"\toprule" in tex and r"\midrule" in tex and r"\bottomrule" in tex
    assert "GRH" in tex and "LI" in tex and "proves neither" in tex
    assert "& 0.9959" in tex and r"\times 10^{-3}$" in tex  # S column; 1 - delta(4;3,1) ~ 4.07e-3
    md = open(os.path.join(out, "ranking.md"), encoding="utf-8").read()
    # every row names its certificate (which `certify verify` accepts; tests/certificate/test_tamper.py)
    assert "GRH" in md and "certificates/" in md


def test_resume_and_warm_cache(table, tmp_path):
    _, out, cache = table
    again = run_batch([3, 4, 5], DIGITS, out, workers=1, cache_path=cache, progress=False,
                      extra=[], kinds=("two-way", "residues"))
    assert again["races_run"] == 0 and again["spectra"]["computed"] == 0
    warm_out = str(tmp_path / "warm")
    warm = run_batch([3, 4, 5], DIGITS, warm_out, workers=1, cache_path=cache, progress=False)
    assert warm["races_run"] == warm["races"] == 11
    assert warm["spectra"]["computed"] == 0 and warm["spectra"]["from_cache"] == warm["spectra"]["needed"]
    # the same spectra give the same enclosures
    for name in ["q4/two-way_4_1_3.json", "q5/residues_5.json"]:
        a = json.load(open(os.path.join(out, "results", name)))["density"]
        b = json.load(open(os.path.join(warm_out, "results", name)))["density"]
        assert (a["lower"], a["upper"]) == (b["lower"], b["upper"])


def test_cache_commands(table, capsys):
    _, _, cache = table
    assert main(["cache", "show", "--cache", cache, "--check"]) == 0
    text = capsys.readouterr().out
    assert "integrity: ok; damaged entries: 0" in text and "conductor     5" in text
    assert main(["cache", "prune", "--cache", cache]) == 2  # nothing said: refused
    assert main(["cache", "show", "--cache", cache + ".missing"]) == 2


@pytest.mark.parametrize("argv", [
    ["table", "--moduli", "2-4", "--out", "X"],
    ["table", "--moduli", "3-x", "--out", "X"],
    ["table", "--out", "X"],
    ["table", "--moduli", "3", "--digits", "0", "--out", "X"],
    ["table", "--moduli", "3", "--race", "4:2,1", "--out", "X"],
    ["table", "--moduli", "3", "--workers", "zero", "--out", "X"],
    ["table", "--moduli", "3", "--kinds", "three-way", "--out", "X"],
])
def test_bad_input_is_one_line(argv, tmp_path, capsys):
    argv = [a if a != "X" else str(tmp_path / "o") for a in argv]
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert err.startswith("certify: error:") and err.count("\n") == 1


def test_latex_tables_compile(table, tmp_path):
    """table.tex and ranking.tex compile with pdflatex (CI installs it; skipped elsewhere)."""
    import shutil
    import subprocess

    if shutil.which("pdflatex") is None:
        if os.environ.get("CI"):
            pytest.fail("pdflatex is missing in CI")
        pytest.skip("pdflatex not installed")
    _, out, _ = table
    doc = tmp_path / "doc.tex"
    doc.write_text("\\documentclass{article}\n\\usepackage{booktabs,longtable,siunitx}\n"
                   "\\begin{document}\n"
                   f"\\input{{{os.path.join(out, 'table.tex')}}}\n"
                   f"\\input{{{os.path.join(out, 'ranking.tex')}}}\n"
                   "\\end{document}\n")
    res = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex"],
                         cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert res.returncode == 0, res.stdout[-2000:]
    assert (tmp_path / "doc.pdf").stat().st_size > 1000
