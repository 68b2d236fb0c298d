"""Certificates and referee checks on the command line.

* ``certify certificate RACE`` -- certify a race and write its certificate
  (JSON, Markdown, LaTeX, fragment, plots);
* ``certify render FILE.json`` -- render an existing certificate;
* ``certify verify FILE.json ...`` -- re-verify certificates from their data;
* ``certify check RACE --claim VALUE`` -- the referee's verdict on one claim;
* ``certify claims FILE`` -- every claim of a claims file, one report;
* ``certify demo`` -- the demo scenario (a fictitious preprint), into reports/.

RACE is ``Q A B`` (two-way), ``Q --residues``, ``Q --weights A:W ...`` or one
word such as ``'delta(4;3,1)'``, ``'delta(8;N,R)'``, ``'weighted(5;1:1,4:-1)'``.

Exit codes: 0 success / consistent; 2 bad input; 4 a verification mismatch;
10 a claim refuted; 11 a claim undecided (and none refuted).
"""

from __future__ import annotations

import json
import os
import sys

from ..errors import BadInput
from .options import (Limits, add_json, add_limits, add_name, add_out, add_progress, add_target,
                      check_out_dir, check_outputs, check_race_size, parse_int, progress,
                      progress_enabled, target_digits, working, write_json)

EXIT_MISMATCH = 4
EXIT_REFUTED = 10
EXIT_UNDECIDED = 11


def _int(text: str, what: str) -> int:
    return parse_int(text, what)


def _add_race(p) -> None:
    p.add_argument("race", nargs="+", metavar="RACE",
                   help="Q A B, or Q with --residues/--weights, or e.g. 'delta(4;3,1)'")
    p.add_argument("--residues", action="store_true", help="non-residues against residues mod Q")
    p.add_argument("--weights", nargs="+", metavar="A:W", help="a weighted race: CLASS:WEIGHT items")


def question_of(args):
    from ..certificate.referee import parse_race
    from ..race.question import residue_race, two_way, weighted

    words = list(args.race)
    if len(words) == 1 and "(" in words[0]:
        if args.residues or args.weights:
            raise BadInput("give the race either as one word like delta(4;3,1) or as Q A B, not both")
        return parse_race(words[0])
    q = _int(words[0], "modulus")
    if args.residues:
        if len(words) != 1 or args.weights:
            raise BadInput("--residues takes only the modulus")
        return residue_race(q)
    if args.weights:
        if len(words) != 1:
            raise BadInput("--weights takes only the modulus before it")
        from .races import parse_weights

        return weighted(q, parse_weights(args.weights))
    if len(words) != 3:
        raise BadInput("a two-way race needs Q A B (e.g. 4 3 1)")
    return two_way(q, _int(words[1], "class a"), _int(words[2], "class b"))


def _digits(text: str, what: str = "--digits") -> int:
    from ..races import MAX_DIGITS

    return parse_int(text, what, 1, MAX_DIGITS)


def _referee_digits(args) -> tuple[int, int]:
    """(start, max) digits of a referee check; --digits is an alias of --max-digits."""
    start = _digits(args.start_digits, "--start-digits")
    top = _digits(args.max_digits, "--max-digits")
    if start > top:
        raise BadInput(f"--start-digits {start} is above --max-digits {top}")
    return start, top


# -- certificate / render -------------------------------------------------------

def run_certificate(args) -> int:
    from ..certificate.build import certify_with_certificate, reproduce_command
    from ..render.files import parse_formats, write_files

    check_outputs(args)
    question = question_of(args)
    d = target_digits(args)
    formats = parse_formats(args.formats)
    check_race_size(question, Limits.of(args), "certificate")
    with working(f"certifying {question.label}", progress_enabled(args)):
        if getattr(question, "kind", "") == "ecq-trace-sum":  # a curve over Q
            from ..certificate.ecq import LIMITS, certify_ecq

            if d > LIMITS["digits"]:
                raise BadInput(f"--digits {d}: a curve's certificate is made to at most "
                               f"{LIMITS['digits']} digits (the limit of its recount)")
            if question.side != ">0":
                raise BadInput("a curve's certificate is that of the side >0 (the side <0 is "
                               "1 minus it); ask for delta(E[...]>0)")
            result, cert = certify_ecq(question.ainvs, d)
        elif getattr(question, "kind", "") == "ordering":  # three or more classes
            from ..certificate.order import certify_order_with_certificate
            from ..certificate.order import reproduce_command as order_command

            result, cert = certify_order_with_certificate(question, d,
                                                          command_line=order_command(question, d))
        else:
            result, cert = certify_with_certificate(question, d,
                                                    command_line=reproduce_command(question, d))
    paths = write_files(cert, args.out, formats, args.name)
    if args.json:
        write_json(json.loads(cert.to_json()), args.json)
    a = cert.answer
    print(f"{cert.label} in [{a['enclosure']['lower']}, {a['enclosure']['upper']}] "
          f"(width {a['width']}; certified digits {a['certified_digits'] or '(none)'}); "
          f"conditional on GRH and LI (assumed, not proven)")
    if not a["target_met"]:
        print(f"  target 1e-{d} NOT met: {cert.parameters.get('not_met_reason', '')}")
    for f, p in paths.items():
        print(f"  wrote {f:<9} {p}")
    return 0 if a["target_met"] else 5


def run_render(args) -> int:
    from ..certificate.dispatch import verify_any
    from ..certificate.model import read_certificate
    from ..render.files import write_files

    check_outputs(args)
    from ..certificate.model import read_document

    data = read_document(args.file)
    if data["kind"] == "twist-family":
        return _render_bundle(args, data)
    cert = read_certificate(args.file)
    # a document shows only what verify re-derives: render nothing that does not verify
    rep = verify_any(cert)
    if not rep.ok:
        return _refuse_unverified(args.file, rep.failures)
    return _write_documents(args, lambda out, formats, base: write_files(cert, out, formats, base))


def _refuse_unverified(path: str, failures) -> int:
    """Say why a document is not rendered (its first failed checks) and return the exit code."""
    for c in failures[:5]:
        print(f"  FAIL {c.name}: {c.detail}", file=sys.stderr)
    print(f"certify: error: {path} does not verify; nothing rendered", file=sys.stderr)
    return EXIT_MISMATCH


def _write_documents(args, write) -> int:
    """Write the documents ``write(out, formats, base)`` makes, where ``render`` was asked to."""
    from ..render.files import parse_formats

    out = args.out or os.path.dirname(os.path.abspath(args.file))
    check_out_dir(out)
    base = args.name or os.path.splitext(os.path.basename(args.file))[0]
    formats = tuple(f for f in parse_formats(args.formats) if f != "json")
    for f, p in write(out, formats, base).items():
        print(f"wrote {f:<9} {p}")
    return 0


def _render_bundle(args, data) -> int:
    """``certify render`` of a ``twist-family`` bundle: every certificate in it and the bundle's
    own claims verified first, then one document with a section per twist degree."""
    from ..certificate.dispatch import _verify_twist_bundle
    from ..render.files import write_bundle_files

    outcomes = _verify_twist_bundle(args.file, data)
    failures = [c for o in outcomes for c in o.report.failures]
    if failures:
        return _refuse_unverified(args.file, failures)
    return _write_documents(args, lambda out, formats, base: write_bundle_files(data, out, formats,
                                                                                base))


# -- verify ---------------------------------------------------------------------

def run_verify(args) -> int:
    from ..certificate.dispatch import report_dict, verify_paths

    check_outputs(args)
    outcomes = []
    shown = args.json != "-"
    with progress(len(args.files), "verify", progress_enabled(args), "files") as bar:
        for path in args.files:
            outcomes.extend(verify_paths([path]))
            bar.update(1)
    Limits.of(args).require("files", len(outcomes), "verify")
    status = 0
    unreadable = False
    out = []
    for o in outcomes:
        if o.error:
            unreadable = True
            print(f"certify: error: {o.error}", file=sys.stderr)
            continue
        status = _verify_one(o.path, o.report, args, out, shown) or status
    if args.json:
        write_json(report_dict(outcomes), args.json)
    if unreadable:
        return BadInput.exit_code
    if shown and status == 0:
        print("The stored enclosures follow from the stored data (conditional on the listed "
              "hypotheses, which certify does not prove).")
    return status


def _verify_one(path, rep, args, out, shown) -> int:
    out.append({"file": path, "label": rep.label, "ok": rep.ok, "seconds": round(rep.seconds, 3),
                "original_seconds": rep.original_seconds,
                "checks": [{"name": c.name, "ok": c.ok, "detail": c.detail} for c in rep.checks]})
    if shown:
        verdict = "VERIFIED" if rep.ok else "MISMATCH"
        ratio = (f" (the original computation took {rep.original_seconds:.2f} s)"
                 if rep.original_seconds else "")
        print(f"{path}: {verdict} -- {rep.label}: {sum(c.ok for c in rep.checks)}/"
              f"{len(rep.checks)} checks passed in {rep.seconds:.2f} s{ratio}")
        for c in rep.checks:
            if args.verbose or not c.ok:
                mark = "ok  " if c.ok else "FAIL"
                print(f"  {mark} {c.name}" + ("" if c.ok else f": {c.detail}"))
    return EXIT_MISMATCH if not rep.ok else 0


# -- referee --------------------------------------------------------------------

def run_check(args) -> int:
    from ..certificate.referee import Claim, parse_value, referee
    from ..render.files import write_files

    check_outputs(args)
    question = question_of(args)
    start, top = _referee_digits(args)
    lo, hi, meaning, places = parse_value(args.claim)
    check_race_size(question, Limits.of(args), "check")
    claim = Claim(question, args.claim.strip(), lo, hi, meaning, places)
    with working(f"checking {question.label}", progress_enabled(args)):
        v = referee(claim, start, top, with_certificate=bool(args.out))
    if args.json != "-":
        print(v.summary())
        extra = ""
        rank = getattr(v.result, "rank", None)  # a curve over Q: its analytic rank
        if rank is not None and not rank.certified:
            extra = f", and on {rank.statement()}"
        print(f"  digits tried: {', '.join(map(str, v.digits_tried))}; conditional on GRH and LI "
              f"(assumed, not proven){extra}")
    written = {}
    if args.out and v.certificate is not None:
        written = write_files(v.certificate, args.out, ("json", "md"), args.name)
        if args.json != "-":
            for f, p in written.items():
                print(f"  wrote {f:<9} {p}")
    if args.json:
        from ..render.report import claims_report_dict

        d = claims_report_dict("command line", [v], {0: written.get("json", "")})
        write_json(d, args.json, "referee-report")
    return {"consistent": 0, "refuted": EXIT_REFUTED}.get(v.verdict, EXIT_UNDECIDED)


def check_claims_file(path: str, out_dir: str, start_digits: int, max_digits: int,
                      certificates: bool, title: str | None = None, quiet: bool = False,
                      display: str | None = None, limits: Limits | None = None,
                      show_progress: bool = False):
    """Check every claim of ``path``; write the report (and certificates) into ``out_dir``.

    A bad line is reported (``FILE:LINE: why``, on standard error and in the
    report) and the other claims are still checked.  Returns (verdicts,
    {"report": path, "json": path, "certificates": [...], "errors": [...]}).
    Raises BadInput only when the file cannot be read or holds no claim at all.
    """
    from ..certificate.referee import read_claims, referee
    from ..io import write_atomic
    from ..render.files import base_name, write_files
    from ..render.report import claims_report_dict, claims_report_markdown
    from ..spectrum.spectrum import SpectrumStore

    limits = limits or Limits()
    try:
        size = os.path.getsize(path)
    except OSError as exc:
        raise BadInput(f"{path}: cannot read ({exc.strerror or exc})") from None
    if size > 10_000_000:
        raise BadInput(f"{path}: {size} bytes; a claims file is at most 10 MB")
    claims, errors = read_claims(path, display)
    kept = []
    for c in claims:
        try:
            check_race_size(c.race, limits, f"{c.source}:")
        except BadInput as exc:
            errors.append(str(exc))
            continue
        kept.append(c)
    claims = kept
    limits.require("claims", len(claims), f"claims file {display or path}")
    for e in errors:
        print(f"certify: error: {e}", file=sys.stderr)
    if not claims:
        raise BadInput(f"{display or path}: no claim could be read ({len(errors)} bad line(s))")
    store = SpectrumStore()
    verdicts, cert_paths, used = [], {}, set()
    os.makedirs(out_dir, exist_ok=True)
    with progress(len(claims), "claims", show_progress, "claims") as bar:
        for i, c in enumerate(claims):
            v = referee(c, start_digits, max_digits, store=store, with_certificate=certificates)
            verdicts.append(v)
            bar.update(1)
            if not quiet:
                print(f"{c.source}: {v.summary()}")
            if certificates and v.certificate is not None:
                base = f"{base_name(c.race.label)}-{c.places or 'interval'}"
                if base in used:  # two claims of one race at one precision: one file each
                    base += "-line" + (c.source.rsplit(":", 1)[-1] if c.source else str(i + 1))
                used.add(base)
                p = write_files(v.certificate, out_dir, ("json", "md"), base)
                cert_paths[i] = os.path.basename(p["json"])
    stem = os.path.splitext(os.path.basename(path))[0]
    report = os.path.join(out_dir, f"{stem}-report.md")
    write_atomic(report, claims_report_markdown(title or stem, display or path, verdicts, max_digits,
                                                cert_paths, errors))
    rj = os.path.join(out_dir, f"{stem}-report.json")
    rd = claims_report_dict(display or path, verdicts, cert_paths)
    rd["bad_lines"] = errors
    write_atomic(rj, json.dumps(rd, indent=1) + "\n")
    return verdicts, {"report": report, "json": rj, "errors": errors,
                      "certificates": [os.path.join(out_dir, p) for p in cert_paths.values()]}


def _claims_exit(verdicts, errors=()) -> int:
    kinds = {v.verdict for v in verdicts}
    if "refuted" in kinds:
        return EXIT_REFUTED
    if errors:
        return BadInput.exit_code
    if "undecided" in kinds:
        return EXIT_UNDECIDED
    return 0


def run_claims(args) -> int:
    check_outputs(args)
    start, top = _referee_digits(args)
    verdicts, paths = check_claims_file(args.file, args.out, start, top, args.certificates,
                                        quiet=args.json == "-", limits=Limits.of(args),
                                        show_progress=progress_enabled(args))
    if args.json:
        with open(paths["json"], encoding="utf-8") as fh:
            write_json(json.load(fh), args.json, "referee-report")
    counts = {k: sum(1 for v in verdicts if v.verdict == k) for k in ("consistent", "refuted", "undecided")}
    bad = len(paths["errors"])
    if args.json != "-":
        print(f"{len(verdicts)} claims: {counts['consistent']} consistent, {counts['refuted']} refuted, "
              f"{counts['undecided']} undecided" + (f"; {bad} bad line(s) not checked" if bad else "")
              + f"; report {paths['report']}")
    return _claims_exit(verdicts, paths["errors"])


def run_demo(args) -> int:
    from ..demo import run_demo as demo

    check_outputs(args)
    summary = demo(args.out, quiet=args.json == "-")
    if args.json:
        write_json({"ok": summary["ok"], "paths": summary["paths"],
                    "verify": [{"file": p, "ok": ok, "seconds": round(s, 3)}
                               for p, ok, s, _ in summary["verify"]]}, args.json, "referee-report")
    if args.json != "-":
        print(summary["text"])
    return 0 if summary["ok"] else 1


def _add_referee_digits(p, start, top):
    from ..races import MAX_DIGITS

    p.add_argument("--start-digits", default=str(start), metavar="D",
                   help=f"first target: width 10^-D (default {start})")
    p.add_argument("--max-digits", "--digits", "-d", dest="max_digits", default=str(top), metavar="D",
                   help=f"raise the target up to width 10^-D before saying undecided "
                   f"(1..{MAX_DIGITS}; default {top}); --digits is an alias")


def register(sub) -> None:
    from ..certificate.referee import MAX_REFEREE_DIGITS, START_DIGITS
    from ..races import DEFAULT_DIGITS, MAX_DIGITS

    p = sub.add_parser("certificate", help="certify a race and write its certificate",
                       description="Certify a race density and write its certificate: JSON "
                       "(re-checkable with `certify verify`), Markdown, LaTeX, an \\input-able "
                       "fragment and, with matplotlib, plots.")
    _add_race(p)
    add_target(p, DEFAULT_DIGITS, MAX_DIGITS)
    add_out(p)
    add_name(p)
    p.add_argument("--formats", default="json,md,tex,fragment",
                   help="comma-separated: json, md, tex, fragment, density, budget, plots, all")
    add_json(p, "the certificate")
    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_certificate)

    p = sub.add_parser("render", help="render a certificate file (Markdown, LaTeX, plots)",
                       description="Write the Markdown, LaTeX, fragment or plots of an existing "
                       "certificate file.")
    p.add_argument("file", metavar="FILE.json", help="the certificate (JSON)")
    add_out(p, default=None, what="output folder (default: beside the file)")
    add_name(p)
    p.add_argument("--formats", default="md,tex,fragment",
                   help="comma-separated: md, tex, fragment, density, budget, plots, all")
    p.set_defaults(func=run_render)

    p = sub.add_parser("verify", help="re-verify certificates from their stored data",
                       description="Re-check every stored zero (sign changes of Z), the moments, "
                       "the residual sums, each error bound and the final sum, trusting no stored "
                       "conclusion. Exit code 4 on any mismatch.")
    p.add_argument("files", nargs="+", metavar="FILE.json", help="certificates to re-verify")
    p.add_argument("--verbose", "-v", action="store_true", help="list every check")
    add_json(p, "the verification report")
    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_verify)

    p = sub.add_parser("check", help="referee check: is a claimed density consistent?",
                       description="Verdict on a claimed value: consistent, refuted (with the "
                       "excluding enclosure and by how much) or undecided; the precision is "
                       "raised automatically. VALUE is 0.9959 (rounded), 0.9959... (truncated) "
                       "or [0.9958, 0.9960], within [0, 1]. Exit 0 consistent, 10 refuted, "
                       "11 undecided.")
    _add_race(p)
    p.add_argument("--claim", required=True, metavar="VALUE", help="the claimed density")
    _add_referee_digits(p, START_DIGITS, MAX_REFEREE_DIGITS)
    add_out(p, default=None, what="also write the deciding certificate into this folder")
    p.add_argument("--certificate", dest="out", metavar="DIR", help=argparse_suppress())
    add_name(p)
    add_json(p, "the verdict")
    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_check)

    p = sub.add_parser("claims", help="check every claim of a claims file; write one report",
                       description="Claims file: one `RACE = VALUE` per line, `#` comments. "
                       "Writes FILE-report.md and FILE-report.json into --out. A bad line is "
                       "reported and the other claims are still checked (exit 2 unless a claim "
                       "is refuted: 10).")
    p.add_argument("file", metavar="FILE", help="the claims file")
    add_out(p)
    _add_referee_digits(p, START_DIGITS, MAX_REFEREE_DIGITS)
    p.add_argument("--certificates", action="store_true", help="also write each claim's certificate")
    add_json(p, "the report")
    add_progress(p)
    add_limits(p)
    p.set_defaults(func=run_claims)

    p = sub.add_parser("demo", help="the demo: referee a fictitious preprint, write reports/",
                       description="Check the claims of a fictitious preprint, write the report "
                       "and certificates, and re-verify them.")
    add_out(p)
    add_json(p, "a summary")
    p.set_defaults(func=run_demo)


def argparse_suppress():
    import argparse

    return argparse.SUPPRESS
