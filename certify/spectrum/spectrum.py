"""Spectra of primitive L-functions and the residual checks that guard them.

A :class:`PrimitiveSpectrum` holds, for one primitive character, its
certified positive ordinates up to a height, the exact power sums S_m of
*all* its zeros and an enclosure of L(1/2, chi).  A :class:`SpectrumStore`
computes spectra once and extends them when a finer or taller one is asked
for; several races and moduli share it.

The residual sums R_m = T_m - sum_found (1/4 + gamma^2)^(-m) of a set of
ordinates must be non-negative, and if every ordinate below the height T
was found, R_{m+1} (1/4 + T^2) <= R_m.  A violation proves that a zero is
missing or a moment is wrong, and the engine refuses to certify
(:func:`residual_checks`).  :func:`residual_sums` and :func:`residual_checks`
serve every analytic L-function (certify.spectrum.lfunction); the store
below is keyed by Dirichlet characters.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from ..arith import acb, arb
from ..errors import Inconsistent
from .moments import (central_value, conductor_power_sums, hardy_grid, prefer_batch,
                      zero_power_sums)
from .zeros import ZeroList, find_zeros


@dataclass
class PrimitiveSpectrum:
    """Certified data of one primitive L(s, chi_{conductor,label})."""

    conductor: int
    label: int
    parity: int
    zeros: ZeroList
    power_sums: list  # S_1..S_K over all zeros (arb)
    power_sum_bits: int
    central: acb

    @property
    def key(self) -> tuple[int, int]:
        return (self.conductor, self.label)

    @property
    def height(self) -> float:
        return self.zeros.height


@dataclass
class SpectrumStore:
    """Computes and keeps spectra by primitive character (in memory).

    ``backend`` may be any object with ``load(key) -> PrimitiveSpectrum | None``
    and ``save(spectrum)`` (a persistent cache).
    """

    spectra: dict = field(default_factory=dict)
    backend: object = None
    z_calls: int = 0
    # power sums and central values computed for a whole conductor at once
    # (:meth:`prefetch`): key -> (sums, bits, central)
    batched: dict = field(default_factory=dict)

    def _have_moments(self, key, moments: int, bits: int) -> bool:
        sp = self.spectra.get(key)
        if sp is not None and len(sp.power_sums) >= moments and sp.power_sum_bits >= bits:
            return True
        b = self.batched.get(key)
        return b is not None and len(b[0]) >= moments and b[1] >= bits

    def prefetch(self, requests) -> int:
        """Compute power sums and central values of many characters, one conductor at a time.

        ``requests`` holds (conductor, label, moments, bits).  Characters already
        held are skipped; a conductor with enough missing characters
        (:func:`certify.spectrum.moments.prefer_batch`) is done by one Hurwitz
        jet per class and one DFT over its character group (docs/method.md,
        section 2c); the others are left to :meth:`get`.  Returns the number of
        characters computed.
        """
        by_cond: dict = {}
        for (c, n, k, b) in requests:
            if self._have_moments((c, n), k, b) or self._stored_moments((c, n), k, b):
                continue
            k0, b0 = by_cond.setdefault(c, {}).get(n, (0, 0))
            by_cond[c][n] = (max(k0, k), max(b0, b))
        done = 0
        for c, want in by_cond.items():
            if not prefer_batch(c, len(want)):
                continue
            K = max(k for k, _ in want.values())
            B = max(b for _, b in want.values())
            for n, (sums, cv) in conductor_power_sums(c, list(want), K, B).items():
                self.batched[(c, n)] = (sums, B, cv)
                done += 1
        return done

    def prefetch_grid(self, requests, fraction: float = 0.25) -> int:
        """Hardy Z on the common search grid of each conductor, all characters at once.

        ``requests`` holds (conductor, label, height).  Characters whose spectrum is
        already held to that height are skipped; a conductor with several characters
        left is evaluated by :func:`certify.spectrum.moments.hardy_grid` (one Hurwitz
        value per class and a DFT per grid point), whose values the zero search then
        reads.  Returns the number of grid points evaluated.
        """
        by_cond: dict = {}
        for (c, n, h) in requests:
            sp = self.spectra.get((c, n))
            if h <= 0 or (sp is not None and sp.height >= h and sp.zeros.grid_fraction <= fraction):
                continue
            by_cond.setdefault(c, {})
            by_cond[c][n] = max(by_cond[c].get(n, 0.0), h)
        done = 0
        for c, want in by_cond.items():
            if prefer_batch(c, len(want)):
                done += hardy_grid(c, list(want), max(want.values()), fraction)
        return done

    def _stored_moments(self, key, moments: int, bits: int) -> bool:
        """Whether the backend holds enough power sums for ``key`` (kept in ``batched``)."""
        if self.backend is None:
            return False
        try:
            sp = self.backend.load(key, 0.0, float("inf"), moments, bits, 1.0)
        except TypeError:
            sp = self.backend.load(key)
        if sp is None or len(sp.power_sums) < moments or sp.power_sum_bits < bits:
            return False
        self.batched[key] = (list(sp.power_sums), sp.power_sum_bits, sp.central)
        return True

    def _moments(self, conductor, label, parity, moments, bits):
        b = self.batched.get((conductor, label))
        if b is not None and len(b[0]) >= moments and b[1] >= bits:
            return b[0], b[1]
        return zero_power_sums(conductor, label, parity, moments, bits), bits

    def _central(self, conductor, label):
        b = self.batched.get((conductor, label))
        return b[2] if b is not None else central_value(conductor, label)

    def get(self, conductor: int, label: int, parity: int, height: float, width: float,
            moments: int, moment_bits: int, fraction: float = 0.25) -> PrimitiveSpectrum:
        """The spectrum of chi_{conductor,label} with at least what is asked.

        ``fraction`` is the zero-search grid step as a fraction of the mean
        spacing; asking for a finer grid than the stored one searches again.
        """
        key = (conductor, label)
        sp = self.spectra.get(key)
        if sp is None and self.backend is not None:
            sp = self.backend.load(key)
        changed = False
        regrid = sp is not None and sp.zeros.grid_fraction > fraction
        if sp is None or regrid or sp.height < height or sp.zeros.width > width:
            start = sp.zeros if sp is not None and not regrid else None
            zl = find_zeros(conductor, label, max(height, sp.height if sp else 0.0), width,
                            fraction=fraction, start=start)
            self.z_calls += zl.z_calls - (start.z_calls if start else 0)
            sums = sp.power_sums if sp else []
            bits = sp.power_sum_bits if sp else 0
            cv = sp.central if sp else self._central(conductor, label)
            sp = PrimitiveSpectrum(conductor, label, parity, zl, sums, bits, cv)
            changed = True
        if len(sp.power_sums) < moments or sp.power_sum_bits < moment_bits:
            sums, bits = self._moments(conductor, label, parity, max(moments, len(sp.power_sums)),
                                       max(moment_bits, sp.power_sum_bits))
            sp = PrimitiveSpectrum(conductor, label, parity, sp.zeros, sums, bits, sp.central)
            changed = True
        self.spectra[key] = sp
        if changed and self.backend is not None:
            self.backend.save(sp)
        return sp


def count_bound_window(conductor: int, T: float, degree: int = 1) -> tuple[float, float]:
    """(expected, tolerance) for sum over positive ordinates gamma > T of 1/(1/4+gamma^2).

    A consistency check, not used in any bound: the main term integrates the
    zero density (1/2pi) log(Q (t/2pi)^d) (conductor Q, degree d); the
    tolerance allows a counting error of d (0.3 l + 2 log(1+l) + 1) with
    l = log(Q^(1/d) (T+2)/2pi), generous against the explicit bounds for
    N(T, chi) (Math. Comp. 90 (2021); constants from memory, inflated),
    integrated by parts.  For d = 1 it is the Dirichlet check unchanged.
    """
    x = conductor * (T / (2 * math.pi)) ** degree
    expected = (math.log(max(x, 1.0)) + degree) / (2 * math.pi * T)
    ell = math.log(conductor ** (1 / degree) * (2 * T + 2) / (2 * math.pi))
    emax = degree * (0.3 * ell + 2 * math.log(1 + ell) + 1)
    tol = 3 * emax / (0.25 + T * T) + 1 / (4 * T**3)
    return expected, tol


def residual_sums(target_sums: list, zeros: list) -> list:
    """R_k = T_k - sum_gamma (1/4 + gamma^2)^(-k), k = 1..len(target_sums)."""
    out = []
    q = [1 / (arb(1) / 4 + g * g) for g in zeros]
    pw = [arb(1)] * len(q)
    for k, tk in enumerate(target_sums, start=1):
        pw = [p * x for p, x in zip(pw, q)]
        out.append(tk - sum(pw, arb(0)))
    return out


def residual_checks(label: str, R: list, T: float, conductor: int, n_sets: int,
                    degree: int = 1) -> list[str]:
    """Check residual sums; raise Inconsistent on a proven violation, else return notes.

    The missed-zero detector of every analytic L-function (pass its ``degree``).
    """
    notes = []
    t2 = arb(1) / 4 + arb(T) * arb(T)
    for k, r in enumerate(R, start=1):
        if r < 0:
            raise Inconsistent(
                f"{label}: residual power sum R_{k} is negative ({r.str(5)}): a moment is "
                "wrong or an isolated zero is spurious; not certified")
    for k in range(1, len(R)):
        if R[k] * t2 > R[k - 1]:
            raise Inconsistent(
                f"{label}: residual sums violate R_{k + 1}(1/4+T^2) <= R_{k} at T = {T:g}: "
                "a zero below the isolation height is missing (or a moment is wrong); not certified")
    r1 = R[0]
    if T < 1:
        # nothing isolated (moments only): no height to compare the count with
        notes.append(f"{label}: no zero isolated (moments only); residual sums R_1..R_{len(R)} "
                     f"non-negative (R_1 = {r1.str(6)})")
        return notes
    expected, tol = count_bound_window(conductor, T, degree)
    lo, hi = n_sets * (expected - tol), n_sets * (expected + tol)
    if r1 < lo or r1 > hi:
        raise Inconsistent(
            f"{label}: residual R_1 = {r1.str(6)} lies outside the window [{lo:.3g}, {hi:.3g}] "
            f"allowed by the zero-counting function above T = {T:g}: a zero is missing or S_1 is "
            "wrong; not certified")
    notes.append(f"{label}: residual sums R_1..R_{len(R)} non-negative and consistent with "
                 f"no zero missing below T = {T:g} (R_1 = {r1.str(6)}; expected {n_sets * expected:.4g})")
    return notes
