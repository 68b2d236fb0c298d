"""certify: certified enclosures of densities in prime races.

Results are conditional on the hypotheses each one lists (GRH for the
L-functions used, LI); certify gathers evidence for them but proves neither.
"""

__version__ = "0.1.0"

from .api import li_race, race, residue_race, weighted_race  # noqa: E402

__all__ = ["race", "residue_race", "weighted_race", "li_race", "__version__"]
