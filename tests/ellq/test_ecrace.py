"""The trace race of a curve over Q: density, rank, hypotheses, CLI, observation."""

import json

import pytest

from certify.cli import main
from certify.ecobserve import observe
from certify.ecrace import certify_ec_race
from certify.source.ellcurve import curve_from_ainvs


def test_rank0_density_conductor_11():
    r = certify_ec_race([0, -1, 1, -10, -20], 3)
    assert r.target_met and r.mean == 1 and r.rank.certified and r.rank.rank == 0
    # under the limit law X = 1 + sum (2/|rho|) cos: Chebyshev's inequality with the exact
    # variance bounds P(X <= 0) <= Var/(Var + 1) (one-sided, Cantelli): an independent bound
    v = float(r.variance.upper())
    assert float(r.density.lower) >= 1 - v / (v + 1) - 1e-3
    assert r.density.width <= 1e-3
    names = [h.name for h in r.hypotheses]
    assert names == ["GRH", "LI"]  # rank 0 is certified, so no rank hypothesis
    d = r.to_dict()
    assert d["analytic_rank"]["certified"] and "symmetric power" in d["count_race"]
    # the residual sums are consistent (non-negative)
    assert not any(x < 0 for x in r.residual) and r.residual[0] > 0


def test_cli_bad_inputs(capsys):
    assert main(["ecrace", "[0,0,0,0,0]"]) == 2
    assert main(["ecrace", "[1,2,x,4,5]"]) == 2
    assert main(["ecrace", "[0,0,1,-1,0]", "--digits", "99"]) == 2
    assert main(["ecrace", "[0,0,1,-1,0]", "--observe", "10000000000000"]) == 2
    assert main(["ecrace", "[10000000000000000000000000000000000000000000000,0,0,0,1]"]) == 2
    err = capsys.readouterr().err
    assert all(line.startswith("certify: error:") for line in err.strip().splitlines())


def test_observation_is_an_observation():
    E = curve_from_ainvs([0, -1, 1, -10, -20])
    o = observe(E, 20000)
    d = o.as_dict()
    assert "not certified" in d["kind"]
    assert 0 <= o.share_positive <= 1 and o.primes == 2262  # pi(20000)
    # the share on [1000, X] of a rank-0 curve: the sum is mostly positive there
    assert o.share_positive_late > 0.8


@pytest.mark.slow
def test_cli_json_plot(tmp_path, capsys):
    js, fig = tmp_path / "e.json", tmp_path / "e.png"
    rc = main(["ecrace", "[0,-1,1,-10,-20]", "-d", "4", "--observe", "30000",
               "--json", str(js), "--plot", str(fig)])
    assert rc == 0
    d = json.loads(js.read_text())
    # --json writes the certificate (kind ecq-race); the observation is on the screen and the plot
    assert d["kind"] == "ecq-race" and {"hypotheses", "error_budget", "parameters", "answer"} <= set(d)
    assert main(["verify", str(js)]) == 0
    assert fig.read_bytes()[:4] == b"\x89PNG"
    assert "out of reach" in capsys.readouterr().out


@pytest.mark.slow
def test_mean_shift_with_rank_four_curves():
    """Conductors 11, 37, 389, 5077 (a-invariants from memory): ranks 0, 1, 2, 3,
    means 1, -1, -3, -5, and the density of the positive set falls with the rank.
    Cantelli's inequality with the exact variance brackets each density independently."""
    out = []
    for a, rank in (([0, -1, 1, -10, -20], 0), ([0, 0, 1, -1, 0], 1), ([0, 1, 1, -2, 0], 2),
                    ([0, 0, 1, -7, 6], 3)):
        r = certify_ec_race(a, 4)
        assert r.rank.rank == rank and r.mean == 1 - 2 * rank and r.target_met
        assert r.rank.certified == (rank <= 1)
        v = float(r.variance.upper())
        m = float(r.mean)
        if m > 0:
            assert float(r.density.lower) >= 1 - v / (v + m * m) - 1e-3
        else:
            assert float(r.density.upper) <= v / (v + m * m) + 1e-3
        if rank == 2:
            h = [h for h in r.hypotheses if h.name == "rank"][0]
            assert h.status == "assumed"
        if rank == 3:
            h = [h for h in r.hypotheses if h.name == "rank"][0]
            assert h.status == "theorem" and "Math. Comp. 44 (1985)" in h.reference
        out.append(float(r.density.mid))
    assert out == sorted(out, reverse=True)


@pytest.mark.slow
@pytest.mark.parametrize("a,rank", [([0, -1, 1, -10, -20], 0), ([0, 0, 1, -1, 0], 1)])
def test_zero_count_matches_sign_changes(a, rank):
    """The argument principle (Taylor models on the contour) counts exactly the zeros found
    as sign changes of Z below T = 10, and the central zero inside |s - 1| < 0.1."""
    from certify.source.ell_l import EllipticL
    from certify.source.ell_zerocount import count_zeros
    from certify.spectrum.zeros import find_zeros_of

    L = EllipticL(curve_from_ainvs(a))
    c = count_zeros(L, 10.0, 0.1)
    zl = find_zeros_of(L, 10.0, 1e-8, t_from=0.1)
    assert c.outside_disc == len(zl.zeros) >= 2
    assert c.inside_disc == rank


@pytest.mark.slow
def test_ecrace_reports_grh_height():
    r = certify_ec_race([0, -1, 1, -10, -20], 3, grh_height=8.0)
    line = r.parameters["grh_verified_line"]
    assert line.startswith("GRH verified to height 8") and "exactly the certified sign changes" in line
    grh = [h for h in r.hypotheses if h.name == "GRH"][0]
    assert grh.status == "assumed" and any("GRH verified to height" in e for e in grh.evidence)
