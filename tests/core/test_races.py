"""Race densities over Q: published values, exact symmetries, refusal on bad data, bad input."""

import math
from fractions import Fraction

import pytest
import sympy

from certify.cli import main
from certify.errors import Inconsistent
from certify.race.question import two_way, weighted
from certify.races import certify_race
from certify.spectrum.spectrum import SpectrumStore


@pytest.fixture(scope="module")
def store():
    return SpectrumStore()


def _narrow(result, width):
    assert result.target_met
    assert result.density.width <= Fraction(width)


def test_chebyshev_bias_mod_4_published(store):
    # "Chebyshev's bias", Experimental Mathematics 3 (1994): delta(4;3,1) = 0.9959 (four decimals)
    r = certify_race(two_way(4, 3, 1), 12, store=store)
    _narrow(r, 1e-12)
    assert r.density.lower > Fraction("0.99585") and r.density.upper < Fraction("0.99595")
    assert r.certified_digits.startswith("0.9959")


def test_chebyshev_bias_mod_3_published(store):
    # "Chebyshev's bias", Experimental Mathematics 3 (1994): delta(3;2,1) = 0.9990 (as we recall the
    # table; the design brief asserts only 0.999)
    r = certify_race(two_way(3, 2, 1), 12, store=store)
    _narrow(r, 1e-12)
    assert round(float(r.density.mid), 3) == 0.999


def test_reverse_race_sums_to_one(store):
    r1 = certify_race(two_way(8, 3, 1), 9, store=store)
    r2 = certify_race(two_way(8, 1, 3), 9, store=store)
    lo = r1.density.lower + r2.density.lower
    hi = r1.density.upper + r2.density.upper
    assert lo <= 1 <= hi
    _narrow(r1, 1e-9)


def test_symmetric_race_is_one_half(store):
    # 2 and 3 = 2^{-1} mod 5 are both non-residues (same c); conjugation swaps them: density 1/2
    r = certify_race(two_way(5, 2, 3), 9, store=store)
    assert r.density.contains(Fraction(1, 2))
    _narrow(r, 1e-9)
    # same-c classes mod 8 with a symmetric weighted race
    r = certify_race(weighted(8, {3: 1, 5: -1}), 8, store=store)
    assert r.density.contains(Fraction(1, 2))


def test_two_targets_overlap(store):
    a = certify_race(two_way(4, 3, 1), 6, store=store)
    b = certify_race(two_way(4, 3, 1), 20, store=store)
    assert a.density.lower <= b.density.upper and b.density.lower <= a.density.upper
    _narrow(b, 1e-20)
    assert a.density.width > b.density.width


def test_sign_convention_against_prime_counts():
    # A weak check of the sign convention (not of the density): pi(x;4,3) >= pi(x;4,1) at most
    # sample points below 10^6 (sympy's primes).
    c3 = c1 = 0
    ahead = total = 0
    checkpoints = set(range(1000, 10**6, 997))
    for p in sympy.primerange(3, 10**6):
        if p % 4 == 3:
            c3 += 1
        else:
            c1 += 1
        if p in checkpoints or p % 997 == 0:
            pass
    # sample the counts on a grid with a second pass
    c3 = c1 = 0
    primes = list(sympy.primerange(3, 10**6))
    j = 0
    for x in range(1000, 10**6, 991):
        while j < len(primes) and primes[j] <= x:
            if primes[j] % 4 == 3:
                c3 += 1
            else:
                c1 += 1
            j += 1
        total += 1
        ahead += c3 > c1
    assert ahead / total > 0.95
    r = certify_race(two_way(4, 3, 1), 4)
    assert r.density.lower > Fraction(1, 2)


def test_dropped_zero_is_detected_not_absorbed():
    from certify.spectrum.spectrum import residual_checks, residual_sums
    store = SpectrumStore()
    certify_race(two_way(4, 3, 1), 8, store=store)
    sp = store.spectra[(4, 3)]
    zeros = list(sp.zeros.zeros)
    dropped = zeros.pop(3)
    R = residual_sums([s / 2 for s in sp.power_sums], zeros)
    with pytest.raises(Inconsistent, match="missing"):
        residual_checks("chi_{4,3}", R, sp.height, 4, 1)
    # the driver does not absorb it: it searches again on a finer grid and finds the zero
    del sp.zeros.zeros[3]
    r = certify_race(two_way(4, 3, 1), 8, store=store, max_rounds=1)
    assert any(z.overlaps(dropped) for z in r.groups[0].zeros)


@pytest.mark.parametrize("k,delta", [(0, Fraction(1, 10**2)), (1, Fraction(1, 10**5)),
                                     (2, Fraction(1, 10**6))])
def test_perturbed_moment_is_detected(k, delta):
    """A moment moved by delta (S_1 by 1e-2, S_2 by 1e-5, S_3 by 1e-6) makes the engine refuse."""
    from certify.arith import arb
    store = SpectrumStore()
    certify_race(two_way(4, 3, 1), 8, store=store)
    sp = store.spectra[(4, 3)]
    sp.power_sums[k] = sp.power_sums[k] + arb(delta.numerator) / delta.denominator
    with pytest.raises(Inconsistent):
        certify_race(two_way(4, 3, 1), 8, store=store, max_rounds=1)


@pytest.mark.parametrize("argv", [
    ["race", "4", "3", "3"],
    ["race", "4", "2", "1"],
    ["race", "2", "1", "1"],
    ["race", "4", "3.5", "1"],
    ["race", "four", "3", "1"],
    ["race", "4", "3", "1", "--digits", "500"],
    ["race", "4", "3", "1", "--digits", "x"],
    ["race", "4", "3", "1", "--digits", "0"],
    ["weighted", "5", "1:1", "2:-2"],
    ["weighted", "5", "1:1", "2"],
    ["weighted", "5", "1:1", "1:-1"],
    ["weighted", "5", "1:nan", "2:-1"],
    ["residues", "3.0"],
    ["nosuchcommand"],
])
def test_bad_input_is_one_line_and_nonzero(argv, capsys):
    code = main(argv)
    err = capsys.readouterr().err.strip()
    assert code != 0
    assert len(err.splitlines()) == 1 and err.startswith("certify")
    assert "Traceback" not in err


def test_cli_json_fields(tmp_path, capsys):
    out = tmp_path / "r.json"
    assert main(["race", "4", "3", "1", "--digits", "8", "--json", str(out)]) == 0
    import json
    data = json.loads(out.read_text())
    # --json writes the certificate shape (one schema for every document); verify accepts it
    assert data["kind"] == "dirichlet-race" and main(["verify", str(out)]) == 0
    lo, hi = (Fraction(data["answer"]["enclosure"]["lower"]),
              Fraction(data["answer"]["enclosure"]["upper"]))
    # published four decimals (Experimental Mathematics 3 (1994)); the width is the target
    assert round(float(lo), 4) == round(float(hi), 4) == 0.9959 and hi - lo <= Fraction(1, 10**8)
    assert {h["name"] for h in data["hypotheses"]} == {"GRH", "LI"}
    assert {e["name"] for e in data["error_budget"]} >= {"aliasing", "frequency truncation",
                                                        "residual zeros"}
    assert "working_precision_bits" in data["parameters"]
    screen = capsys.readouterr().out
    assert "GRH" in screen and "LI" in screen and "Conditional" in screen


def test_api_repr():
    from certify import race
    r = race(4, 3, 1, digits=6)
    text = repr(r)
    assert "delta(4;3,1)" in text and "GRH" in text
    assert math.isclose(float(r.density.mid), 0.995928, abs_tol=2e-6)
