"""Re-derivation of a cached spectrum before a race uses it.

A cache entry is data, not proof: its SHA-256 digest guards against damage
by accident, not against a wrong value written by a bug or by hand (a
changed power sum with a recomputed digest passes the checksum).  So before
any race uses a spectrum read from the cache, :func:`recheck_spectrum`

* **re-derives** the quantities the bounds rest on that are cheap to
  recompute: the exact power sums S_1..S_K of all zeros (from the Taylor
  coefficients of log Lambda at s = 1, at the stored accuracy) and the
  enclosure of L(1/2, chi).  The race then uses the re-derived balls, never
  the stored ones; a stored ball that does not even overlap its
  re-derivation proves the entry wrong, and it is refused;
* **re-checks** every stored zero: its ball is finite, positive, below the
  stored height, disjoint from and above the previous one, and Z(t, chi)
  has opposite Arb-certified signs at the two ends of the ball (so the ball
  holds a zero of odd order on the critical line, exactly as when it was
  computed).

Completeness of the zeros below the height is not a property of the entry:
the race driver checks it from the residual power sums, which now come from
the re-derived S_m.

Measured cost (2-core machine under load, certify at this commit): about
0.03 s per spectrum for the characters mod 13 to the heights a race at 8
digits asks (power sums 0.01-0.035 s, L(1/2) < 0.005 s, sign checks
0.001-0.025 s), against 1.6 s for the race itself; 0.014 s for chi_{4,3}
with 36 zeros.  The batch summary reports the total (``spectra.recheck``).
The cache re-derives the power sums and L(1/2) of all its characters of one
conductor in one batched computation per process
(:meth:`certify.batch.cache.SpectrumCache._batched_rederivation`, passed in as
``rederived``): 95 entries mod 97 in 0.9 s instead of 10.3 s.
"""

from __future__ import annotations

import math
import time

from ..arith import arb
from ..errors import BadInput


class RecheckFailed(BadInput):
    """A cached spectrum disagrees with its re-derivation (the entry is wrong)."""


def recheck_spectrum(sp, rederived=None):
    """``sp`` with re-derived power sums and L(1/2); its zeros re-checked by sign changes.

    ``rederived``, if given, is ``(S_1..S_K, L(1/2))`` for this character computed
    afresh by the batched path (:func:`certify.spectrum.moments.conductor_power_sums`,
    all characters of the conductor at once, each S_m of radius below
    2^-bits for some bits >= the entry's, K >= the entry's count): it replaces
    the one-character computation.  It is a re-derivation, never stored data.

    Returns ``(spectrum, seconds)``.  Raises :class:`RecheckFailed` naming the
    first quantity that fails.
    """
    from ..spectrum.moments import central_value, zero_power_sums
    from ..spectrum.spectrum import PrimitiveSpectrum
    from ..spectrum.zeros import HardyZ, _prec_for

    t0 = time.perf_counter()
    name = f"chi_{{{sp.conductor},{sp.label}}}"
    zl = sp.zeros
    if not (math.isfinite(zl.height) and zl.height >= 0 and math.isfinite(zl.width) and zl.width > 0):
        raise RecheckFailed(f"{name}: stored height {zl.height!r} or width {zl.width!r} is not usable")
    if len(sp.power_sums) > 200 or not (0 <= int(sp.power_sum_bits) <= 20000):
        raise RecheckFailed(f"{name}: stored moment count or accuracy out of range")
    # zeros: order, range, and a certified sign change across each ball
    z = HardyZ(sp.conductor, sp.label)
    prev = arb(0)
    for i, g in enumerate(zl.zeros, start=1):
        if not g.is_finite() or not (g > prev) or g.upper() > arb(zl.height) or \
                float(arb(g.rad())) > zl.width:
            raise RecheckFailed(f"{name}: stored zero #{i} ({g.str(8)}) is not an increasing, "
                                f"positive ball of radius <= {zl.width:g} below {zl.height:g}")
        prec = _prec_for(zl.width, float(g.upper()), sp.conductor)
        lo, hi = arb(g.lower()), arb(g.upper())
        s_lo, _, _ = z.sign(lo, prec, 4 * prec)
        s_hi, _, _ = z.sign(hi, prec, 4 * prec)
        if s_lo == 0 or s_hi == 0 or s_lo == s_hi:
            raise RecheckFailed(f"{name}: stored zero #{i} ({g.str(8)}): no certified sign change "
                                "of Z across its ball")
        prev = g
    # power sums and L(1/2): re-derived; the stored balls must at least overlap them
    sums = []
    if sp.power_sums and rederived is not None:
        sums = list(rederived[0][:len(sp.power_sums)])
        if len(sums) != len(sp.power_sums):
            raise RecheckFailed(f"{name}: batched re-derivation has too few power sums")
    elif sp.power_sums:
        sums = zero_power_sums(sp.conductor, sp.label, sp.parity, len(sp.power_sums),
                               int(sp.power_sum_bits))
    if sp.power_sums:
        for m, (old, new) in enumerate(zip(sp.power_sums, sums), start=1):
            if not old.overlaps(new):
                raise RecheckFailed(f"{name}: stored power sum S_{m} = {old.str(10)} disagrees "
                                    f"with its re-derivation {new.str(10)}")
    central = sp.central
    if central is not None:
        fresh = rederived[1] if rederived is not None else central_value(sp.conductor, sp.label)
        if not central.overlaps(fresh):
            raise RecheckFailed(f"{name}: stored L(1/2) disagrees with its re-derivation")
        central = fresh
    out = PrimitiveSpectrum(sp.conductor, sp.label, sp.parity, zl, sums, sp.power_sum_bits, central)
    return out, time.perf_counter() - t0
