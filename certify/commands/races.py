"""``certify race``, ``certify residues``, ``certify weighted``: densities of races over Q."""

from __future__ import annotations

import shlex

from ..race.question import parse_weight_items, residue_race, two_way, weighted
from ..races import DEFAULT_DIGITS, MAX_DIGITS, certify_race
from ..result import density_lines
from .options import (Limits, add_json, add_limits, add_progress, add_target, check_outputs,
                      check_race_size, parse_int, progress_enabled, target_digits, working,
                      write_json)


def _int(text: str, what: str) -> int:
    return parse_int(text, what)


def _add_common(p):
    add_target(p, DEFAULT_DIGITS, MAX_DIGITS)
    add_json(p)
    add_progress(p)
    add_limits(p)


def _digits(args) -> int:
    return target_digits(args)


def _prepare(args, question) -> int:
    """Outputs and sizes checked before any work; returns the target digits."""
    check_outputs(args)
    d = _digits(args)
    check_race_size(question, Limits.of(args), "race")
    return d


def screen(result) -> str:
    """The one-screen summary of a race result (numbers through certify.result's formatter)."""
    d = result.density
    lines = density_lines(result.question.label, d, result.exact, result.target_met,
                          f"1e-{result.digits_requested}", statement=result.question.statement)
    if result.question.normalisation != 1:
        w = " ".join(f"{a}:{x}" for a, x in result.question.normalised_weights)
        lines.append(f"  weights normalised to sum |w| = 2 (same density): {w}")
    norm = "" if result.question.normalisation == 1 else " (normalised weights)"
    lines.append(f"  mean {result.mean}{norm}, variance {result.variance.str(8, radius=True)}; "
                 f"{result.parameters['zeros_used']} zeros of "
                 f"{len(result.parameters['primitive_l_functions'])} L-functions; "
                 f"{result.timings.get('total', 0):.2f} s")
    if result.exact is not None:
        lines.append("  error budget of the numerical cross-check (the exact value has none):")
    else:
        lines.append("  error budget (each bound rounded up):")
    for e in result.budget:
        lines.append(f"    {e.name:<30} <= {e.bound_text()}")
    assumed = [h for h in result.hypotheses if h.status == "assumed"]
    if assumed:
        lines.append("  hypotheses (assumed, not proven):")
    for h in result.hypotheses:
        tag = "" if h.status == "assumed" else f" [{h.status}]"
        lines.append(f"    {h.name}{tag}: {h.statement}")
    if not result.target_met:
        lines.append(f"  not certified to the target 1e-{result.digits_requested}: "
                     f"{result.parameters.get('not_met_reason', '') or 'no reason recorded'}; "
                     "the enclosure shown is the best one proven")
    lines.append(f"  {result.caution}")
    return "\n".join(lines)


def _certify(question, d, args, command_line):
    """The race result; with --json also its certificate (the one shape every command writes)."""
    with working(f"certifying {question.label}", progress_enabled(args)):
        if not args.json:
            return certify_race(question, d, command_line=command_line), None
        from ..certificate.build import certify_with_certificate

        return certify_with_certificate(question, d, command_line=command_line)


def emit(result, args, cert=None) -> int:
    if args.json:
        write_json(cert.to_dict() if cert is not None else result.to_dict(), args.json)
    if args.json != "-":
        print(screen(result))
    return 0 if result.target_met else 5


def _cmdline(argv_tail) -> str:
    return "certify " + " ".join(shlex.quote(a) for a in argv_tail)


def run_race(args) -> int:
    q = _int(args.modulus, "modulus")
    question = two_way(q, _int(args.a, "class a"), _int(args.b, "class b"))
    d = _prepare(args, question)
    result, cert = _certify(question, d, args, _cmdline(
        ["race", str(q), args.a, args.b, "--digits", str(d)]))
    return emit(result, args, cert)


def run_residues(args) -> int:
    q = _int(args.modulus, "modulus")
    question = residue_race(q)
    d = _prepare(args, question)
    result, cert = _certify(question, d, args, _cmdline(
        ["residues", str(q), "--digits", str(d)]))
    return emit(result, args, cert)


def parse_weights(items: list[str]) -> dict:
    """Parse CLASS:WEIGHT items (weights rational: 1, -2, 3/4)."""
    return parse_weight_items(items, ":")


def run_weighted(args) -> int:
    q = _int(args.modulus, "modulus")
    question = weighted(q, parse_weights(args.weights))
    d = _prepare(args, question)
    result, cert = _certify(question, d, args, _cmdline(
        ["weighted", str(q), *args.weights, "--digits", str(d)]))
    return emit(result, args, cert)


def register(sub) -> None:
    p = sub.add_parser("race", help="density of pi(x;q,a) > pi(x;q,b) (two-way race over Q)",
                       description="Certify delta(q;a,b), the logarithmic density of x with "
                       "pi(x;q,a) > pi(x;q,b), under GRH and LI.")
    p.add_argument("modulus", help="the modulus q >= 3")
    p.add_argument("a", help="the class expected to lead")
    p.add_argument("b", help="the other class")
    _add_common(p)
    p.set_defaults(func=run_race)

    p = sub.add_parser("residues", help="non-residues against residues modulo q",
                       description="Certify the density of x where the quadratic non-residues "
                       "mod q lead the residues (counts averaged over the classes of each side).")
    p.add_argument("modulus", help="the modulus q >= 3")
    _add_common(p)
    p.set_defaults(func=run_residues)

    p = sub.add_parser("weighted", help="density of sum_a w_a pi(x;q,a) > 0 for weights summing to 0",
                       description="Certify the density of x with sum_a w_a pi(x;q,a) > 0. "
                       "Weights are CLASS:WEIGHT items with rational weights summing to zero, "
                       "e.g. `certify weighted 5 1:1 4:1 2:-1 3:-1`.")
    p.add_argument("modulus", help="the modulus q >= 3")
    p.add_argument("weights", nargs="+", help="CLASS:WEIGHT items")
    _add_common(p)
    p.set_defaults(func=run_weighted)
