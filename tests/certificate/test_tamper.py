"""Tampered certificates of every kind are rejected (non-zero exit, within 10 s); clean ones pass.

Issue 10's tamper suite: one variant per field a document shows, plus duplicated,
upgraded and inserted entries and crafted sizes (a radius of 1e30, a bound of
1e-999999999, a working precision of 10^8 bits).  Each variant is written to a
file and checked through ``certify verify`` (``certify.cli.main``), as a referee
would; the clean file of each kind must verify.
"""

import copy
import json
import time

import pytest

from certify.cli import main

LIMIT_SECONDS = 10.0


@pytest.fixture(scope="module")
def clean(tmp_path_factory):
    """One certificate per kind, written by the CLI: {kind: dict}."""
    d = tmp_path_factory.mktemp("clean")
    out = {}
    assert main(["race", "4", "3", "1", "--digits", "8", "--json", str(d / "q.json")]) == 0
    assert main(["ffrace", "3", "t^2+1", "t+1", "1", "--digits", "6", "--leaders", "10",
                 "--json", str(d / "f.json")]) == 0
    # five non-torsion angles, LI assumed (the curve of tests/curves/test_race.py)
    assert main(["curve", "5", "2 + 2*t + 2*t^2 + 4*t^5", "4 + 4*t + t^7 + t^8", "--digits", "6",
                 "--json", str(d / "c.json")]) == 0
    assert main(["order", "5", "1", "2", "3", "--digits", "2", "--json", str(d / "o.json")]) == 0
    # an elliptic curve over Q of conductor 11 at a modest width (ecq-race)
    assert main(["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--observe", "0",
                 "--certificate", str(d / "e.json")]) == 0
    for k, name in (("dirichlet-race", "q"), ("ffield-race", "f"), ("curve-race", "c"),
                    ("order-race", "o"), ("ecq-race", "e")):
        out[k] = json.loads((d / f"{name}.json").read_text())
        assert out[k]["kind"] == k
    return out


def _run(tmp_path, text: str) -> tuple[int, float]:
    p = tmp_path / "t.json"
    p.write_text(text, encoding="utf-8")
    t0 = time.time()
    code = main(["verify", str(p)])
    return code, time.time() - t0


@pytest.mark.parametrize("kind", ["dirichlet-race", "ffield-race", "curve-race", "order-race",
                                  "ecq-race"])
def test_clean_certificates_verify(clean, tmp_path, kind):
    code, secs = _run(tmp_path, json.dumps(clean[kind]))
    assert code == 0 and secs < LIMIT_SECONDS
    # a byte-order mark is accepted
    code, _ = _run(tmp_path, "\ufeff" + json.dumps(clean[kind]))
    assert code == 0


def _hyp(d, name):
    return next(h for h in d["hypotheses"] if h["name"] == name)


def _ev(d, hyp, kind):
    return next(e for e in _hyp(d, hyp)["evidence"] if e["kind"] == kind)


def _grp(d):
    return d["spectrum"]["groups"][0]


def _bump(s: str, k: int = 3) -> str:
    """Change the k-th decimal digit of a decimal string (far above any stored radius)."""
    i = s.index(".") + k
    return s[:i] + str((int(s[i]) + 5) % 10) + s[i + 1:]


def _narrow(d):
    e = d["answer"]["enclosure"]
    from fractions import Fraction
    lo, hi = Fraction(e["lower"]), Fraction(e["upper"])
    w = hi - lo
    e["lower"] = str(round(float(lo + w / 3), 25))
    e["upper"] = str(round(float(hi - w / 3), 25))


def _insert_grh_theorem(d):
    fake = copy.deepcopy(_hyp(d, "GRH"))
    fake["status"] = "theorem"
    d["hypotheses"].insert(0, fake)


def _dup_evidence(d):
    e = copy.deepcopy(_ev(d, "GRH", "zero-count"))
    e["data"]["height"] = "10000"
    e["data"]["count"] = 10000
    _hyp(d, "GRH")["evidence"].append(e)


def _raise_height(d):
    g = _grp(d)
    g["isolation_height"] = str(float(g["isolation_height"]) + 15)
    for e in _hyp(d, "GRH")["evidence"]:
        if e["kind"] in ("zeros-on-critical-line", "zero-count"):
            key = "isolation_height" if e["kind"] == "zeros-on-critical-line" else "height"
            e["data"][key] = g["isolation_height"]


def _drop_zero(d):
    del _grp(d)["zeros"][5]


DIRICHLET = {
    "question statement reversed": lambda d: d["question"].update(
        statement=d["question"]["statement"].replace("pi(x;4,3) > pi(x;4,1)", "pi(x;4,1) > pi(x;4,3)")),
    "definition: natural density": lambda d: d["question"].update(definition="natural density"),
    "normalisation changed": lambda d: d["question"].update(normalisation="E(x) = pi(x)"),
    "label changed": lambda d: d["question"].update(label="delta(4;1,3)"),
    "modulus changed": lambda d: d["question"].update(modulus=8),
    "classes swapped": lambda d: d["question"].update(classes=[1, 3]),
    "weights changed": lambda d: d["question"]["weights"][0].update(weight="2"),
    "race kind changed": lambda d: d["question"].update(kind="residues"),
    "GRH upgraded to theorem": lambda d: _hyp(d, "GRH").update(status="theorem"),
    "LI upgraded to verified": lambda d: _hyp(d, "LI").update(status="verified"),
    "second GRH entry inserted": _insert_grh_theorem,
    "LI duplicated": lambda d: d["hypotheses"].append(copy.deepcopy(_hyp(d, "LI"))),
    "GRH removed": lambda d: d.update(hypotheses=[h for h in d["hypotheses"] if h["name"] != "GRH"]),
    "LI removed": lambda d: d.update(hypotheses=[h for h in d["hypotheses"] if h["name"] != "LI"]),
    "hypotheses reordered": lambda d: d["hypotheses"].reverse(),
    "GRH statement changed": lambda d: _hyp(d, "GRH").update(statement="GRH holds."),
    "reference added": lambda d: _hyp(d, "GRH").update(reference="a proof, Annals 2030"),
    "unexpected hypothesis": lambda d: d["hypotheses"].append(
        {"name": "Extra", "statement": "s", "status": "verified", "evidence": [], "reference": ""}),
    "evidence text rewritten": lambda d: _ev(d, "GRH", "zero-count").update(
        text="GRH verified to height 10000"),
    "evidence duplicated with invented data": _dup_evidence,
    "evidence removed": lambda d: _hyp(d, "LI").update(
        evidence=[e for e in _hyp(d, "LI")["evidence"] if e["kind"] != "central-value"]),
    "zero count changed": lambda d: _ev(d, "GRH", "zero-count")["data"].update(count=3),
    "completeness height raised": lambda d: _ev(d, "GRH", "moment-completeness")["data"].update(
        complete_below="9999"),
    "simple zeros inflated": lambda d: _ev(d, "LI", "simple-zeros")["data"].update(proven_simple=99),
    "relation norm bound raised": lambda d: _ev(d, "LI", "integer-relation-search")["data"].update(
        norm_lower_bound="99999"),
    "central value changed": lambda d: _ev(d, "LI", "central-value")["data"]["re"].update(mid="0.5"),
    "published verification text": lambda d: _ev(d, "GRH", "published-verification").update(
        text="GRH has been verified for every conductor"),
    "caution rewritten": lambda d: d.update(caution="Unconditional theorem."),
    "references changed": lambda d: d["references"].append("an invented reference"),
    "isolation height raised past missing zeros": _raise_height,
    "zero dropped": _drop_zero,
    "zero moved": lambda d: _grp(d)["zeros"][3].update(mid=_bump(_grp(d)["zeros"][3]["mid"], 6)),
    "moment changed": lambda d: _grp(d)["moments"]["target_sums"][1].update(
        mid=_bump(_grp(d)["moments"]["target_sums"][1]["mid"], 6)),
    "residual sum changed": lambda d: _grp(d)["moments"]["residual_sums"][0].update(mid="0.5"),
    "scale changed": lambda d: _grp(d)["scale"].update(mid="3"),
    "group label changed": lambda d: _grp(d).update(label="chi_{4,1}"),
    "parity flipped": lambda d: _grp(d)["l_functions"][0].update(parity=0),
    "enclosure narrowed": _narrow,
    "enclosure shifted": lambda d: d["answer"]["enclosure"].update(lower="0.2", upper="0.3"),
    "width changed": lambda d: d["answer"].update(width="1e-20"),
    "digits inflated": lambda d: d["answer"].update(certified_digits="0.995927923279"),
    "target changed": lambda d: d["answer"].update(target_width="1e-30"),
    "target_met flipped": lambda d: d["answer"].update(target_met=not d["answer"]["target_met"]),
    "gap to one changed": lambda d: d["answer"]["gap_to_one"].update(lower="1e-9"),
    "mean changed": lambda d: d["answer"].update(mean="1/3"),
    "variance changed": lambda d: d["answer"]["variance"].update(mid="0.9"),
    "engine ball moved": lambda d: d["answer"]["engine_ball"].update(mid="0.5"),
    "exact value claimed": lambda d: d["answer"].update(exact={"value": "1/2", "reason": "symmetry"}),
    "bound lowered": lambda d: d["error_budget"][0].update(bound="1e-30"),
    "budget entry duplicated": lambda d: d["error_budget"].append(copy.deepcopy(d["error_budget"][0])),
    "budget entry removed": lambda d: d["error_budget"].pop(),
    "budget description changed": lambda d: d["error_budget"][0].update(description="nothing"),
    "period changed": lambda d: d["parameters"].update(period_L="100/7"),
    "terms changed": lambda d: d["parameters"].update(terms=d["parameters"]["terms"] + 1),
    "digits requested changed": lambda d: d["parameters"].update(digits_requested=20),
    "zeros used changed": lambda d: d["parameters"].update(zeros_used=1000),
    "target width parameter changed": lambda d: d["parameters"].update(target_width="1e-3"),
    "input digest changed": lambda d: d["provenance"].update(input_digest="sha256:" + "0" * 64),
    "crafted: radius 1e30": lambda d: _grp(d)["zeros"][0].update(rad="1" + "0" * 30),
    "crafted: bound 1e-999999999": lambda d: d["error_budget"][0].update(bound="1e-999999999"),
    "crafted: precision 10^8 bits": lambda d: d["parameters"].update(working_precision_bits=10**8),
    "crafted: precision 20000 bits": lambda d: d["parameters"].update(working_precision_bits=20000),
    "crafted: tiny radius": lambda d: _grp(d)["zeros"][0].update(rad="0." + "0" * 7990 + "1"),
    "crafted: moments at 10^6 bits": lambda d: _grp(d)["moments"].update(source_bits=10**6),
    "crafted: 10^4 moments": lambda d: _grp(d)["moments"].update(count=10**4, source_count=10**4),
    "crafted: huge modulus": lambda d: d["question"].update(modulus=10**40),
    "crafted: isolation height 1e9": lambda d: _grp(d).update(isolation_height="1000000000"),
    "schema version changed": lambda d: d.update(schema_version=3),
    "kind changed": lambda d: d.update(kind="curve-race"),
    "unknown top-level key": lambda d: d.update(verified_by="a referee"),
}

FFIELD = {
    "enclosure narrowed": _narrow,
    "L coefficient changed": lambda d: d["spectrum"]["l_polynomials"][0]["coefficients"].__setitem__(
        0, "7"),
    "inverse root moved": lambda d: d["spectrum"]["l_polynomials"][0]["inverse_roots"][0]["re"].update(
        mid="1.5"),
    "relation changed": lambda d: d["spectrum"]["relations"][0].__setitem__(0, 5),
    "relations hypothesis removed": lambda d: d.update(
        hypotheses=[h for h in d["hypotheses"] if h["name"] != "relations"]),
    "Weil downgraded": lambda d: _hyp(d, "Weil").update(status="assumed"),
    "relations upgraded": lambda d: _hyp(d, "relations").update(status="theorem"),
    "hypothesis duplicated": lambda d: d["hypotheses"].append(copy.deepcopy(d["hypotheses"][0])),
    "bound lowered": lambda d: d["error_budget"][0].update(bound="1e-40"),
    "evidence rewritten": lambda d: _hyp(d, "Weil")["evidence"][0].update(text="all fine"),
    "statement changed": lambda d: d["question"].update(statement="natural density of nothing"),
    "classes changed": lambda d: d["question"].update(classes=["t+2", "1"]),
    "mode changed": lambda d: d["question"].update(mode="degree"),
    "caution rewritten": lambda d: d.update(caution="Unconditional."),
    "digits inflated": lambda d: d["answer"].update(certified_digits="0.62878810366"),
    "exact value claimed": lambda d: d["answer"].update(exact="2/3"),
    "crafted: precision 10^8 bits": lambda d: d["parameters"].update(prec=10**8),
    "crafted: 10^9 boxes": lambda d: d["parameters"].update(max_boxes=10**9),
    "crafted: target 1e-999999999": lambda d: d["parameters"].update(target_width="1e-999999999"),
    "crafted: huge field": lambda d: d["question"].update(q=10**9),
    "parameter changed": lambda d: d["parameters"].update(boxes=1),
}

CURVE = {
    "enclosure narrowed": _narrow,
    "L coefficient changed": lambda d: d["spectrum"]["l_polynomial"]["coefficients"].__setitem__(1, 3),
    "rank changed": lambda d: d["spectrum"]["l_polynomial"].update(analytic_rank=2),
    "hypothesis removed": lambda d: d["hypotheses"].pop(0),
    "LI upgraded": lambda d: _hyp(d, "LI").update(status="theorem"),
    "bound lowered": lambda d: d["error_budget"][0].update(bound="1e-40"),
    "curve changed": lambda d: d["question"].update(A="2 + 2*t + 2*t^2 + 3*t^5"),
    "LI downgraded evidence": lambda d: _hyp(d, "LI")["evidence"].append(
        {"kind": "recount", "text": "LI proven", "data": {}}),
    "statement changed": lambda d: d["question"].update(statement="density of everything"),
    "bad place changed": lambda d: d["spectrum"]["curve"]["bad_places"][0].update(kodaira="II"),
    "crafted: confirm 100": lambda d: d["parameters"].update(confirm=100),
    "crafted: precision 10^8 bits": lambda d: d["parameters"].update(prec=10**8),
}

# -- the evidence of the recount kinds: each item's data, its sentence, repeated and inserted
# items; "consistent" forgeries regenerate the sentence from the forged data (as a careful
# forger would, with the project's own function), so only the re-derivation can catch them


def _item(d, hyp, i=0):
    return _hyp(d, hyp)["evidence"][i]


def _regen(kind, item):
    if kind == "ffield-race":
        from certify.ffield.race import evidence_sentence
    else:
        from certify.curves.race import evidence_sentence
    item["text"] = evidence_sentence(item["kind"], item["data"])


def _forge(kind, hyp, i, edit):
    def f(d):
        it = _item(d, hyp, i)
        edit(it["data"])
        _regen(kind, it)
    return f


def _coef(s: str) -> str:
    return "7" if s != "7" else "8"


def _ff_both_coefficients(d):
    """The L-polynomial changed consistently in the spectrum and in its evidence."""
    L = d["spectrum"]["l_polynomials"][0]
    it = _item(d, "Weil", 0)
    L["coefficients"][-1] = _coef(L["coefficients"][-1])
    it["data"]["coefficients"] = list(L["coefficients"])


def _ff_other_character(d):
    it = copy.deepcopy(_item(d, "Weil", 0))
    it["data"]["character"] = "chi_{0,1}" if it["data"]["character"] != "chi_{0,1}" else "chi_{1,0}"
    _regen("ffield-race", it)
    _hyp(d, "Weil")["evidence"].append(it)


def _set(key, value):
    return lambda data: data.update({key: value})


FFIELD_EVIDENCE = {
    "weil: sentence changed": lambda d: _item(d, "Weil", 2).update(
        text=_item(d, "Weil", 2)["text"].replace("0 undecided", "no root undecided")),
    "weil: census inflated (consistent)": _forge("ffield-race", "Weil", 0,
                                                 lambda x: x.update(roots_modulus_sqrt_q=x["roots_modulus_sqrt_q"] + 1)),
    "weil: undecided count changed (consistent)": _forge("ffield-race", "Weil", 1,
                                                         lambda x: x.update(undecided=x["undecided"] + 1)),
    "weil: expected degree changed (consistent)": _forge("ffield-race", "Weil", 0,
                                                         lambda x: x.update(expected_degree=x["expected_degree"] + 2)),
    "weil: unit roots changed (consistent)": _forge("ffield-race", "Weil", 3,
                                                    lambda x: x.update(roots_modulus_1=x["roots_modulus_1"] + 1)),
    "weil: coefficient changed in the evidence only": _forge(
        "ffield-race", "Weil", 0, lambda x: x["coefficients"].__setitem__(-1, _coef(x["coefficients"][-1]))),
    "weil: coefficient changed in spectrum and evidence": _ff_both_coefficients,
    "weil: character renamed (consistent)": _forge("ffield-race", "Weil", 0,
                                                   _set("character", "chi_{9,9}")),
    "weil: item duplicated": lambda d: _hyp(d, "Weil")["evidence"].append(copy.deepcopy(_item(d, "Weil", 0))),
    "weil: item removed": lambda d: _hyp(d, "Weil")["evidence"].pop(),
    "weil: items reordered": lambda d: _hyp(d, "Weil")["evidence"].reverse(),
    "weil: item inserted for another character": _ff_other_character,
    "weil: data emptied": lambda d: _item(d, "Weil", 0).update(data={}),
    "weil: data key added": lambda d: _item(d, "Weil", 0)["data"].update(verified=True),
    "evidence kind renamed": lambda d: _item(d, "Weil", 0).update(kind="recount"),
    "evidence kind unknown (sentence kept)": lambda d: _item(d, "relations", 2).update(kind="proof"),
    "relations: relation changed (consistent)": _forge(
        "ffield-race", "relations", 0, lambda x: x["relations"][0].__setitem__(-1, x["relations"][0][-1] + 1)),
    "relations: relation added (consistent)": _forge(
        "ffield-race", "relations", 0, lambda x: x["relations"].append([0, 1] + [0] * (len(x["relations"][0]) - 2))),
    "relations: sentence changed": lambda d: _item(d, "relations", 0).update(text="confirmed exactly: all"),
    "search: bits raised (consistent)": _forge("ffield-race", "relations", 1,
                                               lambda x: x.update(precision_bits=x["precision_bits"] * 4)),
    "search: coefficient bound raised (consistent)": _forge("ffield-race", "relations", 1,
                                                            _set("coefficient_bound", 10**6)),
    "search: relations dropped (consistent)": _forge("ffield-race", "relations", 1, _set("relations", [])),
    "search: sentence changed": lambda d: _item(d, "relations", 1).update(
        text="LLL proved there is no other relation"),
    "caveat: removed": lambda d: _hyp(d, "relations")["evidence"].pop(2),
    "caveat: bound changed (consistent)": _forge("ffield-race", "relations", 2, _set("coefficient_bound", 999)),
    "caveat: sentence changed": lambda d: _item(d, "relations", 2).update(text="no relation is missing"),
    "caveat: duplicated": lambda d: _hyp(d, "relations")["evidence"].append(copy.deepcopy(_item(d, "relations", 2))),
    "evidence moved between hypotheses": lambda d: _hyp(d, "Weil")["evidence"].append(
        _hyp(d, "relations")["evidence"].pop(1)),
}


def _c_sum(i, delta=1):
    return lambda x: x["frobenius_sums"].__setitem__(i, x["frobenius_sums"][i] + delta)


def _c_both_coefficients(d):
    """L(E, u) changed consistently in the spectrum and its RH evidence."""
    L = d["spectrum"]["l_polynomial"]
    L["coefficients"][1] += 5
    it = _item(d, "RH for L(E,u)")
    it["data"]["coefficients"] = list(L["coefficients"])


CURVE_EVIDENCE = {
    "point counts: c_1 changed (consistent)": _forge("curve-race", "Degree and functional equation", 0, _c_sum(0)),
    "point counts: c_2 changed (consistent)": _forge("curve-race", "Degree and functional equation", 0, _c_sum(1, 5)),
    "point counts: last sum changed (consistent)": _forge("curve-race", "Degree and functional equation", 0, _c_sum(-1, 5)),
    "point counts: truncated (consistent)": _forge("curve-race", "Degree and functional equation", 0,
                                                   lambda x: x["frobenius_sums"].pop()),
    "point counts: sign flipped (consistent)": _forge("curve-race", "Degree and functional equation", 0,
                                                      lambda x: x.update(sign=-x["sign"])),
    "point counts: more degrees confirmed (consistent)": _forge(
        "curve-race", "Degree and functional equation", 0,
        lambda x: x.update(degrees_confirmed=x["degrees_confirmed"] + [x["degrees_confirmed"][-1] + 1])),
    "point counts: degrees used changed (consistent)": _forge(
        "curve-race", "Degree and functional equation", 0, lambda x: x.update(degrees_used=x["degrees_used"] - 1)),
    "point counts: degree changed (consistent)": _forge(
        "curve-race", "Degree and functional equation", 0, lambda x: x.update(degree=x["degree"] + 2)),
    "point counts: sentence changed": lambda d: _item(d, "Degree and functional equation").update(
        text="eps = +1 proved"),
    "point counts: data emptied": lambda d: _item(d, "Degree and functional equation").update(data={}),
    "inverse roots: bound lowered to 0 (consistent)": _forge("curve-race", "RH for L(E,u)", 0,
                                                             _set("max_modulus_error", "0")),
    "inverse roots: coefficients changed (consistent)": _forge(
        "curve-race", "RH for L(E,u)", 0, lambda x: x["coefficients"].__setitem__(1, x["coefficients"][1] + 1)),
    "inverse roots: degree changed (consistent)": _forge("curve-race", "RH for L(E,u)", 0,
                                                         lambda x: x.update(degree=x["degree"] - 1)),
    "inverse roots: sentence changed": lambda d: _item(d, "RH for L(E,u)").update(
        text="all inverse roots have absolute value q exactly"),
    "L-polynomial changed in spectrum and evidence": _c_both_coefficients,
    "usage note changed": lambda d: _item(d, "Weight bound for Sym^2").update(data={"term": "everything"}),
    "usage note sentence changed": lambda d: _item(d, "Weight bound for Sym^2").update(text="proved here"),
    "LI: norm bound raised (consistent)": _forge("curve-race", "LI", 0, _set("norm_lower_bound", "1.000e+9")),
    "LI: angle count changed (consistent)": _forge("curve-race", "LI", 0, lambda x: x.update(angles=x["angles"] + 1)),
    "LI: sentence changed": lambda d: _item(d, "LI").update(text="LLL proved LI"),
    "LI: torsion period changed (consistent)": _forge("curve-race", "LI", 1, lambda x: x.update(period=x["period"] + 1)),
    "LI: torsion representatives changed (consistent)": _forge(
        "curve-race", "LI", 1, lambda x: x.update(representatives=x["representatives"] + 3)),
    "LI: item duplicated": lambda d: _hyp(d, "LI")["evidence"].append(copy.deepcopy(_item(d, "LI"))),
    "LI: item removed": lambda d: _hyp(d, "LI")["evidence"].pop(),
    "LI: items reordered": lambda d: _hyp(d, "LI")["evidence"].reverse(),
    "inserted item: torsion-only in RH": lambda d: _hyp(d, "RH for L(E,u)")["evidence"].append(
        {"kind": "torsion-only", "data": {"period": 1},
         "text": "every inverse root is q times a root of unity (exact cyclotomic factors; period 1 in X)"}),
    "evidence kind unknown": lambda d: _item(d, "LI").update(kind="proof"),
    "evidence moved between hypotheses": lambda d: _hyp(d, "RH for L(E,u)")["evidence"].append(
        _hyp(d, "LI")["evidence"].pop(1)),
}


def _generic(kind):
    """One variant per field a document of a recount kind shows (question, answer, hypotheses,
    budget, parameters, provenance, references, caution, envelope)."""
    q = {
        "question label changed": lambda d: d["question"].update(label=d["question"]["label"] + " "),
        "question definition changed": lambda d: d["question"].update(definition="logarithmic density"),
        "question setting changed": lambda d: d["question"].update(setting="Q"),
        "question key added": lambda d: d["question"].update(proved=True),
        "answer lower end moved up": lambda d: d["answer"]["enclosure"].update(
            lower=d["answer"]["enclosure"]["upper"]),
        "answer upper end moved down": lambda d: d["answer"]["enclosure"].update(
            upper=d["answer"]["enclosure"]["lower"]),
        "answer width changed": lambda d: d["answer"].update(width="1e-30"),
        "answer target changed": lambda d: d["answer"].update(target_width="1e-29"),
        "answer target_met flipped": lambda d: d["answer"].update(target_met=not d["answer"]["target_met"]),
        "hypothesis statement changed": lambda d: d["hypotheses"][0].update(statement="proved"),
        "hypothesis reference changed": lambda d: d["hypotheses"][0].update(reference="Annals 2031"),
        "hypothesis renamed": lambda d: d["hypotheses"][-1].update(name="GRH"),
        "hypotheses reordered": lambda d: d["hypotheses"].reverse(),
        "assumed hypothesis upgraded": lambda d: d["hypotheses"][-1].update(status="theorem"),
        "theorem downgraded": lambda d: d["hypotheses"][0].update(status="assumed"),
        "hypothesis inserted": lambda d: d["hypotheses"].insert(0, {
            "name": "GRH", "statement": "s", "status": "theorem", "evidence": [], "reference": ""}),
        "budget entry duplicated": lambda d: d["error_budget"].append(copy.deepcopy(d["error_budget"][0])),
        "budget entry removed": lambda d: d["error_budget"].pop(),
        "budget description changed": lambda d: d["error_budget"][0].update(description="none"),
        "budget name changed": lambda d: d["error_budget"][0].update(name="nothing"),
        "parameter added": lambda d: d["parameters"].update(verified=True),
        "target parameter changed": lambda d: d["parameters"].update(target_width="1/3"),
        "command line changed": lambda d: d["provenance"].update(command_line="certify --prove"),
        "input digest changed": lambda d: d["provenance"].update(input_digest="sha256:" + "1" * 64),
        "reference removed": lambda d: d["references"].pop(),
        "reference added": lambda d: d["references"].append("Invented, 2030"),
        "crafted: bound 1e-999999999": lambda d: d["error_budget"][0].update(bound="1e-999999999"),
        "crafted: enclosure 1e30 digits": lambda d: d["answer"]["enclosure"].update(lower="0." + "1" * 9000),
        "unknown top-level key": lambda d: d.update(verified_by="a referee"),
        "schema version changed": lambda d: d.update(schema_version=1),
        "kind swapped": lambda d: d.update(kind="ffield-race" if kind == "curve-race" else "curve-race"),
    }
    return q


FFIELD.update(FFIELD_EVIDENCE)
CURVE.update(CURVE_EVIDENCE)
for _k, _m in (("ffield-race", FFIELD), ("curve-race", CURVE)):
    for _name, _f in _generic(_k).items():
        _m.setdefault(_name, _f)

# orderings of three classes (delta(5;1,2,3)): the same document shape as a race over Q, with a
# direction vector per group, a mean vector and a covariance matrix
_NOT_FOR_ORDERINGS = {"question statement reversed", "weights changed", "terms changed",
                      "published verification text"}
ORDER = {k: v for k, v in DIRICHLET.items() if k not in _NOT_FOR_ORDERINGS}
ORDER.update({
    "question statement changed": lambda d: d["question"].update(
        statement=d["question"]["statement"].replace(">", "<", 1)),
    "classes reordered": lambda d: d["question"].update(classes=[2, 1, 3]),
    "class replaced": lambda d: d["question"].update(classes=[1, 2, 4]),
    "direction vector changed": lambda d: _grp(d)["vector"][0]["re"].update(mid="1.5"),
    "mean vector changed": lambda d: d["answer"].update(mean="0,0"),
    "covariance changed": lambda d: d["answer"]["covariance"][0][1].update(mid="0.5"),
    "variance not the covariance's entry": lambda d: d["answer"]["variance"].update(
        mid=d["answer"]["covariance"][1][1]["mid"], rad=d["answer"]["covariance"][1][1]["rad"]),
    "failed consistency check recorded": lambda d: d["parameters"].update(
        consistency=[{"name": "sum", "ok": False, "lower": "0.9", "upper": "1.1", "reference": "1"}]),
    "half periods changed": lambda d: d["parameters"].update(half_periods=["1", "1"]),
    "frequency vectors changed": lambda d: d["parameters"].update(
        frequency_vectors=d["parameters"]["frequency_vectors"] + 1),
    "engine parameter removed": lambda d: d["parameters"].pop("bessel_evaluations"),
    "command line changed": lambda d: d["provenance"].update(command_line="certify order 5 1 2 3 --prove"),
    "crafted: 20 digits requested": lambda d: d["parameters"].update(digits_requested=20),
    "crafted: 0 digits requested": lambda d: d["parameters"].update(digits_requested=0),
    "group parity flipped": lambda d: _grp(d)["l_functions"][1].update(parity=0),
})


# an elliptic curve over Q: y^2 + y = x^3 - x^2 - 10x - 20 (conductor 11, rank 0, root number +1)

def _ecq_curve(d):
    return d["spectrum"]["curve"]


def _ecq_ev(d, hyp="GRH", i=0):
    return _hyp(d, hyp)["evidence"][i]


def _ecq_count_sentence(d):
    """A zero count to height 200 inserted as a well-formed item (its sentence generated from
    its fields): only the re-derivation (no count was asked for, none is re-proved) rejects it."""
    _hyp(d, "GRH")["evidence"].insert(1, _ecq_regen({
        "kind": "zero-count", "text": "",
        "data": {"height": "200", "models": 40, "zeros": 9, "disc_radius": "0.1", "inside": 0,
                 "assumed_order": None}}))


def _ecq_regen(item):
    """The item with its sentence generated from its (edited) fields: a consistent forgery."""
    from certify.certificate.ecq_items import sentence

    item["text"] = sentence(item["kind"], item["data"])
    return item


def _ecq_ind(d, kind):
    return next(e for e in d["spectrum"]["evidence"] if e["kind"] == kind)


def _ecq_edit(where, kind, edit):
    """Edit the data of an item (a GRH item by index, or an independent item by kind) and
    regenerate its sentence."""
    def f(d):
        it = _ecq_ev(d, i=where) if isinstance(where, int) else _ecq_ind(d, kind)
        edit(it["data"])
        _ecq_regen(it)
    return f


def _ecq_ap_changed(x):
    x["a_p"][3] += 1


def _ecq_rank_moved(x):
    x["value"]["mid"] = str(float(x["value"]["mid"]) * 1.001)


def _ecq_rank_theorem(d):
    d["hypotheses"].append({"name": "rank", "statement": "L(E, s) vanishes to order exactly 0 "
                            "at s = 1.", "status": "theorem", "evidence": [],
                            "reference": "a proof, Annals 2030"})


def _ecq_zero_inserted(d):
    z = copy.deepcopy(d["spectrum"]["zeros"][0])
    z["mid"] = "7.5"
    d["spectrum"]["zeros"].insert(1, z)


ECQ = {
    "curve: a-invariants of an isogenous curve": lambda d: d["question"].update(ainvs=[0, -1, 1, 0, 0]),
    "curve: a-invariants as strings": lambda d: d["question"].update(
        ainvs=[str(x) for x in d["question"]["ainvs"]]),
    "question statement: conductor changed": lambda d: d["question"].update(
        statement=d["question"]["statement"].replace("conductor 11", "conductor 37")),
    "question statement: sign reversed": lambda d: d["question"].update(
        statement=d["question"]["statement"].replace("> 0", "< 0")),
    "stored minimal model changed": lambda d: _ecq_curve(d).update(minimal_model=[0, -1, 1, 0, 0]),
    "stored discriminant changed": lambda d: _ecq_curve(d).update(discriminant="-11"),
    "stored minimal discriminant changed": lambda d: _ecq_curve(d).update(minimal_discriminant="-11"),
    "stored j-invariant changed": lambda d: _ecq_curve(d).update(j_invariant="0"),
    "stored curve conductor changed": lambda d: _ecq_curve(d).update(conductor=37),
    "CM claimed": lambda d: _ecq_curve(d).update(cm_discriminant=-3),
    "local root number product flipped": lambda d: _ecq_curve(d).update(
        root_number_from_local_data=-1),
    "reduction split -> nonsplit": lambda d: _ecq_curve(d)["local_data"][0].update(reduction="nonsplit"),
    "local root number flipped": lambda d: _ecq_curve(d)["local_data"][0].update(root_number=1),
    "Kodaira symbol changed": lambda d: _ecq_curve(d)["local_data"][0].update(kodaira="I1"),
    "Tamagawa number changed": lambda d: _ecq_curve(d)["local_data"][0].update(tamagawa=1),
    "bad prime added": lambda d: _ecq_curve(d)["local_data"].append(
        dict(copy.deepcopy(_ecq_curve(d)["local_data"][0]), p=3)),
    "local data duplicated": lambda d: _ecq_curve(d)["local_data"].append(
        copy.deepcopy(_ecq_curve(d)["local_data"][0])),
    "rank raised to 2": lambda d: d["spectrum"]["analytic_rank"].update(value=2, upper_bound=2),
    "rank no longer certified": lambda d: d["spectrum"]["analytic_rank"].update(certified=False),
    "rank root number flipped": lambda d: d["spectrum"]["analytic_rank"].update(root_number=-1),
    "central value moved": lambda d: d["spectrum"]["analytic_rank"]["central_coefficients"][0].update(
        mid="0.2"),
    "central value claimed 0": lambda d: d["spectrum"]["analytic_rank"]["central_coefficients"][0].update(
        mid="0", rad="0.2"),
    "central coefficient inserted": lambda d: d["spectrum"]["analytic_rank"][
        "central_coefficients"].append({"mid": "0", "rad": "0"}),
    "parameter root number flipped": lambda d: d["parameters"].update(root_number=-1),
    "parameter rank used changed": lambda d: d["parameters"].update(analytic_rank_used=1),
    "parameter conductor changed": lambda d: d["parameters"].update(conductor=37),
    "parameter isolation height changed": lambda d: d["parameters"].update(isolation_height=40.0),
    "parameter zeros used changed": lambda d: d["parameters"].update(zeros_used=90),
    "parameter moments changed": lambda d: d["parameters"].update(moments=30),
    "GRH height claimed without a count": lambda d: d["parameters"].update(grh_height=5.0),
    "spectrum mean changed": lambda d: d["spectrum"].update(mean="-1"),
    "spectrum variance changed": lambda d: d["spectrum"]["variance"].update(mid="0.5"),
    "isolation height raised": lambda d: d["spectrum"].update(isolation_height=40.0),
    "zero moved": lambda d: d["spectrum"]["zeros"][2].update(
        mid=_bump(d["spectrum"]["zeros"][2]["mid"], 2)),
    "zero dropped": lambda d: d["spectrum"]["zeros"].pop(3),
    "zero inserted": _ecq_zero_inserted,
    "power sum changed": lambda d: d["spectrum"]["power_sums_all_zeros"][0].update(mid="0.3"),
    "residual sum changed": lambda d: d["spectrum"]["residual_sums"][1].update(mid="0.5"),
    "zeros sentence: count inflated": lambda d: _ecq_ev(d).update(
        text=_ecq_ev(d)["text"].replace("9 zeros", "90 zeros", 1)),
    "zeros sentence: height raised": lambda d: _ecq_ev(d).update(
        text=_ecq_ev(d)["text"].replace("height 19.2075", "height 1000")),
    "residual sentence rewritten": lambda d: _ecq_ev(d, i=1).update(
        text="no zero is missing below T = 10000"),
    "root number sentence flipped": lambda d: _ecq_ev(d, i=2).update(
        text=_ecq_ev(d, i=2)["text"].replace("+1", "-1")),
    "zero-count sentence inserted": _ecq_count_sentence,
    "no-count caveat removed": lambda d: _hyp(d, "GRH")["evidence"].pop(3),
    "evidence duplicated": lambda d: _hyp(d, "GRH")["evidence"].append(copy.deepcopy(_ecq_ev(d))),
    "evidence data inserted": lambda d: _ecq_ev(d)["data"].update(verified=True, height=10000),
    "evidence kind changed": lambda d: _ecq_ev(d).update(kind="proof"),
    "LI evidence removed": lambda d: _hyp(d, "LI").update(evidence=[]),
    "GRH duplicated": lambda d: d["hypotheses"].insert(0, copy.deepcopy(_hyp(d, "GRH"))),
    "GRH upgraded to theorem": lambda d: _hyp(d, "GRH").update(status="theorem"),
    "LI upgraded to verified": lambda d: _hyp(d, "LI").update(status="verified"),
    "rank hypothesis inserted as theorem": _ecq_rank_theorem,
    "caution rewritten": lambda d: d.update(caution="Unconditional theorem."),
    "certified digits inflated": lambda d: d["answer"].update(certified_digits="0.97680"),
    "exact value claimed": lambda d: d["answer"].update(exact="1/1"),
    "enclosure narrowed": _narrow,
    "bound lowered": lambda d: d["error_budget"][0].update(bound="1e-30"),
    "crafted: digits 99": lambda d: d["parameters"].update(digits=99),
    "crafted: GRH height 1e9": lambda d: d["parameters"].update(grh_height=1e9),
    "crafted: conductor above the limit": lambda d: d["question"].update(ainvs=[0, 0, 0, -101, 307]),
    "crafted: zero radius 1e30": lambda d: d["spectrum"]["zeros"][0].update(rad="1" + "0" * 30),
    "crafted: central value radius 1e-99999": lambda d: d["spectrum"]["analytic_rank"][
        "central_coefficients"][0].update(rad="1e-99999"),
}
# structured evidence items: consistent forgeries (fields edited, sentence regenerated), fields
# unknown or missing, sentences not generated from the fields, independent items edited
ECQ_ITEMS = {
    "item: zero count raised, sentence regenerated": _ecq_edit(0, None, lambda x: x.update(zeros=10)),
    "item: isolation height raised, sentence regenerated": _ecq_edit(
        0, None, lambda x: x.update(height="40")),
    "item: residual R_1 changed, sentence regenerated": _ecq_edit(
        1, None, lambda x: x.update(first="[0.0600000 +/- 2.55e-8]")),
    "item: residual moments changed, sentence regenerated": _ecq_edit(
        1, None, lambda x: x.update(moments=20)),
    "item: root number flipped, sentence regenerated": _ecq_edit(2, None, lambda x: x.update(value=-1)),
    "item: unknown field added": lambda d: _ecq_ev(d)["data"].update(checked_by="hand"),
    "item: field removed": lambda d: _ecq_ev(d)["data"].pop("height"),
    "item: field of the wrong type": lambda d: _ecq_ev(d)["data"].update(zeros="9"),
    "item: key added beside kind, text, data": lambda d: _ecq_ev(d).update(verified=True),
    "item: sentence of another item": lambda d: _ecq_ev(d).update(text=_ecq_ev(d, i=1)["text"]),
    "item: LI sentence reworded": lambda d: _ecq_ev(d, "LI").update(text="simplicity proven"),
    "item: no-count caveat given a field": lambda d: _hyp(d, "GRH")["evidence"][3]["data"].update(
        height="0"),
    "independent: a_p changed, sentence regenerated": _ecq_edit(None, "a_p-table", _ecq_ap_changed),
    "independent: a prime dropped from the table": _ecq_edit(
        None, "a_p-table", lambda x: (x["primes"].pop(), x["a_p"].pop())),
    "independent: table bound raised": _ecq_edit(None, "a_p-table", lambda x: x.update(below=1000)),
    "independent: trace bound ratio lowered": _ecq_edit(
        None, "trace-bound", lambda x: x.update(largest_ratio="1/2")),
    "independent: reduction type changed": _ecq_edit(
        None, "reduction-types", lambda x: x.update(types=["nonsplit"])),
    "independent: root number flipped": _ecq_edit(
        None, "root-number-check", lambda x: x.update(value=-1)),
    "independent: rank proof value moved": _ecq_edit(None, "rank-proof", _ecq_rank_moved),
    "independent: rank proof widened": _ecq_edit(
        None, "rank-proof", lambda x: x["value"].update(rad="1")),
    "independent: rank proof terms changed": _ecq_edit(None, "rank-proof", lambda x: x.update(terms=10)),
    "independent: rank proof claims a published theorem": _ecq_edit(
        None, "rank-proof", lambda x: x.update(published="a proof, Annals 2030")),
    "independent: rank proof rank raised": _ecq_edit(None, "rank-proof", lambda x: x.update(rank=2)),
    "independent: an item removed": lambda d: d["spectrum"]["evidence"].pop(1),
    "independent: items reordered": lambda d: d["spectrum"]["evidence"].reverse(),
    "independent: the section removed": lambda d: d["spectrum"].pop("evidence"),
    "independent: an item's kind unknown": lambda d: d["spectrum"]["evidence"][0].update(kind="proof"),
    "independent: an item's sentence reworded": lambda d: _ecq_ind(d, "rank-proof").update(
        text=_ecq_ind(d, "rank-proof")["text"].replace("proven", "proven unconditionally")),
}
ECQ.update(ECQ_ITEMS)
ECQ.update({
    "rank upper bound changed": lambda d: d["spectrum"]["analytic_rank"].update(upper_bound=3),
    "power sum removed": lambda d: d["spectrum"]["power_sums_all_zeros"].pop(),
    "variance widened": lambda d: d["spectrum"]["variance"].update(rad="10"),
    "crafted: rank report a list": lambda d: d["spectrum"].update(analytic_rank=[]),
    "crafted: local data of integers": lambda d: _ecq_curve(d).update(local_data=[11]),
    "crafted: rank 10^9": lambda d: d["spectrum"]["analytic_rank"].update(value=10**9),
})
for _name, _f in _generic("ecq-race").items():
    if _name != "theorem downgraded":  # every ecq-race hypothesis is assumed
        ECQ.setdefault(_name, _f)
# the default suite runs one variant per kind of change (field of each part of the document,
# duplicate, upgrade, insertion, crafted size); the others (each also < 10 s) run with -m slow
ECQ_DEFAULT = {
    "curve: a-invariants of an isogenous curve", "question statement: conductor changed",
    "question definition changed", "stored minimal model changed", "reduction split -> nonsplit",
    "rank raised to 2", "central value claimed 0", "rank root number flipped",
    "isolation height raised", "zero dropped", "power sum changed", "zeros sentence: count inflated",
    "zero-count sentence inserted", "evidence duplicated", "evidence data inserted",
    "GRH duplicated", "GRH upgraded to theorem", "rank hypothesis inserted as theorem",
    "caution rewritten", "certified digits inflated", "enclosure narrowed",
    "budget entry duplicated", "parameter conductor changed", "crafted: digits 99",
    "crafted: GRH height 1e9", "crafted: conductor above the limit", "crafted: zero radius 1e30",
    "variance widened", "crafted: rank report a list",
    "item: zero count raised, sentence regenerated", "item: root number flipped, sentence regenerated",
    "item: unknown field added", "item: field removed", "independent: a_p changed, sentence regenerated",
    "independent: rank proof value moved", "independent: rank proof claims a published theorem",
    "independent: the section removed",
}

CASES = ([("dirichlet-race", k) for k in DIRICHLET] + [("ffield-race", k) for k in FFIELD]
         + [("curve-race", k) for k in CURVE] + [("order-race", k) for k in ORDER]
         + [("ecq-race", k) if k in ECQ_DEFAULT else
            pytest.param("ecq-race", k, marks=pytest.mark.slow) for k in ECQ])
MUTATORS = {"dirichlet-race": DIRICHLET, "ffield-race": FFIELD, "curve-race": CURVE,
            "order-race": ORDER, "ecq-race": ECQ}


def test_the_suite_is_large_enough():
    """At least 60 variants of each kind of certificate (issue 10)."""
    assert all(len(m) >= 60 for m in MUTATORS.values()), {k: len(m) for k, m in MUTATORS.items()}


@pytest.mark.parametrize("kind,name", CASES)
def test_tampered_certificate_rejected(clean, tmp_path, kind, name):
    d = copy.deepcopy(clean[kind])
    MUTATORS[kind][name](d)
    assert d != clean[kind], "the mutation changed nothing"
    code, secs = _run(tmp_path, json.dumps(d))
    assert code != 0, f"{kind}: '{name}' was accepted"
    assert secs < LIMIT_SECONDS, f"{kind}: '{name}' took {secs:.1f} s"


RAW = {
    "duplicate key": lambda t: t.replace('"caution":', '"caution": "x", "caution":', 1),
    "deep nesting": lambda t: t[:-2] + ', "x": ' + "[" * 100000 + "]" * 100000 + "}\n",
    "NaN": lambda t: t.replace('"terms": ', '"terms": NaN, "t2": ', 1),
    "huge integer": lambda t: t.replace('"terms": ', '"terms": 1' + "0" * 5000 + ', "t3": ', 1),
    "truncated": lambda t: t[: len(t) // 2],
}


@pytest.mark.parametrize("name", list(RAW))
def test_malformed_json_refused_cleanly(clean, tmp_path, capsys, name):
    text = RAW[name](json.dumps(clean["dirichlet-race"]))
    code, secs = _run(tmp_path, text)
    err = capsys.readouterr().err
    assert code == 2 and secs < LIMIT_SECONDS and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1


def test_a_table_folder_verifies_whole_and_a_tampered_row_fails(tmp_path, capsys):
    """Every row of `certify table` names a certificate that verify accepts; the folder and
    the index verify whole; a row whose shown enclosure is changed fails."""
    out = tmp_path / "t"
    assert main(["table", "--moduli", "3-4", "--digits", "5", "--out", str(out), "--no-cache",
                 "--quiet"]) == 0
    index = json.loads((out / "table.json").read_text())
    assert index["kind"] == "table" and len(index["rows"]) >= 4
    assert all((out / r["certificate"]).is_file() for r in index["rows"])
    assert "certificates/" in (out / "table.md").read_text()
    assert main(["verify", str(out / "table.json")]) == 0
    assert main(["verify", str(out)]) == 0
    index["rows"][1]["lower"] = index["rows"][1]["lower"][:-1] + "9"
    (out / "table.json").write_text(json.dumps(index))
    assert main(["verify", str(out / "table.json")]) == 4
