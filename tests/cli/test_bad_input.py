"""Bad input over every command: one clear line, a non-zero exit, no traceback, within 5 s.

Each case calls ``certify.cli.main(argv)`` in-process (fast).  A case fails
if main raises (a traceback), returns 0 (a silent success), prints nothing
on standard error, prints a Python traceback, or takes more than 5 s
(every refusal must come before the work, from the estimates and the
checks of the outputs).
"""

from __future__ import annotations

import json
import os
import sqlite3
import stat
import time

import pytest

from certify.cli import main

# {tmp}: a fresh folder; {file}: an existing plain file; {dir}: an existing folder;
# {cert}: a valid certificate; {claims_*}: claims files; {cache_*}: cache files.
HUGE = "9" * 100_000
CASES = [
    # -- race ---------------------------------------------------------------------
    ["race"], ["race", "4", "3"], ["race", "x", "3", "1"], ["race", "4", "3", "3"],
    ["race", "4", "2", "1"], ["race", "2", "1", "1"], ["race", "0", "1", "2"],
    ["race", "-5", "1", "2"], ["race", "9" * 40, "1", "2"], ["race", "1e400", "1", "2"],
    ["race", HUGE, "1", "2"], ["race", "4", HUGE, "1"],
    ["race", "4", "3", "1", "--digits", "0"], ["race", "4", "3", "1", "--digits", "-3"],
    ["race", "4", "3", "1", "--digits", "1e400"], ["race", "4", "3", "1", "--digits", "100000"],
    ["race", "4", "3", "1", "--digits", "abc"], ["race", "4", "3", "1", "--digits", HUGE],
    ["race", "4", "3", "1", "--width", "0"], ["race", "4", "3", "1", "--width", "2"],
    ["race", "4", "3", "1", "--width", "nan"], ["race", "4", "3", "1", "--width", "inf"],
    ["race", "4", "3", "1", "--width", "1e-400"], ["race", "4", "3", "1", "--width", "-1e-3"],
    ["race", "4", "3", "1", "--width", "1e-999"],
    ["race", "4", "3", "1", "--digits", "5", "--width", "1e-5"],
    ["race", "4", "3", "1", "--json", ""], ["race", "4", "3", "1", "--json", "{dir}"],
    ["race", "4", "3", "1", "--json", "{file}/x.json"],
    ["race", "999983", "2", "1", "--digits", "2"], ["race", "10007", "2", "1"],
    ["race", "4", "3", "1", "--limit", "foo"], ["race", "4", "3", "1", "--limit", "races=abc"],
    ["race", "4", "3", "1", "--limit", "bogus=5"], ["race", "4", "3", "1", "--limit", "races=inf"],
    ["race", "4", "3", "1", "--no-such-option"], ["race", "1000001", "1", "2"],
    # -- residues -------------------------------------------------------------------
    ["residues"], ["residues", "8x"], ["residues", "3", "4"], ["residues", "1"],
    ["residues", "4", "--digits", "0"], ["residues", "1000000007"], ["residues", "1e400"],
    ["residues", "4849845", "--limit", "residue-modulus=1e6"], ["residues", "10007", "--limit", "residue-modulus=1e4"],
    ["residues", "9" * 13],
    ["residues", "8", "--json", ""], ["residues", "8", "--json", "{dir}"],
    # -- weighted -------------------------------------------------------------------
    ["weighted", "5"], ["weighted", "5", "1:1"], ["weighted", "5", "1:1", "4:1"],
    ["weighted", "5", "1:1e400", "4:-1e400", "2:1"], ["weighted", "5", "1:x", "4:-1"],
    ["weighted", "5", "1", "4"], ["weighted", "5", "1:1", "1:-1"], ["weighted", "5", "5:1", "4:-1"],
    ["weighted", "5", "1:1/0", "4:-1"], ["weighted", "5", "1:0", "4:0"],
    ["weighted", "5", "1:1", "4:-1", "--digits", "0"], ["weighted", "x", "1:1", "4:-1"],
    ["weighted", "5", f"1:{HUGE}", f"4:-{HUGE}", "2:1"],
    ["weighted", "5", "1:1", "4:-1", "--json", "{dir}"],
    # -- certificate ------------------------------------------------------------------
    ["certificate"], ["certificate", "4", "3"], ["certificate", "delta(4;3,3)"],
    ["certificate", "delta(4;3,1)", "--residues"], ["certificate", "4", "--residues", "--weights", "1:1"],
    ["certificate", "4", "3", "1", "--formats", "pdf"], ["certificate", "4", "3", "1", "--formats", ""],
    ["certificate", "4", "3", "1", "--name", "../x"], ["certificate", "4", "3", "1", "--name", "a/b"],
    ["certificate", "4", "3", "1", "--name", ""], ["certificate", "4", "3", "1", "--name", ".."],
    ["certificate", "4", "3", "1", "--out", "{file}"], ["certificate", "4", "3", "1", "--out", ""],
    ["certificate", "4", "3", "1", "--json", ""], ["certificate", "4", "3", "1", "--json", "{dir}"],
    ["certificate", "4", "3", "1", "--digits", "0"], ["certificate", "999983", "2", "1"],
    ["certificate", "weighted(5;1:1,4:1)"], ["certificate", "nonsense(4)"],
    # -- render -----------------------------------------------------------------------
    ["render"], ["render", "{tmp}/missing.json"], ["render", "{file}"], ["render", "{dir}"],
    ["render", "{cert}", "--formats", "xls"], ["render", "{cert}", "--out", "{file}"],
    ["render", "{cert}", "--name", "../../x"], ["render", "{empty_json}"], ["render", "{list_json}"],
    ["render", "{deep_json}"], ["render", "{binary}"],
    # -- verify -----------------------------------------------------------------------
    ["verify"], ["verify", "{tmp}/missing.json"], ["verify", "{file}"], ["verify", "{dir}"],
    ["verify", "{empty_json}"], ["verify", "{list_json}"], ["verify", "{deep_json}"], ["verify", "{binary}"],
    ["verify", "{cert}", "--json", "{dir}"], ["verify", "{cert}", "--json", ""],
    ["verify", "{cert}", "--limit", "files=0"], ["verify", "{forged_cert}"],
    # -- check ------------------------------------------------------------------------
    ["check", "4", "3", "1"], ["check", "4", "3", "1", "--claim", "abc"],
    ["check", "4", "3", "1", "--claim", "1.5"], ["check", "4", "3", "1", "--claim", "-0.2"],
    ["check", "4", "3", "1", "--claim", "[0.9, 0.8]"], ["check", "4", "3", "1", "--claim", "[1.1, 1.2]"],
    ["check", "4", "3", "1", "--claim", "0." + "9" * 100_000],
    ["check", "4", "3", "1", "--claim", "1e400"], ["check", "4", "3", "1", "--claim", ""],
    ["check", "4", "3", "1", "--claim", "0.99", "--start-digits", "10", "--max-digits", "5"],
    ["check", "4", "3", "1", "--claim", "0.99", "--start-digits", "0"],
    ["check", "4", "3", "1", "--claim", "0.99", "--max-digits", "1000"],
    ["check", "4", "3", "1", "--claim", "0.99", "--digits", "x"],
    ["check", "4", "3", "1", "--claim", "0.99", "--out", "{file}"],
    ["check", "4", "3", "1", "--claim", "0.99", "--json", ""],
    ["check", "4", "3", "1", "--claim", "0.99", "--name", "../y"],
    ["check", "999983", "2", "1", "--claim", "0.5"], ["check", "4", "4", "1", "--claim", "0.5"],
    # -- claims -----------------------------------------------------------------------
    ["claims"], ["claims", "{tmp}/missing.claims"], ["claims", "{dir}"], ["claims", "{binary}"],
    ["claims", "{claims_empty}", "--out", "{tmp}/r"], ["claims", "{claims_all_bad}", "--out", "{tmp}/r"],
    ["claims", "{claims_one_bad}", "--out", "{file}"], ["claims", "{claims_one_bad}", "--json", ""],
    ["claims", "{claims_one_bad}", "--start-digits", "9", "--max-digits", "4"],
    ["claims", "{claims_huge_value}", "--out", "{tmp}/r"], ["claims", "{claims_out_of_range}", "--out", "{tmp}/r"],
    ["claims", "{claims_large_q}", "--out", "{tmp}/r"],
    # -- demo -------------------------------------------------------------------------
    ["demo", "--out", "{file}"], ["demo", "--json", ""], ["demo", "--json", "{dir}"], ["demo", "extra"],
    # -- table ------------------------------------------------------------------------
    ["table"], ["table", "--out", "{tmp}/t"], ["table", "--moduli", "3-2000", "--out", "{tmp}/t"],
    ["table", "--moduli", "30-3", "--out", "{tmp}/t"], ["table", "--moduli", "2", "--out", "{tmp}/t"],
    ["table", "--moduli", "x", "--out", "{tmp}/t"], ["table", "--moduli", "3-1e400", "--out", "{tmp}/t"],
    ["table", "--moduli", "3-" + "9" * 50, "--out", "{tmp}/t"], ["table", "--moduli", ",", "--out", "{tmp}/t"],
    ["table", "--moduli", "3-30", "--out", "{file}"], ["table", "--moduli", "3-30", "--out", ""],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--digits", "0"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--digits", "61"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--kinds", "three-way"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--kinds", ","],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--workers", "0"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--workers", "100000"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--top", "0"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--cache", "{dir}"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--cache", ""],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--json", "{dir}"],
    ["table", "--moduli", "3-30", "--out", "{tmp}/t", "--limit", "races=10"],
    ["table", "--race", "4:3,3", "--out", "{tmp}/t"], ["table", "--race", "x", "--out", "{tmp}/t"],
    ["table", "--race", "5:1=1e400,4=-1e400,2=1", "--out", "{tmp}/t"],
    ["table", "--moduli", "3-2100", "--kinds", "residues", "--out", "{tmp}/t"],
    # -- cache ------------------------------------------------------------------------
    ["cache"], ["cache", "show", "--cache", "{tmp}/none.sqlite"], ["cache", "show", "--cache", "{file}"],
    ["cache", "show", "--cache", "{dir}"], ["cache", "show", "--cache", "{cache_damaged}", "--check"],
    ["cache", "prune", "--cache", "{cache_ok}"], ["cache", "prune", "--cache", "{tmp}/none.sqlite", "--all"],
    ["cache", "prune", "--cache", "{cache_ok}", "--conductor-above", "x"],
    ["cache", "frobnicate"], ["cache", "show", "--cache", "{file}", "--check"],
    # -- ffrace / fflpoly ---------------------------------------------------------------
    ["ffrace"], ["ffrace", "3"], ["ffrace", "4x", "t^2+1", "t+1", "1"], ["ffrace", "6", "t^2+1", "t+1", "1"],
    ["ffrace", "3", "t^2+1", "t+1", "t+1"], ["ffrace", "3", "2*t^2+1", "t+1", "1"],
    ["ffrace", "3", "t^2+1", "t", "1", "--digits", "0"], ["ffrace", "3", "t^2+1", "t+1", "1", "--width", "5"],
    ["ffrace", "3", "t^2+1", "t+1", "1", "--weights", "1", "1"],
    ["ffrace", "3", "t^2+1", "t+1", "1", "--mode", "sideways"],
    ["ffrace", "3", "t^30+t+1", "t+1", "1"], ["ffrace", "3", "t^2+1", "t+1", "1", "--leaders", "-1"],
    ["ffrace", "3", "t^2+1", "t+1", "1", "--json", ""], ["ffrace", "3", "t^2+1", "t+1", "1", "--json", "{dir}"],
    ["ffrace", "3", "t^" + "9" * 40 + "+1", "t+1", "1"], ["ffrace", "1e400", "t^2+1", "t+1", "1"],
    ["fflpoly"], ["fflpoly", "3", "t^40+1"], ["fflpoly", "3", "t^2+1", "--max-characters", "-1"],
    ["fflpoly", "3", "t^2+1", "--json", ""], ["fflpoly", "3", "(t"],
    # -- curve / twists ---------------------------------------------------------------
    ["curve"], ["curve", "3", "t", "t+1"], ["curve", "5", "0", "t"], ["curve", "5", "t^2+1", "t^3+2", "--width", "0"],
    ["curve", "5", "t^1000+t+1", "t^3+2"], ["curve", "5", "t^2+1", "t^3+2", "--observe", "99"],
    ["curve", "5", "t^2+1", "t^3+2", "--json", ""], ["curve", "5", "t^2+1", "t^3+2", "--json", "{dir}"],
    ["curve", "5", "t^2+1", "t^3+2", "--digits", "0"], ["curve", "5", "t^2+1", "t^3+2", "--max-boxes", "0"],
    ["curve", "5", "t^" + HUGE, "t"], ["curve", "5", "t^2+1", "t^3+2", "--confirm", "1e400"],
    ["twists", "7", "t^2+1", "t^3+2", "--degrees", "0"], ["twists", "7", "t^2+1", "t^3+2", "--degrees", "x"],
    ["twists", "7", "t^2+1", "t^3+2", "--degrees", "12"], ["twists", "7", "t^2+1", "t^3+2", "--extension", "0"],
    ["twists", "7", "t^2+1", "t^3+2", "--c", "-1"], ["twists", "7", "t^2+1", "t^3+2", "--sample", "0"],
    ["twists", "7", "t^2+1", "t^3+2", "--plot", "{dir}"], ["twists", "7", "t^2+1", "t^3+2", "--out", "{file}"],
    ["twists", "7", "t^2+1", "t^3+2", "--table", ""],
    # -- ecrace -----------------------------------------------------------------------
    ["ecrace"], ["ecrace", "[0,0,0,0,0]"], ["ecrace", "[1,2,3]"], ["ecrace", "x"],
    ["ecrace", "[0,-1,1,-10,-20]", "--digits", "0"], ["ecrace", "[0,-1,1,-10,-20]", "--observe", "-5"],
    ["ecrace", "[0,-1,1,-10,-20]", "--json", ""], ["ecrace", "[0,-1,1,-10,-20]", "--json", "{dir}"],
    ["ecrace", "[0,-1,1,-10," + HUGE + "]"],
    ["ecrace", "[0,0,0,-101,307]"], ["ecrace", "[0,0,0,-7,13]", "--limit", "ec-conductor=1000"],
    ["ecrace", "[0,-1,1,-10,-20]", "--limit", "zeros=5"],
    ["ecrace", "[0,-1,1,-10,-20]", "--observe", "100000000"],
    ["ecrace", "[0,-1,1,-10,-20]", "--observe", "1000000", "--limit", "primes=1000"],
    ["ecrace", "[0,-1,1,-10,-20]", "--limit", "primes=abc"],
    ["ecrace", "[0,-1,1,-10,-20]", "--limit", "ec-conductor"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "1e400"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "300"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "-1"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "nan"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "inf"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "abc"],
    ["ecrace", "[0,-1,1,-10,-20]", "--grh-height", "9" * 400],
    ["ecrace", "[0,-1,1,-10,-20]", "--certificate", "{dir}"],
    ["ecrace", "[0,-1,1,-10,-20]", "--plot", "{dir}"],
    ["ecrace", "[0,-1,1,-10,-20]", "--digits", "31"],
    # -- lirace -----------------------------------------------------------------------
    ["lirace", "sideways"], ["lirace", "--digits", "0"], ["lirace", "--sig-digits", "0"],
    ["lirace", "--sig-digits", "1e400"], ["lirace", "--json", ""], ["lirace", "--json", "{dir}"],
    ["lirace", "--digits", HUGE],
    ["lirace", "--limit", "zeros=10"], ["lirace", "--sig-digits", "49", "--limit", "zeros=100"],
    ["lirace", "--digits", "30", "--limit", "zeros=20"], ["lirace", "--limit", "bogus=1"],
    ["lirace", "--certificate", "{file}"], ["lirace", "--digits", "61"],
    ["lirace", "--sig-digits", "51"], ["lirace", "--digits", "5", "--sig-digits", "5"],
    # -- order ------------------------------------------------------------------------
    ["order"], ["order", "5"], ["order", "5", "1", "2"], ["order", "5", "1", "1", "2"],
    ["order", "5", "1", "2", "5"], ["order", "x", "1", "2", "3"], ["order", "5", "1", "2", "3", "--digits", "0"],
    ["order", "5", "1", "2", "3", "--json", ""], ["order", "5", "1", "2", "3", "--json", "{dir}"],
    ["order", "999983", "1", "2", "3"], ["order", "5", HUGE, "2", "3"],
    # -- the top level ------------------------------------------------------------------
    [], ["nosuchcommand"], ["--no-such-flag"],
]


def _case_id(argv):
    s = " ".join(a if len(a) < 30 else a[:12] + "..." for a in argv) or "(none)"
    return s.replace("{", "").replace("}", "")


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    base = tmp_path_factory.mktemp("bad-input")
    f = {}
    f["file"] = str(base / "plain.txt")
    open(f["file"], "w").write("not json\n")
    f["dir"] = str(base / "folder")
    os.makedirs(f["dir"])
    cert_dir = base / "cert"
    assert main(["certificate", "4", "3", "1", "--digits", "3", "--out", str(cert_dir),
                 "--name", "c"]) == 0
    f["cert"] = str(cert_dir / "c.json")
    d = json.loads(open(f["cert"]).read())
    d["answer"]["enclosure"]["lower"], d["answer"]["enclosure"]["upper"] = "0.2", "0.3"
    f["forged_cert"] = str(base / "forged.json")
    open(f["forged_cert"], "w").write(json.dumps(d))
    f["empty_json"] = str(base / "empty.json")
    open(f["empty_json"], "w").write("{}")
    f["list_json"] = str(base / "list.json")
    open(f["list_json"], "w").write("[1, 2, 3]")
    f["deep_json"] = str(base / "deep.json")
    open(f["deep_json"], "w").write("[" * 100_000 + "]" * 100_000)
    f["binary"] = str(base / "binary.bin")
    open(f["binary"], "wb").write(bytes(range(256)) * 10)
    claims = {
        "claims_empty": "# nothing here\n\n",
        "claims_all_bad": "delta(4;3,3) = 0.5\nnonsense\n",
        "claims_one_bad": "delta(4;3,1) = 0.9959\nthis line is bad\n",
        "claims_huge_value": "delta(4;3,1) = 0." + "9" * 100_000 + "\n",
        "claims_out_of_range": "delta(4;3,1) = 1.5\ndelta(4;3,1) = -0.1\n",
        "claims_large_q": "delta(999983;2,1) = 0.5\n",
    }
    for k, text in claims.items():
        f[k] = str(base / f"{k}.claims")
        open(f[k], "w").write(text)
    # caches: one sound, one with a damaged entry, one read-only (file and folder)
    from certify.batch.cache import SpectrumCache
    from certify.spectrum.spectrum import SpectrumStore

    sp = SpectrumStore().get(5, 2, 1, 20.0, 1e-8, 4, 80)
    f["cache_ok"] = str(base / "ok.sqlite")
    c = SpectrumCache(f["cache_ok"])
    c.save(sp)
    c.close()
    f["cache_damaged"] = str(base / "damaged.sqlite")
    c = SpectrumCache(f["cache_damaged"])
    c.save(sp)
    c.close()
    con = sqlite3.connect(f["cache_damaged"])
    con.execute("UPDATE spectra SET digest = 'x'")
    con.commit()
    con.close()
    ro = base / "ro"
    os.makedirs(ro)
    f["cache_readonly"] = str(ro / "c.sqlite")
    c = SpectrumCache(f["cache_readonly"])
    c.save(sp)
    c.close()
    os.chmod(f["cache_readonly"], stat.S_IRUSR)
    os.chmod(ro, stat.S_IRUSR | stat.S_IXUSR)
    f["tmp"] = str(base / "tmp")
    os.makedirs(f["tmp"])
    yield f
    os.chmod(ro, stat.S_IRWXU)


def test_the_suite_is_large_enough():
    assert len(CASES) >= 150
    commands = {a[0] for a in CASES if a}
    from certify.cli import build_parser

    sub = next(a for a in build_parser()._actions if a.dest == "command")
    assert set(sub.choices) <= commands, set(sub.choices) - commands


@pytest.mark.parametrize("argv", CASES, ids=[_case_id(a) for a in CASES])
def test_bad_input_is_refused_in_one_line(argv, files, capsys, monkeypatch, tmp_path):
    monkeypatch.setenv("CERTIFY_CACHE", str(tmp_path / "cache.sqlite"))
    monkeypatch.chdir(tmp_path)
    args = [a.format(**files) if "{" in a else a for a in argv]
    t0 = time.perf_counter()
    rc = main(args)
    seconds = time.perf_counter() - t0
    out, err = capsys.readouterr()
    assert rc != 0, f"silent success: {out[-500:]}"
    assert "Traceback" not in err and "Traceback" not in out
    lines = [ln for ln in err.splitlines() if ln.strip()]
    if argv in ([], ["cache"]):  # help printed, exit 2
        assert rc == 2
    elif argv[0] == "verify" and rc == 4:  # a certificate that fails its re-check: said on stdout
        assert "MISMATCH" in out
    else:
        assert lines, "no message on standard error"
        assert any(ln.startswith(("certify: error:", "usage:", "certify: warning:")) for ln in lines), err
        assert all(len(ln) < 400 for ln in lines if ln.startswith("certify: error:")), err[:500]
    assert seconds < 5, f"refusal took {seconds:.1f} s"


@pytest.mark.parametrize("height", ["1e400", "-1e400", "1e309", "201", "nan", "inf"])
def test_an_overflowing_height_is_named_with_its_limit(height, capsys):
    """Every command that takes a height (ecrace --grh-height) refuses one that overflows
    or exceeds the stated limit in one line naming the option, the height and the limit."""
    from certify.commands.options import MAX_HEIGHT

    t0 = time.perf_counter()
    rc = main(["ecrace", "[0,-1,1,-10,-20]", f"--grh-height={height}"])
    err = capsys.readouterr().err.strip()
    assert rc == 2 and time.perf_counter() - t0 < 5
    assert len(err.splitlines()) == 1 and err.startswith("certify: error: --grh-height")
    if height in ("1e400", "1e309", "201"):
        assert height in err and f"{MAX_HEIGHT:g}" in err and "exceeds the limit" in err
    assert "overflow" not in err.lower() or "height" in err


def test_ecrace_and_lirace_refusals_give_the_estimate_and_the_limit(capsys):
    for argv, key in ((["ecrace", "[0,0,0,-101,307]"], "ec-conductor"),
                      (["ecrace", "[0,-1,1,-10,-20]", "--observe", "100000000"], "primes"),
                      (["ecrace", "[0,-1,1,-10,-20]", "--limit", "zeros=5"], "zeros"),
                      (["lirace", "--limit", "zeros=10"], "zeros")):
        assert main(argv) == 2
        err = capsys.readouterr().err.strip()
        assert len(err.splitlines()) == 1, err
        assert f"estimated {key} " in err and "exceeds the limit" in err and f"--limit {key}=N" in err


def test_the_zero_estimates_follow_the_runs():
    """The planned zeros (before any work) against what a run isolated (from the result)."""
    from certify.batch.limits import ec_race_estimate, li_race_estimate
    from certify.ecrace import certify_ec_race
    from certify.lirace import certify_li_race

    r = certify_ec_race("[0,-1,1,-10,-20]", 4)
    est = ec_race_estimate(11, 4)["zeros"]
    assert 0.5 * r.parameters["zeros_used"] <= est <= 2 * r.parameters["zeros_used"] + 5
    li = certify_li_race("pi<li", digits=12)
    est = li_race_estimate(12)["zeros"]
    assert 0.5 * li.parameters["zeros_used"] <= est <= 2 * li.parameters["zeros_used"] + 5


def test_cache_show_reads_a_read_only_cache(files, capsys):
    """``cache show`` opens the file read-only (the file and its folder are read-only; as root
    they stay writable, so the read-only connection is checked directly as well)."""
    before = os.stat(files["cache_readonly"]).st_mtime_ns
    assert main(["cache", "show", "--cache", files["cache_readonly"], "--check"]) == 0
    out = capsys.readouterr().out
    assert "1 entries" in out and "damaged entries: 0" in out
    assert os.stat(files["cache_readonly"]).st_mtime_ns == before
    # the connection itself is read-only: a write through it fails
    from certify.batch.cache import SpectrumCache

    c = SpectrumCache(files["cache_readonly"], read_only=True)
    with pytest.raises(sqlite3.OperationalError):
        c.connection().execute("DELETE FROM spectra")
    c.close()


def test_a_claims_file_with_a_bad_line_still_checks_the_others(files, tmp_path, capsys):
    out = tmp_path / "r"
    rc = main(["claims", files["claims_one_bad"], "--out", str(out), "--max-digits", "6"])
    o, e = capsys.readouterr()
    assert rc == 2  # a bad line, no claim refuted
    assert "claims_one_bad.claims:2:" in e and "this line is bad" not in o
    assert "1 claims: 1 consistent" in o and "1 bad line(s) not checked" in o
    report = (out / "claims_one_bad-report.md").read_text()
    assert "Lines not checked" in report and ":2:" in report
    # each claim once: the checked claim has one row and is not repeated elsewhere
    rows = [ln for ln in report.splitlines() if ln.startswith("| ") and "delta(4;3,1)" in ln]
    assert len(rows) == 1 and "## Details" not in report
    assert sum("CONSISTENT" in ln for ln in o.splitlines()) == 1
    data = json.loads((out / "claims_one_bad-report.json").read_text())
    assert len(data["claims"]) == 1 and len(data["bad_lines"]) == 1


def test_raw_html_in_a_claims_file_is_escaped_in_the_markdown_report(tmp_path, capsys):
    claims = tmp_path / "html.claims"
    claims.write_text("delta(4;3,1) = 0.9959   # <img src=x onerror=alert(1)> <b>bold</b>\n")
    rc = main(["claims", str(claims), "--out", str(tmp_path / "r"), "--max-digits", "6"])
    capsys.readouterr()
    assert rc == 0
    report = (tmp_path / "r" / "html-report.md").read_text()
    assert "<img" not in report and "<b>" not in report
    assert "&lt;img src=x onerror=alert(1)&gt;" in report or "&lt;img src=x onerror=alert(1)>" in report


def test_two_claims_of_one_race_write_two_certificates(tmp_path, capsys):
    claims = tmp_path / "twice.claims"
    claims.write_text("delta(4;3,1) = 0.9959\ndelta(4;3,1) = 0.9959\n")
    rc = main(["claims", str(claims), "--out", str(tmp_path / "r"), "--max-digits", "6",
               "--certificates"])
    capsys.readouterr()
    assert rc == 0
    written = sorted(p.name for p in (tmp_path / "r").glob("delta_4_3_1*.json"))
    assert len(written) == 2 and written[0] != written[1], written


def test_a_full_disk_under_the_cache_is_a_warning_not_a_traceback(tmp_path, monkeypatch, capsys):
    """A cache write that fails (disk full) is reported on one line; the table still completes."""
    import warnings as _w

    from certify.batch.cache import SpectrumCache

    def full(*a, **k):
        raise sqlite3.OperationalError("database or disk is full")

    monkeypatch.setattr(SpectrumCache, "_save_blob", full)
    with _w.catch_warnings(record=True) as caught:
        _w.simplefilter("always")
        rc = main(["table", "--race", "5:1,4", "--kinds", "two-way", "--digits", "4", "--out",
                   str(tmp_path / "t"), "--cache", str(tmp_path / "c.sqlite"), "--workers", "1"])
    capsys.readouterr()
    assert rc == 0
    assert any("disk is full" in str(w.message) for w in caught)
