"""Twist-family certificates (kind ``twist-family-race``): written by ``certify twists``, verified
whole, and every tampered copy rejected (the tamper suite of tests/certificate/test_tamper.py,
for the family kind).

The clean family: the 20 quadratic twists of degree 2 of y^2 = x^3 + t x + t^2 + 1 over F_5(t).
Independent checks beside the verifier's own: the population count q^d - q^(d-1) of monic
square-free polynomials (all coprime to the irreducible quartic discriminant), and each
member's L(E_f, u) from a plain loop over F_5 and F_25 point counts for two members.
"""

import copy
import json
import time
from fractions import Fraction

import pytest

from certify.cli import main

LIMIT_SECONDS = 10.0
CURVE = ["5", "t", "t^2 + 1"]


@pytest.fixture(scope="module")
def clean(tmp_path_factory):
    d = tmp_path_factory.mktemp("twists")
    assert main(["twists", *CURVE, "--degrees", "2", "--width", "1e-3", "--json", str(d / "t.json")]) == 0
    data = json.loads((d / "t.json").read_text())
    assert data["kind"] == "twist-family-race"
    return data


def _run(tmp_path, data) -> tuple[int, float]:
    p = tmp_path / "t.json"
    p.write_text(json.dumps(data), encoding="utf-8")
    t0 = time.time()
    code = main(["verify", str(p)])
    return code, time.time() - t0


def test_clean_certificate_verifies_and_holds_the_family(clean, tmp_path):
    code, secs = _run(tmp_path, clean)
    assert code == 0 and secs < LIMIT_SECONDS
    sp = clean["spectrum"]
    # monic square-free quadratics over F_5: 5^2 - 5 = 20, all coprime to the irreducible quartic
    assert sp["population"] == 20 == len(sp["members"]) and not sp["sampled"]
    assert len({m["f"] for m in sp["members"]}) == 20
    # the mean is the mean of the stored member ends, and the answer contains it
    lo = sum(Fraction(m["density"]["lower"]) for m in sp["members"]) / 20
    hi = sum(Fraction(m["density"]["upper"]) for m in sp["members"]) / 20
    enc = clean["answer"]["enclosure"]
    assert Fraction(enc["lower"]) <= lo <= hi <= Fraction(enc["upper"])
    assert Fraction(enc["upper"]) - Fraction(enc["lower"]) <= Fraction(1, 1000)
    assert sum(sp["summary"]["histogram"]["counts"]) == 20
    assert sum(sp["summary"]["rank_counts"].values()) == 20


def _brute_l(q, A, B, f):
    """L(E_f, u) of degree 6 from point counts over F_5 and F_25 and F_125 by a plain loop
    (FLINT's fq_default, no code of certify.curves): Newton's identities, functional equation."""
    from certify.certificate.curves import brute_force_frobenius_sum
    from certify.curves.family import twist
    from certify.curves.model import make_curve
    from certify.ffield.poly import parse_poly

    E = make_curve(q, A, B)
    Ef = twist(E, parse_poly(f, E.field))
    c = [brute_force_frobenius_sum(Ef, n) for n in (1, 2, 3)]
    # log L = sum c_n u^n / n  ->  coefficients l_1..l_3 by Newton's identities
    l = [Fraction(1)]
    for k in (1, 2, 3):
        l.append(sum(c[i - 1] * l[k - i] for i in range(1, k + 1)) / k)
    return [int(x) for x in l]


@pytest.mark.parametrize("index", [0, 3])
def test_member_l_polynomials_against_a_plain_point_count(clean, index):
    m = clean["spectrum"]["members"][index]
    assert m["l_degree"] == 6
    assert m["l_coefficients"][:4] == _brute_l(5, "t", "t^2 + 1", m["f"])
    # the functional equation (inverse roots of modulus q): l_{6-k} = eps q^{6-2k} l_k
    L = m["l_coefficients"]
    assert all(L[6 - k] == m["sign"] * 5 ** (6 - 2 * k) * L[k] for k in range(4))


def _m(d, i=0):
    return d["spectrum"]["members"][i]


def _s(d):
    return d["spectrum"]["summary"]


def _hyp(d, name):
    return next(h for h in d["hypotheses"] if h["name"].startswith(name))


def _narrow(d):
    e = d["answer"]["enclosure"]
    lo, hi = Fraction(e["lower"]), Fraction(e["upper"])
    w = hi - lo
    e["lower"] = str(round(float(lo + w / 3), 25))
    e["upper"] = str(round(float(hi - w / 3), 25))


def _bump(s: str, k: int = 3) -> str:
    i = s.index(".") + k
    return s[:i] + str((int(s[i]) + 5) % 10) + s[i + 1:]


def _member_narrowed(d):
    m = _m(d)["density"]
    lo, hi = Fraction(m["lower"]), Fraction(m["upper"])
    m["lower"] = f"{float(lo + (hi - lo) / 3):.12f}"


def _consistent_forgery(d):
    """A member's enclosure moved, and every derived field recomputed with the project's own
    functions (as a careful forger would): only the recount can catch it."""
    from certify.certificate.recount import answer_from_enclosure
    from certify.certificate.twists import budget_record, summary_record

    m = _m(d)["density"]
    m["lower"], m["upper"] = "0.2", "0.2001"
    sp = d["spectrum"]
    sp["summary"] = summary_record(sp["members"], 2, 1.0, 20)
    lo, hi = Fraction(sp["summary"]["mean"]["lower"]), Fraction(sp["summary"]["mean"]["upper"])
    d["answer"] = answer_from_enclosure(lo, hi, Fraction(d["parameters"]["target_width"]))
    d["error_budget"] = budget_record(sp["members"])


def _forged_evidence(d):
    from certify.certificate.twists import evidence_sentence

    e = _hyp(d, "LI")["evidence"][0]
    e["data"]["relation_case"] = 3
    e["text"] = evidence_sentence(e["kind"], e["data"])


def _li_claimed_verified(d):
    """Every member's assumption erased and LI stated as verified, consistently (a careful forger)."""
    from certify.certificate.twists import evidence_data, evidence_sentence

    for m in d["spectrum"]["members"]:
        m["assumed"] = []
    h = _hyp(d, "LI")
    h.update(status="verified", statement="no certified member has non-torsion inverse roots: nothing to assume")
    kind, data = evidence_data(d["spectrum"]["members"])["LI for each member"][0]
    h["evidence"] = [{"kind": kind, "text": evidence_sentence(kind, data), "data": data}]
    d["caution"] = ("Unconditional result: no hypothesis is assumed (each one listed is a theorem or was "
                    "verified in full by this computation). Re-check this file with `certify verify`.")


def _histogram_moved(d):
    c = _s(d)["histogram"]["counts"]
    i = next(j for j, x in enumerate(c) if x)
    c[i] -= 1
    c[(i + 10) % len(c)] += 1


def _member_swapped(d):
    ms = d["spectrum"]["members"]
    ms[0], ms[1] = ms[1], ms[0]


def _member_removed(d):
    d["spectrum"]["members"].pop()
    d["spectrum"]["population"] = 19


def _c_changed(d):
    d["parameters"]["c"] = 0.1
    d["question"]["c"] = 0.1


TAMPER = {
    "enclosure narrowed": _narrow,
    "answer lower end moved up": lambda d: d["answer"]["enclosure"].update(lower=d["answer"]["enclosure"]["upper"]),
    "exact value claimed": lambda d: d["answer"].update(exact="2/5"),
    "target_met flipped": lambda d: d["answer"].update(target_met=not d["answer"]["target_met"]),
    "answer width changed": lambda d: d["answer"].update(width="1e-30"),
    "member density changed": lambda d: _m(d, 2)["density"].update(lower=_bump(_m(d, 2)["density"]["lower"])),
    "member enclosure narrowed": _member_narrowed,
    "member density and every derived field forged consistently": _consistent_forgery,
    "member L coefficient changed": lambda d: _m(d, 1)["l_coefficients"].__setitem__(1, 3),
    "member rank changed": lambda d: _m(d).update(rank=0),
    "member sign flipped": lambda d: _m(d).update(sign=-_m(d)["sign"]),
    "member conductor degree changed": lambda d: _m(d).update(conductor_degree=9),
    "member polynomial changed": lambda d: _m(d).update(f="t^2"),
    "member duplicated": lambda d: d["spectrum"]["members"].append(copy.deepcopy(_m(d))),
    "member replaced by a copy of another": lambda d: d["spectrum"]["members"].__setitem__(
        1, copy.deepcopy(_m(d))),
    "member removed": _member_removed,
    "members reordered": _member_swapped,
    "member status upgraded": lambda d: _m(d).update(status="certified on the orbit closure (relations [])"),
    "member density removed": lambda d: _m(d).update(density=None),
    "hypothesis removed": lambda d: d["hypotheses"].pop(),
    "LI upgraded to theorem": lambda d: _hyp(d, "LI").update(status="theorem"),
    "LI claimed verified, members' assumptions erased consistently": _li_claimed_verified,
    "member assumption erased": lambda d: _m(d).update(assumed=[]),
    "RH downgraded": lambda d: _hyp(d, "RH").update(status="assumed"),
    "evidence sentence changed": lambda d: _hyp(d, "LI")["evidence"][0].update(text="LI proven"),
    "evidence data forged with its sentence": _forged_evidence,
    "evidence item duplicated": lambda d: _hyp(d, "RH")["evidence"].append(
        copy.deepcopy(_hyp(d, "RH")["evidence"][0])),
    "bound lowered": lambda d: d["error_budget"][0].update(bound="1e-40"),
    "budget entry removed": lambda d: d["error_budget"].pop(),
    "statement changed": lambda d: d["question"].update(statement="density of everything"),
    "label changed": lambda d: d["question"].update(label="mean delta = 1/2"),
    "twist degree changed": lambda d: d["question"].update(d=3),
    "curve changed": lambda d: d["question"].update(A="t + 1"),
    "summary mean changed": lambda d: _s(d)["mean"].update(lower="2/5"),
    "histogram count moved": _histogram_moved,
    "share within c/d changed": lambda d: _s(d)["within"].update(lower="1/2"),
    "rank counts changed": lambda d: _s(d)["rank_counts"].update({"0": 6, "1": 11}),
    "spread changed": lambda d: _s(d)["spread"].update(lower="0.1", upper="0.3"),
    "certified count changed": lambda d: _s(d).update(certified=21),
    "summary field added": lambda d: _s(d).update(median="1/2"),
    "population changed": lambda d: d["spectrum"].update(population=25),
    "sampled flipped": lambda d: d["spectrum"].update(sampled=True),
    "c changed in question and parameters": _c_changed,
    "bins changed": lambda d: d["parameters"].update(bins=10),
    "target parameter changed": lambda d: d["parameters"].update(target_width="1/3"),
    "parameter added": lambda d: d["parameters"].update(verified=True),
    "crafted: 10^9 boxes": lambda d: d["parameters"].update(max_boxes=10**9),
    "crafted: twist degree 40": lambda d: d["parameters"].update(d=40),
    "crafted: target 1e-999999999": lambda d: d["parameters"].update(target_width="1e-999999999"),
    "crafted: sample of 10^9 with seed": lambda d: d["parameters"].update(sample=10**9, seed=1),
    "command line changed": lambda d: d["provenance"].update(command_line="certify twists --prove"),
    "input digest changed": lambda d: d["provenance"].update(input_digest="sha256:" + "1" * 64),
    "reference removed": lambda d: d["references"].pop(),
    "caution changed": lambda d: d.update(caution="Unconditional result."),
    "base curve changed": lambda d: d["spectrum"]["base_curve"].update(conductor_degree=5),
    "kind swapped": lambda d: d.update(kind="curve-race"),
    "unknown top-level key": lambda d: d.update(verified_by="a referee"),
}


def test_the_suite_is_large_enough():
    assert len(TAMPER) >= 20


@pytest.mark.parametrize("name", list(TAMPER))
def test_tampered_twist_certificate_rejected(clean, tmp_path, name):
    d = copy.deepcopy(clean)
    TAMPER[name](d)
    assert d != clean, "the mutation changed nothing"
    code, secs = _run(tmp_path, d)
    assert code != 0, f"'{name}' was accepted"
    assert secs < LIMIT_SECONDS, f"'{name}' took {secs:.1f} s"


def test_several_degrees_bundle_verifies_and_a_tampered_entry_fails(tmp_path, capsys):
    out = tmp_path / "b.json"
    assert main(["twists", *CURVE, "--degrees", "1,2", "--width", "1e-3", "--json", str(out),
                 "--out", str(tmp_path / "dir")]) == 0
    b = json.loads(out.read_text())
    assert b["kind"] == "twist-family" and [c["question"]["d"] for c in b["certificates"]] == [1, 2]
    # degree 1: the five twists by t + a; every member's density is exact, so is the mean
    one = b["certificates"][0]
    assert one["answer"]["exact"] == "3/10" and len(one["spectrum"]["members"]) == 5
    # no member's density assumes anything there: the caution says so; degree 2 assumes LI
    assert one["caution"].startswith("Unconditional result")
    assert {h["name"]: h["status"] for h in one["hypotheses"]}["LI for each member"] == "verified"
    assert b["certificates"][1]["caution"].startswith("Conditional result") and "LI" in b["caution"]
    assert "mean = 3/10 exactly" in capsys.readouterr().out
    assert main(["verify", str(out)]) == 0
    assert main(["verify", str(tmp_path / "dir")]) == 0
    capsys.readouterr()
    b["question"]["twist_degrees"] = [1, 3]
    out.write_text(json.dumps(b))
    assert main(["verify", str(out)]) != 0
    b["question"]["twist_degrees"] = [1, 2]
    b["certificates"][1]["spectrum"]["members"][0]["rank"] = 0
    out.write_text(json.dumps(b))
    assert main(["verify", str(out)]) != 0


def test_render_of_a_bundle_refuses_a_tampered_member(tmp_path, capsys):
    out = tmp_path / "b.json"
    assert main(["twists", *CURVE, "--degrees", "1,2", "--width", "1e-3", "--json", str(out)]) == 0
    b = json.loads(out.read_text())
    assert main(["render", str(out), "--out", str(tmp_path / "ok"), "--formats", "md"]) == 0
    assert (tmp_path / "ok" / "b.md").read_text().count("## Twist degree") == 2
    # one member's enclosure narrowed inside the degree-2 certificate: nothing rendered
    m = next(m for m in b["certificates"][1]["spectrum"]["members"]
             if m["density"] and m["density"]["lower"] != m["density"]["upper"])
    m["density"]["upper"] = m["density"]["lower"]
    out.write_text(json.dumps(b))
    capsys.readouterr()
    assert main(["render", str(out), "--out", str(tmp_path / "bad"), "--formats", "md,tex"]) == 4
    err = capsys.readouterr().err
    assert "does not verify; nothing rendered" in err and "Traceback" not in err
    assert not (tmp_path / "bad").exists() or not list((tmp_path / "bad").iterdir())
    assert main(["verify", str(out)]) == 4


@pytest.mark.parametrize("edit", ["base curve renamed", "field added", "question field added"])
def test_bundle_claims_beyond_its_certificates_rejected(tmp_path, edit):
    out = tmp_path / "b.json"
    assert main(["twists", *CURVE, "--degrees", "1,2", "--width", "1e-3", "--json", str(out)]) == 0
    b = json.loads(out.read_text())
    if edit == "base curve renamed":
        b["question"]["base_curve"] = b["question"]["base_curve"].replace("t^2 + 1", "t^2 + 2")
    elif edit == "field added":
        b["verified_by"] = "a referee"
    else:
        b["question"]["proved"] = "yes"
    out.write_text(json.dumps(b))
    assert main(["verify", str(out)]) != 0
    assert main(["render", str(out), "--out", str(tmp_path / "r")]) != 0


def test_render_markdown_and_latex(clean, tmp_path):
    p = tmp_path / "fam.json"
    p.write_text(json.dumps(clean))
    assert main(["render", str(p), "--out", str(tmp_path), "--formats", "md,tex,fragment"]) == 0
    md = (tmp_path / "fam.md").read_text()
    assert "all 20 twists" in md and "certify verify fam.json" in md
    # the members as a table: a header and one row per member, beginning with f
    assert "| Member f | Conductor degree |" in md and "\n| t^2 + 4 | " in md
    tex = (tmp_path / "fam.tex").read_text()
    assert r"\begin{document}" in tex and "elliptic" in tex


def test_python_api_gives_the_family_certificate():
    from certify.api import twist_family_certificate, verify

    cert = twist_family_certificate(5, "t", "t^2 + 1", 1)
    # degree 1: the five twists by t + a, each density exact; their mean 3/10 exactly
    assert cert.kind == "twist-family-race" and cert.answer["exact"] == "3/10"
    assert len(cert.spectrum["members"]) == 5 and verify(cert).ok


def test_a_seeded_sample_with_a_relation_case_member_verifies(tmp_path):
    """Twelve of the 7^3 - 7^2 = 294 cubic twists of y^2 = x^3 + t x + t^2 + 3 over F_7 (seed 5); one
    member's angles satisfy relations (certified on the orbit closure); a changed seed fails."""
    p = tmp_path / "s.json"
    assert main(["twists", "7", "t", "t^2 + 3", "--degrees", "3", "--sample", "12", "--seed", "5",
                 "--width", "1e-3", "--json", str(p)]) == 0
    d = json.loads(p.read_text())
    sp = d["spectrum"]
    assert sp["sampled"] and len(sp["members"]) == 12 and sp["population"] <= 294
    assert sp["summary"]["relation_case"] >= 1
    assert main(["verify", str(p)]) == 0
    d["question"]["seed"] = d["parameters"]["seed"] = 6
    p.write_text(json.dumps(d))
    assert main(["verify", str(p)]) != 0
