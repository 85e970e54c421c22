"""One year, a base-load and a peaking plant on a load-duration curve: the optimal mix by the screening-curve method.

The screening-curve method (e.g. Stoft, Power System Economics, 2002, part 1 - from memory): with annual fixed costs
F [currency/MW-yr] and running costs v [currency/MWh], the base plant is cheaper for load that lasts longer than the
break-even duration h* = (F_base - F_peak) / (v_peak - v_base); it covers the load level that lasts h* hours, the
peaker the rest up to the peak. The test computes the mix by hand from the load-duration curve and compares.
"""

from __future__ import annotations

import numpy as np
import pytest

from pathcast.economics import capital_recovery_factor
from pathcast.pipeline import run_scenario
from tests.conftest import write_scenario

# a stepped load-duration curve: five flat representative days [MW] with weights [days/yr]
LEVELS_MW = [1000.0, 900.0, 700.0, 500.0, 400.0]
WEIGHTS = [15, 40, 90, 120, 100]
RATE, LIFETIME = 0.05, 30
BASE = {"capex": 1500.0, "fixed_om": 30.0, "variable_om": 10.0}
PEAK = {"capex": 500.0, "fixed_om": 10.0, "variable_om": 52.0}


def _scenario() -> dict:
    energy_twh = sum(level * 24 * w for level, w in zip(LEVELS_MW, WEIGHTS, strict=True)) / 1e6
    days = [
        {"name": f"level_{i}", "weight_days": w, "demand_shape": [level] * 24}
        for i, (level, w) in enumerate(zip(LEVELS_MW, WEIGHTS, strict=True))
    ]
    plant = {"lifetime": LIFETIME, "availability": 1.0}
    return {
        "metadata": {
            "name": "screening",
            "base_year": 2030,
            "final_year": 2030,
            "currency": "USD",
            "price_year": 2024,
            "discount_rate": RATE,
            "value_of_lost_load": 100000,
            "new_builds_in_base_year": True,  # greenfield: the first year is optimised like the others
        },
        "time": {"representative_days": days},
        "demand": {"electricity": {"base_year_twh": energy_twh}},
        "technologies": {"generators": {"base_plant": {**plant, **BASE}, "peaking_plant": {**plant, **PEAK}}},
        "policy": {"reserve_margin": 0.0},
    }


def test_screening_curve_mix(tmp_path):
    crf = capital_recovery_factor(RATE, LIFETIME)
    fixed_base = (BASE["capex"] * crf + BASE["fixed_om"]) * 1000  # currency/MW-yr
    fixed_peak = (PEAK["capex"] * crf + PEAK["fixed_om"]) * 1000
    break_even_h = (fixed_base - fixed_peak) / (PEAK["variable_om"] - BASE["variable_om"])
    duration_h = np.cumsum(WEIGHTS) * 24.0  # hours a year the load is at least each level
    assert not np.isclose(duration_h, break_even_h, rtol=0.02).any(), "keep h* away from a step of the curve"
    base_mw = max(level for level, hours in zip(LEVELS_MW, duration_h, strict=True) if hours >= break_even_h)
    peak_mw = max(LEVELS_MW) - base_mw

    run = run_scenario(write_scenario(tmp_path, _scenario()))
    capacity = run.result.capacity.set_index("technology")["capacity_mw"]
    assert capacity["base_plant"] == pytest.approx(base_mw, rel=1e-6)
    assert capacity["peaking_plant"] == pytest.approx(peak_mw, rel=1e-6, abs=1e-6)

    # cost by hand: fixed costs + each slice of the curve run by the cheaper plant
    energy_base = sum(min(level, base_mw) * 24 * w for level, w in zip(LEVELS_MW, WEIGHTS, strict=True))
    energy_peak = sum(max(level - base_mw, 0) * 24 * w for level, w in zip(LEVELS_MW, WEIGHTS, strict=True))
    by_hand = (
        fixed_base * base_mw
        + fixed_peak * peak_mw
        + BASE["variable_om"] * energy_base
        + PEAK["variable_om"] * energy_peak
    ) / 1e6  # million currency
    assert run.result.summary["total_discounted_cost_million"] == pytest.approx(by_hand, rel=1e-6)
    assert run.solution.objective == pytest.approx(by_hand, rel=1e-6)
