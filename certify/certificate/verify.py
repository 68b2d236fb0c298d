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

from ..arith import arb, workprec
from ..density.bessel import (TRUNCATION_ISOLATED, BesselVariable, ResidualGroup,
                              density_enclosure)
from ..errors import BadInput, CertifyError, Inconsistent
from ..race.question import (LI_KINDS, RaceQuestion, mean_of, prime_vs_li, residue_race,
                             riemann_hypothesis_name, spectral_groups, two_way, weighted)
from ..source.dirichlet import primitive_character
from ..spectrum.moments import central_value, zero_power_sums
from ..spectrum.spectrum import residual_checks, residual_sums
from ..spectrum.zeros import HardyZ
from .evidence import exact_ends, moment_consequences, relation_search
from .build import answer_fields, input_digest, question_record
from .model import Certificate, ball_of, thaw

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
    _CENTRAL.clear()
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


def check_limits(cert: Certificate) -> None:
    """Refuse, before any work, a certificate that asks for more than a race over Q can need:
    the precision, target, zero count and moment sizes are bounded (BadInput)."""
    from ..races import MAX_DIGITS

    p = cert.parameters
    prec, digits = p["working_precision_bits"], p["digits_requested"]
    if type(digits) is not int or not 1 <= digits <= MAX_DIGITS:
        raise BadInput(f"digits_requested {str(digits)[:20]} outside 1..{MAX_DIGITS}")
    limit = 16 * digits + 512
    if type(prec) is not int or not 16 <= prec <= limit:
        raise BadInput(f"working precision {str(prec)[:20]} bits outside 16..{limit} "
                       f"for {digits} digits")
    zeros = 0
    for g in cert.spectrum["groups"]:
        m = g["moments"]
        if not (m["source_bits"] <= limit + 1024 and m["count"] <= m["source_count"] <= 400):
            raise BadInput(f"{g['label']}: moments asked at {m['source_bits']} bits / "
                           f"{m['source_count']} terms (limit {limit + 1024} bits, 400 terms)")
        zeros += len(g["zeros"])
        if Fraction(g["isolation_height"]) > 10**5:
            raise BadInput(f"{g['label']}: isolation height above 10^5")
        for z in g["zeros"]:
            r = Fraction(z["rad"])
            if not (Fraction(1, 2 ** (4 * limit)) <= r <= 1):
                raise BadInput(f"{g['label']}: a zero's radius {float(r):.3e} outside "
                               f"[2^-{4 * limit}, 1]")
    if zeros > 20000:
        raise BadInput(f"{zeros} zeros stored (limit 20000)")


_CENTRAL: dict = {}  # central values re-derived by the batched path of the current verify


def _batched_sums(groups, stored_groups) -> dict:
    """{(conductor, label): (S_1..S_K, L(1/2, chi))} re-derived for every L-function of the
    stored groups, the characters of one conductor together (one Hurwitz jet per class and a
    DFT, :func:`certify.spectrum.moments.conductor_power_sums`), at the largest count and
    accuracy any group of the conductor asks for; conductors with few characters are left
    to the one-character path.  Nothing stored is used but the sizes (bounded beforehand)."""
    from ..spectrum.moments import conductor_power_sums, prefer_batch

    want: dict = {}
    for g, sg in zip(groups, stored_groups):
        m = sg["moments"]
        for c, n in g.primitive_keys:
            k0, b0 = want.setdefault(c, {}).get(n, (0, 0))
            want[c][n] = (max(k0, int(m["source_count"])), max(b0, int(m["source_bits"])))
    out = {}
    for c, labels in want.items():
        if not prefer_batch(c, len(labels)):
            continue
        K = max(k for k, _ in labels.values())
        B = max(b for _, b in labels.values())
        for n, v in conductor_power_sums(c, list(labels), K, B).items():
            out[(c, n)] = v
    _CENTRAL.clear()
    _CENTRAL.update({k: v[1] for k, v in out.items()})
    return out


def _central_value(c: int, n: int):
    cv = _CENTRAL.get((c, n))
    return cv if cv is not None else central_value(c, n)


def _verify(cert: Certificate, report: VerifyReport) -> None:
    check_limits(cert)
    params = cert.parameters
    prec = int(params["working_precision_bits"])
    digits = int(params["digits_requested"])
    tau = 10.0 ** (-digits)

    # -- the question: every stored sentence must be the one the modulus and weights give
    question = question_from_record(cert.question)
    expected_q = question_record(question)
    diff = sorted(k for k in set(expected_q) | set(cert.question)
                  if thaw(cert.question.get(k)) != expected_q.get(k))
    report.add("question: kind, modulus, classes, weights, label, statement, normalisation and "
               "definition rebuilt from modulus and weights", not diff,
               f"stored field(s) {', '.join(diff)} differ from the rebuilt question")
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
    report.add("provenance: input digest of the question and target",
               cert.provenance["input_digest"] == input_digest(question, digits),
               "the stored digest is not that of the stored question and target")

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
    batched = _batched_sums(groups, stored_groups)
    for g, sg in zip(groups, stored_groups):
        keys = [tuple(k) for k in g.primitive_keys]
        T = Fraction(sg["isolation_height"])
        lfs_ok = (sg["label"] == g.label and sg["real"] == g.is_real
                  and [lf["parity"] for lf in sg["l_functions"]]
                  == [primitive_character(c, n).parity for c, n in keys])
        report.add(f"{g.label}: label, reality and parities as the question gives them", lfs_ok,
                   "stored group label, 'real' flag or parity differ")
        zs = _check_zero_list(report, g.label, list(sg["zeros"]), keys, T)
        if zs is None:
            all_ok = False
            continue
        with workprec(prec):
            report.add(f"{g.label}: scale 2|W(chi)|", _overlap(ball_of(sg["scale"]), g.scale),
                       "stored scale disagrees with the question")
        mom = sg["moments"]
        c0, n0 = keys[0]
        parity = primitive_character(c0, n0).parity
        if (c0, n0) in batched:
            S = batched[(c0, n0)][0][:int(mom["source_count"])]
        else:
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
                notes = residual_checks(g.label, R, float(T), keys[0][0], len(keys))
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
    # the truncation bound the certificate used: section 4 alone for certificates written
    # before section 4c existed (no "truncation" parameter), else the engine's own choice
    stored_trunc = cert.parameters.get("truncation", TRUNCATION_ISOLATED)
    dens = density_enclosure(variable, tau, prec=prec,
                             truncation=TRUNCATION_ISOLATED if stored_trunc == TRUNCATION_ISOLATED
                             else "auto")
    report.add("density: the same truncation bound as the stored one",
               dens.parameters.get("truncation") == stored_trunc,
               f"stored {stored_trunc!r}, recomputed {dens.parameters.get('truncation')!r}")
    lo, hi = dens.enclosure.lower, dens.enclosure.upper
    s_lo, s_hi = cert.lower, cert.upper
    report.add("density: stored enclosure contains the recomputed one",
               s_lo <= lo and hi <= s_hi,
               f"stored [{cert.answer['enclosure']['lower']}, {cert.answer['enclosure']['upper']}], "
               f"recomputed [{float(lo):.17g}, {float(hi):.17g}]; the stored one is short by "
               f"{float(max(s_lo - lo, hi - s_hi)):.3e}")
    stored_names = [e["name"] for e in cert.error_budget]
    names = [e.name for e in dens.budget]
    report.add("error budget: the same terms, once each, in the engine's order",
               stored_names == names, f"stored {stored_names}, recomputed {names}")
    stored_budget = {e["name"]: e for e in cert.error_budget}
    for e in dens.budget:
        st = stored_budget.get(e.name)
        ok = (st is not None and _q(Fraction(st["bound"])) >= arb(e.bound.upper())
              and st["description"] == e.description)
        report.add(f"error bound '{e.name}'", ok,
                   f"stored {st['bound'] if st else 'missing'}, recomputed {e.bound_float:.3e}"
                   + ("" if st is None or st["description"] == e.description
                      else "; the description is not the engine's"))
    total = sum((arb(e.bound.upper()) for e in dens.budget), arb(0))
    report.add("final sum: stored width >= 2 x (aliasing + truncation + residual-zero bounds)",
               _q(s_hi - s_lo) >= 2 * (total - arb(dens.budget[-1].bound.upper())),
               "the stored width is smaller than the proven error allows")
    a = cert.answer
    expected_a = answer_fields(s_lo, s_hi, digits)
    diff = sorted(k for k in expected_a if thaw(a.get(k)) != expected_a[k])
    report.add("answer: width, certified digits, gaps to 1/2 and 1, target and target_met "
               "recomputed from the stored enclosure", not diff,
               f"stored field(s) {', '.join(diff)} differ from what the enclosure gives")
    extra = sorted(set(a) - set(expected_a) - {"enclosure", "engine_ball", "mean", "variance",
                                               "exact", "small_side"})
    report.add("answer: no unexpected field", not extra, f"unexpected field(s) {extra}")
    if question.is_li_race or "small_side" in a:
        from .build import small_side_record

        report.add("answer: the small side and its significant digits follow from the stored "
                   "enclosure", question.is_li_race
                   and thaw(a.get("small_side", {})) == small_side_record(s_lo, s_hi),
                   f"stored {thaw(a.get('small_side', {}))}, implied {small_side_record(s_lo, s_hi)}")
    eb = ball_of(a["engine_ball"], "engine ball")
    el, eh = exact_ends(eb)
    report.add("answer: engine ball inside the stored enclosure and meets the recomputed one",
               s_lo <= el and eh <= s_hi and _overlap(eb, dens.ball),
               "the stored engine ball is outside the enclosure or disjoint from the recomputed one")
    with workprec(prec):
        V = arb(0)
        for g, sg, zs, R in group_data:
            V += g.scale * g.scale * ball_of(sg["moments"]["target_sums"][0]) / 2
    report.add("answer: variance = sum scale^2 T_1 / 2 from the verified moments",
               _overlap(ball_of(a["variance"], "variance"), V)
               and exact_ends(ball_of(a["variance"]))[1] - exact_ends(ball_of(a["variance"]))[0]
               <= max(Fraction(1, 10**6), 4 * (exact_ends(V)[1] - exact_ends(V)[0])),
               f"stored {ball_of(a['variance']).str(10)}, recomputed {V.str(10)}")

    # -- parameters: the shown ones recomputed or compared exactly --------------
    _verify_parameters(cert, report, dens, group_data, digits, tau)

    # -- hypotheses ----------------------------------------------------------
    _verify_hypotheses(cert, report, group_data, prec, required_hypotheses(question))


def _overlap(a: arb, b: arb) -> bool:
    al, ah = exact_ends(a)
    bl, bh = exact_ends(b)
    return al <= bh and bl <= ah


#: Parameters a document shows, and how verify re-derives each (the others are recorded for
#: the reader of the JSON only and are not rendered).
ENGINE_PARAMETERS = ("period_L", "terms", "last_odd_index", "direct_weights",
                     "truncation_weights_used", "residual_groups", "working_precision_bits")
SHOWN_PARAMETERS = ENGINE_PARAMETERS + ("digits_requested", "density_target_width",
                                        "target_width", "moments", "primitive_l_functions",
                                        "zeros_used")


def _verify_parameters(cert, report, dens, group_data, digits, tau) -> None:
    p = cert.parameters
    expected = {k: dens.parameters.get(k) for k in ENGINE_PARAMETERS}
    expected["working_precision_bits"] = int(p["working_precision_bits"])
    expected["digits_requested"] = digits
    expected["density_target_width"] = repr(tau)
    expected["target_width"] = f"1e-{digits}"
    expected["moments"] = max(int(sg["moments"]["count"]) for _, sg, _, _ in group_data)
    expected["primitive_l_functions"] = sorted(f"{lf['conductor']}.{lf['label']}"
                                         for _, sg, _, _ in group_data for lf in sg["l_functions"])
    expected["zeros_used"] = sum(len(zs) for _, _, zs, _ in group_data)
    diff = sorted(k for k in SHOWN_PARAMETERS if thaw(p.get(k)) != expected[k])
    report.add("parameters: every parameter a document shows re-derived (engine re-run, "
               "target, moments, L-functions, zeros)", not diff,
               "; ".join(f"{k}: stored {thaw(p.get(k))!r}, re-derived {expected[k]!r}"
                         for k in diff[:4]))


def _expect_items(report, where: str, stored, expected_keys) -> bool:
    """The stored evidence list must be exactly the expected (kind, key) sequence."""
    got = [(e["kind"], e.get("l_function") or e.get("group") or "") for e in stored]
    ok = got == expected_keys
    missing = [k for k in expected_keys if k not in got]
    extra = [k for k in got if k not in expected_keys]
    dup = sorted({k for k in got if got.count(k) > 1})
    return report.add(f"{where}: exactly the evidence items the setting requires, once each", ok,
                      f"missing {missing[:3]}, unexpected {extra[:3]}, duplicated {dup[:3]}"
                      if not ok else "")


def _verify_hypotheses(cert: Certificate, report: VerifyReport, group_data, prec: int,
                       required: tuple = REQUIRED_HYPOTHESES) -> None:
    from .build import certificate_caution, certificate_references, hypothesis_statements

    rh = required[0]
    names = [h["name"] for h in cert.hypotheses]
    report.add(f"hypotheses: exactly {rh} and LI, once each, in this order",
               names == list(required),
               "; ".join(f"{n} is missing" for n in required if n not in names)
               + f" (stored {names}: this race rests on {rh} and LI, nothing else, "
               "nothing proven)")
    expected = hypothesis_statements(cert.spectrum, rh)
    for h in cert.hypotheses:
        if h["name"] not in expected:
            continue
        report.add(f"hypothesis {h['name']}: status assumed, statement and reference as the "
                   "setting gives them",
                   h["status"] == "assumed" and h["statement"] == expected[h["name"]]
                   and h["reference"] == "",
                   f"status {h['status']!r}; certify does not prove {h['name']}, and the statement "
                   "must be the one the L-functions give")
    report.add("caution: the fixed text", cert.caution == certificate_caution(rh),
               "the caution differs from the fixed conditional-result text")
    report.add("references: the fixed list", list(cert.references) == certificate_references(),
               "the references differ from the fixed list")
    if names != list(required):
        return
    grh, li = cert.hypotheses
    for h in (grh, li):
        bad = [i for i, e in enumerate(h["evidence"]) if e["text"] != _text(e, rh)]
        report.add(f"{h['name']} evidence: every sentence regenerated from its data", not bad,
                   f"item(s) {bad[:5]} carry text that their data do not give")
    keys_grh, keys_li = [], []
    for g, sg, zs, R in group_data:
        ks = [f"{lf['conductor']}.{lf['label']}" for lf in sg["l_functions"]]
        keys_grh += [("zeros-on-critical-line", k) for k in ks] + [("zero-count", k) for k in ks]
        keys_grh.append(("moment-completeness", g.label))
        keys_li += [("central-value", k) for k in ks] + [("simple-zeros", g.label)]
    keys_grh.append(("published-verification", ""))
    total = sum(len(zs) for _, _, zs, _ in group_data)
    if total >= 2:
        keys_li.append(("integer-relation-search", ""))
    if not (_expect_items(report, rh, grh["evidence"], keys_grh)
            & _expect_items(report, "LI", li["evidence"], keys_li)):
        return
    ev_grh = list(grh["evidence"])
    ev_li = list(li["evidence"])
    for e in ev_grh:
        if e["kind"] == "published-verification":
            report.add("GRH evidence: published verifications (cited, no data)",
                       thaw(e["data"]) == {}, "unexpected data")
    from .zerocount import zero_counts

    counts = zero_counts([(int(lf["conductor"]), int(lf["label"]),
                           primitive_character(int(lf["conductor"]), int(lf["label"])).parity,
                           sg["isolation_height"])
                          for _, sg, _, _ in group_data for lf in sg["l_functions"]])
    for g, sg, zs, R in group_data:
        cons = moment_consequences(list(R), list(zs), prec=max(prec, 128))
        for li_idx, lf in enumerate(sg["l_functions"]):
            key = f"{lf['conductor']}.{lf['label']}"
            count = sum(1 for z in sg["zeros"] if z["l"] == li_idx)
            e = next(e for e in ev_grh if e["kind"] == "zeros-on-critical-line"
                     and e.get("l_function") == key)
            report.add(f"{rh} evidence for {_lname(lf)}: zeros on the line",
                       thaw(e["data"]) == {"conductor": lf["conductor"], "label": lf["label"],
                                           "zeros": count,
                                           "isolation_height": sg["isolation_height"]},
                       "the zero count / height differ from the stored spectrum")
            _verify_zero_count(report, ev_grh, key, lf,
                               [z for z in sg["zeros"] if z["l"] == li_idx],
                               sg["isolation_height"], counts)
            cv = _central_value(int(lf["conductor"]), int(lf["label"]))
            e = next(e for e in ev_li if e["kind"] == "central-value"
                     and e.get("l_function") == key)
            ok = (set(e["data"]) == {"re", "im"} and not cv.contains(0)
                  and _overlap(ball_of(e["data"]["re"]), cv.real)
                  and _overlap(ball_of(e["data"]["im"]), cv.imag)
                  and thaw(e["data"]) == thaw(lf["central_value"]))
            report.add(f"LI evidence: {_cname(lf)} != 0", ok,
                       "the recomputed enclosure disagrees / contains 0")
        e = next(e for e in ev_grh if e["kind"] == "moment-completeness"
                 and e.get("group") == g.label)
        report.add(f"{rh} evidence for {g.label}: completeness height",
                   set(e["data"]) == {"complete_below", "moment_index"}
                   and Fraction(e["data"]["complete_below"]) <= cons["complete_below"]
                   and e["data"]["moment_index"] == cons["moment_index"],
                   f"stored {thaw(e['data'])}, recomputed "
                   f"{float(cons['complete_below']):.6g} (R_{cons['moment_index']})")
        e = next(e for e in ev_li if e["kind"] == "simple-zeros" and e.get("group") == g.label)
        report.add(f"LI evidence for {g.label}: simple zeros",
                   set(e["data"]) == {"isolated", "proven_simple"}
                   and 0 <= e["data"]["proven_simple"] <= cons["simple"]
                   and e["data"]["isolated"] == len(zs),
                   f"stored {thaw(e['data'])}, recomputed {cons['simple']} of {len(zs)}")
    e = next((e for e in ev_li if e["kind"] == "integer-relation-search"), None)
    if e is None:
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
    if int(d["scale_bits"]) > 4096 or len(d["ordinates"]) > 64:
        report.add("LI evidence: integer-relation search size", False,
                   "the stored search asks for more than 64 ordinates or 4096 bits")
        return
    balls = _check_zero_list(report, "relation-search ordinates", entries,
                             [tuple(map(int, k.split("."))) for k in keys], None)
    if balls is None:
        return
    rs = relation_search(balls, int(d["scale_bits"]))
    ok = (rs["size"] == d["size"] == len(d["ordinates"])
          and Fraction(d["norm_lower_bound"]) <= rs["norm_lower_bound"]
          and int(d["coefficient_bound"]) <= rs["coefficient_bound"]
          and (d["candidate"] is None) == (rs["candidate"] is None))
    if ok and d["linear_form_lower_bound"] is not None:
        ok = rs["linear_form_lower_bound"] is not None and \
            Fraction(d["linear_form_lower_bound"]) <= rs["linear_form_lower_bound"]
    report.add("LI evidence: integer-relation search (LLL) recomputed", ok,
               f"stored norm bound {d['norm_lower_bound']}, recomputed "
               f"{float(rs['norm_lower_bound']):.6g}")


def _lname(lf) -> str:
    from .build import l_name

    return l_name(int(lf["conductor"]), int(lf["label"]))


def _cname(lf) -> str:
    from .build import central_name

    return central_name(int(lf["conductor"]), int(lf["label"]))


def _text(e, rh: str = "GRH") -> str:
    from .build import evidence_text

    try:
        return evidence_text(e, rh)
    except (KeyError, TypeError, ValueError, ZeroDivisionError):
        return "\x00(no text: the data are malformed)"


def _verify_zero_count(report: VerifyReport, ev_grh, key: str, lf, zeros, height: str,
                       counts: dict) -> None:
    """GRH to the isolation height: the argument-principle count at that height must equal
    the number of stored zeros below it (no zero missing, on or off the line).  ``counts``
    holds the counts re-derived by :func:`zerocount.zero_counts` (every character of a
    conductor at once) from the conductor, label, parity (recomputed) and stored height."""
    e = next(e for e in ev_grh if e["kind"] == "zero-count" and e.get("l_function") == key)
    name = (f"{'RH' if lf['conductor'] == 1 else 'GRH'} evidence for {_lname(lf)}: "
            "argument-principle count, no zero missing below the isolation height")
    d = thaw(e["data"])
    from .zerocount import MAX_COUNT_CONDUCTOR

    T = Fraction(height)
    found = sum(1 for z in zeros if exact_ends(ball_of(z))[1] < T)
    N = counts.get((int(lf["conductor"]), int(lf["label"])))
    if N is None and int(lf["conductor"]) > MAX_COUNT_CONDUCTOR:
        # the smoothed count (the only one attempted above this conductor) failed here too:
        # the certificate must say "not established", and nothing more
        report.add(name, d == {"established": False, "height": height},
                   f"the count is not established on re-derivation either; stored {d}")
        return
    if N is None:
        report.add(name, False, f"the argument-principle count at {float(T):.6g} could not be "
                   "established")
        return
    expected = {"established": True, "height": height, "count": N, "sign_changes": found,
                "verified": N == found}
    report.add(name, d == expected and N == found,
               f"stored {d}; the argument principle counts {N} zeros below {float(T):.6g}, "
               f"{found} are stored" + (" (zeros are missing from the list)" if N != found else ""))
