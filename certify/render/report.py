"""The referee report of a claims file (Markdown and JSON)."""

from __future__ import annotations

import time

from .. import __version__
from ..certificate.numbers import interval_str, sci
from ..result import CAUTION
from .templates import render_template


def claims_rows(verdicts, certificate_paths: dict | None = None) -> list[dict]:
    rows = []
    for i, v in enumerate(verdicts):
        c = v.claim
        src = c.source or f"claim {i + 1}"
        rows.append({
            "source": src,
            "line": src.rsplit(":", 1)[-1] if ":" in src else str(i + 1),
            "race": c.race.label,
            "claimed": c.text,
            "meaning": c.meaning,
            "verdict": v.verdict,
            "margin": sci(v.margin, 3, up=False) if v.margin is not None else "",
            "enclosure": interval_str(v.lower, v.upper) if v.lower is not None else "(none)",
            "digits": ", ".join(map(str, v.digits_tried)),
            "note": c.note,
            "summary": v.summary(),
            "certificate": (certificate_paths or {}).get(i, ""),
        })
    return rows


def claims_report_markdown(title: str, source: str, verdicts, max_digits: int,
                           certificate_paths: dict | None = None, errors=()) -> str:
    """The report: one row per claim (each claim shown once), then the lines not checked."""
    rows = claims_rows(verdicts, certificate_paths)
    counts = {k: sum(1 for v in verdicts if v.verdict == k)
              for k in ("consistent", "refuted", "undecided")}
    return render_template("claims_report.md.j2", {
        "title": title, "source": source, "rows": rows, "counts": counts,
        "date": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()), "version": __version__,
        "caution": CAUTION, "max_digits": max_digits, "errors": list(errors),
    })


def claims_report_dict(source: str, verdicts, certificate_paths: dict | None = None) -> dict:
    rows = claims_rows(verdicts, certificate_paths)
    for r, v in zip(rows, verdicts):
        r["claim_lower"] = str(v.claim.lower)
        r["claim_upper"] = str(v.claim.upper)
    return {"source": source, "certify": __version__, "caution": CAUTION, "claims": rows}
