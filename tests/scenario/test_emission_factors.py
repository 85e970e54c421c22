"""The demo's fuel emission factors against the IPCC 2006 Guidelines defaults."""

from pathlib import Path

import pytest

from pathcast.scenario.loader import load_scenario

DEMO = Path(__file__).parents[2] / "scenarios" / "demo" / "reference.yaml"

# IPCC (2006), 2006 IPCC Guidelines for National Greenhouse Gas Inventories, Vol. 2 Energy, Ch. 1, Table 1.4:
# default CO2 emission factors for combustion, kg CO2/TJ on a net calorific basis (status "secondary" in
# shared/references.md: read in a public copy that cites the table).
IPCC_2006_TABLE_1_4_KG_PER_TJ = {
    "natural_gas": 56_100,
    "coal": 94_600,
    "diesel": 74_100,
}  # coal = other bituminous


@pytest.mark.parametrize(("fuel", "kg_per_tj"), IPCC_2006_TABLE_1_4_KG_PER_TJ.items())
def test_demo_emission_factors_are_ipcc_defaults(fuel, kg_per_tj):
    commodity = load_scenario(DEMO).scenario.commodities[fuel]
    assert commodity.emission_factor == pytest.approx(kg_per_tj / 1e6, rel=1e-12)  # kg/TJ -> t/GJ
    assert "IPCC 2006" in commodity.source and "Table 1.4" in commodity.source


def test_biogenic_and_carbon_free_fuels_count_zero_at_combustion():
    commodities = load_scenario(DEMO).scenario.commodities
    for fuel in ("wood_chips", "biodiesel", "hydrogen", "synthetic_diesel"):
        assert commodities[fuel].emission_factor == 0.0
        assert commodities[fuel].source
