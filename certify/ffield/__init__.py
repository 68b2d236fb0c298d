"""Prime races in F_q[t]: polynomial arithmetic, characters, L-polynomials,
exact prime counts by the explicit formula, and race densities.

Modules: :mod:`.poly` (arithmetic and parsing), :mod:`.characters`,
:mod:`.lpoly`, :mod:`.counts`, :mod:`.race`, :mod:`.torus`, :mod:`.commands`.
"""
