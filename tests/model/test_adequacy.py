"""Adequacy: the reserve margin as an option, capacity credits that depend on what is built, the capacity price, and
cost recovery.

Outside checks, each named where it is used:
- screening curve on a stepped load-duration curve (textbook method, e.g. Stoft, Power System Economics, 2002, part 1,
  from memory): without a reserve margin the hourly prices are the running cost of the marginal plant plus a scarcity
  rent in the peak hours, and each plant's operating surplus equals its fixed cost; with a margin, energy plus
  capacity revenue recover it;
- LP duality (complementary slackness, any LP textbook, e.g. Bertsimas & Tsitsiklis 1997, ch. 4, from memory): a
  build not at a limit recovers exactly its discounted annuities; capacity valued at its installed-row dual equals
  what it earns less its running and fixed costs;
- storage credit by duration against the relation it cites (full credit at 4 h, pro rata below: the 4-hour rule of
  resource-adequacy practice, from memory; credit rising with duration and saturating: Sioshansi, Madaeni & Denholm
  2014, IEEE Trans. Power Systems 29(1), 395-403, secondary);
- credit tranches on a small case by hand.
"""

from __future__ import annotations

import numpy as np
import pytest

from pathcast.economics import capital_recovery_factor
from pathcast.errors import ScenarioError
from pathcast.model.names import RESERVE_MARGIN
from pathcast.pipeline import run_scenario
from pathcast.scenario.inputs import credit_segments
from pathcast.scenario.loader import load_scenario
from tests.conftest import tiny_mapping, write_scenario
from tests.model.test_screening_curve import BASE, LEVELS_MW, LIFETIME, PEAK, RATE, WEIGHTS
from tests.model.test_screening_curve import _scenario as screening_scenario


def _tiny(tmp_path, change=None, name="scenario.yaml"):
    m = tiny_mapping()
    m["metadata"]["new_builds_in_base_year"] = (
        True  # a greenfield test system: its base year is optimised too
    )
    if change:
        change(m)
    return run_scenario(write_scenario(tmp_path, m, name))


def _screening(tmp_path, margin):
    m = screening_scenario()
    m["metadata"]["new_builds_in_base_year"] = True
    m["policy"]["reserve_margin"] = margin
    return run_scenario(write_scenario(tmp_path, m, f"screening_{margin}.yaml"))


# --- the reserve margin as an option -------------------------------------------------------------------------


def test_no_margin_means_no_row_and_no_capacity_price(tmp_path):
    run = _tiny(tmp_path, lambda m: m["policy"].update(reserve_margin=None))
    assert RESERVE_MARGIN not in run.model.lp.row_blocks
    price = run.result.tables["capacity_price"]
    assert (price["capacity_price_per_kw_year"] == 0).all() and (price["required_firm_mw"] == 0).all()


def test_a_margin_of_zero_with_nothing_credited_is_refused_at_check(tmp_path):
    def change(m):
        m["policy"]["reserve_margin"] = 0.0
        for g in m["technologies"]["generators"].values():
            g["capacity_credit"] = 0.0
        m["technologies"]["storage"]["battery"]["capacity_credit"] = 0.0

    m = tiny_mapping()
    change(m)
    with pytest.raises(
        ScenarioError, match=r"policy\.reserve_margin: got 0\.0; expected null \(no reserve-margin row\)"
    ):
        load_scenario(write_scenario(tmp_path, m))


def test_screening_curve_without_a_margin_prices_and_surplus(tmp_path):
    run = _screening(tmp_path, None)
    crf = capital_recovery_factor(RATE, LIFETIME)
    fixed_peak = (PEAK["capex"] * crf + PEAK["fixed_om"]) * 1000  # currency/MW-yr
    # mean price over each flat day: within a day of equal hours the LP may put the rent in any of them (degenerate
    # duals), the day's mean is unique
    prices = run.result.electricity_price.groupby("day")["price_per_mwh"].mean()
    # the peak step: the peaker's running cost plus a scarcity rent that pays its fixed cost over the step's hours
    peak_hours = WEIGHTS[0] * 24.0
    assert prices["level_0"] == pytest.approx(PEAK["variable_om"] + fixed_peak / peak_hours, rel=1e-6)
    # below the peak: the marginal plant's running cost (level_2 is where the base plant's capacity ends, so its
    # price may lie anywhere between the two running costs)
    assert prices["level_1"] == pytest.approx(PEAK["variable_om"], rel=1e-9)
    assert prices["level_3"] == pytest.approx(BASE["variable_om"], rel=1e-9)
    assert prices["level_4"] == pytest.approx(BASE["variable_om"], rel=1e-9)
    assert BASE["variable_om"] - 1e-9 <= prices["level_2"] <= PEAK["variable_om"] + 1e-9
    recovery = run.result.cost_recovery
    for plant in ("base_plant", "peaking_plant"):
        row = recovery[recovery["technology"] == plant].iloc[0]
        assert row["capacity_revenue_million"] == 0
        fixed = row["fixed_om_million"] + row["annuity_million"]
        assert row["operating_margin_million"] == pytest.approx(fixed, rel=1e-6)  # surplus = fixed cost


def test_screening_curve_with_a_margin_energy_and_capacity_revenue_recover_fixed_cost(tmp_path):
    run = _screening(tmp_path, 0.15)
    price = float(run.result.tables["capacity_price"]["capacity_price_per_kw_year"].iloc[0])
    assert price > 0  # the margin binds: peak 1000 MW, 1150 MW firm needed
    capacity = run.result.capacity.set_index("technology")["capacity_mw"]
    assert capacity.sum() == pytest.approx(1.15 * max(LEVELS_MW), rel=1e-6)
    recovery = run.result.cost_recovery
    for _, row in recovery.iterrows():
        fixed = row["fixed_om_million"] + row["annuity_million"]
        earned = row["operating_margin_million"] + row["capacity_revenue_million"]
        assert earned == pytest.approx(fixed, rel=1e-6), row["technology"]


# --- cost recovery by LP duality -------------------------------------------------------------------------------


def _check_recovery(run, rel=1e-6):
    recovery = run.result.cost_recovery
    scale = max(1.0, float(recovery["capacity_value_million"].abs().max()))
    identity = (
        recovery["operating_margin_million"]
        + recovery["capacity_revenue_million"]
        - recovery["fixed_om_million"]
        - recovery["capacity_value_million"]
    )
    assert identity.abs().max() <= rel * scale
    vintages = run.result.cost_recovery_vintages
    free = vintages[~vintages["at_build_limit"]]
    assert len(free) > 0
    assert ((free["recovery_ratio"] - 1.0).abs() <= rel).all(), free


def test_every_build_recovers_its_cost_on_the_tiny_system(tmp_path):
    _check_recovery(_tiny(tmp_path))


@pytest.mark.slow
def test_every_build_recovers_its_cost_on_the_demo():
    from pathlib import Path

    run = run_scenario(Path(__file__).parents[2] / "scenarios" / "demo" / "budget.yaml")
    _check_recovery(run)


# --- credits that depend on what is built ------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("table", "expected"),
    [
        (None, {0.5: 0.125, 1: 0.25, 2: 0.5, 4: 1.0, 8: 1.0}),  # the default 4-hour rule
        ({1: 0.25, 2: 0.45, 4: 0.8, 8: 1.0}, {0.5: 0.125, 1: 0.25, 3: 0.625, 6: 0.9, 10: 1.0}),
    ],
    ids=["default_4_hour_rule", "custom_table"],
)
def test_storage_credit_by_duration_follows_the_relation(table, expected):
    pieces = credit_segments(table)
    for hours, credit in expected.items():
        # a store of 1 GW and `hours` GWh: its firm contribution is the minimum over the linear pieces
        firm = min(a * 1.0 + b * hours for a, b in pieces)
        assert firm == pytest.approx(credit, abs=1e-12), hours


def test_a_one_hour_battery_counts_a_quarter_of_its_power(tmp_path):
    def change(m):
        battery = m["technologies"]["storage"]["battery"]
        del battery["capacity_credit"]  # credit by duration (default: full at 4 h)
        battery["max_duration_hours"] = 1.0
        battery["min_duration_hours"] = 1.0
        m["technologies"]["generators"]["gas_combined_cycle"]["max_total_mw"] = (
            1500.0  # firm capacity is scarce
        )

    run = _tiny(tmp_path, change)
    firm = run.result.tables["capacity_price"]
    cap = run.result.capacity.set_index(["technology", "year"])["capacity_mw"]
    values = run.model  # the solved LP: firm contribution of the battery from the solution values
    from pathcast.model.adequacy import read_firm_capacity

    counted = read_firm_capacity(values.context, run.solution.x)
    i = counted.technologies.index("battery")
    for y, year in enumerate(counted.years):
        assert counted.firm_gw[i, y] * 1000 <= 0.25 * cap["battery", year] + 1e-6
        if firm["capacity_price_per_kw_year"].iloc[y] > 1e-6:
            assert counted.firm_gw[i, y] * 1000 == pytest.approx(
                0.25 * cap["battery", year], rel=1e-6, abs=1e-6
            )


def test_credit_tranches_by_hand(tmp_path):
    tranches = [
        {"up_to_share_of_peak": 0.1, "credit": 0.3},
        {"up_to_share_of_peak": 0.2, "credit": 0.15},
        {"credit": 0.05},
    ]

    def change(m):
        wind = m["technologies"]["generators"]["wind_onshore"]
        del wind["capacity_credit"]
        wind["capacity_credit_tranches"] = tranches

    run = _tiny(tmp_path, change)
    from pathcast.model.adequacy import read_firm_capacity

    counted = read_firm_capacity(run.model.context, run.solution.x)
    i = counted.technologies.index("wind_onshore")
    peak = run.model.inputs.peak_demand_gw
    wind = run.result.capacity.set_index(["technology", "year"])["capacity_mw"]
    price = run.result.tables["capacity_price"]["capacity_price_per_kw_year"].to_numpy()
    for y, year in enumerate(counted.years):
        w = wind["wind_onshore", year] / 1000.0
        p = peak[y]
        by_hand = (
            0.3 * min(w, 0.1 * p) + 0.15 * min(max(w - 0.1 * p, 0.0), 0.1 * p) + 0.05 * max(w - 0.2 * p, 0.0)
        )
        assert counted.firm_gw[i, y] <= by_hand + 1e-9
        if price[y] > 1e-6:  # the margin binds, so every tranche counts fully
            assert counted.firm_gw[i, y] == pytest.approx(by_hand, rel=1e-7, abs=1e-9)
    _check_recovery(run)


# --- bad input ------------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("change", "expected"),
    [
        (
            lambda g, s: g.update(capacity_credit_tranches=[{"up_to_share_of_peak": 0.1, "credit": 0.3}]),
            r"capacity_credit_tranches\.0\.up_to_share_of_peak: got 0\.1; expected none in the last tranche",
        ),
        (
            lambda g, s: g.update(
                capacity_credit_tranches=[{"up_to_share_of_peak": 0.1, "credit": 0.1}, {"credit": 0.3}]
            ),
            r"capacity_credit_tranches\.1\.credit: got 0\.3; expected a credit of at most the previous",
        ),
        (
            lambda g, s: g.update(capacity_credit_tranches=[{"credit": 1.5}]),
            r"capacity_credit_tranches\.0\.credit: got 1\.5; expected less than or equal to 1",
        ),
        (
            lambda g, s: (s.pop("capacity_credit"), s.update(credit_by_duration={2: 0.2, 4: 0.9})),
            r"storage\.battery\.credit_by_duration\.4(\.0)?: got 0\.9; expected credits that rise with duration ever "
            r"more slowly",
        ),
        (
            lambda g, s: s.update(credit_by_duration={4: 1.0}),
            r"storage\.battery\.capacity_credit: got 0\.5; expected no fixed capacity_credit beside credit_by_duration",
        ),
    ],
    ids=["tranches_not_covering", "credits_rising", "credit_above_one", "not_concave", "both_credits"],
)
def test_bad_credits_are_one_located_sentence(tmp_path, change, expected):
    m = tiny_mapping()
    wind = m["technologies"]["generators"]["wind_onshore"]
    wind.pop("capacity_credit")
    change(wind, m["technologies"]["storage"]["battery"])
    path = write_scenario(tmp_path, m)
    with pytest.raises(ScenarioError, match=expected) as info:
        load_scenario(path)
    assert "\n" not in str(info.value) and str(path) in str(info.value)


def test_credit_curve_is_linear_pieces_through_zero():
    pieces = credit_segments({2: 0.5})
    assert pieces == ((0.0, 0.25), (0.5, 0.0))  # firm <= 0.25 x energy, firm <= 0.5 x power
    assert np.isclose(min(a + b * 1.0 for a, b in pieces), 0.25)


def test_cost_recovery_counts_operating_reserve_revenue(tmp_path):
    # a gas plant with a minimum stable output holding an operating reserve: its reserve revenue is part of its
    # operating margin, and the duality identity still closes
    def change(m):
        gas = m["technologies"]["generators"]["gas_combined_cycle"]
        gas["min_stable_output"] = 0.4
        gas["provides_reserve"] = True
        m["policy"]["operating_reserve"] = {"demand_share": 0.05, "variable_renewable_share": 0.05}

    run = _tiny(tmp_path, change)
    recovery = run.result.cost_recovery
    assert recovery["reserve_revenue_million"].sum() > 0
    _check_recovery(run)
