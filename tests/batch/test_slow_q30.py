"""The issue's target batch: every race for q <= 30 at width <= 1e-8 (slow; run with -m slow)."""

import json
import os
from fractions import Fraction

import pytest

from certify.batch.run import run_batch


@pytest.mark.slow
def test_every_race_up_to_30_meets_the_target(tmp_path):
    cache = str(tmp_path / "spectra.sqlite")
    cold = run_batch(list(range(3, 31)), 8, str(tmp_path / "cold"), workers=2, cache_path=cache,
                     progress=False)
    assert cold["races"] == 1834 and cold["failures"] == [] and cold["missing"] == 0
    assert cold["not_met"] == 0
    warm = run_batch(list(range(3, 31)), 8, str(tmp_path / "warm"), workers=2, cache_path=cache,
                     progress=False)
    assert warm["spectra"]["computed"] == 0 and warm["not_met"] == 0
    for d, _, files in os.walk(str(tmp_path / "cold" / "results")):
        for f in files:
            a = json.load(open(os.path.join(d, f)))["density"]
            b = json.load(open(os.path.join(d.replace(os.sep + "cold" + os.sep,
                                                      os.sep + "warm" + os.sep), f)))["density"]
            assert Fraction(a["upper"]) - Fraction(a["lower"]) <= Fraction(1, 10**8)
            # two certified enclosures of one number must intersect (they coincide unless
            # the race had to extend a spectrum in the cold run)
            assert Fraction(a["lower"]) <= Fraction(b["upper"])
            assert Fraction(b["lower"]) <= Fraction(a["upper"])
