"""The commands: certificate, render, verify, check, claims, demo."""

import json
import shutil
from pathlib import Path

import pytest

from certify.cli import main


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    out = tmp_path_factory.mktemp("certs")
    rc = main(["certificate", "4", "3", "1", "--digits", "12", "--out", str(out)])
    assert rc == 0
    return out


def test_certificate_command_writes_files(written):
    for name in ("delta_4_3_1.json", "delta_4_3_1.md", "delta_4_3_1.tex", "delta_4_3_1-fragment.tex"):
        assert (written / name).is_file()


def test_verify_passes_and_fails(written, tmp_path, capsys):
    good = written / "delta_4_3_1.json"
    assert main(["verify", str(good)]) == 0
    assert "VERIFIED" in capsys.readouterr().out
    d = json.loads(good.read_text())
    z = d["spectrum"]["groups"][0]["zeros"][0]
    i = z["mid"].index(".") + 8
    z["mid"] = z["mid"][:i] + str((int(z["mid"][i]) + 3) % 10) + z["mid"][i + 1:]
    bad = tmp_path / "tampered.json"
    bad.write_text(json.dumps(d))
    assert main(["verify", str(bad)]) == 4
    out = capsys.readouterr().out
    assert "MISMATCH" in out and "FAIL" in out


def test_one_line_errors(tmp_path, capsys, written):
    broken = tmp_path / "broken.json"
    broken.write_text('{"schema": "certify/race-certificate",\n  "schema_version": 1,\n  oops\n}')
    assert main(["verify", str(broken)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and f"{broken}:3: malformed JSON" in err and "Traceback" not in err
    d = json.loads((written / "delta_4_3_1.json").read_text())
    d["schema_version"] = 7
    v7 = tmp_path / "v7.json"
    v7.write_text(json.dumps(d))
    assert main(["verify", str(v7)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "v7.json: unknown schema version 7" in err
    claims = tmp_path / "paper.claims"
    claims.write_text("delta(4;3,1) = 0.9959\ndelta(4;3) = 0.9\n# ok\ndelta(5;2,1) == 0.95\n")
    assert main(["claims", str(claims), "--out", str(tmp_path)]) == 2
    err = capsys.readouterr().err.splitlines()
    assert [e.split(": ")[2] for e in err] == [f"{claims}:2", f"{claims}:4"]
    assert all(e.startswith("certify: error: ") for e in err)
    assert main(["verify", str(tmp_path / "missing.json")]) == 2


def test_check_command_exit_codes(capsys):
    assert main(["check", "4", "3", "1", "--claim", "0.9959"]) == 0
    assert "CONSISTENT" in capsys.readouterr().out
    assert main(["check", "delta(4;3,1)", "--claim", "0.9961"]) == 10
    assert "REFUTED" in capsys.readouterr().out
    assert main(["check", "4", "3", "--claim", "0.9"]) == 2


def test_render_command(written, tmp_path):
    src = tmp_path / "c.json"
    shutil.copy(written / "delta_4_3_1.json", src)
    assert main(["render", str(src), "--formats", "md,fragment"]) == 0
    assert (tmp_path / "c.md").is_file() and (tmp_path / "c-fragment.tex").is_file()


def test_demo_scenario(tmp_path):
    from certify.demo import run_demo

    s = run_demo(str(tmp_path), quiet=True)
    verdicts = {(v.claim.race.label, v.claim.text): v.verdict for v in s["verdicts"]}
    refuted = [k for k, v in verdicts.items() if v == "refuted"]
    assert refuted == [("delta(5;2,1)", "0.95218")]
    assert verdicts[("delta(4;3,1)", "0.9959")] == "consistent"
    assert all(v != "undecided" for v in verdicts.values())
    assert any(len(v.digits_tried) > 1 for v in s["verdicts"])
    assert s["ok"] and all(ok for _, ok, _, _ in s["verify"])
    report = Path(s["paths"]["report"]).read_text()
    assert "refuted" in report and "GRH" in report


def test_check_writes_a_verifiable_certificate(tmp_path, capsys):
    assert main(["check", "8", "--residues", "--claim", "0.9999...", "--certificate", str(tmp_path)]) == 0
    files = sorted(p.name for p in tmp_path.iterdir())
    assert files == ["delta_8_N_R.json", "delta_8_N_R.md"]
    assert main(["verify", str(tmp_path / "delta_8_N_R.json")]) == 0
