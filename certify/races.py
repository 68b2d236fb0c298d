"""Certified densities of Dirichlet prime races over Q: the driver.

``certify_race(question, digits)`` plans the computation (period, frequency
range, isolation heights, zero widths, number of moments, precision) from the
requested width 10^-digits, gathers the spectra, runs the residual checks and
the density engine, and refines the plan until the target is met or a
ceiling is reached.  The result is a :class:`RaceResult` holding everything a
certificate needs, so nothing is recomputed downstream.
"""

from __future__ import annotations

from .result import NotebookDisplay

import math
import time
from dataclasses import dataclass, field, replace
from fractions import Fraction
from functools import lru_cache

from . import __version__
from .arith import arb, bound_text, decimal_down, flint_version, sci_down, sci_up, workprec
from .density.bessel import BesselVariable, ResidualGroup, density_enclosure
from .errors import BadInput, Inconsistent, PrecisionExhausted
from .race.question import RaceQuestion, mean_of, spectral_groups
from .result import (CAUTION, Enclosure, ExactValue, Hypothesis, caution_text,
                     headline_text)
from .spectrum.moments import round_height_to_grid
from .spectrum.spectrum import SpectrumStore, residual_checks, residual_sums

J01 = 2.404825557695773
MAX_DIGITS = 60
DEFAULT_DIGITS = 10
MIN_HEIGHT = 4.0  # lowest isolation height (planning)
PLAN_HEIGHT_FACTOR = 2.6  # isolation height per unit s xi / j01 assumed when planning xi_max

REFERENCES = (
    "Chebyshev's bias, Experimental Mathematics 3 (1994) 173-197.",
    "A Treatise on the Theory of Bessel Functions, 2nd ed., Cambridge University Press (1944), "
    "sections 13.74 and 15.3.",
    "Arb: efficient arbitrary-precision midpoint-radius interval arithmetic, "
    "IEEE Transactions on Computers 66 (2017).",
)


@dataclass(frozen=True)
class GroupReport:
    """What one spectral group contributed: zeros used, residual sums, checks."""

    label: str
    primitive_keys: tuple
    scale: arb
    height: float
    zeros: tuple  # arb ordinates used directly (sorted)
    target_sums: tuple  # T_k (exact power sums of the group's ordinates)
    residual: tuple  # R_k
    central_values: tuple  # acb L(1/2, chi*) per primitive key
    notes: tuple
    zero_owners: tuple = ()  # for each zero, the index in primitive_keys of its L-function


@dataclass(frozen=True)
class RaceResult(NotebookDisplay):
    """A certified density with everything behind it.

    Attributes
    ----------
    question : RaceQuestion
    density : Enclosure
        Proven interval for the density (under the hypotheses).
    digits_requested : int
    target_met : bool
        Whether the width reached 10^-digits_requested (or the value is exact).
    mean : Fraction
        mu of the race variable.
    variance : arb
    budget : tuple[ErrorTerm, ...]
    parameters : dict
    hypotheses : tuple[Hypothesis, ...]
    groups : tuple[GroupReport, ...]
    timings : dict
    exact : ExactValue or None
        The density when it is known exactly (1/2 for a race whose limit law is
        symmetric: mean 0, docs/method.md section 1b), with the reason; the
        enclosure ``density`` is then the engine's numerical cross-check and
        contains it.
    """

    question: RaceQuestion
    density: Enclosure
    ball: arb
    digits_requested: int
    target_met: bool
    mean: Fraction
    variance: arb
    budget: tuple
    parameters: dict
    hypotheses: tuple
    groups: tuple
    timings: dict
    provenance: dict
    references: tuple = REFERENCES
    caution: str = CAUTION
    exact: ExactValue | None = None

    def __repr__(self) -> str:
        d = self.density
        status = "target met" if self.target_met else "TARGET NOT MET (best certified enclosure)"
        names = " and ".join(h.name for h in self.hypotheses if h.status == "assumed") or "nothing"
        if self.exact is not None:
            return (f"<RaceResult {self.question.label} = {self.exact.text()} exactly "
                    f"({self.exact.reason}; conditional on {names})>")
        return (f"<RaceResult {self.question.label} in {d.interval_text()} "
                f"(width <= {d.width_text()}; {status}; conditional on {names})>")

    @property
    def headline(self) -> str:
        """The first line shown for this result (exact value, certified digits or enclosure)."""
        return headline_text(self.question.label, self.density, self.exact, self.target_met,
                             f"1e-{self.digits_requested}")

    @property
    def certified_digits(self) -> str:
        return self.density.digits()

    def to_dict(self) -> dict:
        """A JSON-ready dictionary (decimal strings rounded outward)."""
        d = self.density
        places = d.places()
        return {
            "question": {
                "modulus": self.question.modulus,
                "kind": self.question.kind,
                "label": self.question.label,
                "statement": self.question.statement,
                "weights": ({str(a): str(w) for a, w in self.question.weights}
                            if self.question.structure is None else self.question.weights_text),
                "normalised_weights": ({str(a): str(w) for a, w in self.question.normalised_weights}
                                       if self.question.structure is None
                                       else self.question.weights_text),
                "normalisation_factor": str(self.question.normalisation),
            },
            "density": {
                "lower": d.lower_str(places),
                "upper": d.upper_str(places),
                "width": d.width_text(),
                "certified_digits": d.digits(),
                "target_width": f"1e-{self.digits_requested}",
                "target_met": self.target_met,
                "exact": self.exact.as_dict() if self.exact is not None else None,
                "headline": self.headline,
                "one_minus": {"lower": sci_down(1 - d.upper, 8), "upper": sci_up(1 - d.lower, 8)},
                "gap_to_half": {"lower": sci_down(d.lower - Fraction(1, 2), 8),
                                "upper": sci_up(d.upper - Fraction(1, 2), 8)},
            },
            "mean": str(self.mean),
            "variance": self.variance.str(20, radius=True),
            "hypotheses": [h.as_dict() for h in self.hypotheses],
            "error_budget": [e.as_dict() for e in self.budget],
            "parameters": self.parameters,
            "spectrum": [
                {"group": g.label, "primitive_characters": [f"{c}.{n}" for c, n in g.primitive_keys],
                 "isolation_height": g.height, "zeros_used": len(g.zeros),
                 "first_zeros": [z.str(20, radius=False) for z in g.zeros[:3]]}
                for g in self.groups
            ],
            "timings_seconds": self.timings,
            "provenance": self.provenance,
            "references": list(self.references),
            "caution": self.caution,
        }


@lru_cache(maxsize=4096)
def _model_ordinates(conductor: int, height: float) -> tuple[float, ...]:
    """Approximate positive ordinates (planning only): N(t) = (t/2pi) log(q t/(2 pi e)) + 7/8."""
    out = []
    k = 1
    t = 1.0
    while True:
        target = k - 0.5
        # Newton on f(t) = (t/2pi) log(q t / 2 pi e) + 7/8 - target
        t = max(t, 1.0)
        for _ in range(50):
            f = t / (2 * math.pi) * math.log(conductor * t / (2 * math.pi * math.e)) + 0.875 - target
            fp = math.log(conductor * t / (2 * math.pi)) / (2 * math.pi)
            if fp <= 0:
                t *= 2
                continue
            t_new = max(t - f / fp, t / 2)
            if abs(t_new - t) < 1e-9:
                break
            t = t_new
        if t > height:
            return tuple(out)
        out.append(t)
        k += 1


def plan_frequency_range(groups, V: float, mu: float, tau: float,
                         height_factor: float | None = None, sums=None,
                         inverse_rho=None) -> float:
    """Frequency range where the truncation bound falls below tau/8, on model zeros.

    With ``height_factor`` h, a group of scale s is taken to isolate only its
    zeros below h s xi / j_{0,1} (what the Rayleigh condition on its largest
    residual weight asks at the frequency xi, docs/method.md section 5b), so
    groups of small weight isolate few or no zeros and rely on their moments;
    without it every zero counts (the old, optimistic plan).

    With ``sums`` (per group, the floats T_1..T_K of its exact power sums) the
    model is the bound of section 4c: the residual groups' Gaussian factors and
    largest residual weights count too, so a race with many characters needs far
    fewer zeros; without it, the isolated weights alone (section 4).  The zeros taken
    as isolated then follow the height rule of :meth:`RacePlan.request`: those with
    1/4 + gamma^2 below the square of the reach h s xi / j_{0,1}, and none when
    ``inverse_rho`` (per group, min_k T_k^(1/(2k))) times the reach is at most 1.

    Planning only (floating point): the engine later evaluates the bound rigorously
    on the certified zeros.
    """
    import numpy as np

    t = math.sqrt(2 * V * math.log(16 / tau))
    L = 2 * (abs(mu) + t)
    eps = 2 * math.pi / L
    parts = []
    models: dict = {}  # conductors of a group -> (model ordinates, suffix power sums)
    K = max((len(T) for T in sums), default=1) if sums is not None else 1
    for gi, g in enumerate(groups):
        s = float(g.scale.mid())
        key = tuple(qs for (qs, _) in g.primitive_keys)
        if key not in models:
            models[key] = _group_model(key, K if sums is not None else None)
        gam, suffix = models[key]
        parts.append((s, gam, s / np.hypot(0.5, gam), suffix))
    use_residual = sums is not None and height_factor is not None and len(sums) == len(parts)
    xi = eps
    while xi < 1e4:
        if height_factor is None:
            weights = np.concatenate([w for _, _, w, _ in parts]) if parts else np.zeros(0)
        else:
            cut = []
            for i, (s, gam, _, _) in enumerate(parts):
                reach = height_factor * s * xi / J01
                if use_residual:
                    inv = inverse_rho[i] if inverse_rho is not None else None
                    if inv is not None and reach * inv <= 1:
                        cut.append(0)
                        continue
                    reach = math.sqrt(max(0.0, reach * reach - 0.25))
                cut.append(int(np.searchsorted(gam, reach, side="right")))
            sel = [w[:c] for (_, _, w, _), c in zip(parts, cut)]
            weights = np.concatenate(sel) if sel else np.zeros(0)
        if use_residual:
            if _model_tail(parts, cut, sums, weights, eps, xi, tau / 16) < tau / 16:
                return xi
        else:
            f = 2 / (math.pi * weights * xi)
            small = f[f < 1]
            if small.size and 2 / (math.pi * small.size) * math.exp(0.5 * np.log(small).sum()) < tau / 8:
                return xi
        xi *= 1.15
    return xi


@lru_cache(maxsize=4096)
def _group_model(key: tuple, K: int | None):
    """(model ordinates, suffix power sums 1..K or None) of a group whose L-functions have
    the conductors ``key``; memoised (a table plans thousands of races over the same
    characters), read-only arrays."""
    import numpy as np

    gams = [np.asarray(_model_ordinates(qs, 2000.0)) for qs in key]
    gam = np.sort(np.concatenate(gams)) if gams else np.zeros(0)
    suffix = None
    if K is not None:
        a = 1 / (0.25 + gam ** 2)
        pw = a[:, None] ** np.arange(1, K + 1)[None, :]
        suffix = np.vstack([np.cumsum(pw[::-1], axis=0)[::-1], np.zeros((1, K))])
        suffix.flags.writeable = False
    gam.flags.writeable = False
    return gam, suffix


def _model_tail(parts, cut, sums, iso, eps: float, xi: float, goal: float) -> float:
    """Float model of the section-4c truncation bound from the frequency xi (planning only).

    A group that isolates nothing keeps its exact sums T_k.  One that isolates its
    first ``cut`` model zeros keeps T_1 less their contributions (the Gaussian term)
    and takes R_k, k >= 2, from the model zeros above them: the exact T_k less model
    zeros would mix two zero sets, and for large k (where the lowest zero dominates)
    leave meaningless differences.
    """
    import numpy as np

    from .density.bessel import tail_data_from_floats, tail_float

    K = max((len(T) for T in sums), default=1)
    R = np.full((len(sums), K), 1e-300)
    for i, T in enumerate(sums):
        R[i, :len(T)] = T
    for i, c in enumerate(cut):
        if c:
            suffix = parts[i][3]
            r1 = R[i, 0] - (suffix[0, 0] - suffix[c, 0])
            R[i] = suffix[c]
            if r1 > 0:
                R[i, 0] = r1
    R = np.maximum(R, 1e-300)
    d = tail_data_from_floats(np.asarray(iso, dtype=float), np.array([p[0] for p in parts]), R)
    N = max(1, int(xi / eps))
    N = N if N % 2 == 1 else N + 1
    return tail_float(d, eps, N, goal)


def planned_zero_count(conductor: int, height: float) -> int:
    """Model count of positive ordinates below ``height`` (planning only)."""
    return len(_model_ordinates(conductor, float(height))) if height > 0 else 0


_plan_xi_max = plan_frequency_range  # former private name


PUBLISHED_RH = ("Published interval verification (not redone here): \"The Riemann hypothesis is "
                "true up to 3*10^12\", Bulletin of the London Mathematical Society 53 (2021).")


def _hypotheses(question, group_reports) -> tuple:
    ls = sorted({k for g in group_reports for k in g.primitive_keys})
    zeta = question.is_li_race
    ev_grh = []
    for g in group_reports:
        if not g.zeros:
            # moments only (docs/method.md, section 5b): no zero was located, none is claimed
            ev_grh.append(f"{g.label}: no zero isolated (its exact power sums carry it); "
                          "residual power sums non-negative")
            continue
        ev_grh.append(
            f"{g.label}: {len(g.zeros)} zeros certified on the critical line by sign changes "
            f"of the Hardy Z-function up to height {decimal_down(Fraction(g.height), 4)}; "
            "residual power sums "
            f"non-negative and consistent with none missing below that height")
    if zeta:
        ev_grh.append(PUBLISHED_RH)
    else:
        ev_grh.append("Published interval verifications (not redone here): Math. Comp. 61 (1993), "
                      "all conductors < 13 to height 10000; Math. Comp. (2016), conductors <= 400000.")
    ev_li = []
    for g in group_reports:
        for (c, n), cv in zip(g.primitive_keys, g.central_values):
            name = "zeta(1/2)" if c == 1 else f"L(1/2, chi_{{{c},{n}}})"
            ev_li.append(f"{name} = {cv.str(8)} excludes 0")
    ev_li.append("every isolated zero is a certified sign change in its own disjoint interval "
                 "(odd order; simplicity itself is assumed)")
    if zeta:
        return (
            Hypothesis("RH", "The Riemann hypothesis: every non-trivial zero of zeta(s) has real "
                       "part 1/2.", "assumed", tuple(ev_grh)),
            Hypothesis("LI", "The positive ordinates of the non-trivial zeros of zeta(s) are "
                       "linearly independent over Q.", "assumed", tuple(ev_li)),
        )
    names = ", ".join(f"L(s, chi_{{{c},{n}}})" for (c, n) in ls)
    return (
        Hypothesis("GRH", f"The generalised Riemann hypothesis for {names}: every non-trivial "
                   "zero has real part 1/2.", "assumed", tuple(ev_grh)),
        Hypothesis("LI", "The positive ordinates of the zeros of these L-functions (one "
                   "ordinate set per character, conjugates counted apart) are linearly "
                   "independent over Q.", "assumed", tuple(ev_li)),
    )


@dataclass
class RacePlan:
    """The parameters of one round of :func:`certify_race` (planning, floating point).

    Nothing here is trusted by a bound: the plan only decides how far to compute
    (isolation heights, zero widths, moments and their accuracy, precision); the
    engine then bounds every error rigorously for whatever was computed.
    """

    digits: int
    tau: float
    prec: int
    mean: Fraction
    variance: arb
    xi_max: float
    moments: int
    width: float
    # heights are planned with a margin over the factor assumed when xi_max was planned
    # (PLAN_HEIGHT_FACTOR): the engine's frequency range on the certified zeros often
    # exceeds the model's, and a second round costs more than the extra zeros
    height_factor: float = 3.4
    few_zeros: bool = True  # plan heights from each group's weight (no floor)
    # per group (its first primitive key): min_k T_k^(1/(2k)) from the exact power sums, which
    # bounds 1/|rho| over all its zeros; a group whose moments alone give y <= 1/h isolates none
    inverse_rho: dict = field(default_factory=dict)

    def request(self, group) -> tuple[float, float, int, int]:
        """(height, zero width, moments, moment accuracy bits) for a spectral group."""
        s = float(group.scale.mid())
        # the Rayleigh condition asks |rho| > s xi / j01 of every residual zero at the
        # largest frequency; below that height the group's zeros are isolated, above it
        # its moments carry them (a group of small weight may isolate none)
        # |rho| = sqrt(1/4 + gamma^2) >= 1/2 for every zero, so the condition holds with the
        # margin h once sqrt(1/4 + T^2) >= h s xi / j01: below that no zero needs isolating
        reach = self.height_factor * s * self.xi_max / J01
        height = math.sqrt(max(0.0, reach * reach - 0.25))
        inv = self.inverse_rho.get(group.primitive_keys[0])
        if inv is not None and self.few_zeros and reach * inv <= 1:
            # the moments alone bound y by s xi inv / j01 <= 1/h (docs/method.md, section 5b)
            height = 0.0
        if height < MIN_HEIGHT and not self.few_zeros:
            height = MIN_HEIGHT
        # end on a point of the conductor's common search grid, so that every point the
        # zero search visits can be served by the batched evaluation (prefetch_grid)
        height = round_height_to_grid(group.primitive_keys[0][0], height)
        # R_k is multiplied by about (s xi / j01)^(2k) in the engine
        grow = max(2.0, 2 * s * self.xi_max / J01)
        bits = int(self.digits * 3.33 + 2 * self.moments * math.log2(grow) + 40)
        return height, self.width, self.moments, bits

    def to_wire(self) -> dict:
        """The plan as plain data for another process, without the variance ball (which the
        receiver recomputes: :func:`shipped_plan`)."""
        from dataclasses import fields

        d = {f.name: getattr(self, f.name) for f in fields(self) if f.name != "variance"}
        d["mean"] = (self.mean.numerator, self.mean.denominator)
        d["inverse_rho"] = [[list(k), v] for k, v in self.inverse_rho.items()]
        return d

    @classmethod
    def from_wire(cls, d: dict, variance: arb) -> "RacePlan":
        d = dict(d)
        d["variance"] = variance
        d["mean"] = Fraction(*d["mean"])
        d["inverse_rho"] = {tuple(k): v for k, v in d["inverse_rho"]}
        return cls(**d)

    def spectrum_requests(self, groups) -> list[tuple]:
        """(conductor, label, parity, height, width, moments, bits) for every L-function needed."""
        out = []
        for g in groups:
            h, w, k, b = self.request(g)
            out.extend((c, n, g.parity, h, w, k, b) for (c, n) in g.primitive_keys)
        return out


def _first_moments(question: RaceQuestion, digits: int, store: SpectrumStore):
    """(prec, groups, moments, V, sums, inverse_rho): the exact variance V (first moments)
    and the float power sums the plan reads, from ``store``."""
    prec = max(80, int(digits * 3.33) + 48)
    groups = spectral_groups(question)
    if not groups:
        raise BadInput(f"{question.label}: every character sum W(chi) vanishes; the race is degenerate")
    moments = min(60, int(math.ceil(digits * math.log2(10) / 2)) + 6)
    with workprec(prec):
        groups = spectral_groups(question)
        # the first round's moments (at the smallest growth factor 2 of RacePlan.request), so
        # that one batched pass usually serves the variance and the first round
        k_bits = max(prec, int(digits * 3.33 + 2 * moments + 40))
        store.prefetch([(c, n, moments, k_bits) for g in groups for (c, n) in g.primitive_keys])
        V = arb(0)
        sums = []
        inverse_rho = {}
        for g in groups:
            c, n = g.primitive_keys[0]
            sp = store.get(c, n, g.parity, 0.0, 1e-3, moments, k_bits)
            div = 2 if g.is_real else 1
            T1 = sp.power_sums[0] / div
            V += g.scale * g.scale * T1 / 2
            sums.append([float(x.mid()) / div for x in sp.power_sums[:moments]])
            pos = [(k, x) for k, x in enumerate(sums[-1], start=1) if x > 0]
            if pos:
                inverse_rho[g.primitive_keys[0]] = min(x ** (1 / (2 * k)) for k, x in pos)
    return prec, groups, moments, V, sums, inverse_rho


def plan_race(question: RaceQuestion, digits: int, store: SpectrumStore) -> RacePlan:
    """The first-round plan of a race: exact variance (first moments), frequency range, sizes."""
    tau = 10.0 ** (-digits)
    mu_q = mean_of(question)
    prec, groups, moments, V, sums, inverse_rho = _first_moments(question, digits, store)
    xi_max = plan_frequency_range(groups, float(V.mid()), float(mu_q), tau,
                                  height_factor=PLAN_HEIGHT_FACTOR, sums=sums,
                                  inverse_rho=[inverse_rho.get(g.primitive_keys[0])
                                               for g in groups])
    width = min(1e-6, tau / (50 * (1 + xi_max)))
    return RacePlan(digits, tau, prec, mu_q, V, xi_max, moments, width,
                    inverse_rho=inverse_rho)


def shipped_plan(question: RaceQuestion, digits: int, store: SpectrumStore,
                 wire: dict) -> RacePlan:
    """The plan another process made for this race (:meth:`RacePlan.to_wire`), with the
    exact variance recomputed here from ``store`` (a ball does not cross processes bit for
    bit), so the race runs exactly as if it had planned itself; the frequency range, the
    costly part of planning, is taken as shipped."""
    prec, _, moments, V, _, _ = _first_moments(question, digits, store)
    plan = RacePlan.from_wire(wire, V)
    if (plan.digits, plan.prec, plan.moments, plan.mean) != (digits, prec, moments,
                                                             mean_of(question)):
        raise BadInput(f"{question.label}: the shipped plan is not this race's plan")
    return plan


def certify_race(question: RaceQuestion, digits: int = DEFAULT_DIGITS,
                 store: SpectrumStore | None = None, max_rounds: int = 5,
                 command_line: str = "", plan: RacePlan | None = None) -> RaceResult:
    """Certify the density of ``question`` to width 10^-digits (or say how close it got).

    Parameters
    ----------
    question : RaceQuestion
        From :func:`certify.race.question.two_way`, ``residue_race`` or ``weighted``.
    digits : int
        Target: enclosure width at most 10^-digits.
    store : SpectrumStore, optional
        Shared spectra (reused across races).

    Returns
    -------
    RaceResult
        If the target cannot be reached within the ceilings, the best certified
        enclosure, with ``target_met`` False.

    Assumptions
    -----------
    GRH for every L-function used and LI; both are listed in the result with the
    evidence gathered, neither is proven.
    """
    if isinstance(digits, bool) or not isinstance(digits, int):
        raise BadInput(f"digits must be an integer, got {digits!r}")
    if not (1 <= digits <= MAX_DIGITS):
        raise BadInput(f"digits must be between 1 and {MAX_DIGITS} (got {digits})")
    t_start = time.time()
    store = store or SpectrumStore()
    # a batch plans each race once, where it decides which spectra to compute, and passes
    # that plan here (the plan only decides how far to compute; nothing trusts it)
    plan = (plan_race(question, digits, store) if plan is None
            else replace(plan, inverse_rho=dict(plan.inverse_rho)))
    tau, prec, mu_q, V = plan.tau, plan.prec, plan.mean, plan.variance
    best = None
    timings = {"spectra": 0.0, "density": 0.0}
    last_reason = ""
    for round_no in range(max_rounds):
        t0 = time.time()
        reports = []
        weights = []
        residuals = []
        with workprec(prec):
            groups = spectral_groups(question)
            reqs = plan.spectrum_requests(groups)
            store.prefetch([(c, n, k, b) for (c, n, _, _, _, k, b) in reqs])
            if hasattr(store, "prefetch_grid"):
                store.prefetch_grid([(c, n, h) for (c, n, _, h, _, _, _) in reqs])
            for g in groups:
                height, width, moments, bits = plan.request(g)
                fraction = 0.25
                while True:
                    sps = [store.get(c, n, g.parity, height, width, moments, bits, fraction)
                           for (c, n) in g.primitive_keys]
                    owned = sorted(((z, i) for i, sp in enumerate(sps) for z in sp.zeros.zeros),
                                   key=lambda zi: float(zi[0].mid()))
                    zs = [z for z, _ in owned]
                    T = min(sp.height for sp in sps)
                    for sp in sps:
                        # T_k = S_k/2 for a real character needs no zero at s = 1/2
                        if sp.central.real.contains(0) and sp.central.imag.contains(0):
                            raise Inconsistent(
                                f"L(1/2, chi_{{{sp.conductor},{sp.label}}}) = {sp.central.str(5)}: "
                                "a zero at s = 1/2 cannot be excluded; not certified")
                    div = 2 if g.is_real else 1
                    target_sums = [s_k / div for s_k in sps[0].power_sums[:moments]]
                    R = residual_sums(target_sums, zs)
                    try:
                        notes = residual_checks(g.label, R, T, g.primitive_keys[0][0],
                                                len(g.primitive_keys))
                        break
                    except Inconsistent:
                        # a zero may hide between two grid points: search on a finer grid,
                        # and refuse only if the residual sums still disagree
                        if fraction < 0.25 / 16 + 1e-12:
                            raise
                        fraction /= 4
                reports.append(GroupReport(g.label, g.primitive_keys, g.scale, T, tuple(zs),
                                           tuple(target_sums), tuple(R),
                                           tuple(sp.central for sp in sps), tuple(notes),
                                           tuple(i for _, i in owned)))
                for z in zs:
                    weights.append(g.scale / (arb(1) / 4 + z * z).sqrt())
                residuals.append(ResidualGroup(g.scale, tuple(R), g.label))
            variable = BesselVariable(arb(mu_q.numerator) / mu_q.denominator, tuple(weights),
                                      tuple(residuals))
        t1 = time.time()
        timings["spectra"] += t1 - t0
        try:
            dens = density_enclosure(variable, tau, prec=prec)
        except PrecisionExhausted as exc:
            last_reason = str(exc)
            plan.xi_max *= 1.5
            continue
        finally:
            timings["density"] += time.time() - t1
        if best is None or dens.enclosure.width < best[0].enclosure.width:
            best = (dens, reports, dict(dens.parameters),
                    (plan.height_factor, plan.width, plan.moments, prec))
        if dens.enclosure.width <= Fraction(tau):
            break
        # refine the plan where the budget says
        b = {e.name: e.bound_float for e in dens.budget}
        worst = max(b, key=b.get)
        worst_bound = next(e.bound for e in dens.budget if e.name == worst)
        last_reason = f"largest error term: {worst} (<= {bound_text(worst_bound)})"
        if worst == "residual zeros" or dens.parameters.get("fallback_frequencies", 0):
            # grow towards the frequency range the engine needed, at most doubling per round
            plan.xi_max = max(plan.xi_max, min(dens.parameters["xi_max"], 2 * plan.xi_max))
            plan.height_factor *= 1.5
            plan.moments = min(80, plan.moments + 6)
        if worst == "rounding and zero enclosures" or b["rounding and zero enclosures"] > tau / 8:
            plan.width *= 1e-4
            plan.prec += 32
            prec = plan.prec
        if worst == "frequency truncation":
            plan.height_factor *= 1.3
    if best is None:
        raise PrecisionExhausted(f"not certified: {question.label}: {last_reason}")
    dens, reports, params, (hf, w, K, p) = best
    met = dens.enclosure.width <= Fraction(tau)
    params = dict(params)
    params.update({
        "target_width": f"1e-{digits}",
        "isolation_height_factor": hf,
        "zero_enclosure_width": w,
        "moments": K,
        "primitive_l_functions": sorted({f"{c}.{n}" for g in reports for (c, n) in g.primitive_keys}),
        "zeros_used": sum(len(g.zeros) for g in reports),
        "hardy_z_evaluations": store.z_calls,
    })
    if question.normalisation != 1:
        params["weight_normalisation"] = (
            f"weights multiplied by {question.normalisation} so that sum |w_a| = 2; the density "
            "is invariant under positive scaling (docs/method.md, section 1c)")
    exact = None
    if mu_q == 0:
        # docs/method.md, section 1b: mean 0 makes the limit law symmetric without atom at 0
        if not dens.enclosure.contains(Fraction(1, 2)):
            raise Inconsistent(f"{question.label}: the mean is 0, so the density is 1/2 exactly, "
                               f"but the engine's enclosure {dens.enclosure.interval_text()} "
                               "excludes 1/2; not certified")
        exact = ExactValue(Fraction(1, 2), "mean 0, so the limit law is symmetric about 0 and "
                           "has no atom there: docs/method.md, section 1b")
    if not met and exact is None:
        params["not_met_reason"] = last_reason
    timings["total"] = time.time() - t_start
    import platform
    import sys

    provenance = {
        "certify": __version__,
        "python_flint": flint_version,
        "python": sys.version.split()[0],
        "platform": platform.platform(),
        "command_line": command_line,
        "date": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
    }
    hypotheses = _hypotheses(question, reports)
    return RaceResult(question, dens.enclosure, dens.ball, digits, met or exact is not None, mu_q,
                      V, dens.budget, params, hypotheses, tuple(reports),
                      {k: round(v, 3) for k, v in timings.items()}, provenance,
                      caution=caution_text(hypotheses), exact=exact)
