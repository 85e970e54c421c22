"""Inputs that would make the LP numerically empty or absurd are refused before HiGHS sees them (exit 2), naming the
file, the field path, the value and the allowed range; the bounds keep national-size inputs valid."""

from __future__ import annotations

import math
import re
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from pathcast.cli import main
from pathcast.errors import ScenarioError
from pathcast.pipeline import solve_inputs
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from pathcast.scenario.plausibility import (
    ELECTRICITY_LIMIT_TWH,
    FUEL_LIMIT_PJ,
    MONEY_LIMIT,
    POWER_LIMIT_GW,
    check_inputs,
)
from tests.conftest import DATA, tiny_mapping, write_scenario

DEMO = Path(__file__).parents[2] / "scenarios" / "demo"


def _run_and_check(tmp_path: Path, mapping: dict, capsys, named: str = "scenario.yaml") -> str:
    """The one-sentence stderr of 'pathcast check' and 'pathcast run' (both exit 2, nothing written), which names
    the file ``named``."""
    path = write_scenario(tmp_path, mapping)
    assert main(["check", str(path)]) == 2
    checked = capsys.readouterr().err
    out = tmp_path / "results"
    assert main(["run", str(path), "--out", str(out), "--quiet"]) == 2
    ran = capsys.readouterr().err
    assert checked == ran and not out.exists()
    assert (
        str(tmp_path / named) in ran
        and "HiGHS" not in ran
        and "Traceback" not in ran
        and ran.count("\n") == 1
    )
    return ran


def test_demand_of_1e30_is_refused_before_solving(tmp_path, capsys):
    m = tiny_mapping()
    m["demand"]["electricity"]["base_year_twh"] = 1e30
    err = _run_and_check(tmp_path, m, capsys)
    assert re.search(
        r"demand\.electricity\.base_year_twh: got 1e\+30; expected a finite value from 0 to 1e\+06 TWh/yr "
        r"\(plausibility bound\)\.",
        err,
    )


def test_growth_that_compounds_past_the_bound_blames_the_growth_rate(tmp_path, capsys):
    m = tiny_mapping()
    m["metadata"]["final_year"] = 2100
    m["demand"]["electricity"]["growth"] = 0.9  # 10 TWh x 1.9^75, about 8e21 TWh/yr in 2100
    err = _run_and_check(tmp_path, m, capsys)
    assert re.search(
        r"demand\.electricity\.growth: got 0\.9; expected a finite growth rate \[1/yr\] above -1 that keeps "
        r"electricity demand within 0 to 1e\+06 TWh/yr \(it gives [0-9.e+]+ TWh/yr in 20\d\d\)\.",
        err,
    )


def test_year_path_names_the_year_key(tmp_path, capsys):
    m = tiny_mapping()
    m["technologies"]["supplies"]["diesel_import"]["price"] = {2025: 15, 2029: 1e15}
    err = _run_and_check(tmp_path, m, capsys)
    assert (
        "technologies.supplies.diesel_import.price.2029: got 1000000000000000.0; expected a finite value from 0 to "
        "1e+12 currency/GJ (plausibility bound)." in err
    )


def test_existing_fleet_names_the_entry(tmp_path, capsys):
    m = tiny_mapping()
    m["technologies"]["generators"]["gas_combined_cycle"]["existing"][0]["capacity_mw"] = 1e30
    err = _run_and_check(tmp_path, m, capsys)
    assert "technologies.generators.gas_combined_cycle.existing.0.capacity_mw: got 1e+30; expected" in err
    assert "to 1e+08 MW (plausibility bound)" in err


def test_big_number_standing_for_no_limit_says_to_leave_the_field_out(tmp_path, capsys):
    m = tiny_mapping()
    m["technologies"]["generators"]["solar_pv"]["max_total_mw"] = 1e12
    err = _run_and_check(tmp_path, m, capsys)
    assert (
        "technologies.generators.solar_pv.max_total_mw: got 1000000000000.0; expected a finite value from 0 to "
        "1e+08 MW in 2025 (plausibility bound; leave the field out for no limit)." in err
    )


def test_capex_floor_is_named(tmp_path, capsys):
    m = tiny_mapping()
    m["technologies"]["generators"]["solar_pv"]["capex"]["floor"] = 1e30
    err = _run_and_check(tmp_path, m, capsys)
    assert (
        "technologies.generators.solar_pv.capex.floor: got 1e+30; expected a finite value from 0 to 1e+12 currency/kW"
        in err
    )


def test_nan_in_the_representative_days_csv_is_refused_before_solving(tmp_path, capsys):
    m = tiny_mapping()
    lines = ["day,weight_days,hour,demand,solar,wind"]
    for day in m["time"]["representative_days"]:
        for hour in range(24):
            demand = "nan" if (day["name"], hour) == ("winter", 5) else day["demand_shape"][hour]
            lines.append(
                f"{day['name']},{day['weight_days']},{hour},{demand},"
                f"{day['availability']['solar'][hour]},{day['availability']['wind'][hour]}"
            )
    (tmp_path / "days.csv").write_text("\n".join(lines) + "\n")
    m["time"]["representative_days"] = "days.csv"
    path = write_scenario(tmp_path, m)
    assert main(["check", str(path)]) == 2
    assert main(["run", str(path), "--out", str(tmp_path / "results"), "--quiet"]) == 2
    err = capsys.readouterr().err
    # the loader may refuse the NaN while reading the CSV already (naming the CSV line); either way the cell is
    # named and HiGHS never runs
    assert "nan" in err and "HiGHS" not in err and not (tmp_path / "results").exists()
    assert "days.csv: line 31" in err or "time.representative_days.1.demand_shape.5" in err


def test_check_inputs_names_each_array_field(tiny_run):
    inputs = tiny_run.model.inputs
    where = "scenario 'tiny'"
    shape = inputs.electricity_demand_gw.copy()
    shape[0, 1, 5] = math.nan
    with pytest.raises(
        ScenarioError, match=rf"^{where}: time\.representative_days: got 'nan'; expected finite hourly"
    ):
        check_inputs(replace(inputs, electricity_demand_gw=shape))
    with pytest.raises(
        ScenarioError, match=rf"^{where}: demand\.electricity: got inf; expected a finite value"
    ):
        check_inputs(replace(inputs, electricity_demand_twh=np.full(len(inputs.years), math.inf)))
    supplies = (replace(inputs.supplies[0], price=np.full(len(inputs.years), -5.0)), *inputs.supplies[1:])
    with pytest.raises(
        ScenarioError,
        match=rf"^{where}: technologies\.supplies\.gas_import\.price: got -5\.0; expected a finite value from 0 to "
        r"1e\+12 currency/GJ in 2025 \(plausibility bound\)\.$",
    ):
        check_inputs(replace(inputs, supplies=supplies))
    with pytest.raises(
        ScenarioError, match=rf"^{where}: policy\.carbon_price: got -50\.0; expected a finite value"
    ):
        solve_inputs(replace(inputs, carbon_price=np.full(len(inputs.years), -50.0)))
    with pytest.raises(ScenarioError, match=rf"^{where}: policy\.carbon_budget\.total_mt: got nan; expected"):
        check_inputs(replace(inputs, budget_mt=math.nan))
    techs = list(inputs.technologies)
    techs[0] = replace(techs[0], efficiency=0.0)
    with pytest.raises(
        ScenarioError,
        match=r"technologies\.generators\.gas_combined_cycle\.efficiency: got 0\.0; expected a finite "
        r"value above 0 and at most 5",
    ):
        check_inputs(replace(inputs, technologies=tuple(techs)))
    fuel = (replace(inputs.fuel_demands[0], demand_pj=np.full(len(inputs.years), 2 * FUEL_LIMIT_PJ)),)
    with pytest.raises(
        ScenarioError,
        match=rf"^{where}: demand\.fuels\.transport: got 20000000\.0; expected a finite value from 0 to 1e\+07 PJ/yr",
    ):
        check_inputs(replace(inputs, fuel_demands=fuel + inputs.fuel_demands[1:]))
    # NaN means "no target" in the clean share; infinity does not
    share = np.full(len(inputs.years), math.nan)
    check_inputs(replace(inputs, clean_share=share))
    share[2] = math.inf
    with pytest.raises(
        ScenarioError,
        match=r"policy\.clean_electricity_share: got inf; expected a finite value from 0 to 1 in 2027",
    ):
        check_inputs(replace(inputs, clean_share=share))


def test_the_demo_scenarios_pass():
    scenarios = [p for p in sorted(DEMO.glob("*.yaml")) if "design:" not in p.read_text()]
    assert len(scenarios) >= 2
    for path in scenarios:
        loaded = load_scenario(path)
        check_inputs(prepare_inputs(loaded.scenario), loaded)


def test_national_and_weak_currency_figures_stay_within_the_bounds(tmp_path):
    # a large national system (from memory: China used about 9 000 TWh of electricity in 2023, world final energy is
    # about 440 000 PJ/yr) priced in a currency of about 16 000 units per USD (from memory: the Indonesian rupiah):
    # nuclear at 10 000 USD/kW is 1.6e8 IDR/kW, gas at 10 USD/GJ is 1.6e5 IDR/GJ
    m = tiny_mapping()
    m["metadata"]["currency"] = "IDR"
    m["metadata"]["value_of_lost_load"] = 10_000 * 16_000
    m["demand"]["electricity"]["base_year_twh"] = 20_000
    m["demand"]["fuels"]["transport"]["base_year_pj"] = 100_000
    gens = m["technologies"]["generators"]
    gens["gas_combined_cycle"]["capex"] = 10_000 * 16_000
    gens["gas_combined_cycle"]["existing"][0]["capacity_mw"] = 2_000_000
    m["technologies"]["supplies"]["gas_import"]["price"] = 10 * 16_000
    m["policy"]["carbon_budget"]["total_mt"] = 200_000
    loaded = load_scenario(write_scenario(tmp_path, m))
    inputs = prepare_inputs(loaded.scenario)
    check_inputs(inputs, loaded)
    # the margins, in internal units: a tenfold larger system still passes
    assert inputs.electricity_demand_twh.max() * 10 < ELECTRICITY_LIMIT_TWH
    assert inputs.technologies[0].existing_gw.max() * 10 < POWER_LIMIT_GW
    assert inputs.technologies[0].capex.max() * 10 < MONEY_LIMIT


def test_check_of_the_tiny_scenario_is_valid(capsys):
    assert main(["check", str(DATA / "tiny.yaml")]) == 0
    assert "valid scenario 'tiny'" in capsys.readouterr().out
