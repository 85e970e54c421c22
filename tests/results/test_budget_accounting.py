"""Budget accounting and the AR6 constants behind the warming estimate."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from pathcast.errors import ScenarioError
from pathcast.pipeline import solve_inputs
from pathcast.results.budget import BudgetAccount, budget_accounting, budget_terms
from pathcast.results.climate_constants import (
    REMAINING_BUDGETS_2020_GTCO2,
    TCRE_BEST_C_PER_1000_GTCO2,
    TCRE_HIGH_C_PER_1000_GTCO2,
    TCRE_LOW_C_PER_1000_GTCO2,
    remaining_budget_gtco2,
    warming_from_cumulative_co2,
)
from pathcast.results.writers import read_result, write_result


def test_ar6_remaining_budgets_table_spm2():
    # IPCC (2021) AR6 WG1 SPM Table SPM.2, remaining budgets from 1 January 2020 at 50/67/83 % likelihood (secondary
    # in /work/shared/references.md: read in a public copy that cites it)
    assert dict(REMAINING_BUDGETS_2020_GTCO2[1.5]) == {0.50: 500.0, 0.67: 400.0, 0.83: 300.0}
    assert dict(REMAINING_BUDGETS_2020_GTCO2[1.7]) == {0.50: 850.0, 0.67: 700.0, 0.83: 550.0}
    assert dict(REMAINING_BUDGETS_2020_GTCO2[2.0]) == {0.50: 1350.0, 0.67: 1150.0, 0.83: 900.0}
    assert remaining_budget_gtco2(1.5) == 500.0
    assert remaining_budget_gtco2(2.0, 0.83) == 900.0


def test_tcre_constants_and_warming_of_the_1p5_budget():
    # IPCC (2021) AR6 WG1 SPM D.1.1 (confirmed): 0.45 C per 1000 GtCO2, likely 0.27-0.63 C.
    assert (TCRE_LOW_C_PER_1000_GTCO2, TCRE_BEST_C_PER_1000_GTCO2, TCRE_HIGH_C_PER_1000_GTCO2) == (
        0.27,
        0.45,
        0.63,
    )
    # computed: the 500 GtCO2 (1.5 C, 50 %) budget at 0.45 C/1000 GtCO2 is 0.225 C of further warming
    warming = warming_from_cumulative_co2(500.0 * 1000.0)  # MtCO2
    assert warming["warming_best_c"] == pytest.approx(0.225, rel=1e-12)
    assert warming["warming_low_c"] == pytest.approx(0.135, rel=1e-12)
    assert warming["warming_high_c"] == pytest.approx(0.315, rel=1e-12)


def test_remaining_budget_errors():
    with pytest.raises(
        ScenarioError, match=r"warming limit 3\.0 C has no AR6 remaining budget; expected one of"
    ):
        remaining_budget_gtco2(3.0)
    with pytest.raises(ScenarioError, match=r"likelihood 0\.9 has no AR6 remaining budget"):
        remaining_budget_gtco2(1.5, 0.9)


def test_accounting_of_the_tiny_budget_run(tiny_run):
    # the tiny fixture's budget (25 MtCO2 over 2025-2029) binds: the whole budget is used, none is left, it is never
    # exceeded (tolerance as the run summary's within_budget, common practice, no source)
    account = budget_accounting(tiny_run.result)
    assert isinstance(account, BudgetAccount)
    table = account.table
    assert list(table.columns[:5]) == [
        "year",
        "emissions_mtco2",
        "cumulative_mtco2",
        "budget_mtco2",
        "remaining_mtco2",
    ]
    assert table["cumulative_mtco2"].iloc[-1] == pytest.approx(25.0, rel=1e-6)
    np.testing.assert_allclose(table["remaining_mtco2"], 25.0 - table["cumulative_mtco2"])
    assert account.exhaustion_year is None
    assert account.headroom_final_mtco2 == pytest.approx(0.0, abs=1e-5)
    # warming of 25 MtCO2 by TCRE (AR6 WG1 SPM D.1.1): 25e-6 x 1000 GtCO2 x 0.45 C
    assert account.warming["warming_best_c"] == pytest.approx(25.0 / 1e6 * 0.45, rel=1e-6)
    assert (
        account.warming["warming_low_c"]
        < account.warming["warming_best_c"]
        < account.warming["warming_high_c"]
    )


def test_a_smaller_budget_is_exhausted_in_the_year_it_is_passed(tiny_run):
    emissions = tiny_run.result.emissions_total["emissions_mtco2"].to_numpy()
    budget = float(emissions[:2].sum()) + 0.5 * float(emissions[2])  # runs out during the third year
    account = budget_accounting(tiny_run.result, budget_mt=budget)
    assert account.exhaustion_year == 2027
    assert account.headroom_final_mtco2 == pytest.approx(budget - emissions.sum())


def test_budget_period_counts_only_its_own_years(tiny_run):
    result = tiny_run.result
    summary = dict(result.summary, budget_first_year=2027, budget_last_year=2028, carbon_budget_mtco2=12.0)
    shifted = replace(result, summary=summary)
    account = budget_accounting(shifted)
    e = result.emissions_total["emissions_mtco2"].to_numpy()
    np.testing.assert_allclose(account.table["cumulative_mtco2"], [0, 0, e[2], e[2] + e[3], e[2] + e[3]])
    assert account.headroom_final_mtco2 == pytest.approx(12.0 - e[2] - e[3])
    assert account.table["in_budget_period"].tolist() == [False, False, True, True, False]


def test_no_budget_gives_none_and_read_back_folder_gives_the_same(tiny_run, tmp_path):
    no_budget = solve_inputs(replace(tiny_run.model.inputs, budget_mt=None, budget_years=None)).result
    account = budget_accounting(no_budget)
    assert account.exhaustion_year is None and account.headroom_final_mtco2 is None and account.terms is None
    assert budget_terms(no_budget) is None
    assert account.table["budget_mtco2"].isna().all()
    folder = write_result(tiny_run.result, tmp_path / "tiny", parquet=False, excel=False)
    again = budget_accounting(read_result(folder))
    fresh = budget_accounting(tiny_run.result)
    np.testing.assert_allclose(again.table["cumulative_mtco2"], fresh.table["cumulative_mtco2"])
    assert again.warming == pytest.approx(fresh.warming)
