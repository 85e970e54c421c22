"""Reading scenarios: extends merging, quantities with units, CSV tables, demand growth."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from pathcast.scenario.time_paths import growth_path, path_values
from tests.conftest import tiny_mapping, write_scenario

DEMO = Path(__file__).parents[2] / "scenarios" / "demo"


def test_variant_overrides_only_what_it_names():
    base = load_scenario(DEMO / "budget.yaml").scenario
    variant = load_scenario(DEMO / "budget_no_new_gas.yaml").scenario
    assert variant.technologies.generators["gas_combined_cycle"].phase_out_year == 2045
    assert base.technologies.generators["gas_combined_cycle"].phase_out_year is None
    # untouched fields come from the parents
    assert (
        variant.technologies.generators["gas_combined_cycle"].efficiency
        == base.technologies.generators["gas_combined_cycle"].efficiency
    )
    assert variant.policy.carbon_budget == base.policy.carbon_budget
    assert variant.metadata.name != base.metadata.name


def test_quantities_with_units_are_converted(tmp_path):
    m = tiny_mapping()
    m["technologies"]["generators"]["solar_pv"]["capex"] = "0.9 USD/W"
    m["technologies"]["generators"]["gas_combined_cycle"]["existing"][0]["capacity_mw"] = "1.2 GW"
    m["demand"]["electricity"]["base_year_twh"] = "10000 GWh"
    s = load_scenario(write_scenario(tmp_path, m)).scenario
    assert s.technologies.generators["solar_pv"].capex.table == pytest.approx(900.0)
    assert s.technologies.generators["gas_combined_cycle"].existing[0].capacity_mw == pytest.approx(1200.0)
    assert s.demand.electricity.base_year_twh == pytest.approx(10.0)
    assert s.commodities["natural_gas"].emission_factor == pytest.approx(0.0561)  # "56.1 kg/GJ"


def test_heat_rate_gives_efficiency():
    inputs = prepare_inputs(load_scenario(DEMO / "reference.yaml").scenario)
    ocgt = next(t for t in inputs.technologies if t.name == "gas_open_cycle")
    assert ocgt.efficiency == pytest.approx(0.36)  # 3.6 GJ/MWh / 10 GJ/MWh


def test_year_table_from_csv(tmp_path):
    (tmp_path / "prices.csv").write_text("year,value\n2025,10\n2029,14\n")
    m = tiny_mapping()
    m["technologies"]["supplies"]["gas_import"]["price"] = "prices.csv"
    inputs = prepare_inputs(load_scenario(write_scenario(tmp_path, m)).scenario)
    gas = next(s for s in inputs.supplies if s.name == "gas_import")
    assert gas.price.tolist() == pytest.approx([10, 11, 12, 13, 14])


def test_demo_days_from_csv_sum_to_a_year():
    s = load_scenario(DEMO / "reference.yaml").scenario
    assert sum(d.weight_days for d in s.time.representative_days) == 365
    assert all(len(d.demand_shape) == 24 for d in s.time.representative_days)


def test_demand_growth_by_period_and_energy_kept():
    years = np.arange(2025, 2031)
    values = growth_path(100.0, {2025: 0.1, 2028: 0.0}, years)
    assert values.tolist() == pytest.approx([100, 110, 121, 121, 121, 121])
    assert path_values({2025: 1.0, 2027: 3.0}, years).tolist() == pytest.approx([1, 2, 3, 3, 3, 3])
    inputs = prepare_inputs(load_scenario(DEMO / "reference.yaml").scenario)
    # the hourly shape keeps the year's energy: sum_d w_d sum_h P = TWh x 1000
    energy = (inputs.electricity_demand_gw * inputs.day_weights[None, :, None]).sum(axis=(1, 2)) / 1000
    assert energy == pytest.approx(inputs.electricity_demand_twh, rel=1e-12)


def test_input_hash_changes_with_content(tmp_path):
    a = load_scenario(write_scenario(tmp_path, tiny_mapping(), "a.yaml"))
    m = tiny_mapping()
    m["metadata"]["discount_rate"] = 0.05
    b = load_scenario(write_scenario(tmp_path, m, "b.yaml"))
    assert a.input_hash != b.input_hash
    assert a.input_hash == load_scenario(write_scenario(tmp_path, tiny_mapping(), "c.yaml")).input_hash
