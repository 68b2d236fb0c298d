"""``certify table`` (every race for a range of moduli) and ``certify cache`` (the spectra cache)."""

from __future__ import annotations

import os
import shlex
import sys

from ..errors import BadInput
from .options import (Limits, add_json, add_limits, add_out, add_progress, add_target, check_outputs,
                      parse_int, progress_enabled, target_digits, write_json)


def _int(text, what: str, low: int | None = None) -> int:
    return parse_int(text, what, low)


def _command_line(args) -> str:
    """The command that reproduces this table (what each result records)."""
    parts = ["certify", "table"]
    if args.moduli:
        parts += ["--moduli", args.moduli]
    for r in args.race or []:
        parts += ["--race", r]
    if args.kinds != "two-way,residues":
        parts += ["--kinds", args.kinds]
    if getattr(args, "symmetries", False):
        parts += ["--symmetries"]
    parts += ["--digits", str(target_digits(args)), "--out", args.out]
    return " ".join(shlex.quote(x) for x in parts)


def run_table(args) -> int:
    from ..batch.limits import distinct_l_functions, table_estimate
    from ..batch.plan import parse_moduli, parse_race
    from ..batch.run import run_batch

    check_outputs(args)
    if getattr(args, "curves", None) is not None:
        return run_curve_table(args)
    if args.cache is not None:
        _check_cache_path(args.cache)
    limits = Limits.of(args)
    digits = target_digits(args)
    workers = _int(args.workers, "--workers", 1) if args.workers is not None else None
    if workers is not None and workers > 256:
        raise BadInput(f"--workers must be at most 256, got {workers}")
    top = _int(args.top, "--top", 1)
    kinds = tuple(k.strip() for k in args.kinds.split(",") if k.strip())
    if not kinds:
        raise BadInput("--kinds: give two-way, residues or both")
    for k in kinds:
        if k not in ("two-way", "residues"):
            raise BadInput(f"--kinds: unknown race kind {k!r} (use two-way, residues)")
    moduli = parse_moduli(args.moduli) if args.moduli else []
    if args.race and len(args.race) > 10_000:
        raise BadInput("at most 10000 --race options")
    extra = [parse_race(r) for r in (args.race or [])]
    if not moduli and not extra:
        raise BadInput("give --moduli (e.g. 3-30) or at least one --race")
    est = table_estimate(moduli, kinds, extra)
    what = f"table of {len(est['moduli'])} moduli up to {est['conductor']}"
    limits.require("races", est["races"], what)
    limits.require("conductor", est["conductor"], what)
    limits.require("memory-mb", est["memory-mb"], what)
    limits.require("l-functions", distinct_l_functions(est["moduli"]), what)
    cmd = _command_line(args)
    summary = run_batch(moduli, digits, args.out, workers=workers, scheduler=args.scheduler,
                        cache_path=args.cache, kinds=kinds, extra=extra,
                        top=top, progress=progress_enabled(args) and not args.quiet,
                        command_line=cmd, use_cache=not args.no_cache,
                        symmetries=args.symmetries)
    if args.json:
        write_json(summary, args.json, "batch-report")
    if args.json == "-":
        return _table_exit(summary)
    t = summary["timings_seconds"]
    sp = summary["spectra"]
    print(f"{summary['races']} races ({summary['races_run']} certified now, "
          f"{summary['races_reused']} already done) in {t['total']:.1f} s; "
          f"spectra: {sp['needed']} needed, {sp['from_cache']} from the cache, "
          f"{sp['computed']} computed")
    rc_ = sp.get("recheck") or {}
    if rc_.get("entries") or rc_.get("skipped"):
        print(f"  cached spectra re-derived before use: {rc_['entries']} in {rc_['seconds']:.2f} s"
              + (f"; {rc_['skipped']} entries failed and were recomputed" if rc_.get("skipped") else ""))
    wr = sp.get("worker_recheck") or {}
    if wr.get("entries") or wr.get("refused"):
        print(f"  spectra from the workers re-checked before use: {wr['entries']} in "
              f"{wr['seconds']:.2f} s" + (f"; {wr['refused']} refused (their races computed them)"
                                          if wr.get("refused") else ""))
    for k, v in summary["files"].items():
        print(f"  {k:<12} {os.path.join(args.out, v)}")
    print(f"  results      {os.path.join(args.out, 'results')}/  (one JSON per race)")
    print("Every density is conditional on GRH and LI for the L-functions used; "
          "certify proves neither.")
    return _table_exit(summary, digits)


def run_curve_table(args) -> int:
    """``certify table --curves FILE``: one certified row per elliptic curve over Q."""
    from ..batch.ectable import read_curves, run_curve_table as run
    from ..certificate.ecq import LIMITS

    if args.moduli or args.race or args.symmetries or args.kinds != "two-way,residues":
        raise BadInput("--curves makes a table of elliptic curves over Q: give it without "
                       "--moduli, --race, --kinds or --symmetries")
    digits = target_digits(args)
    if digits > LIMITS["digits"]:
        raise BadInput(f"--digits {digits}: a curve's certificate is made to at most "
                       f"{LIMITS['digits']} digits (the limit of its recount)")
    workers = _int(args.workers, "--workers", 1) if args.workers is not None else None
    if workers is not None and workers > 256:
        raise BadInput(f"--workers must be at most 256, got {workers}")
    curves = read_curves(args.curves)
    limits = Limits.of(args)
    limits.require("races", len(curves), f"table of {len(curves)} curves")
    from ..source.ellcurve import curve_from_ainvs
    from .ecrace import check_ec_size

    for c in curves:
        E = curve_from_ainvs(c.ainvs)
        if E.conductor > LIMITS["conductor"]:
            raise BadInput(f"{c.source}: conductor {E.conductor} is above {LIMITS['conductor']}, "
                           "the largest a curve's certificate is made for")
        check_ec_size(E, digits, 0, limits)
    cmd = " ".join(shlex.quote(x) for x in ["certify", "table", "--curves", args.curves,
                                            "--digits", str(digits), "--out", args.out])
    summary = run(curves, digits, args.out, workers=workers, command_line=cmd,
                  show_progress=progress_enabled(args) and not args.quiet)
    if args.json:
        write_json(summary, args.json, "batch-report")
    if args.json != "-":
        print(f"{summary['curves']} curves ({summary['computed']} certified now, "
              f"{summary['reused']} certificates reused) in "
              f"{summary['timings_seconds']['total']:.1f} s")
        for k, v in summary["files"].items():
            print(f"  {k:<12} {os.path.join(args.out, v)}")
        print(f"  certificates {os.path.join(args.out, 'certificates')}/  (one per curve; "
              f"`certify verify {os.path.join(args.out, 'table.json')}` re-checks them all)")
        print("Every density is conditional on GRH and LI for L(E, s) (and on the rank where it is "
              "marked assumed); certify proves none of them.")
    return _table_exit(summary, digits)


def _check_cache_path(path: str) -> None:
    if not str(path).strip():
        raise BadInput("--cache needs a file name, got an empty string")
    if os.path.isdir(path):
        raise BadInput(f"--cache {path}: is a folder; give the cache file's name")


def _table_exit(summary, digits=None) -> int:
    digits = digits if digits is not None else summary.get("digits")
    if summary["failures"] or summary["missing"]:
        for f in summary["failures"]:
            print(f"  not certified: {f['race']}: {f['error']}", file=sys.stderr)
        return 3
    if summary["not_met"]:
        print(f"  {summary['not_met']} race(s) did not reach width 1e-{digits} "
              "(marked *; their certified enclosures are shown)", file=sys.stderr)
        return 5
    return 0


def _cache(args):
    from ..batch.cache import SpectrumCache, default_cache_path

    if args.cache is not None:
        _check_cache_path(args.cache)
    path = args.cache or default_cache_path()
    if not os.path.exists(path):
        raise BadInput(f"no cache at {path}")
    if args.cache_command == "show":
        return SpectrumCache(path, read_only=True)
    if not os.access(path, os.W_OK) or not os.access(os.path.dirname(os.path.abspath(path)), os.W_OK):
        raise BadInput(f"cache {path}: not writable; cannot prune")
    return SpectrumCache(path)


def run_cache_show(args) -> int:
    cache = _cache(args)
    rows = cache.entries(all_versions=True)
    size = os.path.getsize(cache.path) if os.path.exists(cache.path) else 0
    print(f"cache {cache.path}: {len(rows)} entries, {size / 1e6:.2f} MB "
          f"(this software: {cache.version})")
    conductors = sorted({e.conductor for e in rows})
    if args.verbose:
        print(f"{'character':>12} {'height':>8} {'width':>9} {'moments':>7} {'bits':>5} "
              f"{'zeros':>6} {'seconds':>8}  version")
        for e in rows:
            print(f"{str(e.conductor) + '.' + str(e.label):>12} {e.height:8.1f} {e.width:9.1e} "
                  f"{e.moments:7d} {e.moment_bits:5d} {e.zeros:6d} {e.seconds:8.2f}  {e.version}")
    else:
        for c in conductors:
            es = [e for e in rows if e.conductor == c]
            print(f"  conductor {c:>5}: {len(es):3d} entries, heights "
                  f"{min(e.height for e in es):.1f}..{max(e.height for e in es):.1f}, "
                  f"{sum(e.zeros for e in es)} zeros")
    other = sum(1 for e in rows if e.version != cache.version)
    if other:
        print(f"  {other} entries from other software versions (ignored; "
              "`certify cache prune --other-versions` removes them)")
    rc = 0
    if args.check:
        res = cache.check()
        print(f"  integrity: {res['integrity']}; damaged entries: {len(res['damaged'])}; "
              f"{res['entries']} entries re-derived in {res['recheck_seconds']:.2f} s")
        if res["integrity"] != "ok" or res["damaged"]:
            ids = ", ".join(map(str, res["damaged"][:20])) + (" ..." if len(res["damaged"]) > 20 else "")
            print(f"certify: error: cache {cache.path}: integrity {res['integrity']}; "
                  f"{len(res['damaged'])} damaged entries ({ids or 'none'}); "
                  "`certify cache prune --damaged` removes them", file=sys.stderr)
            rc = 4
    cache.close()
    return rc


def run_cache_prune(args) -> int:
    if not (args.other_versions or args.damaged or args.all or args.conductor_above is not None):
        raise BadInput("say what to prune: --other-versions, --damaged, --conductor-above N or --all")
    cache = _cache(args)
    n = cache.prune(other_versions=args.other_versions, damaged=args.damaged,
                    conductor_above=(_int(args.conductor_above, "--conductor-above", 1)
                                     if args.conductor_above is not None else None),
                    everything=args.all)
    print(f"removed {n} entries from {cache.path}")
    cache.close()
    return 0


def register(sub) -> None:
    p = sub.add_parser(
        "table", help="certify every race for a range of moduli and write tables",
        description="Certify every two-way race delta(q;a,b) (a < b; the reverse is 1 - delta) "
        "and the residue race for each modulus (or, with --curves, the trace race of each "
        "elliptic curve over Q of a file), sharing each primitive L-function's spectrum "
        "through a persistent cache, and write LaTeX/CSV/Markdown tables and a ranking of the "
        "most biased races.  Resumable: run the same command again after an interruption.  "
        "The number of races, L-functions and memory are estimated first and refused beyond "
        "the limits (--limit).  Results are conditional on GRH and LI; certify proves neither.")
    p.add_argument("--moduli", "-q", metavar="LIST", help="moduli, e.g. 3-30 or 5,7,11-13")
    p.add_argument("--race", action="append", metavar="RACE",
                   help="an extra race: Q:A,B (two-way), Q:N,R (residues) or Q:A=W,B=W,... "
                   "(weighted); repeatable")
    p.add_argument("--curves", metavar="FILE",
                   help="instead of moduli: a file of elliptic curves over Q, one [a1,a2,a3,a4,a6] "
                   "per line (# comments); one certified row and certificate per curve, ranked "
                   "by bias |delta - 1/2| (docs/elliptic_curves_q.md, section 13)")
    p.add_argument("--kinds", default="two-way,residues",
                   help="race kinds for each modulus (default two-way,residues)")
    add_target(p, 8, 60)
    add_out(p, default=None, required=True)
    p.add_argument("--workers", "-j", default=None, help="local worker processes (default: all cores)")
    p.add_argument("--scheduler", metavar="ADDR",
                   help="run on dask.distributed (e.g. tcp://host:8786); needs dask[distributed]")
    p.add_argument("--cache", metavar="PATH",
                   help="spectra cache (default $CERTIFY_CACHE or ~/.cache/certify/spectra.sqlite)")
    p.add_argument("--no-cache", action="store_true",
                   help="keep spectra in a scratch cache inside DIR instead")
    p.add_argument("--top", default="20", help="length of the ranking of most biased races")
    p.add_argument("--symmetries", action="store_true",
                   help="certify one race per distinct law (r a square: (ra,rb) ~ (a,b); "
                   "(1/a,1/b) ~ (a,b); (b,a) = 1 - (a,b); q = 2m, m odd ~ m) and read every "
                   "row from the race it equals, saying why")
    add_json(p, "the batch summary")
    add_progress(p)
    p.add_argument("--quiet", action="store_true", help="alias of --no-progress")
    add_limits(p)
    p.set_defaults(func=run_table)

    c = sub.add_parser("cache", help="inspect or prune the cache of certified spectra",
                       description="The SQLite cache of certified spectra (zeros, power sums, "
                       "L(1/2)) shared by batch runs.")
    csub = c.add_subparsers(dest="cache_command", metavar="ACTION")
    s = csub.add_parser("show", help="list what the cache holds",
                        description="List the cache's entries (read-only; works on a read-only file).")
    s.add_argument("--cache", metavar="PATH", help="cache file")
    s.add_argument("--verbose", "-v", action="store_true", help="one line per entry")
    s.add_argument("--check", action="store_true",
                   help="verify the file's integrity, every entry's checksum, and re-derive every "
                   "entry's power sums, L(1/2) and zeros' sign changes")
    s.set_defaults(func=run_cache_show)
    r = csub.add_parser("prune", help="remove entries", description="Remove entries from the cache.")
    r.add_argument("--cache", metavar="PATH", help="cache file")
    r.add_argument("--other-versions", action="store_true",
                   help="entries written by another software version")
    r.add_argument("--damaged", action="store_true",
                   help="entries failing their checksum or their re-derivation")
    r.add_argument("--conductor-above", metavar="N", help="entries with conductor > N")
    r.add_argument("--all", action="store_true", help="every entry")
    r.set_defaults(func=run_cache_prune)
    c.set_defaults(func=lambda args: (c.print_help(), 2)[1])
