"""The LaTeX documents compile, set their formulas as mathematics, and are looked at as pages.

* the standalone certificate (longtable hypotheses that break across pages, siunitx numbers);
* the fragment, ``\\input`` into journal-like classes (amsart; a two-column article);
* no text-mode ASCII formula is left (pi(, sqrt(, <=, +/-, 1e-3, x_a outside math);
* commands and file names are printed exactly (typewriter glyphs, no ligature);
* every page is rendered to PNG with pdftoppm (the check a person repeats by viewing them:
  docs/certificates.md, "Looking at the pages").
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from certify.cli import main
from certify.render.texmath import tex_code, tex_text


def _tool(name):
    exe = shutil.which(name)
    if exe is None:
        if os.environ.get("CI", "").lower() in ("1", "true", "yes"):
            pytest.fail(f"{name} is missing on CI (.ci/run installs texlive and poppler-utils)")
        pytest.skip(f"{name} is not installed")
    return exe


def _compile(folder: Path, name: str) -> Path:
    proc = subprocess.run([_tool("pdflatex"), "-interaction=nonstopmode", "-halt-on-error", name],
                          cwd=folder, capture_output=True, text=True, timeout=180)
    assert proc.returncode == 0, proc.stdout[-3000:]
    log = (folder / (Path(name).stem + ".log")).read_text(errors="replace")
    assert "Missing character" not in log
    return folder / (Path(name).stem + ".pdf")


def _pages(pdf: Path) -> list[Path]:
    subprocess.run([_tool("pdftoppm"), "-r", "40", "-png", str(pdf), str(pdf.with_suffix(""))],
                   check=True, timeout=120)
    pages = sorted(pdf.parent.glob(pdf.stem + "-*.png"))
    assert pages and all(p.read_bytes()[:4] == b"\x89PNG" and p.stat().st_size > 2000 for p in pages)
    return pages


def _prose(tex: str) -> str:
    """The text outside math, \\texttt, \\num, comments and the preamble."""
    s = tex.split("\\begin{document}", 1)[-1]
    s = re.sub(r"(?m)(?<!\\)%.*$", "", s)
    s = re.sub(r"\\\[.*?\\\]", " ", s, flags=re.S)
    s = re.sub(r"(?<!\\)\$[^$]*\$", " ", s)
    s = re.sub(r"\\texttt\{(?:[^{}]|\{\})*\}", " ", s)
    s = re.sub(r"\\num\{[^{}]*\}", " ", s)
    s = re.sub(r"\\begin\{(?:longtable|tabular\*?)\}\{[^\n]*", " ", s)
    return s


ASCII_FORMULAS = [r"\bpi\(", r"\bsqrt\(", r"<=", r">=", r"\+/-", r"\d(?:\.\d+)?e-\d", r"\bchi\\_",
                  r"\bgamma\^", r"\|", r"\bw\\_\w", r"->"]


@pytest.fixture(scope="module")
def documents(tmp_path_factory):
    out = tmp_path_factory.mktemp("latex")
    assert main(["certificate", "4", "3", "1", "--digits", "6", "--out", str(out), "--name",
                 "delta_4_3_1", "--formats", "tex,fragment"]) == 0
    return out


def test_no_ascii_formula_left(documents):
    for name in ("delta_4_3_1.tex", "delta_4_3_1-fragment.tex"):
        prose = _prose((documents / name).read_text())
        for pat in ASCII_FORMULAS:
            found = re.findall(r".{0,30}" + pat + r".{0,30}", prose)
            assert not found, f"{name}: text-mode ASCII formula {pat!r}: {found[:3]}"


def test_standalone_compiles_and_renders(documents):
    pdf = _compile(documents, "delta_4_3_1.tex")
    pages = _pages(pdf)
    assert len(pages) >= 2
    tex = (documents / "delta_4_3_1.tex").read_text()
    assert r"\begin{longtable}" in tex and r"\usepackage{siunitx}" in tex


@pytest.mark.parametrize("cls", ["amsart", "article-twocolumn"])
def test_fragment_inputs_into_a_journal_class(documents, cls):
    head = {"amsart": r"\documentclass{amsart}",
            "article-twocolumn": r"\documentclass[twocolumn]{article}"}[cls]
    (documents / f"paper-{cls}.tex").write_text(
        head + "\n\\usepackage{amsmath,booktabs,siunitx}\n\\begin{document}\n"
        "Text before.\n\n\\input{delta_4_3_1-fragment}\n\nText after, in the same font.\n"
        "\\end{document}\n")
    pdf = _compile(documents, f"paper-{cls}.tex")
    _pages(pdf)
    log = (documents / f"paper-{cls}.log").read_text(errors="replace")
    # the fragment fits its column: no overfull box wider than a few points
    for m in re.finditer(r"Overfull \\hbox \(([\d.]+)pt too wide\)", log):
        assert float(m.group(1)) < 20, m.group(0)


def test_commands_and_file_names_are_shown_exactly():
    """Typewriter glyphs by code: what the PDF shows is the command, character for character."""
    s = tex_code("certify verify delta_4_3_1.json --json -")
    assert r"\char95{}" in s and "-{}-{}json" in s and r"\_" not in s
    assert tex_text("re-check with `certify render c_1.json`").count(r"\texttt{") == 1


def test_blank_lines_and_specials_in_a_field_do_not_break_the_latex(tmp_path):
    text = "first line\n\nsecond paragraph with 50% & $5 #1 ~ {braces} \\ and <b>html</b>"
    out = tex_text(text)
    assert "\n" not in out and "\\par" not in out
    (tmp_path / "t.tex").write_text("\\documentclass{article}\\usepackage{amsmath}\\begin{document}\n"
                                    + out + "\n\\end{document}\n")
    _compile(tmp_path, "t.tex")


# -- every kind of certificate: written by the CLI, rendered, free of ASCII formulas, compiled ----

#: one command per certificate kind (and the li race, a dirichlet-race with a small side)
KIND_COMMANDS = {
    "ffield-race": ["ffrace", "3", "t^2+1", "t+1", "1", "--digits", "6", "--leaders", "10"],
    "curve-race": ["curve", "5", "t^2 + 1", "t^3 + t + 2", "--digits", "6"],
    "order-race": ["order", "5", "1", "2", "3", "--digits", "2"],
    "ecq-race": ["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--observe", "0"],
    # with the observed race: its labelled, uncertified section in both documents
    "ecq-race-observed": ["ecrace", "[0,-1,1,-10,-20]", "--digits", "3", "--observe", "2000"],
    "twist-family-race": ["twists", "5", "t", "t^2 + 1", "--degrees", "2", "--width", "1e-3"],
    "li-race": ["lirace", "--digits", "3"],
}
#: beyond ASCII_FORMULAS: a caret or an escaped underscore in prose is a formula left as text,
#: so is an ASCII product (1*zeta) or a bare 2pi / zeta
MORE_ASCII = [r"\\\^\{\}", r"\\_", r"\w\*\w", r"\dpi\b", r"\bzeta\b"]


@pytest.fixture(scope="module", params=list(KIND_COMMANDS))
def kind_document(request, tmp_path_factory):
    kind = request.param
    out = tmp_path_factory.mktemp(kind)
    js = out / "cert.json"
    assert main(KIND_COMMANDS[kind] + ["--json", str(js)]) == 0
    import json

    want = {"li-race": "dirichlet-race", "ecq-race-observed": "ecq-race"}.get(kind, kind)
    assert json.loads(js.read_text())["kind"] == want
    assert main(["render", str(js), "--out", str(out), "--formats", "tex,fragment"]) == 0
    return kind, out


def test_every_kind_has_no_ascii_formula(kind_document):
    kind, out = kind_document
    for name in ("cert.tex", "cert-fragment.tex"):
        prose = _prose((out / name).read_text())
        for pat in ASCII_FORMULAS + MORE_ASCII:
            found = re.findall(r".{0,30}" + pat + r".{0,30}", prose)
            assert not found, f"{kind} {name}: text-mode ASCII formula {pat!r}: {found[:3]}"
        # a file name is never set as a formula (docs/function$_{fields}$.md)
        body = (out / name).read_text().split("\\begin{document}", 1)[-1]
        body = re.sub(r"(?m)(?<!\\)%.*$", "", body)
        bad = re.findall(r".{0,20}(?<!\\texttt\{)docs/.{0,30}", body)
        assert not bad, f"{kind} {name}: a file name not set as code: {bad[:2]}"


def test_every_kind_compiles_standalone_and_as_a_fragment(kind_document):
    kind, out = kind_document
    if kind == "ecq-race-observed":
        for name in ("cert.tex", "cert-fragment.tex"):
            assert "Observed data (not certified)" in (out / name).read_text()
    pdf = _compile(out, "cert.tex")
    assert _pages(pdf)
    (out / "paper.tex").write_text(
        "\\documentclass{amsart}\n\\usepackage{amsmath,booktabs,siunitx}\n\\begin{document}\n"
        "Text before.\n\n\\input{cert-fragment}\n\nText after.\n\\end{document}\n")
    _compile(out, "paper.tex")
    log = (out / "paper.log").read_text(errors="replace")
    for m in re.finditer(r"Overfull \\hbox \(([\d.]+)pt too wide\)", log):
        assert float(m.group(1)) < 20, f"{kind}: {m.group(0)}"


# -- a bundle of twist degrees (``certify twists --degrees 1,2 --json``): one document --------

@pytest.fixture(scope="module")
def bundle_documents(tmp_path_factory):
    out = tmp_path_factory.mktemp("bundle")
    js = out / "tw.json"
    assert main(["twists", "5", "t", "t^2 + 1", "--degrees", "1,2", "--width", "1e-3",
                 "--json", str(js)]) == 0
    assert main(["render", str(js), "--out", str(out), "--formats", "md,tex,fragment"]) == 0
    return out


def test_bundle_renders_one_section_per_degree_in_every_format(bundle_documents):
    out = bundle_documents
    md = (out / "tw.md").read_text()
    assert md.count("\n## Twist degree ") == 2 and md.index("## Twist degree 1") < md.index("## Twist degree 2")
    # the members as a table: a header row and one row per member (5 of degree 1, 20 of degree 2)
    assert md.count("| Member f |") == 2
    assert len([ln for ln in md.splitlines() if ln.startswith("| t")]) == 5 + 20
    assert "| t + 1 | 8 | 4 | +1 | 0 | 2/3 exactly |" in md
    tex = (out / "tw.tex").read_text()
    assert tex.count(r"\section*{Twist degree") == 2 and tex.count(r"\documentclass") == 1
    assert tex.count(r"member $f$") == 2 and r"\item f = " not in tex
    frag = (out / "tw-fragment.tex").read_text()
    assert frag.count("Certified density:") == 2 and r"\documentclass" not in frag
    for name in ("tw.tex", "tw-fragment.tex"):
        prose = _prose((out / name).read_text())
        for pat in ASCII_FORMULAS + MORE_ASCII:
            found = re.findall(r".{0,30}" + pat + r".{0,30}", prose)
            assert not found, f"bundle {name}: text-mode ASCII formula {pat!r}: {found[:3]}"


def test_bundle_compiles_standalone_and_as_a_fragment(bundle_documents):
    out = bundle_documents
    pdf = _compile(out, "tw.tex")
    assert len(_pages(pdf)) >= 2
    log = (out / "tw.log").read_text(errors="replace")
    # the member tables fit the page
    for m in re.finditer(r"Overfull \\hbox \(([\d.]+)pt too wide\) in alignment", log):
        raise AssertionError(m.group(0))
    (out / "paper.tex").write_text(
        "\\documentclass{amsart}\n\\usepackage{amsmath,booktabs,siunitx}\n\\begin{document}\n"
        "Text before.\n\n\\input{tw-fragment}\n\nText after.\n\\end{document}\n")
    _compile(out, "paper.tex")


def test_derivative_orders_are_set_as_derivatives_not_powers():
    """Lambda^(2)(1) is the second derivative (rank evidence of a curve over Q), not a square."""
    assert r"\Lambda ^{(2)}(1)" in tex_text("Lambda^(2)(1)/2! excludes 0")
    assert r"L^{(3)}(E, 1)" in tex_text("L^(3)(E, 1) = 6")
    assert r"q^{X/2}" in tex_text("q^(X/2)")  # a power stays a power
