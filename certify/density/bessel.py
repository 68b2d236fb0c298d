"""Density of a race variable whose centred part is a sum of independent cosines.

The race variable is

    X = mu + sum_j w_j cos(Theta_j)  +  (residual sums, see ResidualGroup)

with independent uniform phases; its characteristic function is
exp(i mu xi) * prod_j J_0(w_j xi).  The engine returns an enclosure of
P(X > 0) with an itemised error budget; docs/method.md derives every term.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from ..arith import arb


@dataclass(frozen=True)
class ResidualGroup:
    """Weights known only through their exact power sums.

    The group stands for the cosines with weights ``scale / |rho|`` over a
    multiset of zeros rho = 1/2 + i gamma that were not isolated; its
    residual power sums ``power_sums[k-1] = sum (1/4 + gamma^2)^(-k)``
    (k = 1..K) are exact balls.
    """

    scale: arb
    power_sums: tuple[arb, ...]
    label: str = ""


@dataclass(frozen=True)
class BesselVariable:
    """X = mu + sum_j weights[j] cos(Theta_j) + residual groups, Theta_j independent uniform."""

    mu: arb
    weights: tuple[arb, ...]
    residuals: tuple[ResidualGroup, ...] = field(default_factory=tuple)
