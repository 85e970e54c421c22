"""Each family reads its own solution back (pathcast.model.solution_values): the values close the model's balances,
its duals become prices that obey LP duality, and results code reaches the solution only through them.

Balances and complementary slackness are properties every solved LP has (common practice, no source); the carbon
price under a cumulative budget rising at the discount rate is Hotelling's rule (H. Hotelling, "The Economics of
Exhaustible Resources", Journal of Political Economy 39(2), 1931)."""

from __future__ import annotations

import ast
import dataclasses
from pathlib import Path

import numpy as np
import pytest

import pathcast
from pathcast.model import names
from pathcast.model.build import build_linear_program
from pathcast.model.solution_values import SolutionValues, read_solution
from pathcast.pipeline import run_scenario
from pathcast.results.extract import extract_tables, tables_from_values
from tests.conftest import tiny_mapping, write_scenario

PACKAGE = Path(pathcast.__file__).parent


@pytest.fixture(scope="module")
def tiny_values(tiny_run) -> SolutionValues:
    return read_solution(tiny_run.model, tiny_run.solution)


@pytest.fixture(scope="module")
def policy_run(tmp_path_factory):
    """The tiny system with a yearly cap, a clean-electricity share and a higher reserve margin, each binding in
    some years."""
    m = tiny_mapping()
    m["policy"]["emission_caps_mt"] = {2026: 4.8}
    m["policy"]["clean_electricity_share"] = {2028: 0.97}
    m["policy"]["reserve_margin"] = 0.4
    run = run_scenario(write_scenario(tmp_path_factory.mktemp("policy"), m))
    return run, read_solution(run.model, run.solution)


def _block_names(model) -> tuple[set[str], set[str]]:
    return set(model.lp.variables), set(model.lp.row_blocks)


def test_every_block_name_is_declared_once(policy_run):
    run, _ = policy_run
    variables, rows = _block_names(run.model)
    assert variables <= set(names.VARIABLE_BLOCKS)
    assert rows <= set(names.ROW_BLOCKS)
    assert len(set(names.VARIABLE_BLOCKS)) == len(names.VARIABLE_BLOCKS)
    assert len(set(names.ROW_BLOCKS)) == len(names.ROW_BLOCKS)
    assert not set(names.VARIABLE_BLOCKS) & set(names.ROW_BLOCKS)
    # the policy variant creates every policy row
    assert {
        names.CARBON_BUDGET,
        names.EMISSION_CAP,
        names.RESERVE_MARGIN,
        names.CLEAN_ELECTRICITY_SHARE,
    } <= rows


def test_block_names_keep_their_values():
    # the strings are an interface (column_bounds, extension variables, diagnostics): listed here as written
    assert (names.CAPACITY, names.NEW, names.ENERGY_CAPACITY, names.ENERGY_NEW) == (
        "capacity",
        "new",
        "energy_capacity",
        "energy_new",
    )
    assert (names.ELECTRICITY_BALANCE, names.CARBON_BUDGET, names.FUEL_BALANCE, names.EMISSION_CAP) == (
        "electricity_balance",
        "carbon_budget",
        "fuel_balance",
        "emission_cap",
    )


def test_context_declares_what_the_families_set(tiny_run):
    fields = {f.name for f in dataclasses.fields(type(tiny_run.model.context))}
    assert {"delivery_pairs", "cap_years", "extension_rows"} <= fields
    ctx = tiny_run.model.context
    assert len(ctx.delivery_pairs) == ctx.blocks[names.DELIVERY].shape[0]
    assert ctx.cap_years == []  # tiny has no yearly cap


def test_values_are_frozen_and_read_only(tiny_values):
    with pytest.raises(dataclasses.FrozenInstanceError):
        tiny_values.capacity.capacity_gw = np.zeros(1)
    with pytest.raises(ValueError, match="read-only"):
        tiny_values.capacity.capacity_gw[0, 0] = 1.0
    with pytest.raises(ValueError, match="read-only"):
        tiny_values.dispatch.generation_gw[0, 0, 0, 0] = 1.0


def test_labels_match_the_arrays(tiny_values):
    v = tiny_values
    Y = len(v.capacity.years)
    assert v.capacity.capacity_gw.shape == (len(v.capacity.technologies), Y)
    assert v.capacity.energy_capacity_gwh.shape == (len(v.capacity.storage_technologies), Y)
    D, H = len(v.dispatch.days), len(v.dispatch.hours)
    assert v.dispatch.generation_gw.shape == (len(v.dispatch.generators), Y, D, H)
    assert v.storage.charge_gw.shape == (len(v.storage.technologies), Y, D, H)
    assert v.fuels.converter_power_gw.shape == (len(v.fuels.electric_converters), Y, D, H)
    assert v.fuels.delivery_pj.shape == (len(v.fuels.delivery_demands), Y)
    assert v.fuels.fuel_price_per_gj.shape == (len(v.fuels.commodities), Y)
    assert v.emissions.by_source_mtco2.shape == (len(v.emissions.sources), Y)
    assert set(v.dispatch.generators) == {"gas_combined_cycle", "solar_pv", "wind_onshore"}
    assert v.fuels.delivery_demands == ("transport", "transport", "industry_hydrogen")
    assert v.fuels.delivery_commodities == ("diesel", "synthetic_diesel", "hydrogen")


def test_electricity_balance_closes_on_the_values(tiny_values):
    v = tiny_values
    supply = (
        v.dispatch.generation_gw.sum(axis=0)
        + v.storage.discharge_gw.sum(axis=0)
        - v.storage.charge_gw.sum(axis=0)
        - v.fuels.converter_power_gw.sum(axis=0)
        + v.dispatch.unserved_gw
    )
    demand = v.inputs.electricity_demand_gw
    assert np.abs(supply - demand).max() < 1e-6 * demand.max()


def test_fuel_balance_closes_on_the_values(tiny_values):
    f = tiny_values.fuels
    net = {c: np.zeros(len(f.years)) for c in f.commodities}
    for i, c in enumerate(f.supply_commodities):
        net[c] += f.supply_pj[i]
    for i, c in enumerate(f.burner_fuels):
        net[c] -= f.fuel_use_pj[i]
    for i, c in enumerate(f.electric_converter_outputs):
        net[c] += f.electric_conversion_output_pj[i]
    for i in range(len(f.fuel_converters)):
        net[f.fuel_converter_inputs[i]] -= f.converter_input_pj[i]
        net[f.fuel_converter_outputs[i]] += f.fuel_conversion_output_pj[i]
    for i, c in enumerate(f.delivery_commodities):
        net[c] -= f.delivery_pj[i]
    for c, values in net.items():
        assert values.min() > -1e-6, c


def test_emissions_by_source_add_up_to_the_total(tiny_values):
    e = tiny_values.emissions
    assert e.by_source_mtco2.sum(axis=0) == pytest.approx(e.total_mtco2, rel=1e-9)
    assert set(e.sectors) <= {"power", "final use", "conversion"}


def test_capacity_bookkeeping(tiny_values):
    c = tiny_values.capacity
    tol = 1e-7
    assert (c.capacity_gw <= c.installed_gw + tol).all()  # retiring early never adds capacity
    assert (c.retired_gw >= 0).all()
    # capacity in service = last year's + builds - retirements
    previous = np.concatenate([c.installed_gw[:, :1] - c.new_gw[:, :1], c.capacity_gw[:, :-1]], axis=1)
    change = c.capacity_gw - previous - c.new_gw + c.retired_gw
    assert np.abs(change[:, 1:]).max() < 1e-6


def test_family_costs_add_up_to_the_objective(tiny_values):
    v = tiny_values
    undiscounted = (
        v.capacity.investment_million
        + v.capacity.fixed_om_million
        + v.dispatch.variable_om_million.sum(axis=0)
        + v.storage.variable_om_million.sum(axis=0)
        + v.fuels.converter_variable_om_million.sum(axis=0)
        + v.fuels.fuel_cost_million
        + v.emissions.carbon_price_cost_million
        + v.dispatch.unserved_cost_million
        + v.fuels.unserved_fuel_cost_million
    )
    assert float((undiscounted * v.inputs.discount_factor).sum()) == pytest.approx(
        v.objective_million, rel=1e-9
    )


def test_budget_carbon_price_rises_at_the_discount_rate(tiny_values):
    # Hotelling's rule: under a cumulative budget alone, the undiscounted carbon price grows at the discount rate
    p = tiny_values.policy
    price = p.budget_carbon_price_per_tco2
    years = np.array(p.years)
    assert price[0] > 0
    expected = price[0] * (1 + tiny_values.inputs.discount_rate) ** (years - years[0])
    assert price == pytest.approx(expected, rel=1e-9)
    assert tiny_values.emissions.total_mtco2.sum() == pytest.approx(p.budget_mtco2, rel=1e-7)  # binding


def test_policy_prices_obey_complementary_slackness(policy_run):
    run, v = policy_run
    p, inputs = v.policy, v.inputs
    tol = 1e-6
    # yearly cap: a price only where the cap binds
    cap_at = {int(y): cap for y, cap in inputs.emission_caps_mt.items()}
    assert p.cap_years == tuple(sorted(cap_at))
    for y, year in enumerate(p.years):
        price = p.cap_carbon_price_per_tco2[y]
        assert price >= -tol
        if year not in cap_at:
            assert price == 0.0
        elif price > tol:
            assert v.emissions.total_mtco2[y] == pytest.approx(cap_at[year], rel=1e-7)
    assert p.cap_carbon_price_per_tco2.max() > 1.0  # the cap binds in this variant
    # reserve margin: firm capacity meets the requirement wherever it has a price
    credit = {t.name: t.capacity_credit for t in inputs.technologies}
    firm = sum(credit[name] * v.capacity.capacity_gw[i] for i, name in enumerate(v.capacity.technologies))
    required = (1 + inputs.reserve_margin) * inputs.peak_demand_gw
    assert (p.reserve_margin_price_per_kw_year >= -tol).all()
    assert (firm >= required - 1e-7).all()
    binding = p.reserve_margin_price_per_kw_year > tol
    assert binding.any()
    assert firm[binding] == pytest.approx(required[binding], rel=1e-7)
    # clean share: NaN without a target; a price only where the share is just met
    clean = {t.name for t in inputs.technologies if t.clean}
    twh = (v.dispatch.generation_gw * v.dispatch.hour_weight[None]).sum(axis=(2, 3)) / 1000.0
    is_clean = np.array([name in clean for name in v.dispatch.generators])
    share = twh[is_clean].sum(axis=0) / twh.sum(axis=0)
    target = inputs.clean_share
    assert np.isnan(p.clean_share_price_per_mwh[np.isnan(target)]).all()
    with_target = ~np.isnan(target)
    assert (p.clean_share_price_per_mwh[with_target] >= -tol).all()
    priced = with_target & (np.nan_to_num(p.clean_share_price_per_mwh) > tol)
    assert priced.any()
    assert share[priced] == pytest.approx(target[priced], rel=1e-7)


def test_no_overshoot_without_an_overshoot_price(tiny_values):
    assert tiny_values.policy.budget_overshoot_mtco2 == 0.0
    assert names.BUDGET_OVERSHOOT not in build_linear_program(tiny_values.inputs).lp.variables


def test_tables_come_from_the_values(tiny_run, tiny_values):
    a = extract_tables(tiny_run.model, tiny_run.solution)
    b = tables_from_values(tiny_values)
    assert list(a) == list(b)
    for name in a:
        assert a[name].equals(b[name]), name


MODEL_INTERNALS = (
    "lp.variables",
    "row_blocks",
    "row_offsets",
    "ctx.blocks",
    ".blocks[",
    "_alive_pairs",
    ".context",
)


@pytest.mark.parametrize("folder", ["results", "report"])
def test_results_and_reports_read_no_model_internals(folder):
    allowed = {"pathcast.model.solution_values", "pathcast.model.build"}  # build: PathwayModel for type hints
    for path in sorted((PACKAGE / folder).glob("*.py")):
        text = path.read_text()
        for word in MODEL_INTERNALS:
            assert word not in text, f"{path.name} uses {word!r}"
        for node in ast.walk(ast.parse(text)):
            if isinstance(node, ast.ImportFrom) and node.level and node.module:
                module = "pathcast." + node.module if node.level == 2 else f"pathcast.{folder}.{node.module}"
                if module.startswith("pathcast.model"):
                    assert module in allowed, f"{path.name} imports {module}"
            elif (
                isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("pathcast.model")
            ):
                assert node.module in allowed, f"{path.name} imports {node.module}"
