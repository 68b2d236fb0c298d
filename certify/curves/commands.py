"""``certify curve`` and ``certify twists``: trace races of elliptic curves over F_q(t)."""

from __future__ import annotations

import json
import os
import shlex
import sys

from ..commands.options import (Limits, add_json, add_limits, add_out, add_progress, add_target,
                                check_json_path, check_outputs, parse_float, parse_int,
                                progress, progress_enabled, stages, target_width)
from ..errors import BadInput
from ..arith import interval_text
from ..result import CAUTION, ExactValue, caution_text, headline_text


def _float(text: str, what: str) -> float:
    return parse_float(text, what)


def _int(text: str, what: str) -> int:
    return parse_int(text, what)


def _write(text: str, path: str) -> None:
    if path == "-":
        sys.stdout.write(text + "\n")
        return
    from ..io import write_atomic

    write_atomic(path, text + "\n")


def _check_curve_size(args, what: str, twist_degree: int = 0, n: int = 1) -> None:
    """Refuse before any work when the point counts would need too large a field.

    The bound from deg A and deg B is instant; when it is over the limit and
    the degrees are modest, the exact deg L from the conductor decides.
    """
    from ..batch.limits import curve_field_size, curve_l_degree_bound
    from ..ffield.poly import parse_poly
    from .model import _check_field, make_curve

    for name in ("A", "B"):
        if len(str(getattr(args, name))) > 5000:
            raise BadInput(f"{name}(t) is longer than 5000 characters")
    limits = Limits.of(args)
    F = _check_field(args.q)
    A, B = parse_poly(args.A, F), parse_poly(args.B, F)
    da, db = (A.degree() if not A.is_zero() else 0), (B.degree() if not B.is_zero() else 0)
    Q = F.q ** n
    deg_l = curve_l_degree_bound(da, db) + (2 * twist_degree + 2 if twist_degree else 0)
    size = curve_field_size(Q, deg_l)
    if size > limits.values["field"] and max(da, db) <= 60:
        deg_l = make_curve(args.q, args.A, args.B).l_degree + (2 * twist_degree + 2 if twist_degree else 0)
        size = curve_field_size(Q, deg_l)
    limits.require("field", size, f"{what} with deg A = {da}, deg B = {db} over F_{Q} "
                   f"(deg L <= {deg_l}: point counts over F_{Q}^{deg_l // 2 + 1})")


def _add_curve_args(p):
    p.add_argument("q", help="the order of the constant field F_q (a prime power, characteristic >= 5)")
    p.add_argument("A", help="A(t), e.g. 't^3 + 2*t + 1' (for q = p^k, 'z' is the generator of F_q)")
    p.add_argument("B", help="B(t), the constant coefficient, e.g. 't^3 + 2'")
    p.add_argument("--mode", choices=("cumulative", "degree"), default="cumulative",
                   help="race over good places of degree <= X (cumulative) or of degree exactly X")
    add_json(p)
    add_limits(p)


def curve_screen(R) -> str:
    E, L = R.curve, R.lpoly
    from .race import _places

    d = R.density
    places = _places(d)
    lines = [
        f"E: {E.describe()}",
        "  bad places: " + ", ".join(f"{b.place} ({b.kodaira}, {b.reduction})" for b in E.bad_places),
        f"  conductor degree {E.conductor_degree}; deg L = {L.degree}; eps = {L.sign:+d}; analytic rank {L.rank}",
        f"  L(E, u) = {L.as_text()}",
        f"  from point counts of degree <= {L.degrees_used}, confirmed by degrees {list(L.degrees_confirmed)}",
        f"race ({R.mode}): {R.statement()}",
        "  " + headline_text("density", d, ExactValue(d.lower, f"an enclosure of width 0: "
                                                             f"{R.parameters.get('engine')}")
                             if d.width == 0 else None),
        f"  enclosure {d.interval_text(places)}   width <= {d.width_text()}",
        f"  mean of the limit law {R.mean().str(8)} (period {R.variable.period} in X); "
        f"{len(R.variable.weights)} non-torsion angle(s)",
        "  error budget:",
    ]
    for e in R.budget:
        lines.append(f"    {e.name:<30} <= {e.bound_text()}")
    lines.append("  hypotheses:")
    for h in R.hypotheses:
        lines.append(f"    [{h.status}] {h.name}: {h.statement}")
    lines.append(f"  {caution_text(R.hypotheses)}")
    return "\n".join(lines)


def run_curve(args) -> int:
    from .lpoly import l_polynomial
    from .model import make_curve
    from .race import trace_race

    check_outputs(args)
    width = target_width(args)
    observe = parse_int(args.observe, "--observe", 0, 12)
    confirm = parse_int(args.confirm, "--confirm", 0, 6)
    max_boxes = parse_int(args.max_boxes, "--max-boxes", 1, 10**7)
    _check_curve_size(args, "curve")
    with stages("curve", progress_enabled(args)) as say:
        say("the curve's bad places and conductor")
        E = make_curve(args.q, args.A, args.B)
        say(f"L(E, u) of degree {E.l_degree} from point counts over F_{E.q}^k")
        L = l_polynomial(E, confirm=confirm)
        say(f"the density of the trace race ({args.mode}) to width {width:.0e}")
        R = trace_race(E, L, args.mode, width, observe=observe, max_boxes=max_boxes)
    if args.json:
        # --json writes the certificate: the one shape of every certify document
        from fractions import Fraction

        from ..certificate.curves import curve_certificate

        cert = curve_certificate(R, Fraction(repr(width)), confirm, max_boxes)
        _write(cert.to_json().rstrip("\n"), args.json)
    if args.json != "-":
        print(curve_screen(R))
    return 0


def family_screen(results, c: float) -> str:
    lines = []
    for r in results:
        s = r.summary()
        if r.mean is not None and r.mean.width == 0:
            mean = f"= {r.mean.lower} exactly"  # every member's density is exact
        else:
            mean = f"[{s['mean']['lower']}, {s['mean']['upper']}]" if s["mean"] else "-"
        w = interval_text(r.within[0], r.within[1], 3) if r.within is not None else "-"
        lines.append(
            f"d = {r.twist_degree}: {s['certified']}/{s['members']} members certified "
            f"({'sample of ' + str(s['members']) + ' from ' if r.sampled else 'whole family of '}{s['population']}); "
            f"mean {mean}; spread {s['spread'] if s['spread'] is None else round(s['spread'], 4)}; "
            f"share within {c:g}/d of 1/2 {w}; ranks {s['rank_counts']}; "
            f"{s['relation_case']} with relations among the angles ({s['wide_enclosures_over_0.01']} enclosures "
            f"wider than 0.01); {s['seconds']:.1f} s")
    if results:
        lines.append("  hypotheses: " + "; ".join(f"{h.name} [{h.status}]" for h in results[-1].hypotheses))
    lines.append(f"  {caution_text(results[-1].hypotheses) if results else CAUTION}")
    return "\n".join(lines)


def run_twists(args) -> int:
    from .family import plot_families, twist_family

    from ..batch.limits import twist_members
    from .model import _check_field

    check_outputs(args)
    check_json_path(args.table)
    check_json_path(args.plot)
    degrees = []
    for part in str(args.degrees).split(",")[:100]:
        part = part.strip()
        if not part:
            continue
        degrees.append(_int(part, "--degrees"))
    if not degrees or any(d < 1 or d > 12 for d in degrees):
        raise BadInput("--degrees must list twist degrees between 1 and 12, e.g. 1,2,3")
    n = parse_int(args.extension, "--extension", 1, 12)
    sample = None if args.sample is None else parse_int(args.sample, "--sample", 1)
    seed = _int(args.seed, "--seed")
    c = parse_float(args.c, "--c", 0.0, 1e6, open_low=True)
    width = target_width(args)
    max_boxes = parse_int(args.max_boxes, "--max-boxes", 1, 10**7)
    q = _check_field(args.q).q
    limits = Limits.of(args)
    members = sum(min(twist_members(q, n, d), sample or twist_members(q, n, d)) for d in degrees)
    limits.require("members", members, f"twists of degrees {','.join(map(str, degrees))} over F_{q ** n}")
    _check_curve_size(args, "a twist", max(degrees), n=n)
    results = []
    with progress(len(degrees), "twist degrees", progress_enabled(args), "degrees") as bar:
        for d in degrees:
            results.append(twist_family(args.q, args.A, args.B, d, n=n, sample=sample, seed=seed,
                                        mode=args.mode, target_width=width, c=c, max_boxes=max_boxes))
            bar.update(1)
    from fractions import Fraction

    from ..certificate.twists import family_certificate

    # one certificate per twist degree (kind twist-family-race), each re-checked by `certify verify`
    target = Fraction(repr(width))
    certs = ([family_certificate(r, target, r.seconds) for r in results]
             if (args.json or args.out) else [])
    out = {}
    if args.out:
        os.makedirs(args.out, exist_ok=True)
        from ..io import write_atomic

        for r, cert in zip(results, certs):
            write_atomic(os.path.join(args.out, f"twists-d{r.twist_degree}.json"), cert.to_json())
    plot_path = args.plot or (os.path.join(args.out, "twists-histogram.png") if args.out else None)
    table_path = args.table or (os.path.join(args.out, "twists-table.md") if args.out else None)
    if plot_path:
        if plot_families(results, plot_path):
            out["figure"] = plot_path
        else:
            print("certify: matplotlib is not installed; no figure written", file=sys.stderr)
    if table_path:
        text = "\n\n".join(f"## twist degree {r.twist_degree}\n\n{r.table()}" for r in results)
        _write(text, table_path)
    if args.json:
        if len(certs) == 1:
            # one degree: the certificate itself
            _write(certs[0].to_json().rstrip("\n"), args.json)
        else:
            # several degrees: one certificate per degree in a bundle that `certify verify` expands
            from ..certificate.model import envelope

            bundle = envelope("twist-family", {
                "question": {"kind": f"quadratic-twist families, trace race ({args.mode})",
                             "base_curve": results[0].base_curve.describe(), "twist_degrees": degrees},
                "certificates": [c.to_dict() for c in certs], **out,
                "caution": certs[-1].caution})
            _write(json.dumps(bundle, indent=1, ensure_ascii=False), args.json)
    if args.json != "-":
        print(family_screen(results, c))
    return 0


def register(sub) -> None:
    p = sub.add_parser("curve", help="L-polynomial, rank and trace-race density of y^2 = x^3 + A x + B over F_q(t)",
                       description="Point counts give L(E, u) exactly; the density of the sign of the normalised "
                                   "Frobenius trace sum is certified under LI (assumed, with LLL evidence).")
    _add_curve_args(p)
    add_target(p, 8, 30)
    add_progress(p)
    p.add_argument("--observe", default="0", help="also list the exact trace sums for X <= this (0..12)")
    p.add_argument("--confirm", default="1", help="extra degrees of point counts that confirm L (default 1)")
    p.add_argument("--max-boxes", default="100000",
                   help="box budget per residue class when the angles satisfy relations (default 100000)")
    p.set_defaults(func=run_curve)

    p = sub.add_parser("twists", help="densities across the quadratic twists y^2 = x^3 + A f^2 x + B f^3",
                       description="f monic square-free of degree d, coprime to the discriminant, over F_{q^n}.")
    _add_curve_args(p)
    p.add_argument("--degrees", default="2", help="twist degrees d, comma-separated (default 2)")
    p.add_argument("--extension", "-n", default="1", help="the family lives over F_{q^n} (default n = 1)")
    p.add_argument("--sample", default=None, help="a random sample of this many twists per degree (default: all)")
    p.add_argument("--seed", default="0", help="seed of the random sample (default 0)")
    p.add_argument("--c", default="1", help="report the share of densities within c/d of 1/2 (default 1)")
    add_target(p, 3, 12, "each member's enclosure")
    add_out(p, default=None, what="write twists-table.md and twists-histogram.png into this folder")
    p.add_argument("--table", metavar="PATH", help="write a Markdown table of every member (- for stdout)")
    p.add_argument("--plot", metavar="PATH", help="write a histogram figure (PNG; needs matplotlib)")
    add_progress(p)
    p.add_argument("--max-boxes", default="3000",
                   help="box budget per residue class for members whose angles satisfy relations (default 3000)")
    p.set_defaults(func=run_twists)
