"""Unachievable budgets: definition, tightest feasible budget, binding limits, 'pathcast run' exit 3, priced overshoot.

Fixture: tests/data/analytics_tight.yaml (tiny.yaml with wind 400 MW/yr, solar 300 MW/yr and fuel synthesis 20 MW/yr
at most, and a 10 MtCO2 budget over 2025-2029 that it cannot meet without shedding demand). Checks are computed
(LP duality and self-consistency), no outside source.
"""

from __future__ import annotations

import json
from dataclasses import replace

import numpy as np
import pandas as pd
import pytest

from pathcast.analysis.achievability import (
    BindingLimit,
    confirm_limits,
    diagnose_budget,
    explain,
    minimum_budget_emissions,
    raise_if_not_achievable,
)
from pathcast.analysis.variants import cap_unserved, emissions_only, fix_history, without_budget
from pathcast.cli import main
from pathcast.errors import InfeasibleError
from pathcast.model.build import build_linear_program
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from tests.conftest import DATA, tiny_mapping, write_scenario


@pytest.fixture(scope="module")
def tight():
    return prepare_inputs(load_scenario(DATA / "analytics_tight.yaml").scenario)


@pytest.fixture(scope="module")
def diagnosis(tight):
    return diagnose_budget(tight)


def test_tight_budget_is_not_achievable_and_its_tightest_budget_is_consistent(tight, diagnosis):
    assert not diagnosis.achievable and not diagnosis.infeasible_in_solver
    assert diagnosis.extra_unserved_electricity_twh > 0.1 and diagnosis.extra_unserved_fuel_pj > 1.0
    tightest = diagnosis.tightest_budget_mtco2
    assert tightest > tight.budget_mt and diagnosis.shortfall_mtco2 == pytest.approx(tightest - 10.0)
    # self-consistency: a budget 0.1 % above the tightest is achievable, one 1 % below is not
    assert diagnose_budget(replace(tight, budget_mt=tightest * 1.001)).achievable
    assert not diagnose_budget(replace(tight, budget_mt=tightest * 0.99)).achievable
    # and the no-budget pathway emits more than the minimum (else the question would be empty)
    assert diagnosis.no_budget_run.result.summary["cumulative_emissions_mtco2"] > tightest


def test_binding_limits_are_the_build_rates_and_their_marginal_is_right(tight, diagnosis):
    kinds = {(b.kind, b.name): b for b in diagnosis.binding}
    wind = kinds[("build-rate limit", "wind_onshore")]
    assert (
        wind.bound == pytest.approx(400.0)
        and wind.unit == "MW/yr"
        and wind.years == (2025, 2026, 2027, 2028, 2029)
    )
    assert ("build-rate limit", "solar_pv") in kinds
    assert diagnosis.binding[-1].kind == "no extra unserved energy"  # binding by construction: listed last
    # the reduced cost is the emissions saved per GW/yr more of the limit, summed over the binding years: raising the
    # wind limit by 1 MW/yr in every year lowers the minimum by wind.marginal x 0.001 (to first order)
    wind_index = [t.name for t in tight.technologies].index("wind_onshore")
    techs = list(tight.technologies)
    techs[wind_index] = replace(techs[wind_index], max_build_gw=techs[wind_index].max_build_gw + 0.001)
    relaxed = replace(tight, technologies=tuple(techs))
    lower = minimum_budget_emissions(relaxed, diagnosis.no_budget_run).solution.objective
    assert diagnosis.tightest_budget_mtco2 - lower == pytest.approx(
        wind.marginal_mtco2_per_unit * 0.001, rel=1e-3
    )


def test_a_limit_whose_relaxation_changes_nothing_is_dropped(tight, diagnosis):
    # the emissions-only LP is degenerate, so a reduced cost can name a limit that does not bind: confirm_limits keeps a
    # limit only when relaxing it (+5 %) lowers the minimum. The wind limit does; more combined-cycle gas plants, made up
    # here as a candidate, do not.
    wind = next(b for b in diagnosis.binding if b.name == "wind_onshore")
    assert wind.relaxation == "+5 %" and wind.cut_mtco2 == pytest.approx(
        wind.marginal_mtco2_per_unit * 0.02, rel=1e-3
    )
    fake = BindingLimit(
        kind="build-rate limit",
        name="gas_combined_cycle",
        years=(2025,),
        bound=100.0,
        unit="MW/yr",
        marginal_mtco2_per_unit=99.0,
    )
    kept = confirm_limits(tight, diagnosis.no_budget_run, diagnosis.tightest_budget_mtco2, (fake, wind))
    assert [b.name for b in kept] == ["wind_onshore"]


def test_run_exits_3_with_the_explanation(tmp_path, capsys):
    code = main(
        [
            "run",
            str(DATA / "analytics_tight.yaml"),
            "--out",
            str(tmp_path / "tight"),
            "--no-excel",
            "--no-parquet",
            "--quiet",
        ]
    )
    assert code == 3
    err = capsys.readouterr().err
    assert (
        "scenario 'analytics_tight': the carbon budget of 10.0 MtCO2 for 2025-2029 is not achievable" in err
    )
    assert "the tightest feasible budget is" in err and "MtCO2 short" in err
    assert "build-rate limit of wind_onshore (400 MW/yr) in 2025-2029" in err
    assert (tmp_path / "tight" / "summary.json").is_file()  # the shedding pathway is kept for inspection


def test_allow_overshoot_prices_the_excess(tmp_path, capsys):
    out = tmp_path / "overshoot"
    assert (
        main(
            [
                "run",
                str(DATA / "analytics_tight.yaml"),
                "--out",
                str(out),
                "--no-excel",
                "--no-parquet",
                "--quiet",
                "--allow-overshoot",
                "100",
            ]
        )
        == 0
    )
    assert "budget overshoot" in capsys.readouterr().out
    summary = json.loads((out / "summary.json").read_text())
    cumulative = summary["cumulative_emissions_mtco2"]
    assert summary["budget_overshoot_mtco2"] == pytest.approx(cumulative - 10.0, rel=1e-6)
    assert summary["budget_overshoot_price_per_tco2"] == 100.0
    # computed: the overshoot is paid in the budget's last year, so the budget price there is the overshoot price
    carbon = pd.read_csv(out / "carbon_price.csv").set_index("year")["from_budget_per_tco2"]
    assert carbon.loc[2029] == pytest.approx(100.0, rel=1e-6)


def test_vol_too_low_branch_and_infeasible_without_budget(tiny_run, tmp_path, capsys):
    # a budget that is physically reachable (the tiny system can reach zero) but where shedding fuel at 20 USD/GJ is
    # cheaper than the last abatement: not achievable by the definition, with advice on the value of lost load
    d = diagnose_budget(replace(tiny_run.model.inputs, value_of_unserved_fuel=20.0, budget_mt=10.0))
    assert not d.achievable and d.shortfall_mtco2 < 0
    assert "shedding is cheaper than the remaining abatement: raise metadata.value_of_lost_load" in explain(d)
    with pytest.raises(
        InfeasibleError,
        match=r"scenario 'tiny': the carbon budget of 10\.0 MtCO2 for 2025-2029 is not achievable",
    ):
        raise_if_not_achievable(d)
    # other limits that conflict on their own: a 200 % reserve margin with every firm technology capped
    mapping = tiny_mapping()
    mapping["policy"]["reserve_margin"] = 2.0
    gens = mapping["technologies"]["generators"]
    gens["gas_combined_cycle"]["max_total_mw"] = 1500
    gens["wind_onshore"]["max_total_mw"] = 1000
    mapping["technologies"]["storage"]["battery"]["max_total_mw"] = 100
    path = write_scenario(tmp_path, mapping)
    assert (
        main(["run", str(path), "--out", str(tmp_path / "r"), "--quiet", "--no-excel", "--no-parquet"]) == 3
    )
    assert "scenario 'tiny' is infeasible even without its carbon budget" in capsys.readouterr().err


def test_achievable_budget_needs_no_extra_solve(tiny_run):
    d = diagnose_budget(tiny_run.model.inputs, budget_run=tiny_run)
    assert d.achievable and d.no_budget_run is None and np.isnan(d.tightest_budget_mtco2)
    assert diagnose_budget(without_budget(tiny_run.model.inputs)) is None
    raise_if_not_achievable(d)  # nothing raised


def test_variants_and_column_bound_errors(tiny_run, capsys):
    inputs = tiny_run.model.inputs
    fixed = fix_history(inputs, tiny_run, 2027)
    lp = build_linear_program(fixed).lp
    emissions = lp.variables["emissions"]
    e = tiny_run.result.emissions_total["emissions_mtco2"].to_numpy()
    np.testing.assert_allclose(emissions.lower[:2], e[:2])
    np.testing.assert_allclose(emissions.upper[:2], e[:2])
    assert np.isinf(emissions.upper[2:]).all()
    capped = build_linear_program(cap_unserved(inputs, tiny_run)).lp.variables["unserved"]
    assert (
        capped.upper.max() <= 1e-9 + tiny_run.solution.x[tiny_run.model.lp.variables["unserved"].all()].max()
    )
    only = emissions_only(inputs)
    assert all((t.capex == 0).all() for t in only.technologies) and only.budget_mt is None
    with pytest.raises(
        ValueError, match=r"column_bounds: 'no_such_block' is not a variable block; expected one of"
    ):
        build_linear_program(replace(inputs, column_bounds={"no_such_block": (np.nan, np.nan)}))
    assert (
        main(
            [
                "run",
                str(DATA / "tiny.yaml"),
                "--allow-overshoot",
                "-5",
                "--quiet",
                "--no-excel",
                "--no-parquet",
                "--out",
                "/nonexistent-never-written",
            ]
        )
        == 2
    )
    assert "--allow-overshoot -5.0: expected a price >= 0" in capsys.readouterr().err


def test_allow_overshoot_without_a_budget(tmp_path, capsys):
    mapping = tiny_mapping()
    del mapping["policy"]["carbon_budget"]
    path = write_scenario(tmp_path, mapping)
    assert main(["run", str(path), "--allow-overshoot", "50", "--quiet", "--out", str(tmp_path / "r")]) == 2
    assert (
        "policy.carbon_budget: got none; expected a carbon budget for --allow-overshoot to relax."
        in capsys.readouterr().err
    )


def test_error_paths_raise_one_sentence_errors(tiny_run, tmp_path):
    import argparse

    from pathcast.commands import run as run_command
    from pathcast.errors import ScenarioError

    inputs = tiny_run.model.inputs
    techs = tuple(replace(t, max_total_gw=np.minimum(t.max_total_gw, 0.1)) for t in inputs.technologies)
    conflicting = replace(inputs, reserve_margin=2.0, technologies=techs)
    with pytest.raises(
        InfeasibleError,
        match=r"scenario 'tiny' is infeasible even without its carbon budget: the reserve margin in 2025 \(firm "
        r"capacity of at least 3\.00 x the peak demand: .*\) cannot be met within the potentials of "
        r"gas_combined_cycle \(100 MW\), wind_onshore \(100 MW\) and battery \(100 MW\) in 2025; relax one of them",
    ):
        diagnose_budget(conflicting)
    parser = argparse.ArgumentParser()
    run_command.add_arguments(parser)
    args = parser.parse_args(
        [str(DATA / "tiny.yaml"), "--allow-overshoot", "-5", "--quiet", "--out", str(tmp_path / "r")]
    )
    with pytest.raises(
        ScenarioError, match=r"--allow-overshoot -5\.0: expected a price >= 0 \[currency/tCO2\]\."
    ):
        run_command.execute(args)
    mapping = tiny_mapping()
    del mapping["policy"]["carbon_budget"]
    path = write_scenario(tmp_path, mapping)
    args = parser.parse_args([str(path), "--allow-overshoot", "50", "--quiet", "--out", str(tmp_path / "r")])
    with pytest.raises(
        ScenarioError,
        match=r"policy\.carbon_budget: got none; expected a carbon budget for --allow-overshoot",
    ):
        run_command.execute(args)
