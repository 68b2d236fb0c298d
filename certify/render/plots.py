"""Plots (optional, needs matplotlib): the limit law's density and the error budget.

Plots are illustrations computed in floating point from the certificate's
stored data; the certified numbers are the enclosure and the bounds, which
the captions repeat.
"""

from __future__ import annotations

import math

from ..certificate.model import Certificate
from ..errors import BadInput


def _pyplot():
    try:
        import matplotlib

        matplotlib.use("Agg")
        import matplotlib.pyplot as plt
    except ImportError:
        raise BadInput("plots need matplotlib: pip install 'certify[plot]'") from None
    return plt


def _bessel_j0(x):
    """J_0 for a numpy array by the trapezoid rule on (1/pi) int_0^pi cos(x sin t) dt.

    (scipy's j0 when installed.)  The integrand is periodic and analytic, so the
    rule converges geometrically once the node count exceeds e|x|/2.
    """
    import numpy as np

    try:
        from scipy.special import j0

        return j0(x)
    except ImportError:
        pass
    n = int(min(400, max(40, 2 * float(np.max(np.abs(x))) + 20)))
    t = (np.arange(n) + 0.5) * (math.pi / n)
    return np.cos(np.multiply.outer(x, np.sin(t))).mean(axis=-1)


def limit_law_density(cert: Certificate, points: int = 600):
    """(x, f(x)) for the limit law of X, by Fourier inversion in floating point."""
    import numpy as np

    mu = float(eval_fraction(cert.answer["mean"]))
    var = float(cert.answer["variance"]["mid"])
    weights = []
    res = []  # (scale, R_1, R_2)
    for g in cert.spectrum["groups"]:
        s = float(g["scale"]["mid"])
        for z in g["zeros"]:
            gam = float(z["mid"])
            weights.append(s / math.sqrt(0.25 + gam * gam))
        target = [float(b["mid"]) for b in g["moments"]["target_sums"]]
        found = [float(z["mid"]) for z in g["zeros"]]
        r1 = target[0] - sum(1 / (0.25 + y * y) for y in found)
        r2 = (target[1] - sum(1 / (0.25 + y * y) ** 2 for y in found)) if len(target) > 1 else 0.0
        res.append((s, max(r1, 0.0), max(r2, 0.0)))
    w = np.array(weights)
    xi_max = max(8.0 / math.sqrt(var), float(cert.parameters.get("xi_max", 30.0)))
    xi = np.linspace(0.0, xi_max, 1500)
    phi = np.ones_like(xi)
    for chunk in np.array_split(w, max(1, len(w) // 50)):
        phi *= np.prod(_bessel_j0(np.multiply.outer(xi, chunk)), axis=1)
    for s, r1, r2 in res:  # log J_0 ~ -x^2/4 - x^4/64: two Rayleigh terms
        phi *= np.exp(-(s * xi) ** 2 * r1 / 4 - (s * xi) ** 4 * r2 / 64)
    sd = math.sqrt(var)
    x = np.linspace(mu - 4.5 * sd, mu + 4.5 * sd, points)
    kernel = np.cos(np.multiply.outer(x - mu, xi))
    dxi = xi[1] - xi[0]
    f = (kernel * phi).sum(axis=1) * dxi / math.pi - (kernel[:, 0] * phi[0]) * dxi / (2 * math.pi)
    return x, np.maximum(f, 0.0)


def eval_fraction(text: str):
    from fractions import Fraction

    return Fraction(text)


def _math_label(label: str) -> str:
    """A race label as matplotlib mathtext: delta(4;3,1) -> $\\delta(4;3,1)$."""
    import re

    m = re.fullmatch(r"delta\((.*)\)", label)
    return rf"$\delta({m.group(1)})$" if m else label


def plot_density(cert: Certificate, path: str) -> str:
    """The density of the limit law with the region X > 0 shaded; returns ``path``."""
    plt = _pyplot()
    x, f = limit_law_density(cert)
    fig, ax = plt.subplots(figsize=(6.4, 3.6))
    ax.plot(x, f, color="black", lw=1.2)
    ax.fill_between(x, 0, f, where=x > 0, color="tab:blue", alpha=0.35,
                    label=f"$X > 0$: {_math_label(cert.label)} $\\in$ [{cert.answer['enclosure']['lower']}, "
                    f"{cert.answer['enclosure']['upper']}]")
    ax.axvline(0, color="grey", lw=0.8)
    ax.set_ylim(0, float(f.max()) * 1.3)
    ax.set_xlabel(r"$X = \mu + \sum_\gamma r_\gamma \cos\Theta_\gamma$ (limit law of the normalised race)")
    ax.set_ylabel(r"probability density of $X$")
    ax.set_title(f"Limit law of the race {_math_label(cert.label)} (under GRH and LI)", fontsize=10)
    ax.legend(fontsize=7, loc="upper left")
    fig.text(0.01, 0.01, "curve: floating-point illustration; the enclosure is certified",
             fontsize=6, color="grey")
    fig.tight_layout()
    fig.savefig(path, dpi=120)
    plt.close(fig)
    return path


def plot_budget(cert: Certificate, path: str) -> str:
    """The error budget as horizontal bars on a log scale; returns ``path``."""
    plt = _pyplot()
    names = [e["name"] for e in cert.error_budget]
    bounds = [max(float(e["bound"]), 1e-300) for e in cert.error_budget]
    width = float(cert.upper - cert.lower)
    fig, ax = plt.subplots(figsize=(6.4, 0.5 + 0.5 * len(names)))
    ax.barh(names, bounds, color="tab:orange")
    ax.set_xscale("log")
    ax.axvline(width / 2, color="black", ls="--", lw=0.8, label=f"half-width of the enclosure ({width / 2:.2e})")
    ax.set_xlabel(r"bound on the error term (log scale)")
    ax.set_title(f"Error budget of {_math_label(cert.label)}", fontsize=10)
    ax.legend(fontsize=7, loc="lower right")
    ax.invert_yaxis()
    fig.tight_layout()
    fig.savefig(path, dpi=120)
    plt.close(fig)
    return path
