"""Numbers shown honestly: every printed interval contains the proven one, every printed
bound is >= the proven bound, exact values are shown as exact, headlines never misread.

The checks parse what a user sees (the screen of ``certify race``, the ``--json`` record,
the CSV/Markdown/LaTeX tables) and compare it with the engine's exact enclosure and budget,
over random races (moduli, classes, weights, targets) and random rationals.
"""

from __future__ import annotations

import json
import random
import re
from fractions import Fraction

import pytest

from certify.arith import (arb, bound_text, interval_text, sci_down, sci_interval_text, sci_text,
                           sci_up, upper_float, upper_fraction)
from certify.batch.plan import RaceItem
from certify.batch.tables import render_csv, render_latex, render_markdown, rows_from_results
from certify.commands.races import screen
from certify.race.question import mean_of, residue_race, two_way, weighted
from certify.races import certify_race
from certify.result import Enclosure, ExactValue, caution_text, headline_text, Hypothesis
from certify.source.dirichlet import reduced_residues
from certify.spectrum.spectrum import SpectrumStore

HALF = Fraction(1, 2)
NUM = r"-?[0-9]+(?:\.[0-9]+)?(?:e-?[0-9]+)?"
INTERVAL = re.compile(rf"\[({NUM}), ({NUM})\](?:e(-?[0-9]+)| \\times 10\^\{{(-?[0-9]+)\}})?")


def _intervals(text: str) -> list[tuple[Fraction, Fraction]]:
    out = []
    for m in INTERVAL.finditer(text):
        e = m.group(3) or m.group(4)
        s = Fraction(10) ** int(e) if e else Fraction(1)
        out.append((Fraction(m.group(1)) * s, Fraction(m.group(2)) * s))
    return out


def _contains(printed: tuple[Fraction, Fraction], lo: Fraction, hi: Fraction) -> bool:
    return printed[0] <= lo and hi <= printed[1]


# --- the formatter on random rationals (cheap, many cases) --------------------------------

@pytest.mark.parametrize("seed", range(4))
def test_sci_rounds_the_right_way_and_tightly(seed):
    rng = random.Random(seed)
    for _ in range(300):
        v = Fraction(rng.randint(-10**12, 10**12), rng.randint(1, 10**12)) * Fraction(10) ** rng.randint(-30, 5)
        sig = rng.randint(1, 12)
        up, down = Fraction(sci_text(v, sig, True)), Fraction(sci_text(v, sig, False))
        assert down <= v <= up
        if v != 0:
            # tight: one unit in the last printed place at most
            e = len(str(abs(v.numerator))) - len(str(v.denominator)) + 1
            assert up - down <= Fraction(10) ** (e - sig + 1)


@pytest.mark.parametrize("seed", range(4))
def test_intervals_are_rounded_outward(seed):
    rng = random.Random(100 + seed)
    for _ in range(200):
        a = Fraction(rng.randint(0, 10**15), 10**15)
        b = a + Fraction(rng.randint(0, 10**6), 10 ** rng.randint(6, 25))
        (lo, hi), = _intervals(interval_text(a, b))
        assert lo <= a and b <= hi
        (lo, hi), = _intervals(sci_interval_text(a, b))
        assert lo <= a and b <= hi
        (lo, hi), = _intervals(interval_text(a, b, rng.randint(0, 8)))
        assert lo <= a and b <= hi
        x = arb(rng.random() * 10 ** rng.randint(-20, 0), rng.random() * 1e-25)
        assert Fraction(bound_text(x)) >= upper_fraction(x)
        assert Fraction(sci_up(x, 5)) >= upper_fraction(x) >= Fraction(sci_down(x, 5))
        assert Fraction(upper_float(x)) >= upper_fraction(x)


def test_one_minus_delta_of_the_issue_contains_the_proof():
    # issue 9: "1 - delta in [9.368085e-04, 9.368085e-04]" did not intersect the proven
    # [9.3680846740e-4, 9.3680849046e-4]
    lo, hi = Fraction("9.3680846740e-4"), Fraction("9.3680849046e-4")
    enc = Enclosure(1 - hi, 1 - lo)
    (a, b), = _intervals(enc.one_minus().sci_text())
    assert a <= lo and hi <= b and a < b


# --- headlines ------------------------------------------------------------------------------

def test_straddling_enclosure_never_prints_a_digit():
    enc = Enclosure(Fraction("0.4999999999998"), Fraction("0.5000000000002"))
    head = headline_text("delta(q;a,b)", enc)
    assert "= 0" not in head and "= 0.5" not in head
    (lo, hi), = _intervals(head)
    assert lo <= enc.lower and enc.upper <= hi
    wide = Enclosure(Fraction("0.50"), Fraction("0.83"))
    head = headline_text("delta(q;a,b)", wide, target_met=False, target="1e-10")
    assert "=" not in head and "NOT met" in head and "1e-10" in head


def test_digits_in_a_headline_are_common_to_the_enclosure():
    rng = random.Random(7)
    for _ in range(300):
        lo = Fraction(rng.randint(0, 10**12), 10**12)
        hi = lo + Fraction(rng.randint(1, 10**5), 10 ** rng.randint(5, 14))
        head = headline_text("x", Enclosure(lo, hi))
        m = re.match(r"x = ([0-9.]+)\.\.\.", head)
        if m:
            d = m.group(1)
            k = len(d.split(".")[1])
            assert k >= 1 and Fraction(d) <= lo and hi < Fraction(d) + Fraction(1, 10**k)
        else:
            (a, b), = _intervals(head)
            assert a <= lo and hi <= b


def test_exact_display():
    enc = Enclosure(Fraction("0.4999999999820"), Fraction("0.5000000000180"))
    ex = ExactValue(HALF, "mean 0")
    assert headline_text("delta(5;2,3)", enc, ex).startswith("delta(5;2,3) = 1/2 exactly (mean 0")
    with pytest.raises(ValueError):
        headline_text("x", Enclosure(Fraction(1, 3), Fraction(2, 5)), ex)


def test_caution_names_the_hypotheses_used():
    grh = Hypothesis("GRH", "s", "assumed")
    li = Hypothesis("LI", "s", "assumed")
    weil = Hypothesis("Weil", "s", "theorem")
    assert "GRH and LI" in caution_text([grh, li, weil]) and "Weil" not in caution_text([grh, li, weil])
    assert caution_text([weil]).startswith("Unconditional")
    assert "only under LI" in caution_text([weil, li])


# --- every output of real races ----------------------------------------------------------

@pytest.fixture(scope="module")
def store():
    return SpectrumStore()


MODULI = (3, 4, 5, 7, 8, 9, 12)


def _random_question(rng):
    q = rng.choice(MODULI)
    classes = reduced_residues(q)
    kind = rng.choice(["two-way", "two-way", "residues", "weighted"])
    if kind == "two-way":
        a, b = rng.sample(classes, 2)
        return two_way(q, a, b)
    if kind == "residues" and q not in (3, 4, 12, 8):
        return residue_race(q)
    k = min(len(classes), rng.randint(2, 3))
    cs = rng.sample(classes, k)
    ws = [rng.randint(-3, 3) or 1 for _ in cs[:-1]]
    ws.append(-sum(ws))
    if ws[-1] == 0:
        ws[-1], ws[0] = 1, ws[0] - 1
    scale = Fraction(rng.randint(1, 9), rng.choice([1, 7, 1000]))
    return weighted(q, {c: w * scale for c, w in zip(cs, ws)})


def _check_screen(result):
    d = result.density
    text = screen(result)
    lines = text.splitlines()
    label = result.question.label
    assert lines[0].startswith(label)
    head = lines[0][len(label):]
    if result.exact is not None:
        assert head.startswith(f" = {result.exact.text()} exactly") and d.contains(result.exact.value)
    elif head.startswith(" = "):
        digits = re.match(r" = ([0-9.]+)\.\.\.", head).group(1)
        k = len(digits.split(".")[1])
        assert Fraction(digits) <= d.lower and d.upper < Fraction(digits) + Fraction(1, 10**k)
    else:
        assert _contains(_intervals(head)[0], d.lower, d.upper)
    seen = 0
    for line in lines[1:]:
        s = line.strip()
        if s.startswith(("enclosure", "numerical cross-check")):
            assert _contains(_intervals(s)[-1], d.lower, d.upper)
            w = Fraction(re.search(rf"width <= ({NUM})", s).group(1))
            assert w >= d.width
            seen += 1
        elif s.startswith("1 - delta"):
            assert _contains(_intervals(s)[0], 1 - d.upper, 1 - d.lower)
            seen += 1
        elif s.startswith("delta - 1/2"):
            assert _contains(_intervals(s)[0], d.lower - HALF, d.upper - HALF)
        elif s.startswith("delta ") and " in " in s:
            assert _contains(_intervals(s)[0], d.lower, d.upper)
    assert seen >= 1
    for e in result.budget:
        m = re.search(rf"^\s+{re.escape(e.name)}\s+<= ({NUM})$", text, re.M)
        assert m, f"budget line for {e.name} missing"
        assert Fraction(m.group(1)) >= upper_fraction(e.bound)
    assert "GRH and LI" in result.caution and result.caution in text


def _check_json(result):
    data = json.loads(json.dumps(result.to_dict()))
    d, rec = result.density, data["density"]
    assert Fraction(rec["lower"]) <= d.lower and d.upper <= Fraction(rec["upper"])
    assert Fraction(rec["width"]) >= d.width
    om, gh = rec["one_minus"], rec["gap_to_half"]
    assert Fraction(om["lower"]) <= 1 - d.upper and 1 - d.lower <= Fraction(om["upper"])
    assert Fraction(gh["lower"]) <= d.lower - HALF and d.upper - HALF <= Fraction(gh["upper"])
    bounds = {e["name"]: Fraction(e["bound"]) for e in data["error_budget"]}
    for e in result.budget:
        assert bounds[e.name] >= upper_fraction(e.bound)
    if result.exact is not None:
        assert rec["exact"]["value"] == "1/2" and "none" in rec["exact"]["error_budget"]
    else:
        assert rec["exact"] is None
    return data


def _check_tables(result, data, tmp_path):
    rows = rows_from_results(str(tmp_path), [(RaceItem(result.question), data)])
    d = result.density
    for r in rows:
        lo, hi = (d.lower, d.upper) if not r.derived else (1 - d.upper, 1 - d.lower)
        assert r.lower <= lo and hi <= r.upper
    csv_text = render_csv(rows)
    md = render_markdown(rows, result.digits_requested, "t")
    tex = render_latex(rows, result.digits_requested)
    import csv as _csv
    for rec, r in zip(_csv.DictReader(csv_text.splitlines()), rows):  # header on the first line
        lo, hi = (d.lower, d.upper) if not r.derived else (1 - d.upper, 1 - d.lower)
        assert Fraction(rec["lower"]) <= lo and hi <= Fraction(rec["upper"])
        assert Fraction(rec["width"]) >= hi - lo
        if rec["exact"]:
            assert Fraction(rec["exact"]) == (HALF if result.exact else None)
        if rec["one_minus_delta"].startswith("["):
            assert _contains(_intervals(rec["one_minus_delta"])[0], 1 - hi, 1 - lo)
    for text in (md, tex):
        for line in text.splitlines():
            if result.question.label.split("(")[0] not in line and "delta" not in line:
                continue
            for iv in _intervals(line):
                # an interval in a row is either delta's or 1 - delta's
                assert (_contains(iv, d.lower, d.upper) or _contains(iv, 1 - d.upper, 1 - d.lower)
                        or _contains(iv, 1 - d.upper, 1 - d.lower))
    if result.exact is not None:
        assert "1/2$ (exact)" in tex and "1/2 (exact)" in md


@pytest.mark.parametrize("seed", range(6))
def test_every_printed_number_contains_the_proof(seed, store, tmp_path):
    rng = random.Random(seed)
    for _ in range(4):
        question = _random_question(rng)
        result = certify_race(question, rng.randint(3, 8), store=store)
        _check_screen(result)
        data = _check_json(result)
        _check_tables(result, data, tmp_path)


@pytest.mark.parametrize("q,a,b", [(5, 2, 3), (5, 1, 4), (8, 3, 5), (7, 3, 5), (13, 1, 3)])
def test_mean_zero_races_print_one_half_exactly(q, a, b, store, tmp_path):
    question = two_way(q, a, b)
    assert mean_of(question) == 0  # same c(q, .) on both sides: both residues or non-residues
    r = certify_race(question, 6, store=store)
    assert r.exact is not None and r.exact.value == HALF and r.density.contains(HALF)
    text = screen(r)
    assert text.splitlines()[0].startswith(f"delta({q};{a},{b}) = 1/2 exactly")
    assert "= 0 " not in text and "no error budget applies to the exact value" in text
    _check_screen(r)
    _check_tables(r, _check_json(r), tmp_path)


def test_cli_race_5_2_3_prints_one_half(capsys):
    from certify.cli import main
    assert main(["race", "5", "2", "3", "--digits", "6"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("delta(5;2,3) = 1/2 exactly (mean 0")


def test_cli_race_3_2_1_one_minus_delta(capsys):
    from certify.cli import main
    assert main(["race", "3", "2", "1", "--digits", "10"]) == 0
    out = capsys.readouterr().out
    line = next(s for s in out.splitlines() if s.strip().startswith("1 - delta"))
    (a, b), = _intervals(line)
    # the proven 1 - delta(3;2,1) of issue 9, [9.3680846740e-4, 9.3680849046e-4], overlaps ours
    assert a < b and a <= Fraction("9.3680849046e-4") and Fraction("9.3680846740e-4") <= b


def _check_certificate(result, cert):
    """The certificate's answer and budget (and its rendering) contain the engine's numbers."""
    d = result.density
    a = cert.answer
    lo, hi = Fraction(a["enclosure"]["lower"]), Fraction(a["enclosure"]["upper"])
    assert lo <= d.lower and d.upper <= hi and Fraction(a["width"]) >= hi - lo
    assert Fraction(a["gap_to_half"]["lower"]) <= d.lower - HALF <= d.upper - HALF \
        <= Fraction(a["gap_to_half"]["upper"])
    assert Fraction(a["gap_to_one"]["lower"]) <= 1 - d.upper <= 1 - d.lower \
        <= Fraction(a["gap_to_one"]["upper"])
    bounds = {e["name"]: Fraction(e["bound"]) for e in cert.error_budget}
    for e in result.budget:
        assert bounds[e.name] >= upper_fraction(e.bound)
    from certify.render import render_markdown as cert_markdown
    md = cert_markdown(cert, "c.json")
    for line in md.splitlines():
        if "∈ [" in line and result.question.label in line:
            assert _contains(_intervals(line)[0], d.lower, d.upper)
        if line.startswith("- Certified digits"):
            if result.exact is not None:
                assert "1/2 exactly" in line
            else:
                assert "`0`" not in line
    for e in result.budget:
        m = re.search(rf"{re.escape(e.name)}\s*\|\s*({NUM})", md)
        if m:
            assert Fraction(m.group(1)) >= upper_fraction(e.bound)
    return md


@pytest.mark.parametrize("question", [two_way(5, 2, 3), two_way(7, 3, 1)],
                         ids=["mean-0", "mean-2"])
def test_certificates_show_numbers_outward_and_exact_values(question):
    import copy

    from certify.certificate.build import certify_with_certificate
    from certify.certificate.model import Certificate
    from certify.certificate.verify import verify_certificate
    result, cert = certify_with_certificate(question, 5)
    _check_certificate(result, cert)
    rep = verify_certificate(cert)
    assert rep.ok, [(c.name, c.detail) for c in rep.failures]
    assert "GRH and LI" in cert.caution
    data = cert.to_dict()
    if result.exact is not None:
        assert data["answer"]["exact"]["value"] == "1/2"
        # a copy that drops the exact value, or claims another one, fails verification
        for bad in (None, {"value": "1/3", "reason": "x", "error_budget": "none"}):
            d2 = copy.deepcopy(data)
            d2["answer"]["exact"] = bad
            assert not verify_certificate(Certificate.from_dict(d2)).ok
    else:
        d2 = copy.deepcopy(data)
        d2["answer"]["exact"] = {"value": "1/2", "reason": "x", "error_budget": "none"}
        assert not verify_certificate(Certificate.from_dict(d2)).ok


def test_target_not_met_says_so_with_the_reason(store):
    import dataclasses
    r = certify_race(two_way(4, 3, 1), 4, store=store)
    params = dict(r.parameters, not_met_reason="largest error term: frequency truncation (1.2e-5)")
    bad = dataclasses.replace(r, target_met=False, digits_requested=9, parameters=params)
    text = screen(bad)
    head = text.splitlines()[0]
    assert "NOT met" in head and "1e-9" in head
    assert "not certified to the target 1e-9: largest error term: frequency truncation" in text
    _check_screen(bad)
    # an enclosure like [0.50, 0.83] is never shown as "= 0"
    wide = dataclasses.replace(bad, density=Enclosure(Fraction("0.50"), Fraction("0.83")))
    head = screen(wide).splitlines()[0]
    assert head.startswith("delta(4;3,1) in [0.5000, 0.8300]") and "NOT met" in head
    assert "NOT met" in repr(wide) or "TARGET NOT MET" in repr(wide)


# --- F_q[t] races: the same formatter (the exact display of a finite orbit closure) -----------

def _check_ff_screen(res):
    from certify.ffield.commands import screen as ff_screen
    d = res.density
    text = ff_screen(res)
    head = text.splitlines()[0]
    assert head.startswith(res.question.label)
    rest = head[len(res.question.label):]
    if d.width == 0:
        assert rest.startswith(f" = {d.lower.numerator}/{d.lower.denominator} exactly")
    elif rest.startswith(" = "):
        digits = re.match(r" = ([0-9.]+)\.\.\.", rest).group(1)
        k = len(digits.split(".")[1])
        assert Fraction(digits) <= d.lower and d.upper < Fraction(digits) + Fraction(1, 10**k)
    else:
        assert _contains(_intervals(rest)[0], d.lower, d.upper)
    enc = next(s for s in text.splitlines() if s.strip().startswith("enclosure"))
    assert _contains(_intervals(enc)[0], d.lower, d.upper)
    assert Fraction(re.search(rf"width <= ({NUM})", enc).group(1)) >= d.width
    for e in res.budget:
        m = re.search(rf"^\s+{re.escape(e.name)}\s+<= ({NUM})$", text, re.M)
        assert m and Fraction(m.group(1)) >= upper_fraction(e.bound)
    data = json.loads(json.dumps(res.to_dict(), default=str))
    assert Fraction(data["density"]["width"]) >= d.width
    for e, rec in zip(res.budget, data["error_budget"]):
        assert Fraction(rec["bound"]) >= upper_fraction(e.bound)
    assumed = [h.name for h in res.hypotheses if h.status == "assumed"]
    assert (("does not prove" in text) if assumed else ("Unconditional" in text))
    return text


def test_ffield_exact_density_is_shown_as_a_fraction():
    from certify.ffield.race import certify_ffrace, residue_race as ff_residue_race
    # q = 3, m = t^3 + 2t + 1: theta = pi/6 exactly, a finite orbit closure (tests/ffield)
    qn, G, wd = ff_residue_race(3, "t^3+2*t+1", "cumulative")
    res = certify_ffrace(qn, G, wd, target_width=1e-10, leader_bound=0)
    assert res.density.width == 0
    text = _check_ff_screen(res)
    assert "exactly (the orbit closure is finite" in text.splitlines()[0]


@pytest.mark.parametrize("m,classes,mode", [("t^2+1", ["t+1", "1"], "cumulative"),
                                            ("t^2+1", ["t+1", "1"], "degree")])
def test_ffield_screens_round_outward(m, classes, mode):
    from certify.ffield.race import certify_ffrace, parse_race
    qn, G, wd = parse_race(3, m, classes, None, mode)
    res = certify_ffrace(qn, G, wd, target_width=1e-8, leader_bound=0)
    _check_ff_screen(res)
