"""Certificates re-checked by a recount: races in F_q[t] and curve races over F_q(t).

In these settings every input is exact (a field order, polynomials, integer
weights) and the whole computation (L-polynomials from exact character sums or
point counts, inverse roots enclosed by Arb, relations confirmed exactly, the
density engine or box subdivision) is cheap for the sizes certify accepts. So
``verify`` recounts: it rebuilds the question from the stored inputs, re-derives
the L-data and the enclosure with the stored parameters, and compares every
stored field with the re-derived one:

* exact data (coefficients, relations, labels, sentences, statuses, parameters)
  must be equal;
* balls stored as ``{mid, rad}`` must meet the re-derived ones and be at most four times
  as wide;
* the stored enclosure must contain the re-derived one, and every stored error
  bound must be at least the re-derived one, term by term, in the same order;
* width, certified digits and the target flag are recomputed from the stored ends.

The sizes a stored certificate may ask for are bounded before the recount starts.
"""

from __future__ import annotations

import hashlib
import json
import platform
import sys
import time
from datetime import datetime, timezone
from fractions import Fraction

from ..arith import certified_digits, decimal_down, decimal_up
from .model import Certificate, ball_of, thaw
from .numbers import places_for, sci
from .verify import VerifyReport, _overlap

#: provenance fields that describe the run, not the result (not compared, not rendered)
RUN_FIELDS = ("certify", "python_flint", "python", "platform", "date", "timings_seconds")


def answer_from_enclosure(lo: Fraction, hi: Fraction, target: Fraction) -> dict:
    """The common answer: ends rounded outward, width rounded up, digits, target, exact value."""
    if hi > lo:
        places = min(places_for(hi - lo), 60)
        lower, upper = decimal_down(lo, places), decimal_up(hi, places)
    else:
        places = 30
        lower, upper = decimal_down(lo, places), decimal_up(hi, places)
    out = {"enclosure": {"lower": lower, "upper": upper}}
    out.update(answer_fields(Fraction(lower), Fraction(upper), target))
    if lo == hi:
        out["exact"] = f"{lo.numerator}/{lo.denominator}"
    return out


def answer_fields(flo: Fraction, fhi: Fraction, target: Fraction) -> dict:
    return {"width": sci(fhi - flo, 3, up=True),
            "certified_digits": certified_digits(flo, fhi),
            "target_width": sci(target, 3, up=False),
            "target_met": bool(fhi - flo <= target)}


def digest(obj) -> str:
    return "sha256:" + hashlib.sha256(json.dumps(obj, sort_keys=True).encode()).hexdigest()


def provenance(command_line: str, inputs: dict, seconds: float) -> dict:
    from .. import __version__

    try:
        import flint

        fv = flint.__version__
    except (ImportError, AttributeError):  # pragma: no cover
        fv = "unknown"
    return {"certify": __version__, "python_flint": fv, "python": sys.version.split()[0],
            "platform": platform.platform(), "command_line": command_line,
            "input_digest": digest(inputs),
            "date": datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
            "timings_seconds": {"total": round(seconds, 3)}}


def hypothesis_records(hypotheses) -> list:
    """Hypotheses of a result, evidence sentences as items (their data is the recount)."""
    return [{"name": h.name, "statement": h.statement, "status": h.status,
             "evidence": [{"kind": "recount", "text": e, "data": {}} for e in h.evidence],
             "reference": h.reference} for h in hypotheses]


def budget_records(budget) -> list:
    from .numbers import sci_bound

    return [{"name": e.name, "bound": sci_bound(e.bound, 3), "description": e.description}
            for e in budget]


def _is_ball(x) -> bool:
    return isinstance(x, dict) and set(x) == {"mid", "rad"}


def differences(stored, fresh, path: str = "", out: list | None = None) -> list:
    """Paths where ``stored`` differs from ``fresh`` (balls: must meet; else equal)."""
    out = [] if out is None else out
    if len(out) > 20:
        return out
    if _is_ball(fresh) and _is_ball(stored):
        try:
            sb, fb = ball_of(stored), ball_of(fresh)
            # a stored ball must meet the re-derived one and be no wider than a few times it
            # (a widened ball would meet anything and say nothing)
            if not _overlap(sb, fb) or Fraction(stored["rad"]) > 4 * Fraction(fresh["rad"]) \
                    + Fraction(1, 2**200):
                out.append(path)
        except Exception:  # a malformed ball is a difference  # noqa: BLE001
            out.append(path)
        return out
    if isinstance(fresh, dict):
        if not isinstance(stored, dict) or set(stored) != set(fresh):
            out.append(path or "(top)")
            return out
        for k in fresh:
            differences(stored[k], fresh[k], f"{path}/{k}", out)
        return out
    if isinstance(fresh, list):
        if not isinstance(stored, list) or len(stored) != len(fresh):
            out.append(path)
            return out
        for i, (a, b) in enumerate(zip(stored, fresh)):
            differences(a, b, f"{path}/{i}", out)
        return out
    if type(stored) is not type(fresh) or stored != fresh:
        out.append(path)
    return out


def compare(cert: Certificate, fresh: Certificate, report: VerifyReport) -> None:
    """Every stored field against the recount (see the module docstring)."""
    s, f = cert.to_dict(), fresh.to_dict()
    for name in ("question", "hypotheses", "parameters", "spectrum", "references", "caution"):
        d = differences(s[name], f[name], name)
        report.add(f"{name}: as re-derived from the stored inputs", not d,
                   f"differs at {', '.join(d[:5])}")
    sp = {k: v for k, v in s["provenance"].items() if k not in RUN_FIELDS}
    fp = {k: v for k, v in f["provenance"].items() if k not in RUN_FIELDS}
    d = differences(sp, fp, "provenance")
    report.add("provenance: command line and input digest re-derived", not d,
               f"differs at {', '.join(d[:5])}")
    # the answer: containment, then everything derived from the stored ends
    lo, hi = fresh.lower, fresh.upper
    s_lo, s_hi = cert.lower, cert.upper
    report.add("answer: stored enclosure contains the re-derived one", s_lo <= lo and hi <= s_hi,
               f"stored [{s['answer']['enclosure']['lower']}, {s['answer']['enclosure']['upper']}], "
               f"re-derived [{f['answer']['enclosure']['lower']}, {f['answer']['enclosure']['upper']}]")
    target = Fraction(f["answer"]["target_width"])
    expected = answer_fields(s_lo, s_hi, target)
    if "exact" in f["answer"]:  # the recount found the density exactly
        expected["exact"] = f["answer"]["exact"]
    extra = {k: v for k, v in s["answer"].items() if k != "enclosure"}
    d = differences(extra, expected, "answer")
    report.add("answer: width, certified digits, target and exact value from the stored ends",
               not d, f"differs at {', '.join(d[:5])}")
    sn = [e["name"] for e in s["error_budget"]]
    fn = [e["name"] for e in f["error_budget"]]
    report.add("error budget: the same terms, once each, in the same order", sn == fn,
               f"stored {sn}, re-derived {fn}")
    if sn == fn:
        for a, b in zip(s["error_budget"], f["error_budget"]):
            report.add(f"error bound '{b['name']}' >= the re-derived one",
                       Fraction(a["bound"]) >= Fraction(b["bound"])
                       and a["description"] == b["description"],
                       f"stored {a['bound']}, re-derived {b['bound']}")


def timed_report(label: str, cert: Certificate, rebuild, question=None,
                 with_report: bool = False) -> VerifyReport:
    """Run ``rebuild(cert) -> fresh certificate`` and compare; failures become checks.

    ``question(cert)``, when given, rebuilds the question record cheaply from the stored
    inputs; a stored question that differs is reported before the (costly) recount,
    which is then skipped.  With ``with_report``, ``rebuild(cert, report)`` may add its
    own checks (the evidence re-derived from its data) before it recounts.
    """
    from ..errors import CertifyError

    t0 = time.time()
    rep = VerifyReport(label)
    try:
        if question is not None:
            d = differences(thaw(cert.question), question(cert), "question")
            if not rep.add("question: rebuilt from the stored inputs before the recount", not d,
                           f"differs at {', '.join(d[:5])}"):
                rep.seconds = time.time() - t0
                return rep
        fresh = rebuild(cert, rep) if with_report else rebuild(cert)
        compare(cert, fresh, rep)
    except CertifyError as exc:
        rep.add("recount from the stored inputs", False, f"{type(exc).__name__}: {exc}")
    except (KeyError, TypeError, ValueError, IndexError, ZeroDivisionError) as exc:
        rep.add("recount from the stored inputs", False,
                f"malformed certificate data ({type(exc).__name__}: {exc})")
    rep.seconds = time.time() - t0
    rep.original_seconds = thaw(cert.provenance).get("timings_seconds", {}).get("total")
    return rep
