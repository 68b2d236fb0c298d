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


def _bundle_parts(data: dict) -> tuple[list, dict]:
    """The certificates of a ``twist-family`` bundle and the bundle's shown fields, each taken
    from a field verify checks (the certificates' questions; the caution, equal to the last's)."""
    certs = [Certificate.from_dict(c, f"degree entry {i + 1}") for i, c in enumerate(data["certificates"])]
    q = certs[0].question
    degrees = ", ".join(str(c.question["d"]) for c in certs)
    title = (f"quadratic twists of degrees {degrees} of y^2 = x^3 + ({q['A']})*x + ({q['B']}) over "
             f"{q['field']} ({q['mode']} trace race)")
    return certs, {"title": title, "degrees": degrees, "caution": data["caution"]}


def _demote(markdown: str, levels: int) -> str:
    """Every ATX heading of a rendered certificate moved down ``levels`` levels."""
    import re

    return re.sub(r"(?m)^(#{1,6}) ", lambda m: "#" * min(6, len(m.group(1)) + levels) + " ", markdown)


def render_bundle_markdown(data: dict, file_name: str = "twists.json") -> str:
    """A ``twist-family`` bundle (several twist degrees) as one Markdown document, one section per
    degree, each the degree's certificate (``data`` already verified)."""
    from .templates import md_escape

    certs, b = _bundle_parts(data)
    out = [f"# Certificates: {md_escape(b['title'])}", "", f"> **{md_escape(b['caution'])}**", "",
           f"One certificate per twist degree ({b['degrees']}), each re-checked on its own by "
           f"`certify verify {file_name}`.", ""]
    for c in certs:
        out += [f"## Twist degree {c.question['d']}", "", _demote(render_markdown(c, file_name), 2).rstrip(), ""]
    return "\n".join(out)


def render_bundle_latex(data: dict, file_name: str = "twists.json") -> str:
    """A ``twist-family`` bundle as one standalone LaTeX document, one section per degree."""
    certs, b = _bundle_parts(data)
    sections = []
    for c in certs:
        ctx = {**certificate_context(c, file_name), "sec": "subsection*"}
        body = render_template("certificate_body.tex.j2", ctx, "latex")
        sections.append({"heading": f"Twist degree {c.question['d']}", "body": body})
    return render_template("bundle.tex.j2", {**b, "sections": sections,
                                             "verify_command": f"certify verify {file_name}"}, "latex")


def render_bundle_fragment(data: dict, file_name: str = "twists.json") -> str:
    """The fragments of a bundle's certificates, one after the other (``\\input``-able)."""
    certs, _ = _bundle_parts(data)
    return "\n".join(render_latex_fragment(c, file_name) for c in certs)


__all__ = ["render_markdown", "render_latex", "render_latex_fragment", "certificate_context",
           "render_bundle_markdown", "render_bundle_latex", "render_bundle_fragment"]
