"""Finding and loading the jinja2 templates (a checkout or an installed package).

The templates live in the top-level ``templates/`` folder of the project;
``certify/templates`` points there (a symbolic link in the repository, a real
folder in an installed wheel, where ``package-data`` copies the files).  The
environment variable ``CERTIFY_TEMPLATES`` overrides both.
"""

from __future__ import annotations

import os
from functools import lru_cache
from importlib import resources
from pathlib import Path

from ..errors import BadInput

MARKER = "certificate.md.j2"


def template_dir() -> Path:
    """The first folder holding the templates: $CERTIFY_TEMPLATES, the package, the checkout."""
    candidates = []
    if os.environ.get("CERTIFY_TEMPLATES"):
        candidates.append(Path(os.environ["CERTIFY_TEMPLATES"]))
    try:
        candidates.append(Path(str(resources.files("certify").joinpath("templates"))))
    except (ModuleNotFoundError, TypeError):  # pragma: no cover - zipped installs
        pass
    candidates.append(Path(__file__).resolve().parents[2] / "templates")
    for c in candidates:
        if (c / MARKER).is_file():
            return c
    raise BadInput("the certificate templates were not found (looked in "
                   + ", ".join(str(c) for c in candidates) + "); reinstall certify")


def _latex_escape(text) -> str:
    """Plain text as LaTeX with its formulas in math mode (:func:`certify.render.texmath.tex_text`)."""
    from .texmath import tex_text

    return tex_text(text)


@lru_cache(maxsize=2)
def environment(kind: str):
    """A jinja2 environment with StrictUndefined: ``"text"`` (Markdown) or ``"latex"``."""
    import jinja2

    loader = jinja2.FileSystemLoader(str(template_dir()))
    common = dict(loader=loader, undefined=jinja2.StrictUndefined, keep_trailing_newline=True,
                  trim_blocks=True, lstrip_blocks=True, autoescape=False)
    if kind == "latex":
        env = jinja2.Environment(block_start_string="<%", block_end_string="%>",
                                 variable_start_string="<<", variable_end_string=">>",
                                 comment_start_string="<#", comment_end_string="#>", **common)
        from .texmath import tex_code, tex_math, tex_num

        env.filters["tex"] = _latex_escape
        env.filters["code"] = tex_code
        env.filters["math"] = tex_math
        env.filters["num"] = tex_num
    else:
        env = jinja2.Environment(**common)
        env.filters["md"] = md_escape
        env.filters["cell"] = lambda t: md_escape(t).replace("|", "\\|")
        env.filters["code"] = md_code
    return env


def _one_line(text) -> str:
    """Every run of whitespace (newlines, blank lines, tabs) as one space."""
    return " ".join(str(text).split())


def md_escape(text) -> str:
    """Text for Markdown: one line, no raw HTML (``<`` and entity-like ``&`` become entities).

    ``>`` alone cannot open a tag and stays readable (``x >= 2``).
    """
    import re

    s = re.sub(r"&(?=#?\w+;)", "&amp;", _one_line(text))
    s = s.replace("<=", "≤").replace(">=", "≥").replace("!=", "≠")
    return s.replace("<", "&lt;")


def md_code(text) -> str:
    """Text inside a Markdown code span: one line, backticks replaced (code spans show HTML literally)."""
    return _one_line(text).replace("`", "'")


def render_template(name: str, context: dict, kind: str = "text") -> str:
    return environment(kind).get_template(name).render(**context)
