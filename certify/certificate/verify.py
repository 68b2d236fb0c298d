"""Independent re-verification of a certificate from the data it stores.

``verify_certificate`` trusts no stored conclusion.  It rebuilds the race
from the question, re-certifies every stored zero by the signs of the Hardy
Z-function at the two ends of its enclosure, recomputes the exact moments and
the residual sums and re-runs the residual checks, re-runs the density engine
on the verified spectrum and checks that the stored enclosure contains what
it finds, that every stored error bound is at least the recomputed one, and
that the printed digits and gaps follow from the stored enclosure.  The
evidence for the hypotheses is recomputed as well (central values, simple
zeros, completeness height, the integer-relation search), and GRH and LI must
both be listed as assumed.

It is faster than the original computation because it does not search for
zeros: two Z evaluations per zero instead of a scan and a refinement.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from fractions import Fraction

from ..arith import arb, certified_digits, workprec
from ..density.bessel import BesselVariable, ResidualGroup, density_enclosure
from ..errors import BadInput, CertifyError, Inconsistent
from ..race.question import (LI_KINDS, RaceQuestion, mean_of, prime_vs_li, residue_race,
                             riemann_hypothesis_name, spectral_groups, two_way, weighted)
from ..source.dirichlet import primitive_character
from ..spectrum.moments import central_value, zero_power_sums
from ..spectrum.spectrum import residual_checks, residual_sums
from ..spectrum.zeros import HardyZ
from .evidence import exact_ends, moment_consequences, relation_search
from .model import Certificate, ball_of

REQUIRED_HYPOTHESES = ("GRH", "LI")  # for Dirichlet races; the zeta race needs RH and LI


def required_hypotheses(question: RaceQuestion) -> tuple:
    return (riemann_hypothesis_name(question), "LI")


@dataclass
class Check:
    """One re-check: what, whether it passed, and the detail of a mismatch."""

    name: str
    ok: bool
    detail: str = ""


@dataclass
class VerifyReport:
    """All checks run on one certificate, with the time taken."""

    label: str
    checks: list = field(default_factory=list)
    seconds: float = 0.0
    original_seconds: float | None = None
    z_evaluations: int = 0

    @property
    def ok(self) -> bool:
        return bool(self.checks) and all(c.ok for c in self.checks)

    @property
    def failures(self) -> list:
        return [c for c in self.checks if not c.ok]

    def add(self, name: str, ok: bool, detail: str = "") -> bool:
        self.checks.append(Check(name, bool(ok), detail))
        return bool(ok)

    @property
    def speedup(self) -> float | None:
        if self.original_seconds and self.seconds > 0:
            return self.original_seconds / self.seconds
        return None


def _q(x: Fraction) -> arb:
    with workprec(max(64, x.numerator.bit_length() + x.denominator.bit_length() + 8)):
        return arb(x.numerator) / x.denominator


def question_from_record(rec) -> RaceQuestion:
    """Rebuild the race from the stored question (BadInput if it is not a valid race)."""
    kind = rec["kind"]
    q = rec["modulus"]
    if kind == "two-way":
        a, b = rec["classes"]
        return two_way(q, a, b)
    if kind == "residues":
        return residue_race(q)
    if kind == "weighted":
        return weighted(q, {w["class"]: w["weight"] for w in rec["weights"]})
    if kind in LI_KINDS:
        if q != 1 or rec.get("classes") or rec.get("weights"):
            raise BadInput(f"the race {kind} has modulus 1 and no classes or weights")
        return prime_vs_li(kind)
    raise BadInput(f"unknown race kind {kind!r}")


def _sign_change(zf: HardyZ, lo: Fraction, hi: Fraction, conductor: int) -> tuple[int, int]:
    """Certified signs of Z at the exact ends lo and hi (0 when undecided)."""
    width = float(hi - lo) if hi > lo else 1e-30
    t = float(hi)
    prec = max(64, int(-math.log2(width)) + 24 + int(math.log2(2 + conductor * (t + 2))))
    s_lo = zf.sign(_q(lo), prec, 4 * prec)[0]
    s_hi = zf.sign(_q(hi), prec, 4 * prec)[0]
    return s_lo, s_hi


def _check_zero_list(report: VerifyReport, where: str, entries: list, keys: list,
                     height: Fraction | None) -> list | None:
    """Re-certify stored zeros; returns their balls (None on a failure)."""
    zfs = {}
    balls = []
    bad = []
    last_hi = {}
    for i, z in enumerate(entries):
        li = z["l"]
        if not (0 <= li < len(keys)):
            bad.append(f"zero {i}: unknown L-function index {li}")
            continue
        c, n = keys[li]
        zf = zfs.setdefault(li, HardyZ(c, n))
        b = ball_of(z, f"{where} zero {i}")
        lo, hi = exact_ends(b)
        if lo <= 0 or (height is not None and hi > height):
            bad.append(f"zero {i} ({float(lo):.12g}) outside (0, {float(height or 0):.6g}]")
        prev = last_hi.get(li)
        if prev is not None and lo <= prev:
            bad.append(f"zero {i} of L(s, chi_{{{c},{n}}}) overlaps the previous one "
                       "(not a distinct zero)")
        last_hi[li] = hi
        s_lo, s_hi = _sign_change(zf, lo, hi, c)
        if s_lo == 0 or s_hi == 0 or s_lo == s_hi:
            bad.append(f"zero {i} of L(s, chi_{{{c},{n}}}) at {float((lo + hi) / 2):.15g}: no "
                       f"certified sign change of Z across its enclosure (signs {s_lo}, {s_hi})")
        balls.append(b)
    report.z_evaluations += sum(zf.counter.calls for zf in zfs.values())
    ok = report.add(f"{where}: {len(entries)} zeros re-certified by sign changes of Z",
                    not bad, "; ".join(bad[:3]) + (f" (and {len(bad) - 3} more)" if len(bad) > 3 else ""))
    return balls if ok else None


def _contains(outer: arb, inner: arb) -> bool:
    ol, oh = exact_ends(outer)
    il, ih = exact_ends(inner)
    return ol <= il and ih <= oh


def verify_certificate(cert: Certificate) -> VerifyReport:
    """Re-check ``cert`` from its stored data; never raises on a mismatch (see the report).

    Returns
    -------
    VerifyReport
        ``report.ok`` is True only if every check passed.
    """
    t0 = time.time()
    report = VerifyReport(cert.label)
    try:
        _verify(cert, report)
    except CertifyError as exc:
        report.add("re-verification", False, f"{type(exc).__name__}: {exc}")
    except (KeyError, TypeError, ValueError, IndexError, ZeroDivisionError) as exc:
        report.add("re-verification", False, f"malformed certificate data ({type(exc).__name__}: {exc})")
    report.seconds = time.time() - t0
    timings = cert.provenance.get("timings_seconds", {})
    report.original_seconds = timings.get("total")
    return report


def _verify(cert: Certificate, report: VerifyReport) -> None:
    params = cert.parameters
    prec = int(params["working_precision_bits"])
    digits = int(params["digits_requested"])
    tau = 10.0 ** (-digits)

    # -- the question -------------------------------------------------------
    question = question_from_record(cert.question)
    report.add("question: race rebuilt from modulus and weights",
               question.label == cert.question["label"]
               and [{"class": a, "weight": str(w)} for a, w in question.weights]
               == [dict(w) for w in cert.question["weights"]],
               f"stored {cert.question['label']}, rebuilt {question.label}")
    mu = mean_of(question)
    report.add("answer: mean mu = -sum w_a c(q,a)", str(mu) == cert.answer["mean"],
               f"stored {cert.answer['mean']}, recomputed {mu}")
    ex = cert.answer.get("exact")
    if ex is not None or mu == 0:
        # docs/method.md, section 1b: the density is exactly 1/2 iff it is shown so for mean 0
        ok = (mu == 0 and ex is not None and ex.get("value") == "1/2"
              and cert.lower <= Fraction(1, 2) <= cert.upper)
        report.add("answer: exact value 1/2 exactly when the mean is 0 (symmetric law)", ok,
                   f"stored exact {ex.get('value') if ex else None!r}, recomputed mean {mu}")

    # -- spectrum: zeros, moments, residuals ---------------------------------
    stored_groups = cert.spectrum["groups"]
    weights, residuals, group_data = [], [], []
    all_ok = True
    with workprec(prec):
        groups = spectral_groups(question)
    if not report.add("spectrum: spectral groups match the question",
                      [list(map(list, g.primitive_keys)) for g in groups]
                      == [[[lf["conductor"], lf["label"]] for lf in sg["l_functions"]]
                          for sg in stored_groups],
                      "the stored L-functions are not those the race needs"):
        return
    for g, sg in zip(groups, stored_groups):
        keys = [tuple(k) for k in g.primitive_keys]
        T = float(sg["isolation_height"])
        zs = _check_zero_list(report, g.label, list(sg["zeros"]), keys, Fraction(T))
        if zs is None:
            all_ok = False
            continue
        with workprec(prec):
            report.add(f"{g.label}: scale 2|W(chi)|", _overlap(ball_of(sg["scale"]), g.scale),
                       "stored scale disagrees with the question")
        mom = sg["moments"]
        c0, n0 = keys[0]
        parity = primitive_character(c0, n0).parity
        S = zero_power_sums(c0, n0, parity, int(mom["source_count"]), int(mom["source_bits"]))
        div = 2 if g.is_real else 1
        K = int(mom["count"])
        with workprec(prec):
            target = [s / div for s in S[:K]]
        stored_t = [ball_of(b, f"{g.label} moment {k + 1}") for k, b in enumerate(mom["target_sums"])]
        bad = [k + 1 for k, (st, t) in enumerate(zip(stored_t, target)) if not _contains(st, t)]
        if len(stored_t) != K:
            bad.append("count")
        if not report.add(f"{g.label}: {K} exact moments recomputed from log Lambda",
                          not bad, f"stored moment(s) {bad[:5]} do not contain the recomputed value"):
            all_ok = False
            continue
        with workprec(prec):
            R = residual_sums(target, zs)
            try:
                notes = residual_checks(g.label, R, T, keys[0][0], len(keys))
                report.add(f"{g.label}: residual sums R_1..R_{K} and their checks", True)
            except Inconsistent as exc:
                report.add(f"{g.label}: residual sums and their checks", False, str(exc))
                all_ok = False
                continue
            stored_r = [ball_of(b) for b in mom.get("residual_sums", [])]
            report.add(f"{g.label}: stored residual sums agree with the recomputed ones",
                       len(stored_r) == K and all(_overlap(a, b) for a, b in zip(stored_r, R)),
                       "a stored residual sum is disjoint from the recomputed one")
            for z in zs:
                weights.append(g.scale / (arb(1) / 4 + z * z).sqrt())
            residuals.append(ResidualGroup(g.scale, tuple(R), g.label))
        group_data.append((g, sg, zs, R))
    if not all_ok:
        report.add("density: not re-run", False, "the spectrum did not verify")
        return

    # -- the density ---------------------------------------------------------
    with workprec(prec):
        variable = BesselVariable(arb(mu.numerator) / mu.denominator, tuple(weights),
                                  tuple(residuals))
    dens = density_enclosure(variable, tau, prec=prec)
    lo, hi = dens.enclosure.lower, dens.enclosure.upper
    s_lo, s_hi = cert.lower, cert.upper
    report.add("density: stored enclosure contains the recomputed one",
               s_lo <= lo and hi <= s_hi,
               f"stored [{cert.answer['enclosure']['lower']}, {cert.answer['enclosure']['upper']}], "
               f"recomputed [{float(lo):.17g}, {float(hi):.17g}]; the stored one is short by "
               f"{float(max(s_lo - lo, hi - s_hi)):.3e}")
    stored_budget = {e["name"]: e for e in cert.error_budget}
    names = [e.name for e in dens.budget]
    report.add("error budget: the same terms", sorted(names) == sorted(stored_budget),
               f"stored {sorted(stored_budget)}, recomputed {sorted(names)}")
    for e in dens.budget:
        st = stored_budget.get(e.name)
        ok = st is not None and _q(Fraction(st["bound"])) >= arb(e.bound.upper())
        report.add(f"error bound '{e.name}'", ok,
                   f"stored {st['bound'] if st else 'missing'}, recomputed {e.bound_float:.3e}")
    total = sum((arb(e.bound.upper()) for e in dens.budget), arb(0))
    report.add("final sum: stored width >= 2 x (aliasing + truncation + residual-zero bounds)",
               _q(s_hi - s_lo) >= 2 * (total - arb(dens.budget[-1].bound.upper())),
               "the stored width is smaller than the proven error allows")
    a = cert.answer
    digits_ok = a["certified_digits"] == certified_digits(s_lo, s_hi)
    report.add("answer: certified digits follow from the stored enclosure", digits_ok,
               f"stored {a['certified_digits']!r}, implied {certified_digits(s_lo, s_hi)!r}")
    gaps_ok = (Fraction(a["gap_to_one"]["lower"]) <= 1 - s_hi <= 1 - s_lo <= Fraction(a["gap_to_one"]["upper"])
               and Fraction(a["gap_to_half"]["lower"]) <= s_lo - Fraction(1, 2)
               and s_hi - Fraction(1, 2) <= Fraction(a["gap_to_half"]["upper"]))
    report.add("answer: gaps to 1/2 and to 1 enclose the stored ones", gaps_ok,
               "a printed gap does not contain the interval it describes")
    if question.is_li_race or "small_side" in a:
        from .build import small_side_record

        report.add("answer: the small side and its significant digits follow from the stored "
                   "enclosure", dict(a.get("small_side", {})) == small_side_record(s_lo, s_hi),
                   f"stored {dict(a.get('small_side', {}))}, implied {small_side_record(s_lo, s_hi)}")
    met = s_hi - s_lo <= Fraction(1, 10**digits)
    report.add("answer: target_met flag", bool(a["target_met"]) == met,
               f"stored {a['target_met']}, width {float(s_hi - s_lo):.3e} vs 1e-{digits}")

    # -- hypotheses ----------------------------------------------------------
    _verify_hypotheses(cert, report, group_data, prec, required_hypotheses(question))


def _overlap(a: arb, b: arb) -> bool:
    al, ah = exact_ends(a)
    bl, bh = exact_ends(b)
    return al <= bh and bl <= ah


def _verify_zero_count(report: VerifyReport, ev_grh, key: str, lf, zeros) -> None:
    """Re-run the argument-principle count claimed for one L-function."""
    from .zerocount import count_height, count_zeros

    e = next((e for e in ev_grh if e["kind"] == "zero-count" and e.get("l_function") == key), None)
    c0, n0 = (int(x) for x in key.split("."))
    name = (f"{'RH evidence for zeta(s)' if c0 == 1 else f'GRH evidence for L(s, chi_{{{key}}})'}"
            ": argument-principle count")
    if e is None:
        report.add(name, False, "missing")
        return
    d = e["data"]
    if not d.get("established"):
        report.add(name + " (not established; nothing claimed)", "verified" not in d)
        return
    ends = sorted(exact_ends(ball_of(z)) for z in zeros)
    T = count_height(ends) if len(ends) >= 2 else None
    found = sum(1 for lo, hi in ends if T is not None and hi < T)
    if T is None or Fraction(d["height"]) != T:
        report.add(name, False, "the counting height is not the one the stored zeros give")
        return
    N, _ = count_zeros(int(lf["conductor"]), int(lf["label"]),
                       primitive_character(int(lf["conductor"]), int(lf["label"])).parity, T)
    report.add(name, d["count"] == N and d["sign_changes"] == found
               and bool(d["verified"]) == (N == found),
               f"stored count {d['count']} / {d['sign_changes']} sign changes, recomputed {N} / {found}")


def _verify_hypotheses(cert: Certificate, report: VerifyReport, group_data, prec: int,
                       required: tuple = REQUIRED_HYPOTHESES) -> None:
    present = {h["name"]: h for h in cert.hypotheses}
    for name in required:
        h = present.get(name)
        if not report.add(f"hypothesis {name} listed", h is not None,
                          f"{name} is missing: the result is conditional on it"):
            continue
        report.add(f"hypothesis {name} stated as assumed", h["status"] == "assumed",
                   f"status {h['status']!r}: certify does not prove {name}")
    report.add("caution: conditional result stated",
               "does not prove" in cert.caution, "the caution sentence is missing")
    grh, li = present.get(required[0]), present.get("LI")
    if grh is None or li is None:
        return
    ev_grh = [e for e in grh["evidence"]]
    ev_li = [e for e in li["evidence"]]
    for g, sg, zs, R in group_data:
        cons = moment_consequences(list(R), list(zs), prec=max(prec, 128))
        for li_idx, lf in enumerate(sg["l_functions"]):
            key = f"{lf['conductor']}.{lf['label']}"
            count = sum(1 for z in sg["zeros"] if z["l"] == li_idx)
            e = next((e for e in ev_grh if e["kind"] == "zeros-on-critical-line"
                      and e.get("l_function") == key), None)
            report.add("RH evidence for zeta(s)" if lf["conductor"] == 1
                       else f"GRH evidence for L(s, chi_{{{key}}})",
                       e is not None and e["data"]["zeros"] == count
                       and e["data"]["isolation_height"] == sg["isolation_height"],
                       "missing, or the zero count / height differ from the stored spectrum")
            _verify_zero_count(report, ev_grh, key, lf,
                               [z for z in sg["zeros"] if z["l"] == li_idx])
            cv = central_value(lf["conductor"], lf["label"])
            e = next((e for e in ev_li if e["kind"] == "central-value"
                      and e.get("l_function") == key), None)
            ok = e is not None and not cv.contains(0) \
                and _overlap(ball_of(e["data"]["re"]), cv.real) and _overlap(ball_of(e["data"]["im"]), cv.imag)
            report.add("LI evidence: zeta(1/2) != 0" if lf["conductor"] == 1
                       else f"LI evidence: L(1/2, chi_{{{key}}}) != 0", ok,
                       "missing, or the recomputed enclosure disagrees / contains 0")
        e = next((e for e in ev_grh if e["kind"] == "moment-completeness"
                  and e.get("group") == g.label), None)
        report.add(f"{required[0]} evidence for {g.label}: completeness height",
                   e is not None and Fraction(e["data"]["complete_below"]) <= cons["complete_below"],
                   f"stored {e and e['data']['complete_below']}, recomputed "
                   f"{float(cons['complete_below']):.6g}")
        e = next((e for e in ev_li if e["kind"] == "simple-zeros" and e.get("group") == g.label), None)
        report.add(f"LI evidence for {g.label}: simple zeros",
                   e is not None and e["data"]["proven_simple"] <= cons["simple"]
                   and e["data"]["isolated"] == len(zs),
                   f"stored {e and e['data']}, recomputed {cons['simple']} of {len(zs)}")
    e = next((e for e in ev_li if e["kind"] == "integer-relation-search"), None)
    if e is None:
        report.add("LI evidence: integer-relation search", False, "missing")
        return
    d = e["data"]
    keys = sorted({o["l_function"] for o in d["ordinates"]})
    key_index = {k: i for i, k in enumerate(keys)}
    entries = [{"l": key_index[o["l_function"]], "mid": o["mid"], "rad": o["rad"]}
               for o in d["ordinates"]]
    # the refined ordinates must lie inside stored (verified) zeros: same zeros, narrower
    zs_all = [(f"{lf['conductor']}.{lf['label']}", ball_of(z))
              for _, sg, _, _ in group_data for z in sg["zeros"]
              for li_idx, lf in enumerate(sg["l_functions"]) if z["l"] == li_idx]
    inside = all(any(k == o["l_function"] and _contains(b, ball_of(o)) for k, b in zs_all)
                 for o in d["ordinates"])
    report.add("LI evidence: relation-search ordinates lie in verified zeros", inside,
               "an ordinate of the search is not inside a stored zero")
    balls = _check_zero_list(report, "relation-search ordinates", entries,
                             [tuple(map(int, k.split("."))) for k in keys], None)
    if balls is None:
        return
    rs = relation_search(balls, int(d["scale_bits"]))
    ok = (rs["size"] == d["size"] and Fraction(d["norm_lower_bound"]) <= rs["norm_lower_bound"]
          and int(d["coefficient_bound"]) <= rs["coefficient_bound"]
          and (d["candidate"] is None) == (rs["candidate"] is None))
    if ok and d["linear_form_lower_bound"] is not None:
        ok = rs["linear_form_lower_bound"] is not None and \
            Fraction(d["linear_form_lower_bound"]) <= rs["linear_form_lower_bound"]
    report.add("LI evidence: integer-relation search (LLL) recomputed", ok,
               f"stored norm bound {d['norm_lower_bound']}, recomputed "
               f"{float(rs['norm_lower_bound']):.6g}")
