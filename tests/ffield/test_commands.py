"""The ffrace / fflpoly commands through certify.cli.main: outputs, JSON, bad input."""

import json
from fractions import Fraction

import pytest

from certify.cli import main


def test_ffrace_json_and_screen(tmp_path, capsys):
    out = tmp_path / "r.json"
    rc = main(["ffrace", "3", "t^2+1", "t+1", "1", "--digits", "9", "--leaders", "20",
               "--json", str(out)])
    assert rc == 0
    text = capsys.readouterr().out
    assert "enclosure" in text and "hypotheses" in text and "Conditional" in text
    d = json.loads(out.read_text())
    assert d["kind"] == "ffield-race" and main(["verify", str(out)]) == 0
    lo, hi = Fraction(d["answer"]["enclosure"]["lower"]), Fraction(d["answer"]["enclosure"]["upper"])
    assert 0 < hi - lo <= Fraction(1, 10**9) * 2
    # independent value: frequency of the exact cumulative sign over X <= 1000 (tolerance 0.02)
    from certify.ffield.race import empirical_frequency, exact_race_values, parse_race
    qn, G, wd = parse_race(3, "t^2+1", ["t+1", "1"])
    emp = empirical_frequency(exact_race_values(G, wd, 1000, qn), "cumulative")
    assert lo - Fraction(2, 100) <= emp <= hi + Fraction(2, 100)
    names = [h["name"] for h in d["hypotheses"]]
    assert "Weil" in names and "relations" in names
    assert all({"name", "statement", "status", "evidence"} <= set(h) for h in d["hypotheses"])
    assert all({"name", "bound"} <= set(e) for e in d["error_budget"])
    assert d["parameters"]["q"] == 3 and d["spectrum"]["l_polynomials"]
    assert d["spectrum"]["relations"]


def test_ffrace_json_stdout(capsys):
    rc = main(["ffrace", "9", "t^2+t", "z", "1", "--digits", "6", "--leaders", "0", "--json", "-"])
    assert rc == 0
    d = json.loads(capsys.readouterr().out)
    assert Fraction(d["answer"]["enclosure"]["lower"]) <= Fraction(d["answer"]["enclosure"]["upper"])


def test_fflpoly(capsys):
    rc = main(["fflpoly", "4", "t^2+z", "--max-characters", "6"])
    assert rc == 0
    out = capsys.readouterr().out
    assert "0 undecided" in out and "F_4 = F_2[z]" in out


@pytest.mark.parametrize("argv,needle", [
    (["ffrace", "6", "t^2+1", "1", "2"], "prime power"),
    (["ffrace", "1", "t^2+1", "1", "2"], "prime power"),
    (["ffrace", "3", "2*t^2+1", "1", "2"], "monic"),
    (["ffrace", "3", "2", "1", "2"], "degree >= 1"),
    (["ffrace", "3", "t^2+t", "t", "1"], "not coprime"),
    (["ffrace", "3", "t^2+1", "t^2+2", "1"], "same residue class"),
    (["ffrace", "3", "t^2+1", "t+", "1"], "cannot parse"),
    (["ffrace", "3", "t^2+1", "1", "2", "--weights", "1", "1"], "sum to 0"),
    (["ffrace", "3", "t^2+1", "1", "2", "--mode", "sideways"], "invalid choice"),
    (["ffrace", "3", "t^2+1", "1"], "at least two"),
    (["ffrace", "5", "t^2+z", "1", "2"], "prime"),
    (["fflpoly", "4", "t^2+x"], "unknown name"),
])
def test_bad_input_one_line(argv, needle, capsys):
    rc = main(argv)
    assert rc != 0
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and needle in err and "Traceback" not in err


# The three races of issue 9 that ran for 4-15 minutes in silence: each now says what it is
# doing (on a terminal: the progress display) and stops within 60 s with the limit that
# stops it named.
_SLOW_RACES = [
    pytest.param(["ffrace", "7", "t^2+1", "t+3", "2"], "dimension", id="q7"),
    pytest.param(["ffrace", "2", "t^6+t+1", "t", "1"], "limited to 32 angles", id="q2",
                 marks=pytest.mark.slow),
    pytest.param(["ffrace", "3", "t^4+t+2", "t", "1", "--mode", "degree"], "limited to 32 angles", id="q3",
                 marks=pytest.mark.slow),
]


@pytest.mark.parametrize("argv,needle", _SLOW_RACES)
def test_formerly_silent_races_explain_themselves_quickly(argv, needle, make_terminal):
    import time
    fake_terminal = make_terminal()
    t0 = time.time()
    rc = main(argv)
    elapsed = time.time() - t0
    err = fake_terminal.getvalue()
    assert elapsed < 60, elapsed
    assert rc == 3 and "not certified" in err and needle in err
    assert "ffrace: computing the L-polynomials" in err      # progress is shown on a terminal
