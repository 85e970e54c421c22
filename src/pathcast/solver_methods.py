"""The names of the HiGHS algorithms pathcast offers (``solver.method``, ``pathcast run --method``).

Kept apart from ``pathcast.solve`` so that the command line can list them without importing HiGHS or Pyomo;
``pathcast.solve`` re-exports ``METHODS`` and maps each name to HiGHS options (``highs_options_for``).
"""

from __future__ import annotations

__all__ = ["METHODS"]

# auto: pathcast's measured choice; simplex: dual simplex; ipm: interior point without crossover;
# ipm-crossover: interior point then crossover to a basic solution; pdlp: first-order primal-dual LP solver
METHODS: tuple[str, ...] = ("auto", "simplex", "ipm", "ipm-crossover", "pdlp")
