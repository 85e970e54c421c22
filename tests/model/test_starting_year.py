"""The calibrated starting year and the speed of change (README, the optimisation): the base year holds the existing
fleet and committed projects only, committed projects come into service in their year, builds grow at most as fast
as their limit allows and plants retire early at most as fast as theirs; bad inputs and an infeasible base year are
named in one sentence.

Every number checked here is a hand calculation from the scenario written in the test (named beside each check);
the rule itself (no new capacity in the first modelled year unless it is committed) is the issue's, common practice
of calibrated planning studies (DeCarolis et al. (2017), Applied Energy 194, 184-198, secondary).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from pathcast.cli import main
from pathcast.errors import InfeasibleError, ScenarioError
from pathcast.pipeline import run_scenario
from pathcast.scenario.loader import load_scenario
from tests.conftest import tiny_mapping, write_scenario

YEARS = list(range(2025, 2030))


def _calibrated_tiny() -> dict:
    """tiny.yaml with a calibrated base year and enough existing gas plant to meet its reserve margin in 2025."""
    m = tiny_mapping()
    m["metadata"]["new_builds_in_base_year"] = False
    m["technologies"]["generators"]["gas_combined_cycle"]["existing"] = [
        {"capacity_mw": 2500, "retirement_year": 2040}
    ]
    return m


def _table(run, name):
    return run.result.tables[name]


def _new_mw(run, technology: str) -> np.ndarray:
    cap = _table(run, "capacity")
    return cap[cap["technology"] == technology].sort_values("year")["new_mw"].to_numpy()


def _capacity_mw(run, technology: str) -> np.ndarray:
    cap = _table(run, "capacity")
    return cap[cap["technology"] == technology].sort_values("year")["capacity_mw"].to_numpy()


# --- the base year -----------------------------------------------------------------------------------------------


def test_base_year_without_committed_projects_has_nothing_new_in_service(tmp_path):
    run = run_scenario(write_scenario(tmp_path, _calibrated_tiny()))
    cap = _table(run, "capacity")
    base = cap[cap["year"] == 2025]
    # the check: with no committed projects nothing new is in service in the base year
    assert (base["new_mw"].abs() <= 1e-6).all(), base
    # and the fleet is the country as it is: every existing plant in service (2500 MW of gas, nothing else)
    assert base.set_index("technology")["capacity_mw"]["gas_combined_cycle"] == pytest.approx(2500, abs=1e-6)
    assert base["capacity_mw"].sum() == pytest.approx(2500, abs=1e-6)
    # later years are optimised: something is built (the carbon budget of tiny.yaml needs clean capacity)
    assert cap[cap["year"] > 2025]["new_mw"].sum() > 100


def test_greenfield_option_builds_in_the_base_year(tmp_path):
    m = _calibrated_tiny()
    m["metadata"]["new_builds_in_base_year"] = True
    run = run_scenario(write_scenario(tmp_path, m))
    cap = _table(run, "capacity")
    assert cap[cap["year"] == 2025]["new_mw"].sum() > 1.0  # the optimiser may now build in 2025


def test_committed_projects_appear_in_their_year(tmp_path):
    m = _calibrated_tiny()
    generators = m["technologies"]["generators"]
    generators["wind_onshore"]["committed"] = [{"capacity_mw": 200, "in_service_year": 2025}]
    generators["solar_pv"]["committed"] = [
        {"capacity_mw": 300, "in_service_year": 2027},
        {"capacity_mw": 150, "in_service_year": 2027, "description": "second auction"},
    ]
    m["technologies"]["storage"]["battery"]["committed"] = [
        {"capacity_mw": 100, "energy_mwh": 400, "in_service_year": 2025}
    ]
    run = run_scenario(write_scenario(tmp_path, m))
    cap = _table(run, "capacity").set_index(["technology", "year"])
    # in the base year the committed projects are exactly what is new (by hand: 200 MW wind, 100 MW battery)
    assert cap.loc[("wind_onshore", 2025), "new_mw"] == pytest.approx(200, abs=1e-6)
    assert cap.loc[("battery", 2025), "new_mw"] == pytest.approx(100, abs=1e-6)
    assert cap.loc[("solar_pv", 2025), "new_mw"] == pytest.approx(0, abs=1e-6)
    energy = _table(run, "storage_energy").set_index(["technology", "year"])
    assert energy.loc[("battery", 2025), "new_mwh"] == pytest.approx(400, abs=1e-6)
    # two solar projects of 2027: 450 MW at least that year, shown in committed_mw
    assert cap.loc[("solar_pv", 2027), "committed_mw"] == pytest.approx(450, abs=1e-9)
    assert cap.loc[("solar_pv", 2027), "new_mw"] >= 450 - 1e-6
    assert cap.loc[("wind_onshore", 2026), "committed_mw"] == 0.0
    # committed capacity is in service from its year: 200 MW wind in 2025 (nothing existing)
    assert cap.loc[("wind_onshore", 2025), "capacity_mw"] == pytest.approx(200, abs=1e-6)


def test_lead_time_keeps_new_builds_out_until_it_has_passed(tmp_path):
    m = _calibrated_tiny()
    m["technologies"]["generators"]["solar_pv"]["lead_time_years"] = 3
    m["technologies"]["generators"]["solar_pv"]["committed"] = [{"capacity_mw": 120, "in_service_year": 2026}]
    run = run_scenario(write_scenario(tmp_path, m))
    new = _new_mw(run, "solar_pv")
    # a decision taken in 2025 is in service from 2028 (2025 + 3); before, only the committed 120 MW of 2026
    assert new[:3] == pytest.approx([0.0, 120.0, 0.0], abs=1e-6)
    assert new[3:].sum() > 1.0  # built once it may be (tiny's budget needs solar)


# --- speed of change: hand calculations on a small case ----------------------------------------------------------


def _one_plant_growing(factor: float, seed_mw: float) -> dict:
    """tiny.yaml with no reserve margin, electricity demand growing 30 %/yr and gas the only plant that may be built,
    with a build growth limit; unserved energy at the value of lost load is the only other way to meet demand, so
    every year builds as much gas as the limit allows."""
    m = _calibrated_tiny()
    m["policy"] = {"reserve_margin": None}
    m["demand"]["electricity"] = {"base_year_twh": 10, "growth": 0.3}
    generators = m["technologies"]["generators"]
    gas = generators["gas_combined_cycle"]
    gas["existing"] = [{"capacity_mw": 2000, "retirement_year": 2040}]
    gas["max_build_growth"] = {"factor": factor, "seed_mw": seed_mw}
    for name in ("solar_pv", "wind_onshore"):
        generators[name]["max_build_mw_per_year"] = 0
    m["technologies"]["storage"]["battery"]["max_build_mw_per_year"] = 0
    m["technologies"]["converters"]["electrolyser"]["max_build_mw_per_year"] = 0
    m["technologies"]["converters"]["fuel_synthesis"]["max_build_mw_per_year"] = 0
    m["demand"]["fuels"] = {}
    return m


def test_build_growth_limit_binds_as_a_hand_calculation_says(tmp_path):
    run = run_scenario(write_scenario(tmp_path, _one_plant_growing(factor=2.0, seed_mw=50)))
    # by hand: new[2025] = 0 (base year), new[y] = 50 + 2 x new[y-1]: 50, 150, 350, 750 MW
    expected = [0.0, 50.0, 150.0, 350.0, 750.0]
    assert _new_mw(run, "gas_combined_cycle") == pytest.approx(expected, abs=1e-6)
    # the limit is what holds the builds back: demand is partly unserved in every later year
    hourly = _table(run, "electricity_hourly")
    unserved = hourly[hourly["technology"] == "unserved"].groupby("year")["power_mw"].max()
    assert (unserved.loc[2026:] > 1.0).all()


def test_committed_projects_come_on_top_of_the_growth_limit(tmp_path):
    m = _one_plant_growing(factor=2.0, seed_mw=50)
    # demand doubling every year: the limit binds despite the project
    m["demand"]["electricity"]["growth"] = 1.0
    m["technologies"]["generators"]["gas_combined_cycle"]["committed"] = [
        {"capacity_mw": 400, "in_service_year": 2026}
    ]
    run = run_scenario(write_scenario(tmp_path, m))
    # by hand: 2026 = 50 + 2 x 0 + 400 committed = 450; then 50 + 2 x 450 = 950; 50 + 2 x 950 = 1950; 3950
    assert _new_mw(run, "gas_combined_cycle") == pytest.approx([0.0, 450.0, 950.0, 1950.0, 3950.0], abs=1e-6)


def _retiring_plant(limit_mw: float | None, phase_out: int | None = None) -> dict:
    """One expensive old plant (1000 MW, 300 USD/kW/yr fixed O&M) that a cheap new one replaces as soon as it may;
    flat demand of 500 MW, no reserve margin, no fuels (hand-checkable)."""
    old = {
        "capex": 1000,
        "fixed_om": 300,
        "variable_om": 40,
        "lifetime": 40,
        "existing": [{"capacity_mw": 1000, "retirement_year": 2100}],
        "max_build_mw_per_year": 0,
    }
    if limit_mw is not None:
        old["max_early_retirement_mw_per_year"] = limit_mw
    if phase_out is not None:
        old["phase_out_year"] = phase_out
    return {
        "metadata": {
            "name": "retiring",
            "base_year": YEARS[0],
            "final_year": YEARS[-1],
            "price_year": 2024,
            "discount_rate": 0.05,
        },
        "time": {"representative_days": [{"name": "day", "weight_days": 365, "demand_shape": [1.0] * 24}]},
        "demand": {"electricity": {"base_year_twh": 4.38}},  # 500 MW flat x 8760 h
        "technologies": {
            "generators": {
                "old_plant": old,
                "new_plant": {"capex": 100, "fixed_om": 5, "variable_om": 10, "lifetime": 30},
            }
        },
        "policy": {"reserve_margin": None},
    }


def test_early_retirement_limit_binds_as_a_hand_calculation_says(tmp_path):
    free = run_scenario(write_scenario(tmp_path, _retiring_plant(None), "free.yaml"))
    # without a limit the old plant leaves at once after the base year (its fixed O&M alone is 300 USD/kW/yr)
    assert _capacity_mw(free, "old_plant") == pytest.approx([1000, 0, 0, 0, 0], abs=1e-6)
    limited = run_scenario(write_scenario(tmp_path, _retiring_plant(300), "limited.yaml"))
    # by hand: at most 300 MW more retired early each year, from the whole fleet in service in 2025
    assert _capacity_mw(limited, "old_plant") == pytest.approx([1000, 700, 400, 100, 0], abs=1e-6)
    cap = _table(limited, "capacity")
    early = cap[cap["technology"] == "old_plant"].sort_values("year")["early_retired_mw"].to_numpy()
    assert early == pytest.approx([0, 300, 600, 900, 1000], abs=1e-6)


# --- base-year statistics ------------------------------------------------------------------------------------------


def test_base_year_calibration_table_compares_statistics_with_the_base_year(tmp_path):
    m = _calibrated_tiny()
    m["base_year_statistics"] = {
        "source": "invented for the test",
        "generation_twh": {"gas_combined_cycle": 9.0, "solar_pv": 0.0},
        "fuel_use_pj": {"natural_gas": 70.0, "diesel": 50.0},
        "emissions_mtco2": 7.5,
    }
    run = run_scenario(write_scenario(tmp_path, m))
    table = _table(run, "base_year_calibration").set_index(["quantity", "subject"])
    electricity = _table(run, "electricity")
    gas = electricity[(electricity["technology"] == "gas_combined_cycle") & (electricity["year"] == 2025)]
    row = table.loc[("generation", "gas_combined_cycle")]
    assert row["model"] == pytest.approx(float(gas["generation_twh"].iloc[0]), rel=1e-12)
    # difference and relative difference by definition: model - statistic, and that over the statistic
    assert row["difference"] == pytest.approx(row["model"] - 9.0, rel=1e-12)
    assert row["relative_difference"] == pytest.approx((row["model"] - 9.0) / 9.0, rel=1e-12)
    assert row["unit"] == "TWh/yr" and row["source"] == "invented for the test"
    assert math.isnan(table.loc[("generation", "solar_pv"), "relative_difference"])  # a statistic of 0
    # diesel: the whole transport demand of tiny.yaml in 2025, 50 PJ, is met by diesel (no synthetic diesel yet)
    assert table.loc[("fuel_use", "diesel"), "model"] == pytest.approx(50.0, rel=1e-6)
    emissions = _table(run, "emissions_total")
    assert table.loc[("emissions", "total"), "model"] == pytest.approx(
        float(emissions.loc[emissions["year"] == 2025, "emissions_mtco2"].iloc[0]), rel=1e-12
    )
    without = run_scenario(write_scenario(tmp_path, _calibrated_tiny(), "without.yaml"))
    assert "base_year_calibration" not in without.result.tables  # only with statistics


# --- bad input: one sentence naming file, field path, value and what was expected; exit 2 ------------------------


def _refused(tmp_path, change) -> str:
    m = _calibrated_tiny()
    change(m)
    path = write_scenario(tmp_path, m)
    with pytest.raises(ScenarioError) as info:
        load_scenario(path)
    message = str(info.value)
    assert str(path) in message and message.endswith(".") and "\n" not in message
    return message


def _solar(m) -> dict:
    return m["technologies"]["generators"]["solar_pv"]


@pytest.mark.parametrize(
    ("change", "expected"),
    [
        (
            lambda m: _solar(m).update(committed=[{"capacity_mw": 100, "in_service_year": 2031}]),
            r"technologies\.generators\.solar_pv\.committed\.0\.in_service_year: got 2031; expected a year from "
            r"metadata\.base_year 2025 to metadata\.final_year 2029\.",
        ),
        (
            lambda m: _solar(m).update(committed=[{"capacity_mw": 100, "in_service_year": 2020}]),
            r"solar_pv\.committed\.0\.in_service_year: got 2020; expected a year from metadata\.base_year 2025",
        ),
        (
            lambda m: _solar(m).update(committed=[{"capacity_mw": -5, "in_service_year": 2026}]),
            r"solar_pv\.committed\.0\.capacity_mw: got -5; expected .*greater than or equal to 0",
        ),
        (
            lambda m: _solar(m).update(lead_time_years=-1),
            r"solar_pv\.lead_time_years: got -1; expected .*greater than or equal to 0",
        ),
        (
            lambda m: _solar(m).update(lead_time_years=5),
            r"solar_pv\.lead_time_years: got 5; expected at most 4 years \(metadata\.final_year - "
            r"metadata\.base_year\)",
        ),
        (
            lambda m: _solar(m).update(max_build_growth={"factor": 0.8, "seed_mw": 100}),
            r"solar_pv\.max_build_growth\.factor: got 0\.8; expected .*greater than or equal to 1",
        ),
        (
            lambda m: _solar(m).update(max_build_growth={"factor": 1.2, "seed_mw": -10}),
            r"solar_pv\.max_build_growth\.seed_mw: got -10; expected .*greater than or equal to 0",
        ),
        (
            lambda m: m["technologies"]["generators"]["gas_combined_cycle"].update(
                max_early_retirement_mw_per_year=-100
            ),
            r"gas_combined_cycle\.max_early_retirement_mw_per_year: got -100; expected .*greater than or equal to 0",
        ),
        (
            lambda m: _solar(m).update(
                first_build_year=2028, committed=[{"capacity_mw": 100, "in_service_year": 2026}]
            ),
            r"solar_pv\.committed\.0\.in_service_year: got 2026; expected a year from first_build_year 2028 on",
        ),
        (
            lambda m: _solar(m).update(
                phase_out_year=2027, committed=[{"capacity_mw": 100, "in_service_year": 2027}]
            ),
            r"solar_pv\.committed\.0\.in_service_year: got 2027; expected a year before phase_out_year 2027",
        ),
        (
            lambda m: _solar(m).update(
                committed=[{"capacity_mw": 100, "energy_mwh": 200, "in_service_year": 2026}]
            ),
            r"solar_pv\.committed\.0\.energy_mwh: got 200\.0; expected 0 \(energy capacity is for storage only\)",
        ),
        (
            lambda m: m["technologies"]["storage"]["battery"].update(
                committed=[{"capacity_mw": 100, "energy_mwh": 1000, "in_service_year": 2026}]
            ),
            r"battery\.committed\.0\.energy_mwh: got 1000\.0; expected energy of 0 to 8 hours of the project's "
            r"capacity_mw \(100 MW;",
        ),
        (
            lambda m: m.update(base_year_statistics={"generation_twh": {"solar_p": 1.0}}),
            r"base_year_statistics\.generation_twh\.solar_p: got 'solar_p'; expected one of the generators "
            r"\[.*\] \(did you mean 'solar_pv'\?\)",
        ),
        (
            lambda m: m.update(base_year_statistics={"fuel_use_pj": {"natural_gs": 1.0}}),
            r"base_year_statistics\.fuel_use_pj\.natural_gs: got 'natural_gs'; expected one of the commodities "
            r"\[.*\] \(did you mean 'natural_gas'\?\)",
        ),
    ],
    ids=[
        "committed after the horizon",
        "committed before the base year",
        "negative committed capacity",
        "negative lead time",
        "lead time longer than the horizon",
        "growth factor below 1",
        "negative seed",
        "negative retirement limit",
        "committed before the first build year",
        "committed at the phase-out",
        "energy on a generator project",
        "storage project longer than its duration",
        "unknown generator in the statistics",
        "unknown fuel in the statistics",
    ],
)
def test_bad_starting_year_and_pace_inputs_are_refused_in_one_sentence(tmp_path, change, expected):
    import re

    assert re.search(expected, _refused(tmp_path, change))


def test_bad_input_exits_2_through_the_command_line(tmp_path, capsys):
    m = _calibrated_tiny()
    _solar(m)["committed"] = [{"capacity_mw": 100, "in_service_year": 2035}]
    path = write_scenario(tmp_path, m)
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert "committed.0.in_service_year: got 2035" in err and "Traceback" not in err
    assert len(err.splitlines()) == 1


# --- an infeasible base year is named: which year, how much is short; exit 3 -----------------------------------


def _peak_mw(m: dict) -> float:
    """Peak hourly demand of the base year [MW] by hand: yearly energy x the largest hourly share of the year."""
    days = m["time"]["representative_days"]
    total = sum(d["weight_days"] * sum(d["demand_shape"]) for d in days)
    return (
        m["demand"]["electricity"]["base_year_twh"] * 1e6 * max(max(d["demand_shape"]) for d in days) / total
    )


def test_infeasible_base_year_says_which_year_and_how_much_is_short(tmp_path):
    m = tiny_mapping()
    m["metadata"]["new_builds_in_base_year"] = (
        False  # tiny.yaml's 1500 MW of gas cannot carry its 2025 margin
    )
    path = write_scenario(tmp_path, m)
    with pytest.raises(InfeasibleError) as info:
        run_scenario(path)
    message = str(info.value)
    # by hand: firm capacity needed 1.1 x peak; the base year has 1500 MW x 0.9 (credit = availability) of gas
    short = 1.1 * _peak_mw(m) - 1500 * 0.9
    assert short > 100
    assert "reserve margin in 2025" in message
    assert f"the existing fleet and committed projects are {short:,.0f} MW of firm capacity short" in message
    assert "base-year fleet" in message and "metadata.new_builds_in_base_year" in message


def test_infeasible_base_year_exits_3_without_a_traceback(tmp_path, capsys):
    m = tiny_mapping()
    m["metadata"]["new_builds_in_base_year"] = False
    path = write_scenario(tmp_path, m)
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--quiet"]) == 3
    err = capsys.readouterr().err
    assert "2025" in err and "MW of firm capacity short" in err and "Traceback" not in err
    assert not (tmp_path / "out").exists()


def test_phase_out_faster_than_the_retirement_limit_is_named(tmp_path):
    path = write_scenario(tmp_path, _retiring_plant(300, phase_out=2027))
    with pytest.raises(InfeasibleError) as info:
        run_scenario(path)
    message = str(info.value)
    # by hand: 1000 MW in 2025, at most 700 in 2026 and 400 in 2027, but the phase-out asks for 0 in 2027
    assert "early-retirement limit of old_plant (300 MW/yr)" in message
    assert "phase-out of old_plant (from 2027)" in message
    assert "technologies.generators.old_plant.max_early_retirement_mw_per_year" in message


def test_growth_limit_in_a_conflict_is_named(tmp_path):
    m = _one_plant_growing(factor=1.5, seed_mw=10)
    m["policy"] = {"reserve_margin": 0.0}  # firm capacity of at least the peak, which grows 30 %/yr
    path = write_scenario(tmp_path, m)
    with pytest.raises(InfeasibleError) as info:
        run_scenario(path)
    message = str(info.value)
    assert "build growth limit of gas_combined_cycle (10 MW/yr + 1.5 x the year before)" in message
    assert "technologies.generators.gas_combined_cycle.max_build_growth" in message
    # by hand: 2026 needs its peak (1.3 x 2025's) of firm capacity; 2000 MW existing + at most 10 MW built,
    # credit 0.9
    short = 1.3 * _peak_mw(m) - (2000 + 10) * 0.9
    assert "reserve margin in 2026-2029" in message
    assert f"{short:,.0f} MW of firm capacity short at best" in message


# --- the demo ------------------------------------------------------------------------------------------------------


@pytest.mark.slow
def test_demo_budget_case_builds_only_committed_projects_in_2025_and_starts_plausibly():
    from pathlib import Path

    run = run_scenario(Path(__file__).parents[2] / "scenarios" / "demo" / "budget.yaml")
    cap = _table(run, "capacity")
    base = cap[cap["year"] == 2025]
    # nothing new in 2025 but the committed projects (solar 800, wind 400, battery 250 MW in reference.yaml)
    assert (base["new_mw"] - base["committed_mw"]).abs().max() <= 1e-6
    assert base["new_mw"].sum() == pytest.approx(1450, abs=1e-6)
    emissions = _table(run, "emissions_total").sort_values("year")["emissions_mtco2"].to_numpy()
    first_change = emissions[1] / emissions[0] - 1
    # plausible first year: a smaller fall than the UK's record 2016 fall of CO2, about 7 % (coal use -52 % after
    # its carbon price floor doubled; BEIS provisional 2016 statistics, 2017; secondary)
    assert -0.07 < first_change < 0.0, first_change
    # the base year stays near the (invented) statistics: total emissions within 5 %
    calibration = _table(run, "base_year_calibration").set_index(["quantity", "subject"])
    assert abs(calibration.loc[("emissions", "total"), "relative_difference"]) < 0.05
