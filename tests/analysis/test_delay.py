"""Delayed action: monotone in the start year, history really fixed, stranded capacity valued, the command.

Fixture: tests/data/analytics_budget.yaml (tiny.yaml over 2025-2036 with a 45 MtCO2 budget; its reference pathway's
emissions rise every year, from 6.7 to 8.1 MtCO2/yr, so the history alone uses up the budget by 2033).
"""

from __future__ import annotations

import json
import math
from dataclasses import replace

import numpy as np
import numpy_financial
import pandas as pd
import pytest

from pathcast.analysis.delay import DELAY_COLUMNS, delayed_action
from pathcast.analysis.stranded import rate_from_crf, remaining_balance_fraction, stranded_capacity
from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.report.console import render_delay as render_text
from pathcast.results.run_result import RunResult
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from tests.conftest import DATA

STARTS = [2025, 2027, 2029, 2031, 2033]


@pytest.fixture(scope="module")
def inputs():
    return prepare_inputs(load_scenario(DATA / "analytics_budget.yaml").scenario)


@pytest.fixture(scope="module")
def study(inputs):
    return delayed_action(inputs, STARTS)


def test_delay_table_is_monotone(study):
    # computed (nested feasible sets): a later start fixes more years of the reference, so its cost never falls; and
    # with the reference's emissions rising (this fixture), a later start never needs a slower required rate. A start
    # whose budget cannot be met counts as infinitely costly and infinitely steep.
    table = study.table
    assert list(table.columns) == list(DELAY_COLUMNS) and table["start_year"].tolist() == STARTS
    cost = table["total_discounted_cost_million"].fillna(math.inf).to_numpy()
    rate = table["required_rate_per_year"].fillna(math.inf).to_numpy()
    assert np.all(np.diff(cost) >= -1e-7 * cost[:-1])
    assert np.all(np.diff(rate) >= 0)
    assert table.loc[0, "cost_increase_million"] == pytest.approx(0.0, abs=1e-6)
    assert table["achievable"].tolist() == [True, True, True, True, False]
    # the budget's carbon price at the start year rises with the delay too
    price = table["carbon_price_at_start_per_tco2"].dropna().to_numpy()
    assert np.all(np.diff(price) > 0)


def test_required_rate_convention(study):
    # computed: E_t = E0 (1-r)^t with t = 0 the year before action (not counted): r = E0 / (E0 + B)
    row = study.table.set_index("start_year").loc[2029]
    e0, remaining = row["emissions_before_action_mtco2"], row["remaining_budget_mtco2"]
    assert row["required_rate_per_year"] == pytest.approx(e0 / (e0 + remaining), rel=1e-12)
    ref = study.reference.result.emissions_total.set_index("year")["emissions_mtco2"]
    assert e0 == pytest.approx(ref.loc[2028])
    assert remaining == pytest.approx(45.0 - ref.loc[2025:2028].sum())


def test_history_is_the_reference_and_the_budget_holds_after(study):
    ref = study.reference.result
    for case in study.cases:
        if case.run is None:
            continue
        r = case.run.result
        before = r.emissions_total["year"] < case.start_year
        np.testing.assert_allclose(
            r.emissions_total.loc[before, "emissions_mtco2"],
            ref.emissions_total.loc[before, "emissions_mtco2"],
            rtol=1e-7,
            atol=1e-7,
        )
        cap, ref_cap = r.capacity, ref.capacity
        early = cap["year"] < case.start_year
        np.testing.assert_allclose(
            cap.loc[early, "new_mw"], ref_cap.loc[early, "new_mw"], rtol=1e-7, atol=1e-4
        )
        assert r.emissions_total["emissions_mtco2"].sum() <= 45.0 * (1 + 1e-6)
        assert r.summary["unserved_electricity_twh"] <= 1e-6 and r.summary["unserved_fuel_pj"] <= 1e-6


def test_start_after_the_budget_is_used_up_is_diagnosed(study):
    late = study.cases[-1]
    assert late.run is None and late.diagnosis.infeasible_in_solver and not late.diagnosis.achievable
    history = study.reference.result.emissions_total.query("year < 2033")["emissions_mtco2"].sum()
    row = study.table.set_index("start_year").loc[2033]
    # the fixed history alone emits more than the budget; nothing after 2033 has to be emitted in this fixture
    assert row["tightest_budget_mtco2"] == pytest.approx(history, rel=1e-6)
    assert row["shortfall_mtco2"] == pytest.approx(history - 45.0, rel=1e-6)
    assert any(b.kind == "fixed history" for b in late.diagnosis.binding)


def test_stranded_value_is_the_remaining_annuity(inputs):
    # a synthetic run: 1000 MW of solar built in 2025, 400 MW of it out of service from 2027. Remaining annuity of a
    # 25-year vintage at 7 % with 23 payments left, checked against numpy-financial's present value of an annuity
    # (independent implementation; /work/shared/references.md, Economics).
    years = inputs.years
    frames = []
    for t in inputs.technologies:
        existing = t.existing_gw * 1000
        new = np.zeros(len(years))
        service = existing.copy()
        if t.name == "solar_pv":
            new[0] = 1000.0
            service = np.where(years >= 2027, 600.0, 1000.0)
        installed = existing + np.where(years >= 2025, new[0], 0.0)
        frames.append(
            pd.DataFrame(
                {
                    "technology": t.name,
                    "kind": t.kind,
                    "year": years,
                    "capacity_mw": service,
                    "new_mw": new,
                    "retired_mw": 0.0,
                    "early_retired_mw": installed - service,
                }
            )
        )
    result = RunResult.create("synthetic", {"capacity": pd.concat(frames, ignore_index=True)}, {}, {}, {})
    stranded = stranded_capacity(result, inputs)
    assert len(stranded) == 1
    row = stranded.iloc[0]
    assert (row["technology"], row["vintage"], row["year"]) == ("solar_pv", "2025", 2027)
    assert row["stranded_mw"] == pytest.approx(400.0) and row["remaining_life_years"] == 23
    solar = next(t for t in inputs.technologies if t.name == "solar_pv")
    annuity = solar.capex[0] * solar.crf  # [million currency / GW / yr]
    expected = 0.4 * -numpy_financial.pv(0.07, 23, annuity)
    assert row["undepreciated_capex_million"] == pytest.approx(expected, rel=1e-9)


def test_crf_inversion_and_balance_fraction():
    # computed: (A/P, 7 %, 25) = 0.08581 (/work/shared/references.md, Economics): the rate comes back as 7 %
    assert rate_from_crf(0.0858105, 25) == pytest.approx(0.07, abs=1e-6)
    assert rate_from_crf(1 / 20, 20) == 0.0
    assert remaining_balance_fraction(0.07, 25, 25) == pytest.approx(
        1.0, rel=1e-12
    )  # retired in its build year
    assert remaining_balance_fraction(0.0, 20, 5) == pytest.approx(0.25)


def test_delay_command_writes_its_tables(study, tmp_path, capsys):
    out = tmp_path / "delay"
    code = main(
        ["delay", str(DATA / "analytics_budget.yaml"), "--start", "2029,2033", "--out", str(out), "--json"]
    )
    assert code == 0
    payload = json.loads(capsys.readouterr().out)
    assert [row["start_year"] for row in payload["table"]] == [2029, 2033]
    assert (
        payload["diagnoses"]["2029"]["achievable"] is True
        and payload["diagnoses"]["2033"]["achievable"] is False
    )
    for name in ("delay.csv", "delay_pathways.csv", "delay_stranded.csv", "delay.json"):
        assert (out / name).is_file()
    pathways = pd.read_csv(out / "delay_pathways.csv")
    assert set(pathways["start_year"].astype(str)) == {"reference", "2029"}
    text = render_text(study)
    assert (
        "NOT ACHIEVABLE" in text
        and "start 2033: scenario 'analytics_budget': the carbon budget of 45.0 MtCO2" in text
    )


def test_delay_error_paths(inputs, capsys):
    with pytest.raises(
        ScenarioError,
        match=r"start year 2040 of scenario 'analytics_budget': expected a year from the base year 2025 to 2036",
    ):
        delayed_action(inputs, [2040])
    with pytest.raises(ScenarioError, match=r"--start: got no start year"):
        delayed_action(inputs, [])
    with pytest.raises(
        ScenarioError,
        match=r"scenario 'analytics_budget': policy.carbon_budget: got none; expected a carbon budget",
    ):
        delayed_action(replace(inputs, budget_mt=None, budget_years=None), [2025])
    assert main(["delay", str(DATA / "analytics_budget.yaml"), "--start", "2025;2030"]) == 2
    assert "--start '2025;2030': expected whole years separated by commas" in capsys.readouterr().err


def test_parse_years_error():
    from pathcast.commands.delay import parse_years

    assert parse_years("2025, 2030,2035") == [2025, 2030, 2035]
    with pytest.raises(ScenarioError, match=r"--start '2025;2030': expected whole years separated by commas"):
        parse_years("2025;2030")
