"""Every race for q <= 30 at the target width 1e-8, cold then warm (slow; -m slow).

With a check of its own: for odd m, the reduction mod m is a bijection
from the classes prime to 2m onto those prime to m and preserves which primes p > 2 lie
in them, so delta(2m; a, b) = delta(m; a mod m, b mod m) and the residue races mod 2m and
mod m are the same race; the two certified enclosures, computed independently (different
characters, conductors read at different moduli), must intersect.
"""

import json
import os
from fractions import Fraction
from math import gcd

import pytest

from certify.batch.run import run_batch

MODULI = list(range(3, 31))
# races per modulus: phi(q)(phi(q)-1)/2 two-way races and one residue race
RACES = sum(f * (f - 1) // 2 + 1 for f in (sum(1 for a in range(1, q) if gcd(a, q) == 1)
                                            for q in MODULI))


def _ends(path):
    d = json.load(open(path))["density"]
    return Fraction(d["lower"]), Fraction(d["upper"])


@pytest.mark.slow
def test_every_race_up_to_30_meets_the_target(tmp_path):
    cache = str(tmp_path / "spectra.sqlite")
    cold = run_batch(MODULI, 8, str(tmp_path / "cold"), workers=2, cache_path=cache,
                     progress=False)
    assert cold["races"] == RACES and cold["failures"] == [] and cold["missing"] == 0
    assert cold["not_met"] == 0
    warm = run_batch(MODULI, 8, str(tmp_path / "warm"), workers=2, cache_path=cache,
                     progress=False)
    assert warm["spectra"]["computed"] == 0 and warm["not_met"] == 0
    n = 0
    for d, _, files in os.walk(str(tmp_path / "cold" / "results")):
        for f in files:
            a_lo, a_hi = _ends(os.path.join(d, f))
            b_lo, b_hi = _ends(os.path.join(d.replace(os.sep + "cold" + os.sep,
                                                      os.sep + "warm" + os.sep), f))
            assert a_hi - a_lo <= Fraction(1, 10**8)
            # two certified enclosures of one number must intersect (they coincide unless
            # the race had to extend a spectrum in the cold run)
            assert a_lo <= b_hi and b_lo <= a_hi
            n += 1
    assert n == RACES
    res = tmp_path / "cold" / "results"
    pairs = 0
    odd = [m for m in range(3, 16, 2)]  # every odd m with 2m <= 30
    for m in odd:
        for name in os.listdir(res / f"q{2 * m}"):
            if name.startswith("two-way_"):
                _, _, a, b = name[:-5].split("_")
                a, b = int(a) % m, int(b) % m
                other = res / f"q{m}" / (f"two-way_{m}_{min(a, b)}_{max(a, b)}.json")
                lo, hi = _ends(other)
                if a > b:  # delta(m; b, a) = 1 - delta(m; a, b)
                    lo, hi = 1 - hi, 1 - lo
            else:
                lo, hi = _ends(res / f"q{m}" / f"residues_{m}.json")
            lo2, hi2 = _ends(res / f"q{2 * m}" / name)
            assert lo <= hi2 and lo2 <= hi, (name, m)
            pairs += 1
    phis = [sum(1 for a in range(1, m) if gcd(a, m) == 1) for m in odd]
    assert pairs == sum(f * (f - 1) // 2 + 1 for f in phis)
