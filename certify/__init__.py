"""certify: certified enclosures of densities in prime races.

Results are conditional on the hypotheses each one lists (GRH for the
L-functions used, LI); certify gathers evidence for them but proves neither.
"""

__version__ = "0.1.0"

from .api import all_orders, li_race, order_race, race, residue_race, weighted_race  # noqa: E402

__all__ = ["race", "residue_race", "weighted_race", "li_race", "order_race", "all_orders", "__version__"]
