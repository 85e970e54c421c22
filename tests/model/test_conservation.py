"""Conservation and limits on a solved tiny system (common practice, no source: a solved LP must close its own
balances and respect its own bounds; these checks read only the written result tables)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from pathcast.scenario.inputs import PJ_PER_GWH
from pathcast.scenario.loader import load_scenario
from tests.conftest import DATA


def test_electricity_balances_close_in_every_hour(tiny_run):
    hourly = tiny_run.result.electricity_hourly
    net = hourly.groupby(["year", "day", "hour"])["power_mw"].sum()
    assert np.abs(net.to_numpy()).max() < 1e-6 * hourly["power_mw"].abs().max()


def test_fuel_balances_close_every_year(tiny_run):
    flows = tiny_run.result.fuel_flows
    sign = flows["role"].map(
        {"supply": 1, "conversion_output": 1, "power_input": -1, "conversion_input": -1, "final_use": -1}
    )
    net = (flows["energy_pj"] * sign).groupby([flows["commodity"], flows["year"]]).sum()
    assert (net > -1e-6).all()  # supply covers use
    assert net.abs().max() < 1e-5  # and nothing is wasted when every fuel has a cost


def test_electrolyser_draws_the_electricity_its_hydrogen_needs(tiny_run):
    r = tiny_run.result
    drawn_twh = r.electricity.query("technology == 'electrolyser'").set_index("year")["consumption_twh"]
    made_pj = r.fuel_flows.query("technology == 'electrolyser' and role == 'conversion_output'").set_index(
        "year"
    )["energy_pj"]
    efficiency = load_scenario(DATA / "tiny.yaml").scenario.technologies.converters["electrolyser"].efficiency
    assert made_pj.to_numpy() == pytest.approx(
        drawn_twh.to_numpy() * 1000 * PJ_PER_GWH * efficiency, rel=1e-9
    )


def test_cumulative_emissions_sum_yearly_and_stay_within_budget(tiny_run):
    r = tiny_run.result
    total = r.emissions_total
    assert total["cumulative_mtco2"].to_numpy() == pytest.approx(
        np.cumsum(total["emissions_mtco2"].to_numpy())
    )
    by_source = r.emissions.groupby("year")["emissions_mtco2"].sum()
    assert by_source.to_numpy() == pytest.approx(total["emissions_mtco2"].to_numpy(), rel=1e-9)
    budget = r.summary["carbon_budget_mtco2"]
    assert total["cumulative_mtco2"].iloc[-1] <= budget * (1 + 1e-7)
    assert r.summary["within_budget"] is True


def test_a_tonne_is_counted_once(tiny_run):
    # emissions by source = fuel burned in power plants + fuel delivered to final use, each at its factor
    r = tiny_run.result
    s = load_scenario(DATA / "tiny.yaml").scenario
    ef = {k: c.emission_factor for k, c in s.commodities.items()}
    burned = r.fuel_flows[r.fuel_flows["role"].isin(["power_input", "final_use"])]
    expected = (burned["energy_pj"] * burned["commodity"].map(ef)).groupby(burned["year"]).sum()
    assert expected.to_numpy() == pytest.approx(r.emissions_total["emissions_mtco2"].to_numpy(), rel=1e-9)


def test_builds_within_limits_and_capacity_within_lifetime(tiny_run):
    r = tiny_run.result
    s = load_scenario(DATA / "tiny.yaml").scenario
    cap = r.capacity
    solar = cap[cap["technology"] == "solar_pv"]
    assert (solar["new_mw"] <= s.technologies.generators["solar_pv"].max_build_mw_per_year + 1e-6).all()
    assert (cap["new_mw"] >= -1e-9).all()
    lifetimes = {
        **{k: g.lifetime for k, g in s.technologies.generators.items()},
        **{k: g.lifetime for k, g in s.technologies.storage.items()},
        **{k: g.lifetime for k, g in s.technologies.converters.items()},
    }
    existing = {
        k: g.existing
        for k, g in {
            **s.technologies.generators,
            **s.technologies.storage,
            **s.technologies.converters,
        }.items()
    }
    for tech, frame in cap.groupby("technology"):
        frame = frame.sort_values("year")
        years, new = frame["year"].to_numpy(), frame["new_mw"].to_numpy()
        for year, in_service in zip(years, frame["capacity_mw"].to_numpy(), strict=True):
            alive = new[(years <= year) & (years > year - lifetimes[tech])].sum()
            old = sum(e.capacity_mw for e in existing[tech] if year < e.retirement_year)
            assert in_service <= alive + old + 1e-6


def test_cost_components_add_up_to_the_objective(tiny_run):
    r = tiny_run.result
    assert r.costs["discounted_million"].sum() == pytest.approx(tiny_run.solution.objective, rel=1e-9)


def test_lifetime_ends_service(tmp_path):
    # a plant whose lifetime is 2 years cannot serve in the third year after its build
    from pathcast.pipeline import run_scenario
    from tests.conftest import tiny_mapping, write_scenario

    m = tiny_mapping()
    m["technologies"]["generators"]["wind_onshore"]["lifetime"] = 2
    run = run_scenario(write_scenario(tmp_path, m))
    wind = run.result.capacity.query("technology == 'wind_onshore'").set_index("year")
    new = wind["new_mw"]
    for year in wind.index:
        alive = new[(new.index <= year) & (new.index > year - 2)].sum()
        assert wind.loc[year, "capacity_mw"] <= alive + 1e-6
    assert isinstance(wind, pd.DataFrame)
