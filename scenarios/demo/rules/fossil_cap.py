"""Extension example 1 (README, Extensions): coal and gas plant together at most 5 GW in service from 2035.

Illustrative rule for the invented demo country; the 5 GW is not taken from any plan.
"""

import pyomo.environ as pyo

FOSSIL = ("coal_steam", "gas_combined_cycle", "gas_open_cycle")
CAP_GW = 5.0  # [GW] of capacity in service
FROM_YEAR = 2035


def extend(model, inputs):
    years = [y for y in model.year if y >= FROM_YEAR]
    model.fossil_cap = pyo.Constraint(
        years, rule=lambda m, y: sum(m.capacity[t, y] for t in FOSSIL) <= CAP_GW
    )
