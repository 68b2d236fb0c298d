"""Renderers: Markdown and LaTeX (standalone and ``\\input``-able) from a certificate, plots.

Each renderer builds a context dict (:mod:`.context`) and hands the layout to
a jinja2 template from ``templates/``.  Plots need matplotlib (the ``plot``
extra); the text renderers do not.
"""

from __future__ import annotations

from ..certificate.model import Certificate
from .context import certificate_context
from .templates import render_template


def render_markdown(cert: Certificate, file_name: str = "certificate.json") -> str:
    """The certificate as a Markdown document."""
    return render_template("certificate.md.j2", certificate_context(cert, file_name))


def render_latex(cert: Certificate, file_name: str = "certificate.json") -> str:
    """A standalone LaTeX document (compiles with pdflatex)."""
    return render_template("certificate.tex.j2", certificate_context(cert, file_name), "latex")


def render_latex_fragment(cert: Certificate, file_name: str = "certificate.json") -> str:
    """An ``\\input``-able fragment: the statement and the table (needs booktabs and amsmath)."""
    return render_template("certificate_fragment.tex.j2", certificate_context(cert, file_name),
                           "latex")


__all__ = ["render_markdown", "render_latex", "render_latex_fragment", "certificate_context"]
