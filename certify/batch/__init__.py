"""Tables at scale: many races sharing spectra, a persistent cache, local or cluster runs.

* :mod:`certify.batch.cache` -- SQLite cache of certified spectra (safe under
  crashes and concurrent runs) and a :class:`SpectrumStore` that uses it;
* :mod:`certify.batch.plan` -- which races, which primitive spectra, how far;
* :mod:`certify.batch.execute` -- tasks and executors (this process, local
  processes, dask.distributed);
* :mod:`certify.batch.run` -- :func:`run_batch`, resumable end to end;
* :mod:`certify.batch.tables` -- LaTeX, CSV, Markdown tables and the ranking.

Every density produced is conditional on GRH and LI for the L-functions used;
certify proves neither.
"""

from .cache import CachedStore, SpectrumCache, default_cache_path
from .run import run_batch

__all__ = ["CachedStore", "SpectrumCache", "default_cache_path", "run_batch"]
