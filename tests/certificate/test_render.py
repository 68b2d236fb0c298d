"""Renderers: Markdown, LaTeX (standalone and fragment), plots, template loading."""

import os
import shutil
import subprocess
from pathlib import Path

import pytest

from certify.render import render_latex, render_latex_fragment, render_markdown
from certify.render.templates import template_dir

REPO = Path(__file__).resolve().parents[2]


def _must_list_everything(text, cert):
    for h in cert.hypotheses:
        assert h["name"] in text and h["status"] in text
        assert h["evidence"], h["name"]
    # the evidence items with their numbers
    assert "zeros on the critical line" in text
    assert "excludes 0" in text or "excluding 0" in text
    assert "integer-relation search (LLL)" in text
    for e in cert.error_budget:
        assert e["name"] in text and e["bound"] in text
    assert "does not prove" in text


def test_markdown_lists_hypotheses_evidence_and_budget(cert_4_3_1):
    _, cert = cert_4_3_1
    md = render_markdown(cert)
    _must_list_everything(md, cert)
    assert cert.answer["enclosure"]["lower"] in md and cert.answer["enclosure"]["upper"] in md
    assert "1 - delta ∈ [" in md  # the tiny gap, in scientific notation
    assert "certify verify certificate.json" in md


def test_latex_lists_hypotheses_evidence_and_budget(cert_4_3_1):
    _, cert = cert_4_3_1
    tex = render_latex(cert)
    assert tex.startswith("\\documentclass") and tex.rstrip().endswith("\\end{document}")
    _must_list_everything(tex, cert)
    frag = render_latex_fragment(cert)
    assert "\\documentclass" not in frag and "\\begin{document}" not in frag
    _must_list_everything(frag, cert)


def _pdflatex_or_skip():
    exe = shutil.which("pdflatex")
    if exe is None:
        if os.environ.get("CI", "").lower() in ("1", "true", "yes"):
            pytest.fail("pdflatex is missing on CI: install texlive-latex-base "
                        "texlive-latex-recommended")
        pytest.skip("pdflatex is not installed (apt-get install texlive-latex-base "
                    "texlive-latex-recommended); CI must run this test")
    return exe


def _compile(exe, folder, name):
    proc = subprocess.run([exe, "-interaction=nonstopmode", "-halt-on-error", name],
                          cwd=folder, capture_output=True, text=True, timeout=180)
    assert proc.returncode == 0, proc.stdout[-3000:]
    pdf = Path(folder) / (Path(name).stem + ".pdf")
    assert pdf.is_file() and pdf.stat().st_size > 1000
    return pdf


def test_latex_compiles_with_pdflatex(cert_4_3_1, tmp_path):
    exe = _pdflatex_or_skip()
    _, cert = cert_4_3_1
    (tmp_path / "cert.tex").write_text(render_latex(cert), encoding="utf-8")
    _compile(exe, tmp_path, "cert.tex")
    # the fragment inside a paper of one's own
    (tmp_path / "frag.tex").write_text(render_latex_fragment(cert), encoding="utf-8")
    (tmp_path / "paper.tex").write_text(
        "\\documentclass{article}\\usepackage{amsmath,booktabs,siunitx}\n"
        "\\begin{document}\nAs certified:\n\n\\input{frag}\n\\end{document}\n")
    _compile(exe, tmp_path, "paper.tex")


def test_plots_written(cert_4_3_1, tmp_path):
    pytest.importorskip("matplotlib")
    from certify.render.plots import limit_law_density, plot_budget, plot_density

    _, cert = cert_4_3_1
    x, f = limit_law_density(cert)
    dx = float(x[1] - x[0])
    # a floating-point illustration, but it must be the right law: total mass 1 and
    # mass on X > 0 near the certified density
    assert abs(float(f.sum()) * dx - 1) < 1e-3
    assert abs(float(f[x > 0].sum()) * dx - float(cert.lower)) < 2e-3
    for fn, name in ((plot_density, "d.png"), (plot_budget, "b.png")):
        p = fn(cert, str(tmp_path / name))
        assert Path(p).read_bytes()[:4] == b"\x89PNG"


def test_templates_found_in_checkout_and_package():
    d = template_dir()
    assert (d / "certificate.md.j2").is_file()
    top = REPO / "templates"
    pkg = REPO / "certify" / "templates"
    # the package's template folder is the top-level one (a link) or an identical copy
    for f in top.glob("*.j2"):
        assert (pkg / f.name).read_text() == f.read_text()


def test_golden_files_pin_the_layout():
    """Rendering a stored certificate reproduces the pinned Markdown and LaTeX fragment.

    To update after a deliberate template change:
    ``certify render tests/certificate/data/delta_4_3_1.json --formats md,fragment``.
    """
    from certify.certificate.model import read_certificate

    data = Path(__file__).parent / "data"
    cert = read_certificate(str(data / "delta_4_3_1.json"))
    assert render_markdown(cert, "delta_4_3_1.json") == (data / "delta_4_3_1.md").read_text()
    assert render_latex_fragment(cert, "delta_4_3_1.json") == \
        (data / "delta_4_3_1-fragment.tex").read_text()
