"""The curve and twists commands through certify.cli.main."""

import json

import pytest

from certify.cli import main


def test_curve_json_to_stdout(capsys):
    assert main(["curve", "5", "t", "t^2 + 1", "--json", "-"]) == 0
    out = json.loads(capsys.readouterr().out)
    enc = out["answer"]["enclosure"]
    from fractions import Fraction
    lo, hi = Fraction(enc["lower"]), Fraction(enc["upper"])
    assert lo <= Fraction(2, 3) <= hi and hi - lo <= Fraction(1, 10**29)
    assert out["answer"]["exact"] == "2/3"
    assert {"hypotheses", "error_budget", "parameters"} <= set(out)
    assert out["spectrum"]["l_polynomial"]["coefficients"] == [1, 5, 25]
    assert any(h["name"] == "LI" for h in out["hypotheses"])


def test_curve_screen_and_file(tmp_path, capsys):
    path = tmp_path / "c.json"
    assert main(["curve", "5", "t^2 + 1", "t^3 + t + 2", "--json", str(path)]) == 0
    text = capsys.readouterr().out
    d = json.loads(path.read_text())
    # the caution names the hypotheses assumed, or says that none is
    assumed = [h["name"] for h in d["hypotheses"] if h["status"] == "assumed"]
    assert "analytic rank 1" in text
    assert ("does not prove" in text) if assumed else ("Unconditional result" in text)
    assert d["kind"] == "curve-race" and main(["verify", str(path)]) == 0
    enc = d["answer"]["enclosure"]
    assert d["spectrum"]["l_polynomial"]["analytic_rank"] == 1 and float(enc["lower"]) <= float(enc["upper"])


def test_degree_race_with_a_vanishing_limit_refuses(capsys):
    # L = (1 - 5u)(1 + 5u)(1 + 5u + 25u^2): the degree-X limit 1[X even] - 1 - (-1)^X - 2 cos(2 pi X/3)
    # is 0 for X = 2 mod 6, so the sign there is not decided by the limit: refused, exit code 3
    assert main(["curve", "5", "t^2 + 1", "t^3 + t + 2", "--mode", "degree"]) == 3
    assert "0 on the progression X = 2 mod 6" in capsys.readouterr().err


def test_twists_outputs(tmp_path, capsys):
    js, tab, fig = tmp_path / "f.json", tmp_path / "f.md", tmp_path / "f.png"
    rc = main(["twists", "5", "t", "t^2 + 1", "--degrees", "1,2", "--c", "0.5", "--json", str(js),
               "--table", str(tab), "--plot", str(fig)])
    assert rc == 0
    d = json.loads(js.read_text())
    assert d["kind"] == "twist-family" and len(d["certificates"]) == 2
    assert len(d["certificates"][1]["spectrum"]["members"]) == 20
    assert all({"hypotheses", "error_budget", "parameters", "answer"} <= set(c) for c in d["certificates"])
    assert main(["verify", str(js)]) == 0
    assert "| t^2 + 3 |" in tab.read_text()
    pytest.importorskip("matplotlib")
    assert fig.read_bytes()[:4] == b"\x89PNG"


@pytest.mark.parametrize("argv,needle", [
    (["curve", "3", "t", "t"], "characteristic 3"),
    (["curve", "9", "t", "t"], "characteristic 3"),
    (["curve", "5", "0", "t^2"], "isotrivial"),
    (["curve", "5", "t^2", "2*t^3"], "isotrivial"),
    (["curve", "7", "4*t^2", "2*t^3"], "singular"),
    (["curve", "5", "t^", "1"], "cannot parse"),
    (["curve", "5", "t", "y + 1"], "unknown name"),
    (["curve", "6", "t", "t"], "prime power"),
    (["curve", "5", "t", "t^2+1", "--width", "2"], "--width"),
    (["curve", "5", "t", "t^2+1", "--width", "nan"], "--width"),
    (["twists", "5", "t", "t^2+1", "--degrees", "0"], "--degrees"),
    (["twists", "5", "t", "t^2+1", "--sample", "x"], "--sample"),
])
def test_bad_input_is_one_line(argv, needle, capsys):
    rc = main(argv)
    err = capsys.readouterr().err
    assert rc == 2
    assert needle in err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
