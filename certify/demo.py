"""The demo: a referee checks the claims of a fictitious preprint.

``certify demo`` reads ``certify/data/demo_preprint.claims`` (an invented
manuscript: most claims right, one wrong in its last printed digit, one
printed to more places than the default precision settles), checks every
claim with automatic refinement, writes a certificate per claim and the
referee report into ``reports/``, re-verifies every certificate it wrote, and
writes the full certificate of delta(4;3,1) (Markdown, LaTeX, fragment and,
with matplotlib, plots).
"""

from __future__ import annotations

import os
import time
from importlib import resources

from .arith import sci_down

DEMO_FILE = "demo_preprint.claims"
TITLE = "Lopsided races: the bias of primes in progressions to small moduli (fictitious preprint)"


def demo_claims_path() -> str:
    return str(resources.files("certify").joinpath("data", DEMO_FILE))


def run_demo(out_dir: str = "reports", quiet: bool = False) -> dict:
    """Run the scenario; returns {"ok", "text", "verdicts", "paths", "verify"}."""
    from .certificate.model import read_certificate
    from .certificate.referee import MAX_REFEREE_DIGITS, START_DIGITS
    from .certificate.dispatch import verify_any
    from .commands.documents import check_claims_file
    from .render.files import write_files

    t0 = time.time()
    src = demo_claims_path()
    shown_src = f"certify/data/{DEMO_FILE}"
    verdicts, paths = check_claims_file(src, out_dir, START_DIGITS, MAX_REFEREE_DIGITS,
                                        certificates=True, title=TITLE, quiet=quiet,
                                        display=shown_src)
    lines = [f"Demo: {TITLE}", f"  claims: {shown_src} (in the installed package: {src})"]
    for v in verdicts:
        lines.append(f"  {v.claim.race.label} = {v.claim.text}: {v.verdict}"
                     + (f" (off by at least {sci_down(v.margin, 3)})" if v.margin is not None else "")
                     + (f" after refinement to {v.digits_tried[-1]} digits"
                        if len(v.digits_tried) > 1 else ""))
    # the showcase certificate: every format
    first = next(v for v in verdicts if v.certificate is not None)
    formats = ["json", "md", "tex", "fragment"]
    try:
        import matplotlib  # noqa: F401

        formats += ["density", "budget"]
    except ImportError:
        pass
    shown = write_files(first.certificate, out_dir, tuple(formats), "delta_4_3_1-certificate")
    # re-verify every certificate written
    checks = []
    for p in paths["certificates"] + [shown["json"]]:
        rep = verify_any(read_certificate(p))
        checks.append((p, rep.ok, rep.seconds, rep.original_seconds))
        lines.append(f"  verify {os.path.basename(p)}: {'VERIFIED' if rep.ok else 'MISMATCH'} "
                     f"in {rep.seconds:.2f} s")
    lines.append(f"  report: {paths['report']}")
    lines.append(f"  certificate of {first.claim.race.label}: "
                 + ", ".join(os.path.basename(p) for p in shown.values()))
    lines.append(f"  {time.time() - t0:.1f} s in all (the spectra are shared between the claims; "
                 "bench/bench_verify.py compares verify with a cold computation).")
    lines.append("  Every enclosure is conditional on GRH and LI, which certify does not prove.")
    expected_ok = all(ok for _, ok, _, _ in checks)
    return {"ok": expected_ok, "text": "\n".join(lines), "verdicts": verdicts,
            "paths": {**paths, "showcase": shown}, "verify": checks}
