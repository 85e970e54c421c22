"""Extension example 2 (README, Extensions): at least 30 % of the solar capacity built each year goes on rooftops.

Works with any scenario that has the generators ``solar_rooftop`` and ``solar_pv`` (see rooftop.yaml beside this
file). Illustrative numbers.
"""

import pyomo.environ as pyo

SHARE = 0.30  # [-] of each year's new solar capacity


def extend(model, inputs):
    def rule(m, y):
        return m.new["solar_rooftop", y] >= SHARE * (m.new["solar_rooftop", y] + m.new["solar_pv", y])

    model.rooftop_share = pyo.Constraint(model.year, rule=rule)
