"""The comparison table equals the runs' summaries and the budget / rate analytics. The abatement cost is the
definition in results.compare (average cost of abatement, (cost - cost_0) / (CO2_0 - CO2): common practice, no
source)."""

from __future__ import annotations

import math

import pytest

from pathcast.errors import ScenarioError
from pathcast.results.budget import budget_accounting
from pathcast.results.compare import METRIC_LABELS, compare, metric_label, milestone_years
from pathcast.results.reduction_rates import realised_rates, required_rates_table


def same(value, expected) -> bool:
    if expected is None:
        return value is None or (isinstance(value, float) and math.isnan(value))
    if isinstance(expected, bool | str):
        return value == expected
    return value == pytest.approx(expected, rel=1e-12, abs=1e-12)


def test_values_equal_summaries(reference_run, tiny_run):
    results = [reference_run.result, tiny_run.result]
    table = compare(results)
    assert list(table.columns) == ["tiny_reference", "tiny"]
    for result in results:
        column = table[result.scenario_name]
        for key, value in result.summary.items():
            if isinstance(value, dict):
                for technology, inner in value.items():
                    assert same(column[f"{key}.{technology}"], inner), (key, technology)
            elif key in table.index:
                assert same(column[key], value), key
        for key in ("total_discounted_cost_million", "cumulative_emissions_mtco2", "peak_build_mw_per_year"):
            assert key in table.index


def test_budget_and_rate_rows(reference_run, tiny_run):
    table = compare([reference_run.result, tiny_run.result])
    tiny = tiny_run.result
    account = budget_accounting(tiny)
    assert same(table.loc["budget_exhaustion_year", "tiny"], account.exhaustion_year)
    assert same(table.loc["budget_headroom_final_mtco2", "tiny"], account.headroom_final_mtco2)
    rates = required_rates_table(tiny, start_years=[2025]).iloc[0]
    assert same(table.loc["required_rate_from_start_per_year", "tiny"], rates["exponential_rate_per_year"])
    # tiny runs 2025-2029: five years on lies outside the horizon
    assert math.isnan(table.loc["required_rate_from_start_plus_5_per_year", "tiny"])
    _, periods = realised_rates(tiny, period_years=4)
    assert same(
        table.loc["realised_compound_rate_per_year", "tiny"], periods["compound_rate_per_year"].iloc[0]
    )
    # the reference has no budget: it is measured against tiny's 25 MtCO2
    assert table.loc["carbon_budget_mtco2", "tiny_reference"] is None
    assert table.loc["comparison_budget_mtco2", "tiny_reference"] == 25.0
    assert table.loc["comparison_budget_of", "tiny_reference"] == "tiny"
    borrowed = budget_accounting(reference_run.result, budget_mt=25.0)
    assert same(table.loc["budget_exhaustion_year", "tiny_reference"], borrowed.exhaustion_year)
    assert borrowed.exhaustion_year is not None  # the unconstrained case overshoots 25 MtCO2 within 2025-2029


def test_abatement_cost(reference_run, tiny_run):
    first, second = reference_run.result.summary, tiny_run.result.summary
    table = compare([reference_run.result, tiny_run.result])
    expected = (second["total_discounted_cost_million"] - first["total_discounted_cost_million"]) / (
        first["cumulative_emissions_mtco2"] - second["cumulative_emissions_mtco2"]
    )
    assert math.isnan(table.loc["abatement_cost_per_tco2", "tiny_reference"])
    assert table.loc["abatement_cost_per_tco2", "tiny"] == pytest.approx(expected, rel=1e-12)
    assert expected > 0  # the budget costs money and avoids CO2


def test_same_scenario_twice_has_no_abatement_cost(tiny_run):
    table = compare([tiny_run.result, tiny_run.result])
    assert list(table.columns) == ["tiny", "tiny (2)"]
    assert math.isnan(table.loc["abatement_cost_per_tco2", "tiny (2)"])


def test_carbon_price_rows(tiny_run):
    table = compare([tiny_run.result])
    first, last = milestone_years(tiny_run.result)
    assert (first, last) == (
        2027,
        2029,
    )  # no decade year inside 2025-2029: the middle year and the final year
    price = tiny_run.result.carbon_price.set_index("year")["carbon_price_per_tco2"]
    assert same(table.loc["carbon_price_2029_per_tco2", "tiny"], price[2029])


def test_every_metric_has_a_label(reference_run, tiny_run):
    table = compare([reference_run.result, tiny_run.result])
    for metric in table.index:
        assert metric in METRIC_LABELS or "." in metric or metric.startswith("carbon_price_"), metric
        assert metric_label(metric) != metric or metric == "currency"


def test_no_results():
    with pytest.raises(ScenarioError, match="got no results; expected at least one"):
        compare([])
