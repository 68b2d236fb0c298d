"""``certify ffrace`` and ``certify fflpoly``: prime races and L-polynomials in F_q[t].

Examples::

    certify ffrace 3 "t^2+1" "t+1" 1                    # two-way, cumulative (degree <= X)
    certify ffrace 3 "t^2+1" "t+1" 1 --mode degree      # prescribed degree (degree = X)
    certify ffrace 5 "t^2+t" 1 2 3 --weights 2 -1 -1    # weighted
    certify ffrace 5 "t^7+t+3" --residues --json out.json
    certify fflpoly 9 "t^2+t"                            # characters, L-polynomials, Weil check

Polynomials are text in ``t``; for a prime power q the generator of F_q over
its prime field is written ``z`` (see ``certify.ffield.poly``).
"""

from __future__ import annotations

from ..commands.options import (Limits, add_json, add_limits, add_progress, add_target, check_outputs,
                                parse_int, progress_enabled, stages, target_width, write_json)
from ..errors import BadInput
from ..result import ExactValue, caution_text, headline_text

NAME_RACE = "ffrace"
NAME_LPOLY = "fflpoly"
MAX_DIGITS = 30


def _int(text, what: str) -> int:
    return parse_int(text, what)


def _check_group(args, what: str) -> None:
    """Refuse before any work when q^deg m (the size of the tables) exceeds the limit."""
    from .poly import finite_field, parse_field_order, parse_monic

    q = parse_field_order(args.q)
    if len(str(args.modulus)) > 2000:
        raise BadInput("the modulus is longer than 2000 characters")
    m = parse_monic(args.modulus, finite_field(q), "modulus")
    Limits.of(args).require("group", q ** m.degree(), f"{what} modulo a polynomial of degree "
                            f"{m.degree()} over F_{q} (q^deg m)")


def screen(res) -> str:
    """One screen of text for a function-field race result."""
    d = res.density
    exact = None
    if d.width == 0:
        why = (f"the orbit closure is finite ({res.closure.describe()}): an exact average of "
               "the limit function's sign over it" if getattr(res.closure, "dim", None) == 0
               else f"an enclosure of width 0: {res.parameters.get('method')}")
        exact = ExactValue(d.lower, why)
    lines = [
        headline_text(res.question.label, d, exact, res.target_met, f"{res.target_width:.0e}"),
        f"  {res.question.statement}",
        f"  enclosure  {d.interval_text(min(d.places(), 30))}   width <= {d.width_text()}"
        + ("" if res.target_met else f"   (target {res.target_width:.0e} NOT met)"),
        f"  case: {res.case}; {res.closure.describe()}; method: {res.parameters.get('method')}",
        f"  {len(res.l_data)} L-polynomials, {len(res.points)} distinct roots of modulus sqrt(q) "
        f"({res.parameters['angles_J']} angles in (0, pi)); {res.timings.get('total', 0):.2f} s",
    ]
    if res.relations:
        lines.append("  relations (confirmed exactly), coordinates (pi, theta_1, ...): "
                     + "; ".join(str(list(r)) for r in res.relations))
    lines.append("  error budget:")
    for e in res.budget:
        lines.append(f"    {e.name:<40} <= {e.bound_text()}")
    lines.append("  hypotheses:")
    for h in res.hypotheses:
        lines.append(f"    {h.name} [{h.status}]: {h.statement}")
    if res.leaders:
        L = res.leaders
        led = ", ".join(f"{k}: {len(v)}" for k, v in L.degrees_led.items())
        lines.append(f"  exact counts to degree {L.bound} ({L.mode}): first leader change at "
                     f"{L.first_change if L.first_change else 'none'}; degrees led: {led}")
    lines.append(f"  {caution_text(res.hypotheses)}")
    return "\n".join(lines)


def _emit_json(obj: dict, path: str) -> None:
    write_json(obj, path)


def run_race(args) -> int:
    from .race import certify_ffrace, parse_race, residue_race

    check_outputs(args)
    width = target_width(args)
    _check_group(args, NAME_RACE)
    leaders = _int(args.leaders, "--leaders")
    if not (0 <= leaders <= 2000):
        raise BadInput(f"--leaders must be between 0 and 2000 (got {leaders})")
    if args.residues:
        if args.classes:
            raise BadInput("give either --residues or classes, not both")
        if args.weights:
            raise BadInput("--weights does not apply to --residues")
        qn, G, wd = residue_race(args.q, args.modulus, args.mode)
    else:
        qn, G, wd = parse_race(args.q, args.modulus, list(args.classes), args.weights, args.mode)

    # each stage that can take long is shown on a terminal (never in a log or a pipe)
    with stages(NAME_RACE, progress_enabled(args)) as say:
        if args.json:
            # --json writes the certificate: the one shape of every certify document
            from fractions import Fraction

            from ..certificate.ffield import certify_ffield

            res, cert = certify_ffield(qn, G, wd, Fraction(repr(width)), leader_bound=leaders,
                                       progress=say)
            write_json(cert.to_dict(), args.json)
        else:
            res = certify_ffrace(qn, G, wd, target_width=width, leader_bound=leaders, progress=say)
    if args.json != "-":
        print(screen(res))
    return 0 if res.target_met else 5


def run_lpoly(args) -> int:
    from .characters import character_group
    from .lpoly import l_polynomial, weil_check
    from .poly import finite_field, parse_field_order, parse_monic, poly_str

    check_outputs(args)
    _check_group(args, NAME_LPOLY)
    q = parse_field_order(args.q)
    F = finite_field(q)
    m = parse_monic(args.modulus, F, "modulus")
    if q ** m.degree() > 10**6:
        raise BadInput("fflpoly lists every character: use a modulus with q^deg m <= 10^6")
    G = character_group(F, m)
    limit = parse_int(args.max_characters, "--max-characters", 0, 10**6)
    out = []
    lines = [G.describe(), f"  field: {F.describe()}"]
    for i, chi in enumerate(G.characters()):
        if chi.is_trivial():
            continue
        if len(out) >= limit:
            lines.append(f"  ... ({G.order - 1 - limit} more characters; raise --limit)")
            break
        L = l_polynomial(chi)
        rep = weil_check(L)
        roots = L.inverse_roots()
        out.append({"character": chi.label(), "order": chi.order,
                    "parity": "even" if chi.is_even else "odd",
                    "conductor": poly_str(chi.conductor, F), "degree": L.degree,
                    "coefficients": L.coefficient_strings(),
                    "inverse_roots": [r.str(12, radius=True) for r in roots],
                    "weil_check": rep.describe(), "weil_ok": rep.ok})
        lines.append(f"  {chi.describe()}: L = [{', '.join(L.coefficient_strings())}] "
                     f"(zeta = exp(2 pi i/{chi.order})); {rep.describe()}")
    if args.json:
        from ..certificate.model import envelope

        _emit_json(envelope("l-polynomials", {"group": G.describe(), "field": F.describe(),
                                              "characters": out}), args.json)
    if args.json != "-":
        print("\n".join(lines))
    return 0 if all(o["weil_ok"] for o in out) else 4


def register(subparsers) -> None:
    p = subparsers.add_parser(
        NAME_RACE, help="density of a prime race in F_q[t] (cumulative or prescribed degree)",
        description="Certified natural density of a prime race among residue classes modulo a "
                    "monic m in F_q[t]. Polynomials in t; for prime powers q the generator of "
                    "F_q is z. Conditional on LI (or on the completeness of the relations found).")
    p.add_argument("q", help="field order (a prime power)")
    p.add_argument("modulus", help="monic modulus m, e.g. 't^2+1'")
    p.add_argument("classes", nargs="*", help="residue classes coprime to m, e.g. 't+1' 1")
    p.add_argument("--weights", nargs="+", metavar="W", help="integer weights summing to 0 (default 1 -1)")
    p.add_argument("--residues", action="store_true", help="race non-residues against residues")
    p.add_argument("--mode", default="cumulative", choices=["cumulative", "degree"],
                   help="cumulative: primes of degree <= X; degree: primes of degree exactly X")
    add_target(p, 10, MAX_DIGITS)
    p.add_argument("--leaders", default="60", metavar="N",
                   help="report leaders from exact counts up to degree N (0: skip; default 60)")
    add_json(p)
    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_race)

    p2 = subparsers.add_parser(
        NAME_LPOLY, help="characters mod m in F_q[t] with their L-polynomials and inverse roots",
        description="List the characters of (F_q[t]/m)^x with exact L-polynomials, certified "
                    "inverse roots and the check against Weil's theorem.")
    p2.add_argument("q", help="field order (a prime power)")
    p2.add_argument("modulus", help="monic modulus m")
    p2.add_argument("--max-characters", default="50", metavar="N",
                    help="list at most this many characters (default 50)")
    add_json(p2, "the characters and L-polynomials")
    add_limits(p2)
    p2.set_defaults(func=run_lpoly)
