"""``certify ecrace``: the bias of the Frobenius traces of an elliptic curve over Q."""

from __future__ import annotations

import shlex
import sys

from ..errors import BadInput
from ..result import headline_text


def _int(text, what):
    try:
        return int(str(text).replace("_", ""))
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be an integer, got {text!r}") from None


def screen(result, obs=None) -> str:
    d = result.density
    places = d.places()
    E = result.curve
    lines = [
        f"E = {list(E.minimal)}  (given {list(E.ainvs)})   conductor {E.conductor}   "
        f"j = {E.j}" + (f"   CM by discriminant {E.cm_discriminant}" if E.has_cm else ""),
        "  local data: " + ", ".join(f"p={ld.p} {ld.kodaira} f={ld.conductor_exponent} "
                                     f"{ld.reduction} w={'open' if ld.root_number is None else f'{ld.root_number:+d}'}"
                                     f"{' (derived)' if ld.root_number_source.startswith('derived') else ''}"
                                     for ld in E.local),
        f"  root number {result.rank.root_number:+d}; {result.rank.statement()}",
        "  " + headline_text("P[ sum_(p<=x) a_p/sqrt(p) > 0 ]", d),
        f"  enclosure  {d.interval_text(places)}   width <= {d.width_text()}"
        + ("" if result.target_met else f"   (target 1e-{result.digits_requested} NOT met)"),
        f"  limit law: mean 1 - 2r = {result.mean}, variance {result.variance.str(8)}; "
        f"{result.parameters['zeros_used']} zeros to height {result.height:.1f}; "
        f"{result.timings.get('total', 0):.1f} s",
        "  error budget:",
    ]
    for e in result.budget:
        lines.append(f"    {e.name:<30} <= {e.bound_text()}")
    lines.append("  hypotheses:")
    for h in result.hypotheses:
        lines.append(f"    {h.name} ({h.status}): {h.statement}")
    if "grh_verified_line" in result.parameters:
        lines.append(f"    evidence: {result.parameters['grh_verified_line']}")
    if obs is not None:
        lines.append(f"  observed to x = {obs.bound:.3g} (an observation, not certified): "
                     f"normalised sum {obs.final_value:+.4f}, positive on "
                     f"{100 * obs.share_positive:.2f}% of log-scale [2, X] "
                     f"({100 * obs.share_positive_late:.2f}% of [1000, X]), {obs.sign_changes} sign changes")
    lines.append("  the count race #{a_p > 0} vs #{a_p < 0} is out of reach of this method "
                 "(docs/elliptic_curves_q.md, section 7)")
    lines.append(f"  {result.caution}")
    return "\n".join(lines)


def check_ec_size(E, digits: int, observe_bound: int, limits) -> dict:
    """Refuse, before any work, a race whose estimated cost exceeds the stated limits.

    The estimates (:mod:`certify.batch.limits`): the conductor (the cost of each
    evaluation of L(E, s) grows like its square root), the zeros the driver's first
    plan isolates at this target, and the primes of the observed race (pi(X) at most
    1.25506 X / log X).
    """
    from ..batch.limits import ec_race_estimate, prime_count_bound

    what = f"ecrace for E of conductor {E.conductor} at {digits} digits"
    limits.require("ec-conductor", E.conductor, what)
    est = ec_race_estimate(E.conductor, digits)
    limits.require("zeros", est["zeros"], what + f" (zeros of L(E, s) to height {est['height']:.4g})")
    if observe_bound:
        est["primes"] = prime_count_bound(observe_bound)
        limits.require("primes", est["primes"], f"ecrace --observe {observe_bound}")
    return est


def run_ecrace(args) -> int:
    from ..ecrace import MAX_DIGITS, certify_ec_race
    from ..ecobserve import observe, plot_observation
    from ..source.ellcurve import curve_from_ainvs

    from .options import Limits, check_json_path, parse_height, progress_enabled, stages

    # outputs and inputs checked, and sizes bounded, before any work
    check_json_path(args.json)
    check_json_path(args.plot)
    check_json_path(args.certificate)
    if len(str(args.ainvs)) > 400:
        raise BadInput("the a-invariants are longer than 400 characters")
    limits = Limits.of(args)
    digits = _int(args.digits, "--digits")
    if not (1 <= digits <= MAX_DIGITS):
        raise BadInput(f"--digits must be between 1 and {MAX_DIGITS} (got {digits})")
    bound = _int(args.observe, "--observe")
    obs = None
    if bound:
        from ..ecobserve import MAX_OBSERVE

        if not (10 <= bound <= MAX_OBSERVE):
            raise BadInput(f"--observe must be 0 or between 10 and {MAX_OBSERVE} (got {bound})")
    if bound and (args.json or args.certificate):
        from ..certificate.ecq import LIMITS as CERT_LIMITS

        if bound > CERT_LIMITS["observe"]:
            raise BadInput(f"--observe {bound} with a certificate: verify recounts the observed race, "
                           f"so a certificate keeps it only up to {CERT_LIMITS['observe']} (or use "
                           "--observe 0)")
    grh = parse_height(args.grh_height, "--grh-height")
    E = curve_from_ainvs(args.ainvs)
    check_ec_size(E, digits, bound, limits)
    cmd = "certify " + " ".join(shlex.quote(a) for a in sys.argv[1:])
    t_run = __import__("time").time()
    with stages("ecrace", progress_enabled(args)) as say:
        say(f"certifying the trace race of E (conductor {E.conductor}) to width 1e-{digits}")
        result = certify_ec_race(E, digits, command_line=cmd, grh_height=grh)
        if bound:
            say(f"observed race: a_p for p <= {bound}")
            obs = observe(E, bound)
        cert = None
        if args.certificate or args.json:
            from ..certificate.ecq import ecq_certificate

            # the observation goes in as a labelled, uncertified section that verify recounts
            cert = ecq_certificate(result, grh, __import__("time").time() - t_run, obs)
        if args.certificate:
            from ..certificate.model import write_certificate

            say("writing the certificate")
            write_certificate(cert, args.certificate)
    if args.plot:
        if obs is None:
            raise BadInput("--plot needs --observe X > 0 (the observed race to plot)")
        plot_observation(obs, result, args.plot)
    if args.json:
        # --json writes the certificate (kind ecq-race): the one shape of every certify document,
        # re-checked by `certify verify`, with the observed race as a labelled uncertified section
        if args.json == "-":
            sys.stdout.write(cert.to_json())
        else:
            from ..io import write_atomic

            write_atomic(args.json, cert.to_json())
    if args.json != "-":
        print(screen(result, obs))
    return 0 if result.target_met else 5


def register(sub) -> None:
    p = sub.add_parser(
        "ecrace", help="certified bias of sum a_p/sqrt(p) for an elliptic curve over Q",
        description="E: y^2 + a1 xy + a3 y = x^3 + a2 x^2 + a4 x + a6 given as [a1,a2,a3,a4,a6]. "
                    "Certifies the limiting logarithmic density of {x : sum_(p<=x) a_p/sqrt(p) > 0} "
                    "under GRH for L(E,s) and LI (assumed, listed with evidence), with the analytic "
                    "rank certified (r <= 1) or bounded. The count race #{a_p>0} vs #{a_p<0} is "
                    "out of reach of this method.")
    p.add_argument("ainvs", metavar="[a1,a2,a3,a4,a6]",
                   help="integral a-invariants, e.g. [0,-1,1,-10,-20] (brackets keep a leading minus sign)")
    p.add_argument("--digits", "-d", default="10", metavar="D",
                   help="target: enclosure width at most 10^-D (default 10)")
    p.add_argument("--observe", default="1000000", metavar="X",
                   help="also compute the observed race from the a_p up to X (default 10^6; 0 to skip)")
    p.add_argument("--plot", metavar="PATH", help="figure of the observed race beside the limit law (PNG)")
    p.add_argument("--grh-height", default="0", metavar="T",
                   help="also verify GRH for L(E,s) up to height T (0 <= T <= 200, at most the "
                        "isolation height) by counting zeros with the argument principle (slow; "
                        "default 0: skip)")
    p.add_argument("--json", metavar="PATH",
                   help="write the certificate (kind ecq-race) as JSON (- for stdout; certify verify "
                   "re-checks it)")
    p.add_argument("--certificate", metavar="PATH",
                   help="write a certificate (kind ecq-race) that `certify verify` re-checks by a recount")
    from .options import add_limits, add_progress

    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_ecrace)
