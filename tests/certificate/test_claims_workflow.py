"""The referee's claims workflow (issue 11, item 5): a bad line is reported with its line number
and the other lines are still checked; a claimed value outside [0, 1] is refused as such; the
terminal and the report show each claim once.

The race delta(4;3,1) ~ 0.9959 ("Chebyshev's bias", Experimental Mathematics 3 (1994)).
"""

import json

import pytest

from certify.cli import main

LINES = [
    "# a preprint's table",
    "delta(4;3,1) = 1.2            # above 1",
    "delta(4;3,1) = -0.1           # below 0",
    "delta(4;3,1) = [0.9, 1.5]     # an interval reaching past 1",
    "delta(4;3,1) = 0.9959         # the published value",
    "delta(4;3 1) = 0.5            # malformed race",
    "delta(4;3,1) = 0.5            # refuted",
    "delta(4;3,1) = zero point 9   # malformed value",
]


@pytest.fixture(scope="module")
def run(tmp_path_factory):
    d = tmp_path_factory.mktemp("claims")
    f = d / "paper.claims"
    f.write_text("\n".join(LINES) + "\n")
    import contextlib
    import io

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        rc = main(["claims", str(f), "--out", str(d / "r"), "--max-digits", "6"])
    return {"rc": rc, "out": out.getvalue(), "err": err.getvalue(), "file": str(f),
            "md": (d / "r" / "paper-report.md").read_text(),
            "json": json.loads((d / "r" / "paper-report.json").read_text())}


def test_out_of_range_values_are_refused_as_such_with_their_lines(run):
    for line in (2, 3, 4):
        msg = [ln for ln in run["err"].splitlines() if f"{run['file']}:{line}:" in ln]
        assert len(msg) == 1 and "outside [0, 1]" in msg[0], run["err"]
        assert f":{line}:" in run["md"]


def test_malformed_lines_are_reported_and_the_others_checked(run):
    errs = run["err"].splitlines()
    assert any(f"{run['file']}:6:" in ln for ln in errs)
    assert any(f"{run['file']}:8:" in ln for ln in errs)
    assert "Traceback" not in run["err"]
    verdicts = [c["verdict"] for c in run["json"]["claims"]]
    assert verdicts == ["consistent", "refuted"]
    assert len(run["json"]["bad_lines"]) == 5
    assert run["rc"] == 10  # a refuted claim decides the exit code


def test_each_claim_is_shown_once(run):
    out = run["out"].splitlines()
    assert sum("CONSISTENT" in ln for ln in out) == 1
    assert sum("REFUTED" in ln for ln in out) == 1
    assert sum(":5:" in ln for ln in out) == 1 and sum(":7:" in ln for ln in out) == 1
    rows = [ln for ln in run["md"].splitlines() if ln.startswith("| ") and "delta(4;3,1)" in ln]
    assert len(rows) == 2
    # a bad line is listed once, among the lines not checked, never as a claim
    assert sum("1.2" in ln for ln in run["md"].splitlines()) == 1
    assert "2 claims: 1 consistent, 1 refuted" in run["out"] and "5 bad line(s)" in run["out"]


@pytest.mark.parametrize("value", ["1.3", "-0.01", "[0.5, 1.01]"])
def test_check_refuses_a_claim_outside_the_unit_interval(value, capsys):
    assert main(["check", "4", "3", "1", "--claim", value, "--max-digits", "6"]) == 2
    err = capsys.readouterr().err
    assert "outside [0, 1]" in err and len(err.strip().splitlines()) == 1
