"""An infeasible or unbounded run blames only limits that exist in the scenario, and the ones that conflict.

Solved with the real HiGHS. The infeasible cases are small and checkable by hand: with every technology's potential
at zero there is no firm capacity at all, so the reserve margin (firm capacity >= (1 + margin) x peak demand > 0)
cannot be met: an arithmetic certainty, no outside source needed.
"""

from __future__ import annotations

import json
import re
from dataclasses import replace

import numpy as np
import pandas as pd
import pytest

from pathcast.cli import main
from pathcast.errors import InfeasibleError, ScenarioError
from pathcast.infeasibility import conflict_members, explain_no_optimum, limits_in_scenario
from pathcast.model.build import build_linear_program
from pathcast.pipeline import solve_inputs
from pathcast.solve import Conflict, SolverOptions, find_conflict, solve_lp
from tests.conftest import tiny_mapping, write_scenario

NOT_IN_TINY = ("carbon budget", "caps", "cap ", "clean-electricity share", "minimum build", "phase-out")


def _no_supply_potential() -> dict:
    """tests/data/tiny.yaml with every supply potential_pj at 0 and no carbon budget."""
    m = tiny_mapping()
    del m["policy"]["carbon_budget"]
    for supply in m["technologies"]["supplies"].values():
        supply["potential_pj"] = 0
    return m


def _run(tmp_path, mapping, capsys) -> tuple[int, str]:
    tmp_path.mkdir(parents=True, exist_ok=True)
    path = write_scenario(tmp_path, mapping)
    code = main(
        ["run", str(path), "--out", str(tmp_path / "results"), "--quiet", "--no-excel", "--no-parquet"]
    )
    return code, capsys.readouterr().err


def test_no_supply_potential_and_no_budget_is_met_by_synthetic_fuels(tmp_path, capsys):
    # the exact inputs: no fuel can be imported, but transport diesel and industrial hydrogen are still met through
    # the electrolyser and fuel synthesis, so the run is feasible (exit 0) with no unserved fuel and no emissions
    code, err = _run(tmp_path, _no_supply_potential(), capsys)
    assert code == 0, err
    summary = json.loads((tmp_path / "results" / "summary.json").read_text())
    assert summary["unserved_fuel_pj"] == pytest.approx(0.0, abs=1e-6)
    assert summary["cumulative_emissions_mtco2"] == pytest.approx(0.0, abs=1e-6)
    supply = pd.read_csv(tmp_path / "results" / "fuel_supply.csv")
    assert supply.filter(like="pj").abs().to_numpy().max() == pytest.approx(0.0, abs=1e-6)


def test_all_potentials_zero_names_the_reserve_margin_and_the_potentials(tmp_path, capsys):
    m = _no_supply_potential()
    for section in ("generators", "storage", "converters"):
        for technology in m["technologies"][section].values():
            technology["max_total_mw"] = 0
    code, err = _run(tmp_path, m, capsys)
    assert code == 3 and err.count("\n") == 1 and "Traceback" not in err
    assert re.search(
        r"scenario\.yaml: HiGHS reports the model infeasible: the reserve margin in 2025 \(firm capacity of at "
        r"least 1\.10 x the peak demand: [\d,]+ MW for a peak of [\d,]+ MW in 2025\) cannot be met within the "
        r"potentials of gas_combined_cycle \(0 MW\), wind_onshore \(0 MW\) and battery \(0 MW\) in 2025; relax one "
        r"of them \(policy\.reserve_margin, technologies\.generators\.gas_combined_cycle\.max_total_mw, "
        r"technologies\.generators\.wind_onshore\.max_total_mw, technologies\.storage\.battery\.max_total_mw\)\.",
        err,
    )
    for absent in NOT_IN_TINY:
        assert absent not in err
    assert not (tmp_path / "results").exists()


def test_peak_demand_in_the_message_is_the_scenarios(tmp_path, tiny_run):
    # 1.10 x the base-year peak of the tiny system, computed from its own demand shape
    inputs = tiny_run.model.inputs
    techs = tuple(replace(t, max_total_gw=np.zeros_like(t.max_total_gw)) for t in inputs.technologies)
    with pytest.raises(InfeasibleError) as info:
        solve_inputs(replace(inputs, budget_mt=None, budget_years=None, technologies=techs))
    peak_mw = inputs.peak_demand_gw[0] * 1000
    assert f"{1.1 * peak_mw:,.0f} MW for a peak of {peak_mw:,.0f} MW in 2025" in str(info.value)
    diagnosis = info.value.diagnosis
    assert diagnosis["status"] == "infeasible"
    kinds = {(c["kind"], c["subject"]) for c in diagnosis["conflict"]}
    assert kinds == {
        ("reserve margin", ""),
        ("potential", "gas_combined_cycle (0 MW)"),
        ("potential", "wind_onshore (0 MW)"),
        ("potential", "battery (0 MW)"),
    }


def test_phase_outs_and_build_rate_limits_are_named(tmp_path, capsys):
    m = tiny_mapping()
    del m["policy"]["carbon_budget"]
    for section in ("generators", "storage"):
        for technology in m["technologies"][section].values():
            technology["phase_out_year"] = 2027
    code, err = _run(tmp_path / "a", m, capsys)
    assert code == 3
    assert re.search(
        r"the reserve margin in 2027 \(.*\) cannot be met within the phase-outs of gas_combined_cycle \(from 2027\), "
        r"wind_onshore \(from 2027\) and battery \(from 2027\) in 2027; relax one of them \(policy\.reserve_margin, "
        r"technologies\.generators\.gas_combined_cycle\.phase_out_year,",
        err,
    )
    m = tiny_mapping()
    del m["policy"]["carbon_budget"]
    for section in ("generators", "storage"):
        for technology in m["technologies"][section].values():
            technology["max_build_mw_per_year"] = 10
    code, err = _run(tmp_path / "b", m, capsys)
    assert code == 3
    assert (
        "cannot be met within the build-rate limits of gas_combined_cycle (10 MW/yr), wind_onshore (10 MW/yr) and "
        in err
    )
    assert "technologies.storage.battery.max_build_mw_per_year" in err
    for absent in NOT_IN_TINY[:4]:
        assert absent not in err


def test_with_a_budget_the_other_limits_are_named_without_blaming_the_budget(tmp_path, capsys):
    m = tiny_mapping()  # keeps its carbon budget
    for section in ("generators", "storage", "converters"):
        for technology in m["technologies"][section].values():
            technology["max_total_mw"] = 0
    code, err = _run(tmp_path, m, capsys)
    assert code == 3
    assert "scenario 'tiny' is infeasible even without its carbon budget: the reserve margin in 2025" in err
    assert "cannot be met within the potentials of gas_combined_cycle (0 MW)" in err


def test_limits_in_scenario_lists_only_those_present(tiny_run):
    inputs = tiny_run.model.inputs
    # tiny.yaml: a carbon budget, the reserve margin, solar's build-rate limit, the battery's longest duration
    assert limits_in_scenario(inputs) == [
        "the carbon budget",
        "the reserve margin",
        "the build-rate limits",
        "the storage durations",
    ]
    bare = replace(
        inputs,
        budget_mt=None,
        budget_years=None,
        technologies=tuple(
            replace(t, max_build_gw=np.full_like(t.max_build_gw, np.inf), max_duration_h=np.inf)
            for t in inputs.technologies
        ),
    )
    assert limits_in_scenario(bare) == ["the reserve margin"]
    richer = replace(
        inputs,
        emission_caps_mt={2030: 1.0},
        clean_share=np.full(len(inputs.years), 0.5),
        supplies=(replace(inputs.supplies[0], phase_out_year=2028), *inputs.supplies[1:]),
    )
    assert {"the yearly emission caps", "the clean-electricity share", "the phase-outs"} <= set(
        limits_in_scenario(richer)
    )


def test_without_a_conflict_set_the_message_lists_only_the_scenarios_limits(tiny_run):
    model = build_linear_program(replace(tiny_run.model.inputs, budget_mt=None, budget_years=None))
    message, diagnosis, infeasible = explain_no_optimum(model, Conflict("unknown"), "infeasible", "here.yaml")
    assert infeasible and diagnosis["conflict"] == []
    assert message == (
        "here.yaml: HiGHS reports the model infeasible: its limits (the reserve margin, the build-rate limits and "
        "the storage durations) cannot all be met together; relax one of them."
    )


def test_unbounded_model_names_the_negative_price(tiny_run):
    # a negative fuel price lets the cost fall without limit: built and solved directly (the plausibility check in
    # solve_inputs refuses it before HiGHS, see tests/scenario/test_plausibility.py)
    inputs = replace(tiny_run.model.inputs, budget_mt=None, budget_years=None)
    supplies = (replace(inputs.supplies[0], price=np.full(len(inputs.years), -5.0)), *inputs.supplies[1:])
    model = build_linear_program(replace(inputs, supplies=supplies))
    matrix, _, _ = model.lp.matrix()
    solution = solve_lp(model.lp, SolverOptions())
    assert solution.status in ("unbounded_or_infeasible", "unbounded")
    conflict = find_conflict(solution)
    assert conflict.kind == "unbounded"
    message, diagnosis, infeasible = explain_no_optimum(model, conflict, solution.status, "here.yaml")
    assert not infeasible and diagnosis == {"status": "unbounded"}
    assert re.match(
        r"here\.yaml: HiGHS reports the model unbounded: the cost falls without limit with more supply of "
        r"gas_import \(price -5\.00 USD/GJ in 20\d\d\)[^;]*; expected prices and costs of at least 0 "
        r"\(technologies\.supplies\.gas_import\.price\)\.$",
        message,
    )
    with pytest.raises(
        ScenarioError, match=r"technologies\.supplies\.gas_import\.price: got -5\.0; expected"
    ):
        solve_inputs(replace(inputs, supplies=supplies))


def test_conflict_members_merge_years(tiny_run):
    inputs = replace(tiny_run.model.inputs, budget_mt=None, budget_years=None)
    techs = tuple(replace(t, max_build_gw=np.full_like(t.max_build_gw, 0.01)) for t in inputs.technologies)
    model = build_linear_program(replace(inputs, technologies=techs))
    matrix, _, _ = model.lp.matrix()
    solution = solve_lp(model.lp, SolverOptions())
    assert solution.status == "infeasible"
    members = conflict_members(model, find_conflict(solution))
    margin = [m for m in members if m.kind == "reserve margin"]
    assert len(margin) == 1 and margin[0].years[0] == 2025 and margin[0].role == "target"
    assert "in 2025" in margin[0].figure
    # by hand: 1,587 MW firm needed; 1500 MW of gas x 0.9 and at most 10 MW of each build in 2025 (gas x 0.9, wind
    # x 0.1, battery x 0.5): 1587 - 1365 = 222 MW short (a second solve with a slack on the margin finds it)
    assert margin[0].figure.endswith("; 222 MW of firm capacity short at best")
    assert {m.kind for m in members} <= {"reserve margin", "build-rate limit", "potential"}
