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

EXIT_MISMATCH = 4
EXIT_REFUTED = 10
EXIT_UNDECIDED = 11


def _int(text: str, what: str) -> int:
    try:
        return int(text)
    except (TypeError, ValueError):
        raise BadInput(f"{what} must be an integer, got {text!r}") from None


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

    d = _int(text, what)
    if not 1 <= d <= MAX_DIGITS:
        raise BadInput(f"{what} must lie in 1..{MAX_DIGITS} (got {d})")
    return d


# -- certificate / render -------------------------------------------------------

def run_certificate(args) -> int:
    from ..certificate.build import certify_with_certificate, reproduce_command
    from ..render.files import parse_formats, write_files

    question = question_of(args)
    d = _digits(args.digits)
    formats = parse_formats(args.formats)
    result, cert = certify_with_certificate(question, d,
                                            command_line=reproduce_command(question, d))
    paths = write_files(cert, args.out, formats, args.name)
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
    from ..render.files import parse_formats, write_files

    cert = read_certificate(args.file)
    # a document shows only what verify re-derives: render nothing that does not verify
    rep = verify_any(cert)
    if not rep.ok:
        for c in rep.failures[:5]:
            print(f"  FAIL {c.name}: {c.detail}", file=sys.stderr)
        print(f"certify: error: {args.file} does not verify; nothing rendered", file=sys.stderr)
        return EXIT_MISMATCH
    out = args.out or os.path.dirname(os.path.abspath(args.file))
    base = os.path.splitext(os.path.basename(args.file))[0]
    formats = tuple(f for f in parse_formats(args.formats) if f != "json")
    for f, p in write_files(cert, out, formats, base).items():
        print(f"wrote {f:<9} {p}")
    return 0


# -- verify ---------------------------------------------------------------------

def run_verify(args) -> int:
    from ..certificate.dispatch import report_dict, verify_paths

    outcomes = verify_paths(list(args.files))
    status = 0
    unreadable = False
    for o in outcomes:
        rep, path = o.report, o.path
        if o.error:
            unreadable = True
            print(f"certify: error: {o.error}", file=sys.stderr)
            continue
        if not args.json:
            verdict = "VERIFIED" if rep.ok else "MISMATCH"
            ratio = (f" (the original computation took {rep.original_seconds:.2f} s)"
                     if rep.original_seconds else "")
            print(f"{path}: {verdict} -- {rep.label}: {sum(c.ok for c in rep.checks)}/"
                  f"{len(rep.checks)} checks passed in {rep.seconds:.2f} s{ratio}")
            for c in rep.checks:
                if args.verbose or not c.ok:
                    mark = "ok  " if c.ok else "FAIL"
                    print(f"  {mark} {c.name}" + ("" if c.ok else f": {c.detail}"))
        if not rep.ok:
            status = EXIT_MISMATCH
    if args.json:
        print(json.dumps(report_dict(outcomes), indent=1))
    if unreadable:
        return BadInput.exit_code
    if args.json:
        pass
    elif status == 0:
        print("The stored enclosures follow from the stored data (conditional on the listed "
              "hypotheses, which certify does not prove).")
    return status


# -- referee --------------------------------------------------------------------

def run_check(args) -> int:
    from ..certificate.referee import Claim, parse_value, referee
    from ..render.files import write_files

    question = question_of(args)
    lo, hi, meaning, places = parse_value(args.claim)
    claim = Claim(question, args.claim.strip(), lo, hi, meaning, places)
    v = referee(claim, _digits(args.start_digits, "--start-digits"),
                _digits(args.max_digits, "--max-digits"), with_certificate=bool(args.certificate))
    print(v.summary())
    print(f"  digits tried: {', '.join(map(str, v.digits_tried))}; conditional on GRH and LI "
          "(assumed, not proven)")
    if args.certificate and v.certificate is not None:
        for f, p in write_files(v.certificate, args.certificate, ("json", "md")).items():
            print(f"  wrote {f:<9} {p}")
    return {"consistent": 0, "refuted": EXIT_REFUTED}.get(v.verdict, EXIT_UNDECIDED)


def check_claims_file(path: str, out_dir: str, start_digits: int, max_digits: int,
                      certificates: bool, title: str | None = None, quiet: bool = False,
                      display: str | None = None):
    """Check every claim of ``path``; write the report (and certificates) into ``out_dir``.

    Returns (verdicts, {"report": path, "json": path, "certificates": [...]}).
    Raises BadInput listing every bad line.
    """
    from ..certificate.referee import read_claims, referee
    from ..io import write_atomic
    from ..render.files import base_name, write_files
    from ..render.report import claims_report_dict, claims_report_markdown
    from ..spectrum.spectrum import SpectrumStore

    claims, errors = read_claims(path, display)
    if errors:
        raise BadInput("\n".join(errors))
    store = SpectrumStore()
    verdicts, cert_paths = [], {}
    os.makedirs(out_dir, exist_ok=True)
    for i, c in enumerate(claims):
        v = referee(c, start_digits, max_digits, store=store, with_certificate=certificates)
        verdicts.append(v)
        if not quiet:
            print(f"{c.source}: {v.summary()}")
        if certificates and v.certificate is not None:
            base = f"{base_name(c.race.label)}-{c.places or 'interval'}"
            p = write_files(v.certificate, out_dir, ("json", "md"), base)
            cert_paths[i] = os.path.basename(p["json"])
    stem = os.path.splitext(os.path.basename(path))[0]
    report = os.path.join(out_dir, f"{stem}-report.md")
    write_atomic(report, claims_report_markdown(title or stem, display or path, verdicts, max_digits,
                                                cert_paths))
    rj = os.path.join(out_dir, f"{stem}-report.json")
    write_atomic(rj, json.dumps(claims_report_dict(display or path, verdicts, cert_paths), indent=1) + "\n")
    return verdicts, {"report": report, "json": rj,
                      "certificates": [os.path.join(out_dir, p) for p in cert_paths.values()]}


def _claims_exit(verdicts) -> int:
    kinds = {v.verdict for v in verdicts}
    if "refuted" in kinds:
        return EXIT_REFUTED
    if "undecided" in kinds:
        return EXIT_UNDECIDED
    return 0


def run_claims(args) -> int:
    try:
        verdicts, paths = check_claims_file(args.file, args.out,
                                            _digits(args.start_digits, "--start-digits"),
                                            _digits(args.max_digits, "--max-digits"),
                                            args.certificates)
    except BadInput as exc:
        for line in str(exc).splitlines():
            print(f"certify: error: {line}", file=sys.stderr)
        return BadInput.exit_code
    counts = {k: sum(1 for v in verdicts if v.verdict == k) for k in ("consistent", "refuted", "undecided")}
    print(f"{len(verdicts)} claims: {counts['consistent']} consistent, {counts['refuted']} refuted, "
          f"{counts['undecided']} undecided; report {paths['report']}")
    return _claims_exit(verdicts)


def run_demo(args) -> int:
    from ..demo import run_demo as demo

    summary = demo(args.out)
    print(summary["text"])
    return 0 if summary["ok"] else 1


def register(sub) -> None:
    from ..certificate.referee import MAX_REFEREE_DIGITS, START_DIGITS
    from ..races import DEFAULT_DIGITS

    p = sub.add_parser("certificate", help="certify a race and write its certificate",
                       description="Certify a race density and write its certificate: JSON "
                       "(re-checkable with `certify verify`), Markdown, LaTeX, an \\input-able "
                       "fragment and, with matplotlib, plots.")
    _add_race(p)
    p.add_argument("--digits", "-d", default=str(DEFAULT_DIGITS), metavar="D",
                   help=f"target width 10^-D (default {DEFAULT_DIGITS})")
    p.add_argument("--out", "-o", default="reports", help="output folder (default reports/)")
    p.add_argument("--name", help="base file name (default from the race, e.g. delta_4_3_1)")
    p.add_argument("--formats", default="json,md,tex,fragment",
                   help="comma-separated: json, md, tex, fragment, density, budget, plots, all")
    p.set_defaults(func=run_certificate)

    p = sub.add_parser("render", help="render a certificate file (Markdown, LaTeX, plots)")
    p.add_argument("file", metavar="FILE.json")
    p.add_argument("--out", "-o", help="output folder (default: beside the file)")
    p.add_argument("--formats", default="md,tex,fragment", help="md, tex, fragment, density, budget, plots, all")
    p.set_defaults(func=run_render)

    p = sub.add_parser("verify", help="re-verify certificates from their stored data",
                       description="Re-check every stored zero (sign changes of Z), the moments, "
                       "the residual sums, each error bound and the final sum, trusting no stored "
                       "conclusion. Exit code 4 on any mismatch.")
    p.add_argument("files", nargs="+", metavar="FILE.json")
    p.add_argument("--verbose", "-v", action="store_true", help="list every check")
    p.add_argument("--json", action="store_true", help="machine-readable output")
    p.set_defaults(func=run_verify)

    p = sub.add_parser("check", help="referee check: is a claimed density consistent?",
                       description="Verdict on a claimed value: consistent, refuted (with the "
                       "excluding enclosure and by how much) or undecided; the precision is "
                       "raised automatically. VALUE is 0.9959 (rounded), 0.9959... (truncated) "
                       "or [0.9958, 0.9960]. Exit 0 consistent, 10 refuted, 11 undecided.")
    _add_race(p)
    p.add_argument("--claim", required=True, metavar="VALUE")
    p.add_argument("--start-digits", default=str(START_DIGITS), metavar="D")
    p.add_argument("--max-digits", default=str(MAX_REFEREE_DIGITS), metavar="D")
    p.add_argument("--certificate", metavar="DIR", help="also write the deciding certificate here")
    p.set_defaults(func=run_check)

    p = sub.add_parser("claims", help="check every claim of a claims file; write one report",
                       description="Claims file: one `RACE = VALUE` per line, `#` comments. "
                       "Writes FILE-report.md and FILE-report.json into --out.")
    p.add_argument("file", metavar="FILE")
    p.add_argument("--out", "-o", default="reports", help="output folder (default reports/)")
    p.add_argument("--start-digits", default=str(START_DIGITS), metavar="D")
    p.add_argument("--max-digits", default=str(MAX_REFEREE_DIGITS), metavar="D")
    p.add_argument("--certificates", action="store_true", help="also write each claim's certificate")
    p.set_defaults(func=run_claims)

    p = sub.add_parser("demo", help="the demo: referee a fictitious preprint, write reports/")
    p.add_argument("--out", "-o", default="reports", help="output folder (default reports/)")
    p.set_defaults(func=run_demo)

