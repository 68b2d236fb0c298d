"""``certify order Q A1 A2 A3 ...``: densities of orderings of three or more classes mod q."""

from __future__ import annotations

import shlex

from ..arith import interval_text
from ..errors import BadInput
from ..result import headline_text
from ..race.order import ordering


def _int(text: str, what: str) -> int:
    try:
        return int(text)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be an integer, got {text!r}") from None


def screen(result) -> str:
    """One-screen summary of an ordering's density."""
    d = result.density
    places = d.places()
    lines = [
        headline_text(result.question.label, d, None, result.target_met,
                      f"1e-{result.digits_requested}"),
        f"  {result.question.statement}",
        f"  enclosure  {d.interval_text(places)}   width <= {d.width_text()}"
        + ("" if result.target_met else f"   (target 1e-{result.digits_requested} NOT met)"),
        f"  mean vector ({', '.join(map(str, result.mean))}); "
        f"{result.parameters['zeros_used']} zeros of {len(result.parameters['primitive_l_functions'])} "
        f"L-functions; {result.parameters['frequency_vectors']} frequency vectors; "
        f"{result.timings.get('total', 0):.2f} s",
        "  error budget:",
    ]
    for e in result.budget:
        lines.append(f"    {e.name:<30} <= {e.bound_text()}")
    lines.append("  hypotheses (assumed, not proven):")
    for h in result.hypotheses:
        lines.append(f"    {h.name}: {h.statement}")
    if not result.target_met:
        lines.append(f"  not certified to the target: {result.parameters.get('not_met_reason', '')}")
    lines.append(f"  {result.caution}")
    return "\n".join(lines)


def family_screen(fam) -> str:
    lines = [f"every ordering of the classes {', '.join(map(str, fam.classes))} mod {fam.modulus}:"]
    for r in fam.results:
        d = r.density
        p = d.places()
        lines.append(f"  {r.question.label:<24} {d.interval_text(p)}  "
                     f"width <= {d.width_text(2)}" + ("" if r.target_met else "  (target NOT met)"))
    lines.append("consistency checks (exact identities; each interval must contain its reference):")
    for c in fam.checks:
        lines.append(f"  {'ok  ' if c.ok else 'FAIL'} {c.name}: {interval_text(c.lower, c.upper, 10)} "
                     f"vs {c.reference}")
    lines.append(f"  {fam.caution}")
    return "\n".join(lines)


def _write(payload: dict, path: str) -> None:
    from .options import write_json

    write_json(payload, path)


def run_order(args) -> int:
    import math

    from ..batch.limits import race_l_functions
    from ..orders import MAX_DIGITS, certify_order, certify_orderings
    from .options import Limits, check_json_path

    check_json_path(args.json)
    q = _int(args.modulus, "modulus")
    classes = [_int(a, "class") for a in args.classes]
    question = ordering(q, *classes)
    if len(question.classes) < 3:
        raise BadInput("an ordering race needs at least three classes "
                       "(for two, use `certify race Q A B`)")
    limits = Limits.of(args)  # sizes bounded before work starts
    what = f"order modulo {q} with {len(question.classes)} classes"
    limits.require("conductor", q, what)
    limits.require("l-functions", race_l_functions(q, "two-way"), what)
    if args.all:
        limits.require("races", math.factorial(min(len(question.classes), 30)), what + " (--all)")
    d = _int(args.digits, "--digits")
    if not 1 <= d <= MAX_DIGITS:
        raise BadInput(f"--digits must lie in 1..{MAX_DIGITS} (got {d})")
    cmd = "certify " + " ".join(shlex.quote(a) for a in
                                ["order", str(q), *map(str, classes), "--digits", str(d)]
                                + (["--all"] if args.all else []))
    from ..spectrum.spectrum import SpectrumStore
    from .options import check_outputs

    check_outputs(args)
    from .options import progress_enabled, stages

    store = SpectrumStore()
    if args.all:
        with stages("order", progress_enabled(args)) as say:
            fam = certify_orderings(q, question.classes, d, store=store, command_line=cmd,
                                    progress=say)
        if args.json:
            # one document: the family's consistency checks and every ordering's certificate
            from ..certificate.model import envelope
            from ..certificate.order import order_certificate

            body = {"modulus": fam.modulus, "classes": list(fam.classes), "consistent": fam.ok,
                    "consistency": [c.as_dict() for c in fam.checks],
                    "certificates": [order_certificate(r, store, fam.checks).to_dict()
                                     for r in fam.results]}
            _write(envelope("order-family", body), args.json)
        if args.json != "-":
            print(family_screen(fam))
        if args.certificate:
            _certificates(fam.results, store, args.certificate, fam.checks)
        if not fam.ok:
            return 4
        return 0 if all(r.target_met for r in fam.results) else 5
    with stages("order", progress_enabled(args)) as say:
        say(f"certifying {question.label} to width 1e-{d}")
        result = certify_order(question, d, store=store, command_line=cmd)
    if args.json:  # the certificate: the one shape every command writes with --json
        from ..certificate.order import order_certificate

        _write(order_certificate(result, store).to_dict(), args.json)
    if args.json != "-":
        print(screen(result))
    if args.certificate:
        _certificates([result], store, args.certificate, ())
    return 0 if result.target_met else 5


def _certificates(results, store, out_dir: str, checks) -> None:
    """Write each result's certificate (JSON and Markdown) into out_dir."""
    from ..certificate.order import order_certificate
    from ..render.files import base_name, write_files

    for r in results:
        cert = order_certificate(r, store, checks)
        for f, p in write_files(cert, out_dir, ("json", "md"), base_name(r.question.label)).items():
            print(f"  wrote {f:<9} {p}")


def register(sub) -> None:
    from ..orders import DEFAULT_ORDER_DIGITS

    p = sub.add_parser("order", help="density of pi(x;q,a1) > pi(x;q,a2) > ... (three or more classes)",
                       description="Certify delta(q;a1,...,ar), the logarithmic density of x with "
                       "pi(x;q,a1) > ... > pi(x;q,ar), under GRH and LI. With --all, every "
                       "ordering of the classes, with the consistency checks (the r! densities "
                       "sum to 1; pairwise marginals against the two-way densities).")
    p.add_argument("modulus", help="the modulus q >= 3")
    p.add_argument("classes", nargs="+", help="three or more distinct classes, leader first")
    p.add_argument("--digits", "-d", default=str(DEFAULT_ORDER_DIGITS), metavar="D",
                   help=f"target: width at most 10^-D (default {DEFAULT_ORDER_DIGITS})")
    p.add_argument("--all", action="store_true", help="every ordering of the classes, with checks")
    p.add_argument("--json", metavar="PATH", nargs="?", const="-", default=None,
                   help="write the certificate (with --all: every certificate and the checks) as "
                   "JSON to PATH (- or no PATH: standard output)")
    p.add_argument("--certificate", metavar="DIR",
                   help="also write certificates (JSON for `certify verify`, Markdown) into DIR")
    from .options import add_limits, add_progress

    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_order)
