"""Jupyter display of results and certificates (``_repr_html_``, ``_repr_latex_``).

Any result with a ``density`` (an :class:`~certify.result.Enclosure`), ``hypotheses``
and ``budget`` (races over Q, in F_q[t], curve races) and any
:class:`~certify.certificate.model.Certificate` displays as a small table: the
enclosure rounded outward, the certified digits, each hypothesis with its status,
each error bound rounded up, and the caution.  Text is HTML-escaped.
"""

from __future__ import annotations

import html
from fractions import Fraction

from ..arith import decimal_down, decimal_up
from ..result import caution_text


def _label(obj) -> str:
    q = getattr(obj, "question", None)
    if q is not None and hasattr(q, "label"):
        return q.label
    if hasattr(obj, "statement") and callable(obj.statement) and hasattr(obj, "curve"):
        return f"delta_{obj.mode}({obj.curve.describe()})"
    return getattr(obj, "label", type(obj).__name__)


def _rows(label, lower, upper, width, digits, hyps, budget, caution) -> str:
    e = html.escape
    out = [f"<table><caption>{e(label)}</caption>",
           f"<tr><th>enclosure</th><td>[{e(lower)}, {e(upper)}]</td></tr>",
           f"<tr><th>width</th><td>{e(width)}</td></tr>",
           f"<tr><th>certified digits</th><td>{e(digits or '(none)')}</td></tr>"]
    for name, status, statement in hyps:
        out.append(f"<tr><th>{e(name)} ({e(status)})</th><td>{e(statement)}</td></tr>")
    for name, bound in budget:
        out.append(f"<tr><th>error: {e(name)}</th><td>&le; {e(bound)}</td></tr>")
    out.append(f"<tr><td colspan='2'><em>{e(caution)}</em></td></tr></table>")
    return "\n".join(out)


def result_html(res) -> str:
    """HTML table of a result (any setting)."""
    d = res.density
    p = d.places()
    hyps = [(h.name, h.status, h.statement) for h in res.hypotheses]
    budget = [(b.name, b.bound_text(3)) for b in res.budget]
    caution = getattr(res, "caution", "") or caution_text(res.hypotheses)
    return _rows(_label(res), d.lower_str(p), d.upper_str(p), d.width_text(), d.digits(), hyps,
                 budget, caution)


def _tex(s: str) -> str:
    from .templates import _latex_escape

    return _latex_escape(s)


def result_latex(res) -> str:
    """A LaTeX display of a result's enclosure (math mode, for notebooks)."""
    d = res.density
    p = d.places()
    return (rf"$\delta \in [{d.lower_str(p)},\ {d.upper_str(p)}]$"
            rf" \quad (\text{{width }} {d.width_text()})")


def certificate_html(cert) -> str:
    a = cert.answer
    hyps = [(h["name"], h["status"], h["statement"]) for h in cert.hypotheses]
    budget = [(b["name"], b["bound"]) for b in cert.error_budget]
    return _rows(cert.label, a["enclosure"]["lower"], a["enclosure"]["upper"], a["width"],
                 a["certified_digits"], hyps, budget, cert.caution)


def certificate_latex(cert) -> str:
    a = cert.answer
    return (rf"$\delta \in [{a['enclosure']['lower']},\ {a['enclosure']['upper']}]$"
            rf" \quad (\text{{width }} {a['width']})")


def decimal_ends(lower: Fraction, upper: Fraction, places: int) -> tuple[str, str]:
    """The ends as decimal strings rounded outward (down, up)."""
    return decimal_down(lower, places), decimal_up(upper, places)
