"""The extension the benchmarks time (``run_benchmarks.py --extension``): one rule per year on ``model.capacity``.

Gas combined cycle and gas open cycle together at most 30 GW in service in every year: a cap on two technologies' sum,
the kind of rule the README's extension examples show. The 30 GW is invented (common practice, no source); only the
cost of building the rule is measured. The benchmark scenarios (scenario_generator.py) have both technologies from
8 technologies up; with fewer, the rule caps the gas combined cycle alone.
"""

from __future__ import annotations

import pyomo.environ as pyo

__all__ = ["extend", "CAP_GW", "CAPPED"]

CAPPED = ("gas_combined_cycle", "gas_open_cycle")
CAP_GW = 30.0  # [GW] of capacity in service, both technologies together


def extend(model, inputs):
    capped = [t for t in CAPPED if t in model.technology]
    model.gas_cap = pyo.Constraint(
        model.year, rule=lambda m, y: sum(m.capacity[t, y] for t in capped) <= CAP_GW
    )
