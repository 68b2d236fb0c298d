"""The trace race of a curve as actually observed from its a_p (an observation, not a certificate).

For x up to a bound X, the normalised sum

    s(x) = (log x / sqrt x) * sum_{p <= x} a_p / sqrt p

is computed from the exact traces (certify.source.ectraces).  Between two
consecutive primes the sum is constant, so the share of logarithmic scale
where it is positive, (1/log(X/2)) * int_2^X 1[sum > 0] dx/x, is an exact
finite sum over the gaps (evaluated in floating point: it is an observation,
reported beside the certified limiting density, never as a certified value).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .errors import BadInput
from .source.ectraces import traces_upto
from .source.ellcurve import EllipticCurveQ

MAX_OBSERVE = 10**9


@dataclass(frozen=True)
class Observation:
    """What the a_p up to ``bound`` show (floating point; not certified)."""

    bound: int
    primes: int
    final_value: float  # s(X)
    share_positive: float  # of log-scale in [2, X] where sum_{p<=x} a_p/sqrt p > 0
    sign_changes: int
    last_sign_change: float | None
    mean_normalised: float  # log-scale average of s(x) over [100, X]
    share_positive_late: float  # the same share over [1000, X] (small x are erratic)
    samples_x: np.ndarray  # x at which s(x) is sampled (for plots)
    samples_s: np.ndarray
    positive: int = 0  # #{p <= bound : a_p > 0} (exact)
    negative: int = 0  # #{p <= bound : a_p < 0} (exact)

    def as_dict(self) -> dict:
        return {
            "kind": "observation (floating point, not certified)",
            "bound": self.bound, "primes": self.primes,
            "normalised_sum_at_bound": round(self.final_value, 6),
            "share_of_log_scale_positive": round(self.share_positive, 6),
            "sign_changes": self.sign_changes,
            "last_sign_change": self.last_sign_change,
            "log_scale_mean_of_normalised_sum": round(self.mean_normalised, 6),
            "share_of_log_scale_positive_from_1000": round(self.share_positive_late, 6),
        }

    def record(self) -> dict:
        """The observation as a certificate stores it (section ``spectrum.observation`` of an
        ``ecq-race`` certificate): exact prime counts and the floating-point statistics rounded
        to 6 places, under a label that says it is no part of the proven enclosure; ``verify``
        recounts it from the a_p up to the bound."""
        return {
            "label": OBSERVATION_LABEL,
            "bound": self.bound, "primes": self.primes,
            "primes_with_a_p_positive": self.positive, "primes_with_a_p_negative": self.negative,
            "primes_with_a_p_zero": self.primes - self.positive - self.negative,
            "normalised_sum_at_bound": _six(self.final_value),
            "share_of_log_scale_positive": _six(self.share_positive),
            "share_of_log_scale_positive_from_1000": _six(self.share_positive_late),
            "log_scale_mean_of_normalised_sum": _six(self.mean_normalised),
            "sign_changes": self.sign_changes,
            "last_sign_change": self.last_sign_change,
        }


def _six(x: float):
    """x rounded to 6 places; None where it is not defined (a NaN: the range is empty)."""
    return round(x, 6) if math.isfinite(x) else None


def _f(x, fmt: str) -> str:
    return "not defined (the bound is below the range)" if x is None else format(x, fmt)


OBSERVATION_LABEL = ("observed data, not certified: computed in floating point from the exact a_p "
                     "up to the bound; no part of the proven enclosure")


def observation_lines(rec: dict) -> list[str]:
    """Sentences of a stored observation record (every renderer shows these)."""
    last = rec["last_sign_change"]
    return [
        f"primes p <= {rec['bound']}: {rec['primes']}, of which {rec['primes_with_a_p_positive']} "
        f"with a_p > 0, {rec['primes_with_a_p_negative']} with a_p < 0 and "
        f"{rec['primes_with_a_p_zero']} with a_p = 0 (exact counts)",
        f"normalised sum (log x/sqrt(x)) sum_(p <= x) a_p/sqrt(p) at x = {rec['bound']}: "
        f"{_f(rec['normalised_sum_at_bound'], '+.6f')}; its log-scale mean over [100, {rec['bound']}]: "
        f"{_f(rec['log_scale_mean_of_normalised_sum'], '+.6f')}",
        f"share of log-scale in [2, {rec['bound']}] where the sum is positive: "
        f"{_f(rec['share_of_log_scale_positive'], '.6f')} "
        f"({_f(rec['share_of_log_scale_positive_from_1000'], '.6f')} "
        f"over [1000, {rec['bound']}]); {rec['sign_changes']} sign changes"
        + ("" if last is None else f", the last at p = {last:.0f}"),
    ]


def observe(E: EllipticCurveQ, bound: int = 10**6, samples: int = 4000) -> Observation:
    """The observed race of E up to ``bound``."""
    if isinstance(bound, bool) or not isinstance(bound, int):
        raise BadInput(f"observation bound must be an integer, got {bound!r}")
    if not (10 <= bound <= MAX_OBSERVE):
        raise BadInput(f"observation bound must be between 10 and {MAX_OBSERVE} (got {bound})")
    ps, ap = traces_upto(E, bound)
    pf = ps.astype(np.float64)
    S = np.cumsum(ap / np.sqrt(pf))
    nxt = np.append(pf[1:], float(bound))
    gaps = np.log(nxt / pf)  # log-length of [p_i, p_{i+1}) where the sum is S_i
    total = math.log(bound / 2.0)
    share = float(gaps[S > 0].sum() / total)
    sgn = np.sign(S)
    nz = sgn != 0
    s2 = sgn[nz]
    changes = np.nonzero(s2[1:] != s2[:-1])[0]
    last = float(pf[nz][changes[-1] + 1]) if changes.size else None
    norm = S * np.log(pf) / np.sqrt(pf)
    # log-scale mean of s(x), using the value at the left end of each gap (x >= 100)
    sel = pf >= 100
    mean = float((norm[sel] * gaps[sel]).sum() / max(gaps[sel].sum(), 1e-300)) if sel.any() else float("nan")
    # samples evenly spaced in log x
    grid = np.exp(np.linspace(math.log(max(pf[0], 2.0)), math.log(bound), samples))
    idx = np.searchsorted(pf, grid, side="right") - 1
    idx = np.clip(idx, 0, pf.size - 1)
    sx = grid
    ss = S[idx] * np.log(grid) / np.sqrt(grid)
    late = pf >= 1000
    share_late = (float(gaps[late & (S > 0)].sum() / gaps[late].sum())
                  if late.any() and gaps[late].sum() > 0 else float("nan"))
    return Observation(bound, int(ps.size), float(S[-1] * math.log(bound) / math.sqrt(bound)),
                       share, int(changes.size), last, mean, share_late, sx, ss,
                       int((ap > 0).sum()), int((ap < 0).sum()))


def limit_law_density(mu: float, weights, residual_variance: float, xs: np.ndarray) -> np.ndarray:
    """Density of X = mu + sum w cos Theta + (Gaussian of the residual variance), numerically.

    For the figure only (floating point inverse Fourier transform of the
    characteristic function); the certified number is the density enclosure.
    """
    try:
        from scipy.special import j0
    except ImportError:  # J_0(x) = (1/pi) int_0^pi cos(x sin t) dt, midpoint rule
        th = (np.arange(200) + 0.5) * math.pi / 200

        def j0(x):
            return np.cos(np.multiply.outer(x, np.sin(th))).mean(axis=-1)

    xi = np.linspace(0, 60, 6000)
    phi = np.ones_like(xi)
    for w in weights:
        phi *= j0(w * xi)
    phi *= np.exp(-residual_variance * xi**2 / 2)
    dx = xi[1] - xi[0]
    out = []
    for x in xs:
        out.append((phi * np.cos(xi * (x - mu))).sum() * dx / math.pi)
    return np.asarray(out)


def plot_observation(obs: Observation, result, path: str) -> None:
    """Figure: the observed normalised sum against log x, and its log-scale histogram beside the limit law."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, (ax1, ax2) = plt.subplots(1, 2, figsize=(11, 4))
    ax1.plot(np.log10(obs.samples_x), obs.samples_s, lw=0.6)
    ax1.axhline(0, color="k", lw=0.5)
    ax1.axhline(float(result.mean), color="C3", lw=0.8, ls="--", label=f"limit-law mean {result.mean}")
    ax1.set_xlabel("log10 x")
    ax1.set_ylabel("(log x / sqrt x) sum a_p / sqrt p")
    ax1.set_title(f"observed to x = {obs.bound:.0e} (observation, not certified)", fontsize=9)
    ax1.legend(fontsize=8)
    sel = obs.samples_x >= 100
    ax2.hist(obs.samples_s[sel], bins=60, density=True, alpha=0.5, label="observed (log-scale samples)")
    xs = np.linspace(min(obs.samples_s.min(), float(result.mean) - 4), max(obs.samples_s.max(),
                     float(result.mean) + 4), 400)
    ws = [2 / math.sqrt(0.25 + float(z.mid()) ** 2) for z in result.zeros]
    resid = 2 * float(result.residual[0].mid())  # variance of the residual cosines
    dens = limit_law_density(float(result.mean), ws, resid, xs)
    ax2.plot(xs, dens, color="C1", label="limit law (numerical, for illustration)")
    d = result.density
    ax2.axvline(0, color="k", lw=0.5)
    ax2.set_title(f"P(X > 0) in [{d.lower_str(d.places())}, {d.upper_str(d.places())}] "
                  "(certified under GRH, LI)", fontsize=9)
    ax2.legend(fontsize=8)
    fig.tight_layout()
    from .io import write_atomic  # noqa: F401  (figures are written through a temporary file)
    import os
    import tempfile

    directory = os.path.dirname(os.path.abspath(path)) or "."
    fd, tmp = tempfile.mkstemp(prefix=".tmp-", suffix=".png", dir=directory)
    os.close(fd)
    try:
        fig.savefig(tmp, dpi=110)
        os.replace(tmp, path)
    finally:
        plt.close(fig)
        if os.path.exists(tmp):
            os.unlink(tmp)
