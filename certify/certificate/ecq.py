"""Certificates of the trace race of an elliptic curve over Q (kind ``ecq-race``).

Verified by a recount (see :mod:`.recount`): the curve is rebuilt from its stored
a-invariants; Tate's algorithm, the root number (local data and the functional
equation), the analytic rank, the zeros (sign changes of the Hardy Z-function),
the exact power sums and the density are recomputed with the stored target and
zero-count height; every stored field is compared with the re-derived one
(balls must meet, the stored enclosure must contain the re-derived one).
"""

from __future__ import annotations

import shlex
import time
from fractions import Fraction

from ..errors import BadInput, Inconsistent
from .model import Certificate, ball_record
from .ecq_items import hypothesis_records, independent_items
from .recount import answer_from_enclosure, budget_records, provenance, timed_report

DEFINITION = ("logarithmic density: lim_{X -> oo} (1/log X) int_2^X 1[sum_{p <= x} a_p/sqrt(p) > 0] "
              "dx/x, equal to P(X > 0) for the limit law of `docs/elliptic_curves_q.md` (section 5)")
LIMITS = {"digits": 12, "conductor": 10**5, "observe": 10**6}


def ecq_certificate(result, grh_height: float, seconds: float, observation=None) -> Certificate:
    """The certificate of an :class:`~certify.ecrace.ECRaceResult`; with ``observation`` (an
    :class:`~certify.ecobserve.Observation`), a section ``spectrum.observation`` of observed data
    (labelled as such: no part of the proven enclosure; verify recounts it)."""
    E = result.curve
    question = {"setting": "E/Q", "ainvs": [int(x) for x in E.ainvs],
                "label": result.question.label, "statement": result.question.statement,
                "definition": DEFINITION}
    params = {k: v for k, v in result.parameters.items()}
    params.update({"digits": result.digits_requested, "grh_height": float(grh_height)})
    if observation is not None:
        params["observe"] = int(observation.bound)
    spectrum = {
        "curve": E.as_dict(),
        "analytic_rank": {"value": result.rank.rank, "certified": result.rank.certified,
                          "upper_bound": result.rank.upper_bound,
                          "root_number": result.rank.root_number,
                          "central_coefficients": [ball_record(c.real)
                                                   for c in result.rank.central_coefficients]},
        "mean": str(result.mean),
        "variance": ball_record(result.variance),
        "isolation_height": result.height,
        "zeros": [ball_record(z) for z in result.zeros],
        "power_sums_all_zeros": [ball_record(s) for s in result.power_sums],
        "residual_sums": [ball_record(r) for r in result.residual],
    }
    inputs = {"setting": "E/Q", "ainvs": question["ainvs"], "digits": result.digits_requested,
              "grh_height": float(grh_height)}
    # the independent checks as structured items (verify re-derives each and its sentence)
    curve = spectrum["curve"]
    spectrum["evidence"] = independent_items(
        tuple(int(x) for x in E.minimal), int(E.conductor), set(int(p) for p in E.bad_primes),
        result.rank.root_number, result.rank.rank,
        {int(d["p"]): d for d in curve["local_data"]}, result.rank.theorem)
    if observation is not None:
        spectrum["observation"] = observation.record()
        inputs["observe"] = int(observation.bound)
    cmd = " ".join(shlex.quote(a) for a in [
        "certify", "ecrace", "[" + ",".join(str(x) for x in E.ainvs) + "]",
        "--digits", str(result.digits_requested),
        "--observe", str(observation.bound if observation is not None else 0),
        "--grh-height", f"{float(grh_height):g}"])
    lo, hi = result.density.lower, result.density.upper
    return Certificate(
        question=question,
        answer=answer_from_enclosure(lo, hi, Fraction(1, 10**result.digits_requested)),
        hypotheses=hypothesis_records(result.hypotheses), error_budget=budget_records(result.budget),
        parameters=params, spectrum=spectrum, provenance=provenance(cmd, inputs, seconds),
        references=list(result.references), caution=result.caution + " Re-check this file with "
        "`certify verify`.", kind="ecq-race")


def certify_ecq(ainvs, digits: int, grh_height: float = 0.0, observe_bound: int = 0):
    """(result, certificate) of a curve's trace race over Q (with the observed race up to
    ``observe_bound`` when it is not 0)."""
    from ..ecrace import certify_ec_race

    t0 = time.time()
    r = certify_ec_race(ainvs, digits, grh_height=grh_height)
    obs = None
    if observe_bound:
        from ..ecobserve import observe

        obs = observe(r.curve, observe_bound)
    return r, ecq_certificate(r, grh_height, time.time() - t0, obs)


def observe_parameter(params) -> int:
    """The stored observation bound (0: none), bounded before any work (BadInput)."""
    if "observe" not in params:
        return 0
    b = params["observe"]
    if type(b) is not int or not 10 <= b <= LIMITS["observe"]:
        raise BadInput(f"parameter observe = {str(b)[:20]} outside 10..{LIMITS['observe']}")
    return b


def _limits(cert: Certificate) -> None:
    """Refuse, before any work, digits, heights and conductors beyond the recount's limits."""
    from ..source.ellcurve import curve_from_ainvs

    p = cert.parameters
    d = p["digits"]
    if type(d) is not int or not 1 <= d <= LIMITS["digits"]:
        raise BadInput(f"parameter digits = {str(d)[:20]} outside 1..{LIMITS['digits']}")
    gh = p["grh_height"]
    if not isinstance(gh, (int, float)) or not 0 <= gh <= 200:
        raise BadInput(f"parameter grh_height = {str(gh)[:20]} outside [0, 200]")
    observe_parameter(p)
    E = curve_from_ainvs(list(cert.question["ainvs"]))
    if E.conductor > LIMITS["conductor"]:
        raise BadInput(f"conductor {E.conductor} above the recount limit {LIMITS['conductor']}")


def _rebuild(cert: Certificate) -> Certificate:
    from ..source.ellcurve import curve_from_ainvs

    _limits(cert)
    E = curve_from_ainvs(list(cert.question["ainvs"]))
    # the observed race, if stored, is recounted from the a_p up to its bound (not trusted)
    return certify_ecq(E, cert.parameters["digits"], float(cert.parameters["grh_height"]),
                       observe_parameter(cert.parameters))[1]


def _rebuild_checked(cert: Certificate, report) -> Certificate:
    """Bound the sizes, re-derive the evidence independently (:mod:`.ecq_evidence`: a_p by
    point counting, the root number, the rank, the zero-count sentences), then recount;
    the recount is skipped when an independent check already failed."""
    from ..source.ellcurve import curve_from_ainvs
    from .ecq_evidence import check_ecq_evidence

    _limits(cert)
    E = curve_from_ainvs(list(cert.question["ainvs"]))
    try:
        ok = check_ecq_evidence(cert, E, report)
    except AttributeError as exc:  # a stored object where a list or a number belongs
        raise ValueError(f"malformed spectrum data ({exc})") from None
    if not ok:
        raise Inconsistent("the evidence re-derived independently disagrees with the stored "
                           "one (see the checks above); the recount was not run")
    return _rebuild(cert)


def verify_ecq(cert: Certificate):
    """Recount an ``ecq-race`` certificate (a :class:`~.verify.VerifyReport`), after the
    independent re-derivation of its evidence (:mod:`.ecq_evidence`)."""
    return timed_report(cert.label, cert, _rebuild_checked, with_report=True)
