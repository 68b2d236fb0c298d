"""Tables of a batch: LaTeX (booktabs), CSV, Markdown, and the most biased races.

Rows are built from the result files only (nothing is recomputed), from the
enclosures they store, which are rounded outward.  A density is shown by
its *certified digits*: the decimal digits shared by every point of the
enclosure (truncated, not rounded).  When delta is close to 1 the table also
gives 1 - delta in scientific notation, again with only the digits common to
the whole enclosure of 1 - delta; when the enclosure straddles a digit
boundary (for instance delta = 1/2 exactly, a race with mean 0), the
enclosure itself is printed, rounded outward.

The reverse race delta(q; b, a) = 1 - delta(q; a, b) is exact (under LI the
limit law has no atom at 0), so it is listed with the same certificate.
Every row names the result file it comes from and that file's SHA-256.
"""

from __future__ import annotations

import csv
import functools
import hashlib
import io
import math
import os
from dataclasses import dataclass
from fractions import Fraction

from ..arith import certified_digits, decimal_down, decimal_up, fraction_text, sci_up
from ..errors import Inconsistent
from ..io import write_atomic

CLOSE_TO_ONE = Fraction(99, 100)
HYPOTHESES_NOTE = ("Every density is conditional on the generalised Riemann hypothesis (GRH) "
                   "for the Dirichlet L-functions used and on the linear independence "
                   "hypothesis (LI); certify gathers evidence for both and proves neither. "
                   "Each result file lists the hypotheses with their evidence.")
DIGITS_NOTE = ("Digits shown are common to every point of the certified enclosure "
               "(truncated, not rounded); an interval is shown where no digit is common; "
               "a fraction marked exact is the proven value (mean 0: the limit law is "
               "symmetric, so delta = 1/2).")


@dataclass
class Row:
    q: int
    kind: str
    a: int | None
    b: int | None
    label: str
    lower: Fraction | None
    upper: Fraction | None
    target_met: bool
    mean: str
    source: str  # result file, relative to the output folder
    sha256: str
    derived: bool = False
    error: str = ""
    exact: Fraction | None = None  # the density when known exactly (e.g. 1/2 for mean 0)
    equals: str = ""  # the computed race this row equals (by an exact symmetry)
    relation: str = ""  # why

    @property
    def certified(self) -> bool:
        return self.lower is not None

    @property
    def latex_label(self) -> str:
        if self.kind == "two-way":
            return rf"$\delta({self.q};{self.a},{self.b})$"
        if self.kind == "residues":
            return rf"$\delta({self.q};N,R)$"
        return self.label.replace("_", r"\_").replace("#", r"\#")


def _file_digest(path: str) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        h.update(fh.read())
    return h.hexdigest()


def rows_from_equivalences(out: str, ordered, equivalences) -> list[Row]:
    """One row per :class:`certify.batch.symmetry.Equivalence`, from the computed results.

    A row equal to a computed race by an exact symmetry carries that race's
    enclosure (or 1 minus it, endpoints swapped, for a reversed race), its result
    file and digest, and says which race it equals and why.  Computed races that
    no row names (extra races) get their own rows as before.
    """
    from ..race.question import residue_race, two_way
    from .plan import RaceItem
    from .run import result_path

    by_slug = {it.slug: (it, d) for it, d in ordered}
    rows = []
    named = set()
    digests: dict = {}
    parsed: dict = {}  # slug -> (lo, hi, mean, exact, path, rel): ~45 rows share one race
    for e in equivalences:
        tq = (residue_race(e.target_q) if e.target_a is None
              else two_way(e.target_q, e.target_a, e.target_b))
        slug = RaceItem(tq).slug
        named.add(slug)
        it, d = by_slug.get(slug, (RaceItem(tq), None))
        kind = "residues" if e.a is None else "two-way"
        label = f"delta({e.q};N,R)" if e.a is None else f"delta({e.q};{e.a},{e.b})"
        got = parsed.get(slug)
        if got is None:
            path = result_path(out, it)
            rel = os.path.relpath(path, out)
            if d is not None:
                ex = (d["density"].get("exact") or {}).get("value")
                got = (Fraction(d["density"]["lower"]), Fraction(d["density"]["upper"]),
                       Fraction(d["mean"]) if d.get("mean") else None,
                       Fraction(ex) if ex else None, path, rel)
            else:
                got = (None, None, None, None, path, rel)
            parsed[slug] = got
        lo, hi, mean, exact, path, rel = got
        if d is None:
            rows.append(Row(e.q, kind, e.a, e.b, label, None, None, False, "", rel, "",
                            derived=not e.is_identity, error="not certified (see batch.json)",
                            equals=e.target_label, relation=e.reason))
            continue
        if e.flip:
            lo, hi = 1 - hi, 1 - lo
            mean = -mean if mean is not None else None
            exact = None if exact is None else 1 - exact
        if path not in digests:
            digests[path] = _file_digest(path) if os.path.exists(path) else ""
        rows.append(Row(e.q, kind, e.a, e.b, label, lo, hi, bool(d["density"]["target_met"]),
                        str(mean) if mean is not None else "", rel, digests[path],
                        derived=not e.is_identity, exact=exact, equals=e.target_label,
                        relation=e.reason))
    rest = [(it, d) for it, d in ordered if it.slug not in named]
    return rows + rows_from_results(out, rest)


def rows_from_results(out: str, ordered, reverse: bool = True) -> list[Row]:
    """Rows for (item, result dict or None) pairs; reverse two-way races added if asked."""
    from .run import result_path

    rows = []
    for it, d in ordered:
        qn = it.question
        a, b = (qn.classes if qn.kind == "two-way" else (None, None))
        path = result_path(out, it)
        rel = os.path.relpath(path, out)
        if d is None:
            rows.append(Row(qn.modulus, qn.kind, a, b, qn.label, None, None, False, "", rel, "",
                            error="not certified (see batch.json)"))
            continue
        lo, hi = Fraction(d["density"]["lower"]), Fraction(d["density"]["upper"])
        digest = _file_digest(path) if os.path.exists(path) else ""
        met = bool(d["density"]["target_met"])
        ex = (d["density"].get("exact") or {}).get("value")
        exact = Fraction(ex) if ex else None
        if exact is not None and not lo <= exact <= hi:
            raise Inconsistent(f"{rel}: the exact value {ex} lies outside the stored enclosure")
        rows.append(Row(qn.modulus, qn.kind, a, b, qn.label, lo, hi, met, d.get("mean", ""), rel,
                        digest, exact=exact))
        if reverse and qn.kind == "two-way":
            mean = str(-Fraction(d["mean"])) if d.get("mean") else ""
            rows.append(Row(qn.modulus, qn.kind, b, a, f"delta({qn.modulus};{b},{a})", 1 - hi,
                            1 - lo, met, mean, rel, digest, derived=True,
                            exact=None if exact is None else 1 - exact, equals=qn.label,
                            relation=f"reverse race: 1 - {qn.label}"))
    return rows


def _floor_log10(x: Fraction) -> int:
    e = math.floor(math.log10(float(x))) if x > 0 else 0
    while Fraction(10) ** e > x:
        e -= 1
    while Fraction(10) ** (e + 1) <= x:
        e += 1
    return e


def density_text(lo: Fraction, hi: Fraction, places: int, exact: Fraction | None = None) -> str:
    """The exact value, or certified digits of [lo, hi], or the interval rounded outward."""
    if exact is not None:
        return fraction_text(exact)
    d = certified_digits(lo, hi)
    if "." in d and len(d.split(".")[1]) >= 1:
        return d
    return f"[{decimal_down(lo, places)}, {decimal_up(hi, places)}]"


def sci_parts(lo: Fraction, hi: Fraction, sig: int = 12) -> tuple[str, int] | None:
    """(mantissa digits, exponent) common to every x in [lo, hi] (0 < lo <= hi), or None."""
    if lo <= 0:
        return None
    e = _floor_log10(hi)
    if _floor_log10(lo) != e:
        return None
    scale = Fraction(10) ** (-e)
    d = certified_digits(lo * scale, hi * scale, max_digits=sig)
    if not d:
        return None
    return d, e


def sci_interval(lo: Fraction, hi: Fraction, sig: int = 3) -> tuple[str, str, int]:
    """[lo, hi] as two mantissas with one exponent, rounded outward."""
    e = _floor_log10(hi) if hi > 0 else 0
    scale = Fraction(10) ** (-e)
    return decimal_down(lo * scale, sig), decimal_up(hi * scale, sig), e


def one_minus_text(row: Row, latex: bool) -> str:
    """1 - delta in scientific notation where delta is close to 1 (else empty)."""
    if not row.certified or row.lower < CLOSE_TO_ONE or row.exact is not None:
        return ""
    return _one_minus_text(row.lower, row.upper, latex)


@functools.lru_cache(maxsize=1 << 15)
def _one_minus_text(lower: Fraction, upper: Fraction, latex: bool) -> str:
    # memoised: the rows a table reads from one race share its enclosure
    lo, hi = 1 - upper, 1 - lower
    if lo <= 0:
        return ""
    parts = sci_parts(lo, hi)
    if parts is not None:
        m, e = parts
        return rf"${m} \times 10^{{{e}}}$" if latex else f"{m}e{e}"
    a, b, e = sci_interval(lo, hi)
    return rf"$[{a}, {b}] \times 10^{{{e}}}$" if latex else f"[{a}, {b}]e{e}"


def _mark(row: Row) -> str:
    if row.exact is not None:
        return " (exact)"
    return "" if row.target_met else "*"


def leader_first(rows: list[Row]) -> list[Row]:
    """One row per two-way race, oriented so the leading class comes first (delta > 1/2).

    A race whose enclosure contains 1/2 keeps the order a < b.  Other kinds pass.
    """
    out = []
    for r in rows:
        if r.kind != "two-way":
            out.append(r)
            continue
        if not r.certified:
            if not r.derived:
                out.append(r)
            continue
        half = Fraction(1, 2)
        contains_half = r.lower <= half <= r.upper
        if contains_half:
            if not r.derived:
                out.append(r)
        elif r.lower > half:
            out.append(r)
    return out


def _s_cell(text: str) -> str:
    """A cell of a siunitx S column: a plain decimal aligns on its point; anything else is braced."""
    import re

    if re.fullmatch(r"\d+\.\d+", text):
        return text
    return "{" + text + "}"


def render_latex(rows: list[Row], digits: int, caption: str = "") -> str:
    """A longtable (booktabs rules, siunitx decimal alignment).

    Needs ``\\usepackage{booktabs,longtable,siunitx}``.
    """
    lines = [
        "% certify batch table: needs \\usepackage{booktabs,longtable,siunitx}",
        "% " + HYPOTHESES_NOTE,
        "% " + DIGITS_NOTE,
        "% The comment after each row names its result file and that file's SHA-256.",
        rf"\begin{{longtable}}{{rlS[table-format=1.{max(digits, 1) + 2}]l}}",
    ]
    if caption:
        lines.append(rf"\caption{{{caption}}}\\")
    head = r"$q$ & race & {$\delta$} & $1-\delta$ \\"
    lines += [r"\toprule", head, r"\midrule", r"\endfirsthead", r"\toprule", head, r"\midrule",
              r"\endhead", r"\bottomrule", r"\endfoot"]
    for r in rows:
        if r.certified:
            dtext = density_text(r.lower, r.upper, digits, r.exact)
            if r.exact is not None:
                dcell = "{$" + dtext + "$ (exact)}"
            else:
                dcell = dtext if _s_cell(dtext) == dtext else "{$" + dtext + "$}"
            omt = one_minus_text(r, True)
        else:
            dcell, omt = "{not certified}", ""
        if r.certified and not r.target_met and r.exact is None:  # marked: set as text, not aligned
            dcell = "{" + (dcell[1:-1] if dcell.startswith("{") else dcell) + r"$^{*}$}"
        lines.append(f"{r.q} & {r.latex_label} & {dcell} & {omt} \\\\ % {getattr(r, 'certificate', '') or r.source} "
                     f"sha256={r.sha256[:16]}{' (reverse race: 1 - delta)' if r.derived else ''}")
    lines.append(r"\end{longtable}")
    lines.append(r"\par\noindent{\footnotesize " + _latex_escape(HYPOTHESES_NOTE) + " "
                 + _latex_escape(DIGITS_NOTE)
                 + rf" Target width $10^{{-{digits}}}$; $^{{*}}$ marks a race where it was not met "
                 "(the certified enclosure is shown).}")
    return "\n".join(lines) + "\n"


def _latex_escape(s: str) -> str:
    return s.replace("&", r"\&").replace("%", r"\%").replace("_", r"\_")


def render_latex_ranking(rows: list[Row], digits: int) -> str:
    lines = [
        "% certify batch: the most biased races; needs \\usepackage{booktabs,siunitx}",
        "% " + HYPOTHESES_NOTE,
        rf"\begin{{tabular}}{{rrlS[table-format=1.{max(digits, 1) + 2}]l}}",
        r"\toprule",
        r"rank & $q$ & race & {$\delta$} & $1-\delta$ \\",
        r"\midrule",
    ]
    for i, r in enumerate(rows, 1):
        dtext = density_text(r.lower, r.upper, digits, r.exact)
        if r.exact is not None:
            dcell = "{$" + dtext + "$ (exact)}"
        elif not r.target_met:
            dcell = "{$" + dtext + "$$^{*}$}"
        else:
            dcell = _s_cell(dtext) if _s_cell(dtext) == dtext else "{$" + dtext + "$}"
        lines.append(f"{i} & {r.q} & {r.latex_label} & {dcell} & {one_minus_text(r, True)} \\\\ % {r.source} sha256={r.sha256[:16]}")
    lines += [r"\bottomrule", r"\end{tabular}"]
    return "\n".join(lines) + "\n"


def render_markdown(rows: list[Row], digits: int, title: str) -> str:
    lines = [f"# {title}", "", f"> {HYPOTHESES_NOTE}", ">", f"> {DIGITS_NOTE} Target width "
             f"1e-{digits}; `*` marks a race where it was not met.", "",
             "| q | race | delta | 1 - delta | certificate |", "|---:|---|---|---|---|"]
    for r in rows:
        if r.certified:
            d = density_text(r.lower, r.upper, digits, r.exact) + _mark(r)
            om = one_minus_text(r, False)
        else:
            d, om = "not certified", ""
        cert = getattr(r, "certificate", "") or r.source
        src = f"[{os.path.basename(cert)}]({cert})" + (" (1 - delta)" if r.derived else "")
        lines.append(f"| {r.q} | {r.label} | {d} | {om} | {src} |")
    return "\n".join(lines) + "\n"


CSV_FIELDS = ["q", "kind", "a", "b", "race", "lower", "upper", "width", "certified_digits",
              "one_minus_delta", "target_met", "mean", "derived", "result_file", "result_sha256",
              "status", "exact", "equals", "relation", "conditional_on"]
CSV_CONDITION = "GRH and LI for the L-functions used (assumed, not proven)"


@functools.lru_cache(maxsize=1 << 15)
def _csv_numbers(lo: Fraction, hi: Fraction) -> tuple[str, str, str, str]:
    """(lower, upper, width, certified digits) cells of an enclosure, memoised (the rows a
    table reads from one race share it)."""
    return (decimal_down(lo, 30).rstrip("0"), decimal_up(hi, 30).rstrip("0"),
            sci_up(hi - lo, 4), certified_digits(lo, hi))


def render_csv(rows: list[Row]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_FIELDS)  # the header on the first line; the caution in every row
    for r in rows:
        if r.certified:
            lower, upper, width, common = _csv_numbers(r.lower, r.upper)
            w.writerow([r.q, r.kind, r.a if r.a is not None else "", r.b if r.b is not None else "",
                        r.label, lower, upper, width, common, one_minus_text(r, False),
                        "yes" if r.target_met else "no", r.mean, "yes" if r.derived else "no",
                        r.source, r.sha256, "certified",
                        fraction_text(r.exact) if r.exact is not None else "", r.equals, r.relation,
                        CSV_CONDITION])
        else:
            w.writerow([r.q, r.kind, r.a or "", r.b or "", r.label, "", "", "", "", "", "no", "",
                        "yes" if r.derived else "no", r.source, "", r.error, "", r.equals,
                        r.relation, CSV_CONDITION])
    return buf.getvalue()


def ranking(rows: list[Row], top: int) -> list[Row]:
    """The ``top`` races with the largest certified lower bound for delta (all orientations).

    Rows that are one law (one result file read in one orientation) are listed once.
    """
    # the same law read several times (symmetric classes, or the same race at q and 2q)
    # is one result file in one orientation: list it once, by its row of least modulus
    # (then label); one row per law is chosen first, so only those few are sorted exactly
    first: dict = {}
    for r in rows:
        if not r.certified:
            continue
        key = (r.source, r.lower, r.upper)
        best = first.get(key)
        if best is None or (r.q, r.label) < (best.q, best.label):
            first[key] = r
    out = sorted(first.values(), key=lambda r: (-r.lower, r.q, r.label))
    return out[:top]


@functools.lru_cache(maxsize=1 << 15)
def _one_minus(x: str) -> str:
    from decimal import Decimal, localcontext

    with localcontext() as ctx:
        ctx.prec = len(x) + 10
        return str(Decimal(1) - Decimal(x))


def certificate_index(out: str, rows: list, known: dict | None = None) -> list:
    """Rows of the table index: each names its certificate and shows the certificate's
    enclosure (or 1 minus it, ends swapped, for a row equal to a reversed race).  A row
    whose result has a certificate names that file in every table instead of the result.

    ``known`` maps the paths of certificates this run wrote to their enclosure and label
    (as read back they would be); any other certificate is read from its file."""
    import json

    index = []
    # path -> (enclosure, label): rows read by symmetry share a certificate
    read: dict = dict(known or {})
    ends: dict = {}  # path -> midpoint of the certificate's enclosure
    for row in rows:
        if row.lower is None or not row.source.startswith("results" + os.sep):
            continue
        rel = os.path.join("certificates", row.source[len("results" + os.sep):])
        path = os.path.join(out, rel)
        if path not in read:
            if not os.path.exists(path):
                read[path] = None
            else:
                with open(path, encoding="utf-8") as fh:
                    c = json.load(fh)
                read[path] = {"answer": {"enclosure": c["answer"]["enclosure"]},
                              "question": {"label": c["question"]["label"]}}
        cert = read[path]
        if cert is None:
            continue
        enc = cert["answer"]["enclosure"]
        if path not in ends:
            ends[path] = (Fraction(enc["lower"]) + Fraction(enc["upper"])) / 2
        cmid = ends[path]
        mid = (row.lower + row.upper) / 2
        # a row equal to the reversed race shows 1 - delta; ties (delta = 1/2) need the labels
        flip = (row.label != cert["question"]["label"]
                and abs(mid - (1 - cmid)) <= abs(mid - cmid))
        lower, upper = ((_one_minus(enc["upper"]), _one_minus(enc["lower"])) if flip
                        else (enc["lower"], enc["upper"]))
        index.append({"label": row.label, "lower": lower, "upper": upper, "certificate": rel,
                      "equals": cert["question"]["label"], "flip": flip,
                      "relation": row.relation or "computed"})
        row.certificate = rel  # the tables name it (the CSV keeps the result file and digest)
    return index


def write_tables(out: str, ordered, digits: int, top: int = 20, command_line: str = "",
                 equivalences=None, certificates: dict | None = None) -> dict:
    """Write table.{tex,csv,md} and ranking.{tex,md,csv}; returns {kind: path}.

    With ``equivalences`` (:func:`certify.batch.plan.table_equivalences`) every row is
    read from the computed race it equals by an exact symmetry.
    """
    rows = (rows_from_equivalences(out, ordered, equivalences) if equivalences is not None
            else rows_from_results(out, ordered))
    index = certificate_index(out, rows, certificates)
    shown = leader_first(rows)
    best = ranking(rows, top)
    files = {
        "table_tex": os.path.join(out, "table.tex"),
        "table_csv": os.path.join(out, "table.csv"),
        "table_md": os.path.join(out, "table.md"),
        "ranking_tex": os.path.join(out, "ranking.tex"),
        "ranking_md": os.path.join(out, "ranking.md"),
        "ranking_csv": os.path.join(out, "ranking.csv"),
        "table_index": os.path.join(out, "table.json"),
    }
    import json

    from ..certificate.model import envelope

    # one row per line (each row by the C encoder): readable, and fast for 10^5 rows
    head = json.dumps(envelope("table", {
        "title": "prime races", "rows": [],
        "note": "each row names the certificate it comes from; `certify verify table.json` "
                "re-checks every certificate and every row against it"}), indent=1)
    body = ",\n  ".join(json.dumps(r, ensure_ascii=False) for r in index)
    text = head.replace('"rows": []', '"rows": [\n  ' + body + "\n ]" if index else '"rows": []', 1)
    write_atomic(files["table_index"], text + "\n")
    moduli = sorted({r.q for r in rows})
    span = f"{moduli[0]}..{moduli[-1]}" if moduli else ""
    write_atomic(files["table_tex"], render_latex(shown, digits))
    write_atomic(files["table_csv"], render_csv(rows))
    md = render_markdown(shown, digits, f"Prime races modulo q = {span}")
    if command_line:
        md += f"\nProduced by `{command_line}`.\n"
    write_atomic(files["table_md"], md)
    write_atomic(files["ranking_tex"], render_latex_ranking(best, digits))
    write_atomic(files["ranking_md"], render_markdown(best, digits,
                                                      f"The {len(best)} most biased races, q = {span}"))
    write_atomic(files["ranking_csv"], render_csv(best))
    return {k: os.path.relpath(v, out) for k, v in files.items()}
