"""``certify curve`` and ``certify twists``: trace races of elliptic curves over F_q(t)."""

from __future__ import annotations

import json
import shlex
import sys

from ..errors import BadInput
from ..result import CAUTION


def _float(text: str, what: str) -> float:
    try:
        v = float(text)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be a number, got {text!r}") from None
    if not (v == v) or v in (float("inf"), float("-inf")):
        raise BadInput(f"{what} must be finite, got {text!r}")
    return v


def _int(text: str, what: str) -> int:
    try:
        return int(text)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be an integer, got {text!r}") from None


def _write(text: str, path: str) -> None:
    if path == "-":
        sys.stdout.write(text + "\n")
        return
    try:
        from ..io import write_atomic

        write_atomic(path, text + "\n")
    except ImportError:  # pragma: no cover
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(text + "\n")


def _add_curve_args(p):
    p.add_argument("q", help="the order of the constant field F_q (a prime power, characteristic >= 5)")
    p.add_argument("A", help="A(t), e.g. 't^3 + 2*t + 1' (for q = p^k, 'z' is the generator of F_q)")
    p.add_argument("B", help="B(t)")
    p.add_argument("--mode", choices=("cumulative", "degree"), default="cumulative",
                   help="race over good places of degree <= X (cumulative) or of degree exactly X")
    p.add_argument("--json", metavar="PATH", help="write the machine-readable result (- for stdout)")


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
        (f"  density = {d.lower} (exact" + (": the limit is periodic in X and never 0)"
                                            if str(R.parameters.get("engine", "")).startswith("exact") else ")")
         if d.width == 0 else
         f"  density = {d.digits()[:42] or '(no digit certified)'}   enclosure [{d.lower_str(places)}, "
         f"{d.upper_str(places)}]   width {float(d.width):.2e}"),
        f"  mean of the limit law {R.mean().str(8)} (period {R.variable.period} in X); "
        f"{len(R.variable.weights)} non-torsion angle(s)",
        "  error budget:",
    ]
    for e in R.budget:
        lines.append(f"    {e.name:<30} <= {e.bound_float:.2e}")
    lines.append("  hypotheses:")
    for h in R.hypotheses:
        lines.append(f"    [{h.status}] {h.name}: {h.statement}")
    lines.append(f"  {CAUTION}")
    return "\n".join(lines)


def run_curve(args) -> int:
    from .lpoly import l_polynomial
    from .model import make_curve
    from .race import trace_race

    width = _float(args.width, "--width")
    if not (0 < width < 1):
        raise BadInput("--width must lie in (0, 1)")
    observe = _int(args.observe, "--observe")
    if observe < 0 or observe > 12:
        raise BadInput("--observe must be between 0 and 12")
    E = make_curve(args.q, args.A, args.B)
    L = l_polynomial(E, confirm=_int(args.confirm, "--confirm"))
    R = trace_race(E, L, args.mode, width, observe=observe, max_boxes=_int(args.max_boxes, "--max-boxes"))
    d = R.to_dict()
    d["parameters"]["command"] = "certify " + " ".join(shlex.quote(a) for a in getattr(args, "_argv", []) or [])
    if args.json:
        _write(json.dumps(d, indent=2, default=str), args.json)
    if args.json != "-":
        print(curve_screen(R))
    return 0


def family_screen(results, c: float) -> str:
    lines = []
    for r in results:
        s = r.summary()
        mean = f"[{s['mean']['lower']}, {s['mean']['upper']}]" if s["mean"] else "-"
        within = s["share_within_c_over_d_of_half"]
        w = f"[{within['lower']:.3f}, {within['upper']:.3f}]" if within else "-"
        lines.append(
            f"d = {r.twist_degree}: {s['certified']}/{s['members']} members certified "
            f"({'sample of ' + str(s['members']) + ' from ' if r.sampled else 'whole family of '}{s['population']}); "
            f"mean {mean}; spread {s['spread'] if s['spread'] is None else round(s['spread'], 4)}; "
            f"share within {c:g}/d of 1/2 {w}; ranks {s['rank_counts']}; "
            f"{s['relation_case']} with relations among the angles ({s['wide_enclosures_over_0.01']} enclosures "
            f"wider than 0.01); {s['seconds']:.1f} s")
    lines.append("  hypotheses: RH for every L(E_f, u) [theorem]; LI for each member [assumed, LLL evidence]")
    lines.append(f"  {CAUTION}")
    return "\n".join(lines)


def run_twists(args) -> int:
    from .family import plot_families, twist_family

    degrees = []
    for part in str(args.degrees).split(","):
        part = part.strip()
        if not part:
            continue
        degrees.append(_int(part, "--degrees"))
    if not degrees or any(d < 1 or d > 12 for d in degrees):
        raise BadInput("--degrees must list twist degrees between 1 and 12, e.g. 1,2,3")
    n = _int(args.extension, "--extension")
    sample = None if args.sample is None else _int(args.sample, "--sample")
    seed = _int(args.seed, "--seed")
    c = _float(args.c, "--c")
    width = _float(args.width, "--width")
    if not (0 < width < 1):
        raise BadInput("--width must lie in (0, 1)")
    max_boxes = _int(args.max_boxes, "--max-boxes")
    results = [twist_family(args.q, args.A, args.B, d, n=n, sample=sample, seed=seed, mode=args.mode,
                            target_width=width, c=c, max_boxes=max_boxes) for d in degrees]
    out = {
        "question": {"kind": f"quadratic-twist families, trace race ({args.mode})",
                     "base_curve": results[0].base_curve.describe(), "twist_degrees": degrees},
        "density": results[-1].to_dict()["density"],
        "families": [r.to_dict() for r in results],
        "hypotheses": results[-1].to_dict()["hypotheses"],
        "error_budget": results[-1].to_dict()["error_budget"],
        "parameters": {"q": args.q, "A": args.A, "B": args.B, "n": n, "degrees": degrees, "sample": sample,
                       "seed": seed, "c": c, "mode": args.mode, "width": width},
        "caution": CAUTION,
    }
    if args.plot:
        if plot_families(results, args.plot):
            out["figure"] = args.plot
        else:
            print("certify: matplotlib is not installed; no figure written", file=sys.stderr)
    if args.table:
        text = "\n\n".join(f"## twist degree {r.twist_degree}\n\n{r.table()}" for r in results)
        _write(text, args.table)
    if args.json:
        _write(json.dumps(out, indent=2, default=str), args.json)
    if args.json != "-":
        print(family_screen(results, c))
    return 0


def register(sub) -> None:
    p = sub.add_parser("curve", help="L-polynomial, rank and trace-race density of y^2 = x^3 + A x + B over F_q(t)",
                       description="Point counts give L(E, u) exactly; the density of the sign of the normalised "
                                   "Frobenius trace sum is certified under LI (assumed, with LLL evidence).")
    _add_curve_args(p)
    p.add_argument("--width", default="1e-8", help="target width of the density enclosure (default 1e-8)")
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
    p.add_argument("--width", default="1e-3", help="target width of each member's enclosure (default 1e-3)")
    p.add_argument("--table", metavar="PATH", help="write a Markdown table of every member (- for stdout)")
    p.add_argument("--plot", metavar="PATH", help="write a histogram figure (PNG; needs matplotlib)")
    p.add_argument("--max-boxes", default="3000",
                   help="box budget per residue class for members whose angles satisfy relations (default 3000)")
    p.set_defaults(func=run_twists)
