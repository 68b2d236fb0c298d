"""``certify lirace``: the race of pi(x) against li(x), planned for significant digits.

    certify lirace                      # delta(pi<li), 10 significant digits of 1 - delta
    certify lirace 'pi>li' --sig-digits 20 --json out.json
    certify lirace gt --digits 17       # an absolute width 1e-17 instead
    certify lirace -s 20 --certificate reports/   # and the certificate of the final round

Certificates, verify and the referee check take the same race as
``'delta(pi<li)'`` / ``'delta(pi>li)'`` (``certify certificate 'delta(pi<li)'``,
``certify check 'delta(pi<li)' --claim 0.99999973...``, claims files).
"""

from __future__ import annotations

import shlex
import sys

from ..errors import BadInput

ALIASES = {"pi<li": "pi<li", "lt": "pi<li", "pi>li": "pi>li", "gt": "pi>li"}


def direction_of(text: str) -> str:
    d = str(text).strip().replace(" ", "").lower()
    if d.startswith("delta(") and d.endswith(")"):
        d = d[len("delta("):-1]
    if d not in ALIASES:
        raise BadInput(f"direction must be pi<li (or lt) or pi>li (or gt), got {text!r}")
    return ALIASES[d]


def rh_to_height(result) -> dict:
    """RH to a height for the zeros used: argument-principle count against the sign changes.

    The count (certify/certificate/zerocount.py, docs/method.md section 2b) runs
    to midway between the last two isolated zeros; if it equals the number of
    sign changes below that height, every zero there is on the critical line
    and simple.
    """
    from ..certificate.evidence import exact_ends
    from ..certificate.zerocount import count_height, count_zeros
    from ..errors import PrecisionExhausted

    zeros = result.groups[0].zeros
    ends = sorted(exact_ends(z) for z in zeros)
    if len(ends) < 2:
        return {"established": False, "reason": "too few zeros"}
    T = count_height(ends)
    found = sum(1 for lo, hi in ends if hi < T)
    try:
        n, _ = count_zeros(1, 1, 0, T)
    except PrecisionExhausted as exc:
        return {"established": False, "reason": str(exc)}
    return {"established": True, "height": float(T), "count": n, "sign_changes": found,
            "verified": n == found}


def screen(result, rh: dict | None = None) -> str:
    """The one-screen summary of an li race."""
    from ..lirace import small_side_text

    d = result.density
    places = d.places()
    k, text = result.significant
    lines = [
        f"{result.question.label}: {result.question.statement}",
        f"  delta      in {d.interval_text(places)}   width <= {d.width_text()}",
        f"  {small_side_text(result)}",
    ]
    if result.sig_digits_requested and not result.sig_target_met:
        lines.append(f"  TARGET NOT MET: {result.sig_digits_requested} significant digits asked, "
                     f"{k} certified ({result.parameters.get('not_met_reason', '')})")
    elif not result.sig_digits_requested and not result.target_met:
        lines.append(f"  TARGET NOT MET: width 1e-{result.digits_requested} asked "
                     f"({result.parameters.get('not_met_reason', '')})")
    rounds = ", ".join(f"{dd} digits: {s:.2f} s, {z} zeros" for dd, s, z in result.rounds)
    lines.append(f"  mean {result.mean}, variance {result.variance.str(10)} "
                 f"(exact: 2 + gamma_E - log 4 pi)")
    lines.append(f"  {result.parameters['zeros_used']} zeros of zeta; rounds: {rounds}; "
                 f"total {result.timings.get('total', 0):.2f} s")
    lines.append("  error budget (absolute, on delta):")
    for e in result.budget:
        lines.append(f"    {e.name:<30} <= {e.bound_text()}")
    lines.append("  hypotheses (assumed, not proven):")
    for h in result.hypotheses:
        lines.append(f"    {h.name}: {h.statement}")
        for ev in h.evidence[:2]:
            lines.append(f"      - {ev}")
        if h.name == "RH" and rh and rh.get("established"):
            verdict = ("so RH holds to that height" if rh["verified"]
                       else "so RH is NOT verified to that height")
            lines.append(f"      - argument principle: {rh['count']} zeros with 0 < gamma < "
                         f"{rh['height']:.6g}, {rh['sign_changes']} sign changes found there, "
                         f"{verdict}")
    lines.append(f"  {result.caution}")
    return "\n".join(lines)


def _int(text, what: str) -> int:
    try:
        return int(text)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be an integer, got {text!r}") from None


def check_li_size(direction: str, digits: int | None, sig: int | None, limits) -> dict:
    """Refuse, before any work, a target whose estimated zeros of zeta exceed the limit.

    The absolute width the final round needs is 10^-(S + 8) for S significant digits
    of the small side (about 2.6e-7: :func:`certify.lirace.digits_for`), or 10^-D
    for ``--digits D``; the estimate is the race driver's first plan at that width
    (:func:`certify.batch.limits.li_race_estimate`).
    """
    from ..batch.limits import li_race_estimate
    from ..lirace import DEFAULT_SIG_DIGITS, MAX_SIG_DIGITS, digits_for
    from ..races import MAX_DIGITS

    if digits is None:
        s = DEFAULT_SIG_DIGITS if sig is None else sig
        if not 1 <= s <= MAX_SIG_DIGITS:
            raise BadInput(f"--sig-digits must lie in 1..{MAX_SIG_DIGITS} (got {s})")
        # the small side is about 2.6e-7 (docs/method.md section 9): 2e-7 as its planned size
        from fractions import Fraction

        d = digits_for(Fraction(2, 10**7), s)
    else:
        if not 1 <= digits <= MAX_DIGITS:
            raise BadInput(f"--digits must lie in 1..{MAX_DIGITS} (got {digits})")
        d = digits
    est = li_race_estimate(d, direction)
    limits.require("zeros", est["zeros"], f"lirace at width 1e-{d} (zeros of zeta to height "
                   f"{est['height']:.4g})")
    return est


def run_lirace(args) -> int:
    from ..lirace import certify_li_race
    from .options import (Limits, check_json_path, check_out_dir, progress_enabled, stages)

    check_json_path(args.json)  # before any work: an empty or folder --json is refused at once
    check_out_dir(args.certificate, "--certificate")
    limits = Limits.of(args)
    direction = direction_of(args.direction)
    if args.digits is not None and args.sig_digits is not None:
        raise BadInput("give either --sig-digits or --digits, not both")
    tail = ["lirace", direction]
    if args.digits is not None:
        digits, sig = _int(args.digits, "--digits"), None
        tail += ["--digits", str(digits)]
    else:
        digits = None
        sig = _int(args.sig_digits, "--sig-digits") if args.sig_digits is not None else None
        if sig is not None:
            tail += ["--sig-digits", str(sig)]
    check_li_size(direction, digits, sig, limits)
    from ..spectrum.spectrum import SpectrumStore

    formats = None
    if args.certificate:
        from ..render.files import parse_formats

        formats = parse_formats(args.formats)
    store = SpectrumStore()
    with stages("lirace", progress_enabled(args)) as say:
        say("certifying " + direction + (f" to {sig} significant digits" if sig else
                                        f" to width 1e-{digits}" if digits else ""))
        result = certify_li_race(direction, sig_digits=sig, digits=digits, store=store,
                                 command_line="certify " + " ".join(shlex.quote(a) for a in tail))
        say("RH to a height: the argument-principle count of zeta's zeros")
        rh = rh_to_height(result)
    cert = None
    if args.json or args.certificate:
        from ..certificate.build import certificate_from_result

        # the certificate of the final round (its absolute target), re-checkable by verify
        cert = certificate_from_result(result, store)
    if args.json:
        # --json writes the certificate: the one shape of every certify document (kind
        # dirichlet-race, question pi<li or pi>li, the small side in answer.small_side)
        if args.json == "-":
            sys.stdout.write(cert.to_json())
        else:
            from ..io import write_atomic

            write_atomic(args.json, cert.to_json())
    if args.json != "-":
        print(screen(result, rh))
    if args.certificate:
        from ..certificate.build import reproduce_command
        from ..render.files import write_files

        paths = write_files(cert, args.certificate, formats)
        out = sys.stderr if args.json == "-" else sys.stdout
        print(f"  certificate of the final round (reproduce: "
              f"{reproduce_command(result.question, result.digits_requested)}):", file=out)
        for f, p in paths.items():
            print(f"  wrote {f:<9} {p}", file=out)
    return 0 if result.sig_target_met else 5


def register(sub) -> None:
    from ..lirace import DEFAULT_SIG_DIGITS, MAX_SIG_DIGITS
    from ..races import MAX_DIGITS

    p = sub.add_parser(
        "lirace", help="density of pi(x) < li(x) (or >), to significant digits of the tiny side",
        description="Certify the logarithmic density of x with pi(x) < li(x) (pi<li, the default) "
        "or pi(x) > li(x) (pi>li), under RH and LI for zeta. The small side, 1 - delta(pi<li) = "
        "delta(pi>li) ~ 2.6e-7, is reported in scientific notation with the significant digits "
        "common to its whole enclosure; the computation is planned for --sig-digits of it.")
    p.add_argument("direction", nargs="?", default="pi<li",
                   help="pi<li (or lt; default) or pi>li (or gt); quote it in a shell")
    p.add_argument("--sig-digits", "-s", default=None, metavar="S",
                   help=f"significant digits of the small side (1..{MAX_SIG_DIGITS}; "
                   f"default {DEFAULT_SIG_DIGITS})")
    p.add_argument("--digits", "-d", default=None, metavar="D",
                   help=f"instead: an absolute width 10^-D for delta (1..{MAX_DIGITS})")
    p.add_argument("--json", metavar="PATH",
                   help="write the certificate of the final round as JSON (- for stdout; "
                   "certify verify re-checks it)")
    p.add_argument("--certificate", metavar="DIR",
                   help="also write the certificate of the final round into DIR (certify verify "
                   "re-checks it)")
    p.add_argument("--formats", default="json,md",
                   help="certificate formats: json, md, tex, fragment, plots, all (default json,md)")
    from .options import add_limits, add_progress

    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_lirace)
