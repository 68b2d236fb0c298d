"""The bias of Frobenius traces of an elliptic curve over Q: the driver.

For E/Q of analytic rank r, under GRH for L(E, s) and LI for its non-central
zeros, the normalised sum (log x / sqrt x) sum_{p <= x} a_p / sqrt p has the
limiting logarithmic distribution of

    X = 1 - 2r + sum_{gamma > 0} (2 / sqrt(1/4 + gamma^2)) cos Theta_gamma

(docs/elliptic_curves_q.md, section 5).  ``certify_ec_race(curve, digits)``
certifies P(X > 0) (the density of x where the sum is positive) with the
shared density engine, an itemised budget, the analytic rank certified (r <= 1)
or assumed with evidence (r >= 2), and returns an :class:`ECRaceResult`
shaped like :class:`certify.races.RaceResult`.

The count race #{p <= x : a_p > 0} against #{p <= x : a_p < 0} is *not*
reachable this way: its explicit formula involves every symmetric power
L-function of E (docs/elliptic_curves_q.md, section 7).
"""

from __future__ import annotations

from .result import NotebookDisplay

import math
import time
from dataclasses import dataclass
from fractions import Fraction

from . import __version__
from .arith import arb, flint_version, workprec
from .density.bessel import BesselVariable, ResidualGroup, density_enclosure
from .errors import BadInput, Inconsistent, PrecisionExhausted
from .result import CAUTION, Enclosure, Hypothesis
from .source.ell_l import EllipticL, check_conductor_for_l
from .source.ellcurve import EllipticCurveQ, curve_from_ainvs, with_global_root_number
from .spectrum.lfunction import zero_power_sums_of
from .spectrum.spectrum import residual_checks, residual_sums
from .spectrum.zeros import find_zeros_of

J01 = 2.404825557695773
MAX_DIGITS = 30
DEFAULT_DIGITS = 10
MAX_RANK_ORDER = 7
RANK3_THEOREM_MODEL = (0, 0, 1, -7, 6)

REFERENCES = (
    "Chebyshev's bias, Experimental Mathematics 3 (1994) 173-197.",
    "Finding meaning in error terms, Bulletin of the AMS 45 (2008) 185-228.",
    "Elliptic curves of unbounded rank and Chebyshev's bias, IMRN (2013).",
    "Algorithm for determining the type of a singular fiber in an elliptic pencil, "
    "Lecture Notes in Mathematics 476 (1975).",
    "Variation of the root number in families of elliptic curves, "
    "Compositio Mathematica 87 (1993).",
    "Galois theory, elliptic curves, and root numbers, Compositio Mathematica 100 (1996).",
    "Arb: efficient arbitrary-precision midpoint-radius interval arithmetic, "
    "IEEE Transactions on Computers 66 (2017).",
)
RANK3_REFERENCE = ("On the conjecture of Birch and "
                   "Swinnerton-Dyer for an elliptic curve of rank 3, Math. Comp. 44 (1985).")


@dataclass(frozen=True)
class RankReport:
    """The analytic rank: parity from the root number, the order certified or bounded."""

    root_number: int
    rank: int  # the value used (certified if ``certified``)
    certified: bool
    upper_bound: int  # proven: ord_{s=1} L(E, s) <= upper_bound
    central_coefficients: tuple  # enclosures of Lambda^(k)(1)/k!, k = 0..upper_bound
    theorem: str = ""  # a published proof of the rank, if one applies to this curve

    def statement(self) -> str:
        if self.certified:
            return f"analytic rank {self.rank} (certified)"
        if self.theorem:
            return (f"analytic rank {self.rank} (published theorem, Math. Comp. 44 (1985)); "
                    f"computed here: rank <= {self.upper_bound}, rank = {self.rank} mod 2")
        return (f"analytic rank {self.rank} assumed; proven: rank <= {self.upper_bound}, "
                f"rank = {self.rank} mod 2")

    def hypothesis(self) -> Hypothesis | None:
        """The rank r >= 2 as a hypothesis: Lambda^(r)(1) != 0 proves rank <= r, the root number
        the parity; the lower derivatives of r's parity are balls containing 0, which is
        consistent with rank r but does not prove that they vanish (unless a published proof
        applies to this curve, cited as such)."""
        if self.certified:
            return None
        ev = [f"Lambda^({k})(1)/{k}! = {c.real.str(5, radius=True)} contains 0 (radius "
              f"{float(c.real.rad()):.1e}): consistent with rank {self.rank}; vanishing is not "
              "proven numerically"
              for k, c in enumerate(self.central_coefficients[:self.rank])
              if (k % 2 == 0) == (self.root_number == 1)]
        ev.append(f"Lambda^({self.rank})(1)/{self.rank}! = "
                  f"{self.central_coefficients[self.rank].real.str(8)} excludes 0: analytic rank "
                  f"<= {self.rank} proven")
        ev.append(f"root number {self.root_number:+d}: Lambda^(k)(1) = 0 for every k of the other "
                  f"parity (functional equation); rank = {self.rank} mod 2 proven")
        status, ref = "assumed", ""
        if self.theorem:
            ev.append(f"published proof that this curve has analytic rank {self.rank}: {self.theorem}")
            status, ref = "theorem", self.theorem
        return Hypothesis(
            "rank", f"L(E, s) vanishes to order exactly {self.rank} at s = 1 (the lower "
            f"derivatives of the parity of {self.rank} vanish).", status, tuple(ev), ref)


def analytic_rank(L: EllipticL, prec: int = 100) -> RankReport:
    """Parity from the root number; r = 0 or 1 certified; r >= 2 bounded above."""
    eps = L.eps
    for length in (4, MAX_RANK_ORDER + 1):
        cs = L.central_jet(length, prec)
        for k in range(length):
            if (k % 2 == 0) != (eps == 1):
                continue  # vanishes exactly by the functional equation
            if not cs[k].real.contains(0):
                certified = k <= 1
                thm = RANK3_REFERENCE if (k == 3 and tuple(L.E.minimal) == RANK3_THEOREM_MODEL) else ""
                return RankReport(eps, k, certified, k, tuple(cs[:k + 1]), thm)
    raise PrecisionExhausted(
        f"not certified: no derivative of order <= {MAX_RANK_ORDER} of L(E, s) at s = 1 is "
        "separated from 0")


@dataclass(frozen=True)
class ECRaceQuestion:
    """The race of a curve: which sign does sum_{p <= x} a_p / sqrt p prefer?"""

    ainvs: tuple
    conductor: int
    kind: str = "ecq-trace-sum"

    @property
    def label(self) -> str:
        return f"delta_E(>0), E = [{','.join(map(str, self.ainvs))}]"

    @property
    def statement(self) -> str:
        return ("the logarithmic density of the set of x >= 2 with sum_{p <= x} a_p(E)/sqrt(p) > 0, "
                f"for E: [{','.join(map(str, self.ainvs))}] of conductor {self.conductor}")


MAX_CLAIM_DIGITS = 12  # a curve claim is decided at most to this width (the recount limit)


@dataclass(frozen=True)
class CurveRace:
    """A side of a curve's trace race, as claims name it: ``delta(E[a1,a2,a3,a4,a6]>0)``.

    ``side`` is ">0" (the density of x with sum_{p <= x} a_p/sqrt(p) > 0) or "<0"
    (its complement, 1 - delta(>0) exactly under LI).  The a-invariants are kept as
    given; the certificate is that of the side ">0".
    """

    ainvs: tuple
    side: str = ">0"
    kind: str = "ecq-trace-sum"

    @property
    def label(self) -> str:
        return f"delta(E[{','.join(map(str, self.ainvs))}]{self.side})"

    @property
    def statement(self) -> str:
        rel = ">" if self.side == ">0" else "<"
        return (f"the logarithmic density of the set of x >= 2 with sum_(p <= x) a_p(E)/sqrt(p) "
                f"{rel} 0, E = [{','.join(map(str, self.ainvs))}]")

    def enclosure(self, result) -> tuple:
        """(lower, upper) of this side from a result of :func:`certify_ec_race`."""
        d = result.density if self.side == ">0" else result.negative_density
        return d.lower, d.upper


def curve_race(ainvs, side: str = ">0") -> CurveRace:
    """A checked :class:`CurveRace` (BadInput, one line, for a singular or malformed curve)."""
    if side not in (">0", "<0"):
        raise BadInput(f"the side of a curve race is >0 or <0, got {side!r}")
    E = curve_from_ainvs(ainvs)
    return CurveRace(tuple(E.ainvs), side)


@dataclass(frozen=True)
class ECRaceResult(NotebookDisplay):
    """A certified density for the trace race of a curve, with everything behind it.

    The same field names as :class:`certify.races.RaceResult` (density, ball,
    digits_requested, target_met, mean, variance, budget, parameters,
    hypotheses, timings, provenance, references, caution), plus the curve,
    its rank report, the zeros used and the residual sums.
    """

    question: ECRaceQuestion
    curve: EllipticCurveQ
    density: Enclosure
    ball: arb
    digits_requested: int
    target_met: bool
    mean: Fraction
    variance: arb
    budget: tuple
    parameters: dict
    hypotheses: tuple
    rank: RankReport
    zeros: tuple
    height: float
    power_sums: tuple  # S_m over all zeros (central included)
    residual: tuple
    notes: tuple
    timings: dict
    provenance: dict
    references: tuple = REFERENCES
    caution: str = CAUTION

    @property
    def negative_density(self) -> Enclosure:
        """P(X < 0) = 1 - P(X > 0) (X has a continuous law under LI)."""
        return Enclosure(1 - self.density.upper, 1 - self.density.lower)

    def __repr__(self) -> str:
        d = self.density
        p = d.places()
        status = "target met" if self.target_met else "TARGET NOT MET (best certified enclosure)"
        return (f"<ECRaceResult {self.question.label} in [{d.lower_str(p)}, {d.upper_str(p)}] "
                f"({status}; conditional on GRH and LI)>")

    def to_dict(self) -> dict:
        d = self.density
        places = d.places()
        neg = self.negative_density
        return {
            "question": {"kind": self.question.kind, "label": self.question.label,
                         "statement": self.question.statement},
            "curve": self.curve.as_dict(),
            "density": {
                "lower": d.lower_str(places), "upper": d.upper_str(places),
                "width": d.width_text(), "certified_digits": d.digits(),
                "target_width": f"1e-{self.digits_requested}", "target_met": self.target_met,
            },
            "negative_density": {"lower": neg.lower_str(places), "upper": neg.upper_str(places)},
            "mean": str(self.mean),
            "variance": self.variance.str(20, radius=True),
            "analytic_rank": {"value": self.rank.rank, "certified": self.rank.certified,
                              "upper_bound": self.rank.upper_bound,
                              "root_number": self.rank.root_number,
                              "statement": self.rank.statement()},
            "hypotheses": [h.as_dict() for h in self.hypotheses],
            "error_budget": [e.as_dict() for e in self.budget],
            "parameters": self.parameters,
            "spectrum": {"l_function": f"L(E, s), conductor {self.curve.conductor}",
                         "isolation_height": self.height, "zeros_used": len(self.zeros),
                         "first_zeros": [z.str(20, radius=False) for z in self.zeros[:5]]},
            "notes": list(self.notes),
            "count_race": COUNT_RACE_NOTE,
            "timings_seconds": self.timings,
            "provenance": self.provenance,
            "references": list(self.references),
            "caution": self.caution,
        }


COUNT_RACE_NOTE = (
    "The race #{p <= x : a_p > 0} against #{p <= x : a_p < 0} is not certified by certify: "
    "its explicit formula involves the zeros of every symmetric power L-function of E, "
    "which this method does not reach (`docs/elliptic_curves_q.md`, section 7).")


def _model_ordinates(N: int, height: float) -> list[float]:
    """Approximate positive ordinates (planning only): N(t) = (t/pi) log(sqrt(N) t/(2 pi e)) + 1."""
    out, k, t = [], 1, 1.0
    while True:
        target = k - 0.5
        for _ in range(60):
            f = t / math.pi * math.log(math.sqrt(N) * t / (2 * math.pi * math.e)) + 1 - target
            fp = math.log(math.sqrt(N) * t / (2 * math.pi)) / math.pi
            if fp <= 0:
                t *= 2
                continue
            tn = max(t - f / fp, t / 2)
            if abs(tn - t) < 1e-9:
                break
            t = tn
        if t > height:
            return out
        out.append(t)
        k += 1


def plan_xi(N: int, V: float, mu: float, tau: float) -> float:
    """Frequency range where the truncation bound falls below tau/8, on model zeros (planning)."""
    import numpy as np

    t = math.sqrt(2 * V * math.log(16 / tau))
    L = 2 * (abs(mu) + t)
    eps = 2 * math.pi / L
    w = 2 / np.hypot(0.5, np.asarray(_model_ordinates(N, 3000.0)))
    xi = eps
    while xi < 1e4:
        f = 2 / (math.pi * w * xi)
        small = f[f < 1]
        if small.size and 2 / (math.pi * small.size) * math.exp(0.5 * np.log(small).sum()) < tau / 8:
            return xi
        xi *= 1.15
    return xi


def _hypotheses(E, L, zl, rank: RankReport, notes) -> tuple:
    ev_grh = [f"{len(zl.zeros)} zeros of L(E, s) certified on the critical line Re s = 1 by sign "
              f"changes of the Hardy Z-function up to height {zl.height:g}",
              *notes,
              f"root number {L.eps:+d} ({L.eps_source}); functional equation checked in balls"]
    if not any(str(n).startswith("GRH ") for n in notes):
        ev_grh.append("no zero count: GRH is not verified to any height here (the residual sums "
                      "detect a missing zero but do not prove its absence); `certify ecrace "
                      "--grh-height T` counts the zeros up to T by the argument principle and "
                      "`certify verify` re-proves that count")
    cm = ""
    if E.has_cm:
        cm = (" E has complex multiplication: L(E, s) is a Hecke L-function of an imaginary "
              "quadratic field; GRH and LI are then statements about that Hecke L-function.")
    hyps = [
        Hypothesis("GRH", f"The Riemann hypothesis for L(E, s), E = {list(E.minimal)}: every "
                   "non-trivial zero has real part 1 (arithmetic normalisation)." + cm,
                   "assumed", tuple(ev_grh)),
        Hypothesis("LI", "The positive ordinates of the non-central zeros of L(E, s) are "
                   "linearly independent over Q (in particular simple).", "assumed",
                   ("every isolated zero is a certified sign change in its own disjoint interval "
                    "(odd order; simplicity itself is assumed)",)),
    ]
    rh = rank.hypothesis()
    if rh is not None:
        hyps.append(rh)
    return tuple(hyps)


def verify_grh_to(L, zeros, T: float, rank: int, rho0: float = 0.1) -> str:
    """Count the zeros below T by the argument principle and compare with the sign changes.

    Returns the evidence line; raises nothing (a failure is reported as "not verified").
    """
    from .source.ell_zerocount import count_zeros

    # keep the top edge off every zero enclosure
    for _ in range(20):
        if not any(z.contains(arb(T)) or abs(float(z.mid()) - T) < 1e-3 for z in zeros):
            break
        T += 0.01
    found = sum(1 for z in zeros if float(z.mid()) < T)
    try:
        c = count_zeros(L, T, rho0)
    except PrecisionExhausted as exc:
        return f"GRH to height {T:g}: not verified ({exc})"
    if c.outside_disc != found or c.inside_disc != rank:
        return (f"GRH to height {T:g}: NOT verified: the argument principle counts "
                f"{c.outside_disc} zeros with 0 < gamma < {T:g} outside |s - 1| <= {rho0} and "
                f"{c.inside_disc} inside, against {found} sign changes and central order {rank}")
    return (f"GRH verified to height {T:g} by a zero count (argument principle with Taylor "
            f"models, {c.models} models): the {found} zeros with {rho0} < gamma < {T:g} are "
            f"exactly the certified sign changes (all simple, on the line), and "
            f"|s - 1| < {rho0} holds exactly {c.inside_disc} zero(s)"
            + ("" if rank <= 1 else f" (the central zero of the assumed order {rank})"))


def certify_ec_race(curve, digits: int = DEFAULT_DIGITS, max_rounds: int = 5,
                    command_line: str = "", height: float | None = None,
                    grh_height: float = 0.0) -> ECRaceResult:
    """Certify P(X > 0) for the trace race of ``curve`` to width 10^-digits.

    Parameters
    ----------
    curve : EllipticCurveQ or a-invariants (anything :func:`curve_from_ainvs` accepts)
    digits : int
        Target width 10^-digits (1..30).

    Assumptions
    -----------
    GRH for L(E, s), LI for its non-central zeros, and (if not certified) the
    analytic rank; all are listed in the result with their evidence.
    """
    if isinstance(digits, bool) or not isinstance(digits, int):
        raise BadInput(f"digits must be an integer, got {digits!r}")
    if not (1 <= digits <= MAX_DIGITS):
        raise BadInput(f"digits must be between 1 and {MAX_DIGITS} (got {digits})")
    t_start = time.time()
    E = curve if isinstance(curve, EllipticCurveQ) else curve_from_ainvs(curve)
    check_conductor_for_l(E.conductor)
    L = EllipticL(E)
    # the root number: local data (if complete) must agree with the functional equation
    fe_eps = L.decide_root_number()
    if E.root_number_local is not None and fe_eps != E.root_number_local:
        raise Inconsistent(f"root number from local data ({E.root_number_local:+d}) contradicts "
                           f"the functional equation ({fe_eps:+d}); not certified")
    # an open local factor (additive at 2 or 3, no formula) is derived from the proven sign
    E = with_global_root_number(E, fe_eps)
    timings = {}
    t0 = time.time()
    rank = analytic_rank(L)
    timings["rank"] = time.time() - t0
    L.central_order = rank.rank
    r = rank.rank
    mu = Fraction(1 - 2 * r)
    tau = 10.0 ** (-digits)
    prec = max(80, int(digits * 3.33) + 48)
    moments = min(60, int(math.ceil(digits * math.log2(10) / 2)) + 4)
    # a cheap S_1 gives the exact variance and the plan; then one jet of the planned
    # length and accuracy serves the residual sums
    t0 = time.time()
    with workprec(prec):
        S1 = zero_power_sums_of(L, 1, prec)[0]
        V = 2 * (S1 - 4 * r) / 2
    xi_max = plan_xi(E.conductor, float(V.mid()), float(mu), tau)
    S_bits = int(digits * 3.33 + 2 * moments * math.log2(max(2.0, 2.2 * xi_max / J01)) + 40)
    S = zero_power_sums_of(L, moments, S_bits)
    timings["moments"] = time.time() - t0
    width = min(1e-6, tau / (50 * (1 + xi_max)))
    height_factor = 2.2
    best = None
    last_reason = ""
    zl = None
    timings.update({"spectrum": 0.0, "density": 0.0})
    for _round in range(max_rounds):
        t0 = time.time()
        H = height if height is not None else max(6.0, height_factor * 2 * xi_max / J01)
        # the engine multiplies R_k by about (2 xi / j01)^(2k): plan the moments' accuracy
        bits = int(digits * 3.33 + 2 * moments * math.log2(max(2.0, 2.2 * xi_max / J01)) + 40)
        with workprec(prec):
            t_from = 0.1  # = the radius of the disc left out by the zero count
            if zl is None or zl.height < H or zl.width > width:
                zl = find_zeros_of(L, H, width, 0.25, start=zl if zl is not None and zl.width <= width else None,
                                   t_from=t_from)
            if len(S) < moments or S_bits < bits - 24:
                S = zero_power_sums_of(L, moments, bits)
                S_bits = bits
            T = [(s - r * arb(4) ** m) / 2 for m, s in enumerate(S, start=1)]
            zs = list(zl.zeros)
            R = residual_sums(T, zs)
            fraction = 0.25
            while True:
                try:
                    notes = residual_checks(f"L(E, s), conductor {E.conductor}", R, zl.height,
                                            E.conductor, 1, degree=2)
                    break
                except Inconsistent:
                    if fraction < 0.25 / 16 + 1e-12:
                        raise
                    fraction /= 4
                    zl = find_zeros_of(L, zl.height, width, fraction, t_from=t_from)
                    zs = list(zl.zeros)
                    R = residual_sums(T, zs)
            weights = tuple(2 / (arb(1) / 4 + z * z).sqrt() for z in zs)
            var = BesselVariable(arb(int(mu)), weights, (ResidualGroup(arb(2), tuple(R), "L(E,s)"),))
        t1 = time.time()
        timings["spectrum"] += t1 - t0
        try:
            dens = density_enclosure(var, tau, prec=prec)
        except PrecisionExhausted as exc:
            last_reason = str(exc)
            xi_max *= 1.5
            continue
        finally:
            timings["density"] += time.time() - t1
        if best is None or dens.enclosure.width < best[0].enclosure.width:
            best = (dens, zl, tuple(R), tuple(notes), H, width, moments)
        if dens.enclosure.width <= Fraction(tau):
            break
        b = {e.name: e.bound_float for e in dens.budget}
        worst = max(b, key=b.get)
        last_reason = f"largest error term: {worst} ({b[worst]:.2e})"
        if worst == "residual zeros" or dens.parameters.get("fallback_frequencies", 0):
            xi_max = max(xi_max, min(dens.parameters["xi_max"], 2 * xi_max))
            height_factor *= 1.5
            moments = min(80, moments + 6)
        if worst == "rounding and zero enclosures" or b["rounding and zero enclosures"] > tau / 8:
            width *= 1e-4
            prec += 32
        if worst == "frequency truncation":
            height_factor *= 1.3
    if best is None:
        raise PrecisionExhausted(f"not certified: {last_reason}")
    dens, zl, R, notes, H, w, K = best
    met = dens.enclosure.width <= Fraction(tau)
    params = dict(dens.parameters)
    params.update({
        "target_width": f"1e-{digits}", "isolation_height": zl.height,
        "zero_enclosure_width": w, "moments": K, "zeros_used": len(zl.zeros),
        "hardy_z_evaluations": zl.z_calls, "conductor": E.conductor,
        "root_number": L.eps, "analytic_rank_used": r,
    })
    if not met:
        params["not_met_reason"] = last_reason
    timings["total"] = time.time() - t_start
    import platform
    import sys

    provenance = {"certify": __version__, "python_flint": flint_version,
                  "python": sys.version.split()[0], "platform": platform.platform(),
                  "command_line": command_line,
                  "date": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())}
    if grh_height:
        t0 = time.time()
        line = verify_grh_to(L, list(zl.zeros), min(float(grh_height), zl.height), r)
        notes = tuple(notes) + (line,)
        params["grh_verified_line"] = line
        timings["zero_count"] = round(time.time() - t0, 3)
    q = ECRaceQuestion(tuple(E.minimal), E.conductor)
    with workprec(prec):
        var_x = 2 * (S[0] - 4 * r) / 2
    return ECRaceResult(q, E, dens.enclosure, dens.ball, digits, met, mu, var_x, dens.budget,
                        params, _hypotheses(E, L, zl, rank, notes), rank, tuple(zl.zeros),
                        zl.height, tuple(S), R, notes,
                        {k: round(v, 3) for k, v in timings.items()}, provenance)
