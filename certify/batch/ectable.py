"""Tables over a list of elliptic curves over Q: ``certify table --curves FILE``.

Every curve of the file gets the certified density of {x : sum_{p <= x} a_p/sqrt(p) > 0}
(docs/elliptic_curves_q.md) with its certificate (kind ``ecq-race``) in
``DIR/certificates/``; the tables (CSV, Markdown, LaTeX) rank the curves by bias,
the distance of the density from 1/2, and are read from the certificates only.
``DIR/table.json`` is a table index: ``certify verify DIR/table.json`` recounts every
certificate and checks that each row shows its certificate's enclosure.

The curves file holds one curve per line, its a-invariants ``[a1,a2,a3,a4,a6]``
(or ``a1,a2,a3,a4,a6``); ``#`` starts a comment (kept as the row's note) and blank
lines are skipped.  Bad lines are reported as ``FILE:LINE: why`` and nothing is
computed.  The run is resumable: a certificate already in ``certificates/`` for the
same a-invariants and target is reused (it is data: ``verify`` re-derives it).
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import time
from dataclasses import dataclass
from fractions import Fraction

from ..arith import certified_digits, decimal_down, decimal_up, sci_up
from ..errors import BadInput, CertifyError
from ..io import write_atomic

MAX_CURVES_FILE = 10_000_000  # bytes
HYPOTHESES_NOTE = ("Every density is conditional on the Riemann hypothesis for L(E, s) (GRH) and "
                   "on the linear independence of the positive ordinates of its non-central zeros "
                   "(LI); where the analytic rank is 2 or more and no published proof applies, "
                   "the rank is assumed as well (upper bound and parity proven). certify gathers "
                   "evidence for each hypothesis and proves none; every certificate lists them.")
ORDER_NOTE = ("Rows are ranked by bias |delta - 1/2|, largest first; where two consecutive "
              "enclosures of the bias overlap the order between them is not certified (marked ~).")


@dataclass(frozen=True)
class CurveLine:
    ainvs: tuple
    source: str  # FILE:LINE
    note: str = ""


def read_curves(path: str, display: str | None = None) -> list[CurveLine]:
    """The curves of a file; BadInput listing every bad line (one line each) if any."""
    from ..source.ellcurve import curve_from_ainvs

    from ..io import read_text_lines

    name = display or path
    try:
        size = os.path.getsize(path)
    except OSError as exc:
        raise BadInput(f"{name}: cannot read ({exc.strerror or exc})") from None
    if size > MAX_CURVES_FILE:
        raise BadInput(f"{name}: {size} bytes; a curves file is at most 10 MB")
    lines = read_text_lines(path, name)
    out, errors = [], []
    for no, line in enumerate(lines, start=1):
        body, _, note = line.partition("#")
        body = body.strip()
        if not body:
            continue
        try:
            if len(body) > 400:
                raise BadInput("a curve line is at most 400 characters")
            E = curve_from_ainvs(body)
        except BadInput as exc:
            errors.append(f"{name}:{no}: {exc}")
            continue
        out.append(CurveLine(tuple(E.ainvs), f"{name}:{no}", note.strip()))
    if errors:
        import sys

        for e in errors:
            print(f"certify: error: {e}", file=sys.stderr)
        raise BadInput(f"{name}: {len(errors)} bad line(s) (first: {errors[0]}); nothing computed")
    if not out:
        raise BadInput(f"{name}: no curve in the file (expected lines [a1,a2,a3,a4,a6])")
    return out


def certificate_name(ainvs) -> str:
    """A file base name that keeps the signs: [0,-1,1,-10,-20] -> E_0_m1_1_m10_m20."""
    return "E_" + "_".join(str(a).replace("-", "m") for a in ainvs)


def _certify_one(ainvs: tuple, digits: int) -> str:
    """The certificate (JSON text) of one curve; run in a worker process."""
    from ..certificate.ecq import certify_ecq

    return certify_ecq(list(ainvs), digits)[1].to_json()


def _reusable(path: str, ainvs: tuple, digits: int) -> bool:
    try:
        with open(path, encoding="utf-8") as fh:
            d = json.load(fh)
        return (d.get("kind") == "ecq-race" and tuple(d["question"]["ainvs"]) == tuple(ainvs)
                and d["parameters"]["digits"] == digits)
    except (OSError, ValueError, KeyError, TypeError):
        return False


@dataclass
class CurveRow:
    line: CurveLine
    certificate: str  # relative to the output folder
    sha256: str = ""
    data: dict | None = None
    error: str = ""

    @property
    def certified(self) -> bool:
        return self.data is not None

    def ends(self) -> tuple[Fraction, Fraction]:
        e = self.data["answer"]["enclosure"]
        return Fraction(e["lower"]), Fraction(e["upper"])

    def bias(self) -> tuple[Fraction, Fraction]:
        """Enclosure of |delta - 1/2|."""
        lo, hi = self.ends()
        half = Fraction(1, 2)
        a, b = lo - half, hi - half
        if a <= 0 <= b:
            return Fraction(0), max(-a, b)
        return (min(abs(a), abs(b)), max(abs(a), abs(b)))


def run_curve_table(curves: list[CurveLine], digits: int, out: str, workers: int | None = None,
                    command_line: str = "", show_progress: bool = False) -> dict:
    """Certify every curve (reusing certificates already written) and write the tables."""
    from ..commands.options import progress

    cert_dir = os.path.join(out, "certificates")
    os.makedirs(cert_dir, exist_ok=True)
    t0 = time.time()
    rows, todo, seen = [], [], {}
    for c in curves:
        rel = os.path.join("certificates", certificate_name(c.ainvs) + ".json")
        row = CurveRow(c, rel)
        rows.append(row)
        if rel in seen:
            continue
        seen[rel] = row
        if not _reusable(os.path.join(out, rel), c.ainvs, digits):
            todo.append(row)
    reused = len(seen) - len(todo)
    workers = max(1, min(workers or (os.cpu_count() or 1), len(todo) or 1))
    with progress(len(todo), "curves", show_progress, "curves") as bar:
        if workers == 1:
            for row in todo:
                _store(row, out, lambda: _certify_one(row.line.ainvs, digits))
                bar.update(1)
        else:
            from concurrent.futures import ProcessPoolExecutor

            with ProcessPoolExecutor(workers) as ex:
                futs = {ex.submit(_certify_one, r.line.ainvs, digits): r for r in todo}
                for f, row in futs.items():
                    _store(row, out, f.result)
                    bar.update(1)
    for row in rows:
        if row.error:
            continue
        path = os.path.join(out, row.certificate)
        if not os.path.exists(path):
            row.error = seen[row.certificate].error or "no certificate"
            continue
        with open(path, "rb") as fh:
            raw = fh.read()
        row.sha256 = hashlib.sha256(raw).hexdigest()
        row.data = json.loads(raw)
    files = write_curve_tables(out, rows, digits, command_line)
    failures = [{"curve": list(r.line.ainvs), "source": r.line.source, "error": r.error}
                for r in rows if not r.certified]
    not_met = sum(1 for r in rows if r.certified and not r.data["answer"]["target_met"])
    return {"curves": len(rows), "computed": len(todo), "reused": reused, "digits": digits,
            "files": files, "failures": failures, "missing": [], "not_met": not_met,
            "timings_seconds": {"total": round(time.time() - t0, 3)}}


def _store(row: CurveRow, out: str, compute) -> None:
    try:
        text = compute()
    except CertifyError as exc:
        row.error = str(exc)
        return
    write_atomic(os.path.join(out, row.certificate), text)


def ranked(rows: list[CurveRow]) -> list[tuple[CurveRow, bool]]:
    """Certified rows by bias (largest first), each with "order vs the previous row certified"."""
    ok = sorted((r for r in rows if r.certified),
                key=lambda r: (-(sum(r.bias()) / 2), r.data["spectrum"]["curve"]["conductor"],
                               r.line.source))
    out = []
    for i, r in enumerate(ok):
        sure = i == 0 or ok[i - 1].bias()[0] > r.bias()[1]
        out.append((r, sure))
    return out


def _rank_text(data: dict) -> tuple[int, str]:
    rk = data["spectrum"]["analytic_rank"]
    if rk["certified"]:
        return rk["value"], "certified"
    if any(h["name"] == "rank" and h["status"] == "theorem" for h in data["hypotheses"]):
        return rk["value"], f"published theorem; <= {rk['upper_bound']} proven here"
    return rk["value"], f"assumed; <= {rk['upper_bound']} proven"


def _small_side(lo: Fraction, hi: Fraction) -> str:
    """min(delta, 1 - delta) in scientific notation, rounded outward, when it is below 1/100."""
    if lo > Fraction(99, 100):
        a, b, what = 1 - hi, 1 - lo, "1-delta"
    elif hi < Fraction(1, 100):
        a, b, what = lo, hi, "delta"
    else:
        return ""
    from .tables import sci_interval, sci_parts

    parts = sci_parts(a, b) if a > 0 else None
    if parts is not None and len(parts[0].replace(".", "")) >= 3:
        return f"{what} = {parts[0]}e{parts[1]}"
    x, y, e = sci_interval(a, b)
    return f"{what} in [{x}, {y}]e{e}"


def _row_fields(r: CurveRow) -> dict:
    sp = r.data["spectrum"]
    E = sp["curve"]
    lo, hi = r.ends()
    rank, status = _rank_text(r.data)
    return {"ainvs": "[" + ",".join(map(str, r.line.ainvs)) + "]",
            "minimal": "[" + ",".join(map(str, E["minimal_model"])) + "]",
            "conductor": E["conductor"], "rank": rank, "rank_status": status,
            "root_number": sp["analytic_rank"]["root_number"], "mean": sp["mean"],
            "lower": r.data["answer"]["enclosure"]["lower"],
            "upper": r.data["answer"]["enclosure"]["upper"],
            "digits": certified_digits(lo, hi) or f"[{decimal_down(lo, 12)}, {decimal_up(hi, 12)}]",
            "small": _small_side(lo, hi), "width": r.data["answer"]["width"],
            "target_met": r.data["answer"]["target_met"], "note": r.line.note}


CSV_FIELDS = ["order", "order_certified", "ainvs", "minimal_model", "conductor", "analytic_rank",
              "rank_status", "root_number", "mean", "lower", "upper", "width", "certified_digits",
              "small_side", "target_met", "certificate", "certificate_sha256", "source", "note",
              "status", "conditional_on"]
CSV_CONDITION = "GRH and LI for L(E, s) (assumed, not proven); the rank where marked assumed"


def render_csv(rows: list[CurveRow]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_FIELDS)
    for i, (r, sure) in enumerate(ranked(rows), 1):
        f = _row_fields(r)
        w.writerow([i, "yes" if sure else "no", f["ainvs"], f["minimal"], f["conductor"], f["rank"],
                    f["rank_status"], f["root_number"], f["mean"], f["lower"], f["upper"],
                    f["width"], f["digits"], f["small"], "yes" if f["target_met"] else "no",
                    r.certificate, r.sha256, r.line.source, f["note"], "certified", CSV_CONDITION])
    for r in rows:
        if not r.certified:
            w.writerow(["", "", "[" + ",".join(map(str, r.line.ainvs)) + "]", "", "", "", "", "",
                        "", "", "", "", "", "", "no", "", "", r.line.source, r.line.note,
                        f"not certified: {r.error}", CSV_CONDITION])
    return buf.getvalue()


def render_markdown(rows: list[CurveRow], digits: int, command_line: str = "") -> str:
    lines = ["# The bias of Frobenius traces: curves ranked by |delta - 1/2|", "",
             f"> {HYPOTHESES_NOTE}", ">",
             f"> delta = the logarithmic density of x with sum_(p<=x) a_p/sqrt(p) > 0. Digits shown "
             f"are common to every point of the certified enclosure (truncated). Target width "
             f"1e-{digits}; `*` marks a row where it was not met. {ORDER_NOTE}", "",
             "| # | E | N | rank | eps | mean 1-2r | delta | small side | certificate |",
             "|---:|---|---:|---|---:|---:|---|---|---|"]
    for i, (r, sure) in enumerate(ranked(rows), 1):
        f = _row_fields(r)
        mark = "" if f["target_met"] else "*"
        order = f"{i}" if sure else f"~{i}"
        lines.append(f"| {order} | {f['ainvs']} | {f['conductor']} | {f['rank']} ({f['rank_status']}) "
                     f"| {f['root_number']:+d} | {f['mean']} | {f['digits']}{mark} | {f['small']} "
                     f"| [{os.path.basename(r.certificate)}]({r.certificate}) |")
    bad = [r for r in rows if not r.certified]
    if bad:
        lines += ["", "Not certified:", ""]
        lines += [f"- {r.line.source} [{','.join(map(str, r.line.ainvs))}]: {r.error}" for r in bad]
    if command_line:
        lines += ["", f"Produced by `{command_line}`."]
    return "\n".join(lines) + "\n"


def _tex(s: str) -> str:
    return s.replace("&", r"\&").replace("%", r"\%").replace("_", r"\_").replace("#", r"\#")


def render_latex(rows: list[CurveRow], digits: int) -> str:
    lines = ["% certify curve table: needs \\usepackage{booktabs,longtable}",
             "% " + HYPOTHESES_NOTE,
             "% The comment after each row names its certificate and that file's SHA-256.",
             r"\begin{longtable}{rlrrrrll}", r"\toprule",
             r"\# & $E$ & $N$ & $r$ & $\varepsilon$ & $1-2r$ & $\delta$ & small side \\",
             r"\midrule", r"\endhead", r"\bottomrule", r"\endfoot"]
    for i, (r, sure) in enumerate(ranked(rows), 1):
        f = _row_fields(r)
        rank = f"{f['rank']}" + ("" if f["rank_status"] == "certified" else r"$^{\dagger}$")
        mark = "" if f["target_met"] else r"$^{*}$"
        small = f["small"].replace("1-delta", r"$1-\delta$").replace("delta", r"$\delta$")
        order = str(i) if sure else r"$\sim$" + str(i)
        lines.append(f"{order} & ${f['ainvs']}$ & {f['conductor']} & {rank} & "
                     f"${f['root_number']:+d}$ & ${f['mean']}$ & {f['digits']}{mark} & {small} \\\\ "
                     f"% {r.certificate} sha256={r.sha256[:16]}")
    lines.append(r"\end{longtable}")
    lines.append(r"\par\noindent{\footnotesize " + _tex(HYPOTHESES_NOTE) + " " + _tex(ORDER_NOTE)
                 + r" $\delta$: the logarithmic density of $x$ with $\sum_{p\le x} a_p/\sqrt{p} > 0$;"
                 + rf" target width $10^{{-{digits}}}$ ($^{{*}}$: not met); $^{{\dagger}}$: rank "
                 r"assumed (upper bound and parity proven).}")
    return "\n".join(lines) + "\n"


def write_curve_tables(out: str, rows: list[CurveRow], digits: int, command_line: str = "") -> dict:
    """table.{csv,md,tex} and the index table.json; returns {kind: relative path}."""
    from ..certificate.model import envelope

    files = {"table_csv": "table.csv", "table_md": "table.md", "table_tex": "table.tex",
             "table_index": "table.json"}
    write_atomic(os.path.join(out, files["table_csv"]), render_csv(rows))
    write_atomic(os.path.join(out, files["table_md"]), render_markdown(rows, digits, command_line))
    write_atomic(os.path.join(out, files["table_tex"]), render_latex(rows, digits))
    index = []
    for r, _ in ranked(rows):
        e = r.data["answer"]["enclosure"]
        index.append({"label": r.data["question"]["label"], "lower": e["lower"], "upper": e["upper"],
                      "certificate": r.certificate.replace(os.sep, "/"),
                      "equals": r.data["question"]["label"], "flip": False, "relation": "computed"})
    write_atomic(os.path.join(out, files["table_index"]), json.dumps(envelope("table", {
        "title": "elliptic curves over Q: bias of Frobenius traces", "rows": index,
        "note": "each row names the certificate it comes from; `certify verify table.json` "
                "recounts every certificate and checks every row against it"}), indent=1) + "\n")
    return files


__all__ = ["read_curves", "run_curve_table", "write_curve_tables", "certificate_name", "ranked"]
