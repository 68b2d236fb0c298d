"""Writing a certificate and its renderings to a folder."""

from __future__ import annotations

import os
import re

from ..certificate.model import Certificate
from ..errors import BadInput
from ..io import write_atomic

FORMATS = ("json", "md", "tex", "fragment", "density", "budget")
TEXT_FORMATS = ("json", "md", "tex", "fragment")


def base_name(label: str) -> str:
    """A file name from a race label: delta(4;3,1) -> delta_4_3_1, delta(pi<li) -> delta_pi_lt_li.

    A minus sign that starts a list entry (a-invariants of a curve) is kept as ``m``:
    delta(E[0,-1,1,-10,-20]>0) -> delta_E_0_m1_1_m10_m20_gt_0.
    """
    label = re.sub(r"(?<=[\[,])\s*-", "m", label)
    label = label.replace("<", "_lt_").replace(">", "_gt_")
    s = re.sub(r"[^A-Za-z0-9]+", "_", label).strip("_")
    return s[:80] or "certificate"


def parse_formats(text: str) -> tuple[str, ...]:
    items = [t.strip() for t in text.split(",") if t.strip()]
    if items == ["all"]:
        return FORMATS
    bad = [t for t in items if t not in FORMATS + ("plots",)]
    if bad or not items:
        raise BadInput(f"unknown format(s) {', '.join(bad) or '(none)'}: choose from "
                       f"{', '.join(FORMATS)}, plots, all")
    out = []
    for t in items:
        out.extend(("density", "budget") if t == "plots" else (t,))
    return tuple(dict.fromkeys(out))


def write_files(cert: Certificate, out_dir: str, formats=TEXT_FORMATS, base: str | None = None
                ) -> dict[str, str]:
    """Write the requested renderings; returns {format: path}."""
    from . import render_latex, render_latex_fragment, render_markdown

    base = base or base_name(cert.label)
    os.makedirs(out_dir, exist_ok=True)
    json_name = f"{base}.json"
    paths = {}
    for f in formats:
        if f == "json":
            p = os.path.join(out_dir, json_name)
            write_atomic(p, cert.to_json())
        elif f == "md":
            p = os.path.join(out_dir, f"{base}.md")
            write_atomic(p, render_markdown(cert, json_name))
        elif f == "tex":
            p = os.path.join(out_dir, f"{base}.tex")
            write_atomic(p, render_latex(cert, json_name))
        elif f == "fragment":
            p = os.path.join(out_dir, f"{base}-fragment.tex")
            write_atomic(p, render_latex_fragment(cert, json_name))
        elif f == "density":
            from .plots import plot_density

            p = plot_density(cert, os.path.join(out_dir, f"{base}-density.png"))
        elif f == "budget":
            from .plots import plot_budget

            p = plot_budget(cert, os.path.join(out_dir, f"{base}-budget.png"))
        else:
            raise BadInput(f"unknown format {f!r}")
        paths[f] = p
    return paths


def write_bundle_files(data: dict, out_dir: str, formats, base: str) -> dict[str, str]:
    """Write the Markdown / LaTeX / fragment of a ``twist-family`` bundle (one section per degree)."""
    from . import render_bundle_fragment, render_bundle_latex, render_bundle_markdown

    os.makedirs(out_dir, exist_ok=True)
    json_name = f"{base}.json"
    writers = {"md": (f"{base}.md", render_bundle_markdown), "tex": (f"{base}.tex", render_bundle_latex),
               "fragment": (f"{base}-fragment.tex", render_bundle_fragment)}
    paths = {}
    for f in formats:
        if f not in writers:
            raise BadInput(f"format {f!r} is not available for a bundle of twist degrees "
                           "(choose md, tex, fragment)")
        name, fn = writers[f]
        p = os.path.join(out_dir, name)
        write_atomic(p, fn(data, json_name))
        paths[f] = p
    return paths
