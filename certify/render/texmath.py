"""Plain text of certify's results as LaTeX: formulas in math mode, commands shown exactly.

The sentences a certificate shows are regenerated from its data as plain
text (the same text the terminal and Markdown show).  :func:`tex_text`
sets them for LaTeX: special characters escaped, and the formulas certify
writes (``pi(x;4,3) > pi(x;4,1)``, ``chi_{4,3}``, ``sqrt(1/4 + gamma^2)``,
``4.07e-3``, ``[0.66 +/- 1.04e-11]``, ``lim_{X -> oo}``, ``10^8/q`` ...)
typeset as mathematics, never as text-mode ASCII.  :func:`tex_code` sets a
command or a file name in typewriter type so that what is printed (and
copied from the PDF) is exactly the command: no ligature, no curly quote,
underscores as the typewriter glyph.
"""

from __future__ import annotations

import re

GREEK = {"gamma": r"\gamma", "chi": r"\chi", "mu": r"\mu", "Theta": r"\Theta", "delta": r"\delta",
         "phi": r"\varphi", "pi": r"\pi", "rho": r"\rho", "sigma": r"\sigma", "theta": r"\theta",
         "alpha": r"\alpha", "xi": r"\xi", "epsilon": r"\varepsilon", "eps": r"\varepsilon",
         "zeta": r"\zeta", "psi": r"\psi", "Lambda": r"\Lambda", "lambda": r"\lambda"}
FUNCS = {"sum": r"\sum", "sqrt": r"\sqrt", "log": r"\log", "exp": r"\exp", "lim": r"\lim",
         "cos": r"\cos", "sin": r"\sin", "arg": r"\arg", "int": r"\int", "inf": r"\infty"}

_TEXT_SPECIALS = {"\\": r"\textbackslash{}", "{": r"\{", "}": r"\}", "_": r"\_", "^": r"\^{}",
                  "#": r"\#", "$": r"\$", "%": r"\%", "&": r"\&", "~": r"\~{}"}


def _esc_text(s: str) -> str:
    s = "".join(_TEXT_SPECIALS.get(ch, ch) for ch in s)
    # comparison signs left in prose (OT1 text fonts have no <, >, |): as mathematics
    for a, b in (("<=", r"$\le$"), (">=", r"$\ge$"), ("!=", r"$\ne$"), ("+/-", r"$\pm$"),
                 ("<", "$<$"), (">", "$>$"), ("|", r"$\vert$")):
        s = s.replace(a, b) if a not in ("<", ">") else re.sub(rf"(?<![$\\a-z]){re.escape(a)}(?!\$)", b, s)
    return s


def tex_code(text) -> str:
    """``\\texttt{...}`` showing ``text`` exactly (OT1 typewriter glyphs by their codes)."""
    s = " ".join(str(text).split())
    out = []
    for ch in s:
        if ch in "\\{}_^~<>|'`\"":
            out.append(rf"\char{ord(ch) if ch not in chr(39) + chr(96) else (13 if ch == chr(39) else 18)}{{}}")
        elif ch in "#$%&":
            out.append("\\" + ch)
        elif ch == "-":
            out.append("-{}")  # no -- or --- ligature
        else:
            out.append(ch)
    return r"\texttt{" + "".join(out) + "}"


# -- formulas ----------------------------------------------------------------------

def _sym(name: str) -> str:
    return GREEK.get(name, FUNCS.get(name, name))


def _math_expr(e: str) -> str:
    """A plain-text formula (no prose) in LaTeX math syntax (without the $ signs)."""
    e = e.replace("+/-", r"\pm ").replace("<=", r"\le ").replace(">=", r"\ge ").replace("!=", r"\ne ")
    e = e.replace("->", r"\to ").replace("*", r"\cdot ").replace(" vs ", r"\ \text{vs}\ ")
    e = re.sub(r"\|\|([^|]*)\|\|", r"\\lVert \1\\rVert ", e)
    e = re.sub(r"\|([^|]*)\|", r"\\lvert \1\\rvert ", e)
    e = re.sub(r"\boo\b", r"\\infty", e)
    e = re.sub(r"(\d+(?:\.\d+)?)e([+-]?)0*(\d+)",
               lambda m: rf"{m.group(1)}\times 10^{{{'-' if m.group(2) == '-' else ''}{m.group(3)}}}", e)
    e = re.sub(r"\bsqrt\(([^()]*(?:\([^()]*\)[^()]*)*)\)", r"\\sqrt{\1}", e)
    e = re.sub(r"_\{([^{}]*)\}", lambda m: "_{" + m.group(1) + "}", e)
    e = re.sub(r"_\(([^()]*)\)", r"_{\1}", e)            # sum_(p <= x)
    # a derivative: Lambda^(2)(1), L^(k)(E, 1) (certify writes no power of Lambda or L this way)
    e = re.sub(r"\b(Lambda|L)\^\((\w+)\)", r"\1^{(\2)}", e)
    e = re.sub(r"\^\(([^()]*)\)", r"^{\1}", e)           # q^(X/2)
    e = re.sub(r"\^(\w+'?)", r"^{\1}", e)
    e = re.sub(r"_(\w+)", lambda m: "_{" + " ".join(_sym(p) for p in [m.group(1)]) + "}", e)
    e = re.sub(r"(?<![\\A-Za-z])([A-Za-z]+)(?![A-Za-z])",
               lambda m: _sym(m.group(1)) + (" " if m.group(1) in GREEK or m.group(1) in FUNCS else ""), e)
    return e.replace("%", r"\%").replace("#", r"\#").replace("&", r"\&")


# a formula run: starts at a formula token and goes on over formula tokens and operators
_TOKEN = (r"(?:\d+(?:\.\d+)?e[+-]?\d+"                      # 4.07e-3
          r"|\[\s*[-\d.]+\s*\+/-\s*[-\d.e]+\s*\]"           # [0.66 +/- 1.0e-11]
          r"|lim_\{[^{}]*\}"                                 # lim_{X -> oo}
          r"|(?:sqrt|pi|phi|delta|log|exp|cos|arg|L)\([^()]*(?:\([^()]*\)[^()]*)*\)"  # f(...)
          r"|[A-Za-z]+_\{[^{}]*\}(?:\([^()]*\))?"           # chi_{4,3}, sum_{gamma > 0}
          r"|\|\|[^|]{1,40}\|\|(?:_[A-Za-z0-9]+)?"            # ||xi||_inf
          r"|[A-Za-z]+_\([^()]*\)"                           # sum_(p <= x)
          r"|(?:[A-Za-z0-9]+|\((?:[^()]|\([^()]*\))*\))\^(?:\([^()]*\)|[A-Za-z0-9]+'?)"  # q^(X/2), (qu)^N'
          r"|[A-Za-z]+_[A-Za-z0-9]+(?:\^[A-Za-z0-9]+)?(?:\([^()]*\))?"  # w_a, J_0(x), int_2^X
          r"|[A-Za-z0-9]+\^[A-Za-z0-9]+"                     # 10^8, gamma^2
          r"|\|[^|\s]{1,40}\|"                               # |W(chi)|
          r"|(?:log|sqrt)\s+[A-Za-z](?![A-Za-z])"           # log X, sqrt x
          r"|(?<![A-Za-z])[A-Za-z]\([^()]*\)"                # E(x), P(X > 0), W(chi)
          r"|(?<![A-Za-z])\d*(?:gamma|chi|mu|Theta|delta|rho|zeta|theta|pi)\b)")
_OP = r"(?:\s*(?:<=|>=|!=|->|\+/-|[=<>+*/-])\s*)"
_OPERAND = r"(?:-?(?:" + _TOKEN + r"|\d+(?:\.\d+)?|(?<![A-Za-z])[A-Za-z](?![A-Za-z])|\([^()]*\)))"
_JOIN = r"(?:" + _OP + r"|\s+(?=" + _TOKEN + r"))"
_RUN = re.compile(r"(?:" + _OPERAND + _JOIN + r")*" + _TOKEN + r"(?:" + _JOIN + _OPERAND + r")*"
                  + r"|(?:" + _OPERAND + _OP + r")+" + _OPERAND)


def tex_text(text) -> str:
    """Plain text as LaTeX: one line, specials escaped, formulas in math mode, `code` as tex_code."""
    s = " ".join(str(text).split())
    # a project file named in prose (docs/function_fields.md) is code, not a formula
    s = re.sub(r"(?<![`\w/])((?:docs|certify|tests|bench|templates)/[\w./-]*\w)", r"`\1`", s)
    out = []
    pos = 0
    # code spans first: `certify verify FILE`
    for m in re.finditer(r"`([^`]+)`", s):
        out.append(_prose(s[pos:m.start()]))
        out.append(tex_code(m.group(1)))
        pos = m.end()
    out.append(_prose(s[pos:]))
    return "".join(out)


def _prose(s: str) -> str:
    out = []
    pos = 0
    for m in _RUN.finditer(s):
        run = m.group(0)
        if not run.strip() or re.fullmatch(r"[\d.]+|[A-Za-z]|\([^()]*\)", run.strip()):
            continue  # a bare number, a lone letter or a parenthesis is prose
        if re.fullmatch(r"\d+(?:\.\d+)?\s*[-/]\s*\d+(?:\.\d+)?", run.strip()) and "/" not in run:
            continue  # a range of numbers such as 3-30
        lead = len(run) - len(run.lstrip())
        trail = len(run) - len(run.rstrip())
        out.append(_esc_text(s[pos:m.start() + lead]))
        out.append("$" + _math_expr(run.strip()) + "$")
        pos = m.end() - trail
    out.append(_esc_text(s[pos:]))
    return re.sub(r"\$(\s*)\$", r"\1", "".join(out))  # adjacent formulas: one formula


def tex_math(text) -> str:
    """A formula or number for use inside ``$...$`` (no dollar signs added)."""
    return _math_expr(" ".join(str(text).split()))


def tex_num(text) -> str:
    """A number for a siunitx S column or ``\\num``: 6.01e-10 stays (siunitx reads it); else braced math."""
    t = " ".join(str(text).split())
    if re.fullmatch(r"[-+]?\d+(?:\.\d+)?(?:e[-+]?\d+)?", t):
        return t
    return "{$" + _math_expr(t) + "$}"
