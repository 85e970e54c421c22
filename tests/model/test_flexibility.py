"""Operating flexibility (model.flexibility): minimum stable output, ramp limits and the hourly operating reserve.

The approximation is the linear relaxation of clustered unit commitment (Palmintier & Webster (2011), IEEE PES
General Meeting, doi:10.1109/PES.2011.6038963; secondary: known from reviews, the paper itself not read). The checks
below are hand calculations on one-year, one-day systems (worked out in each test's docstring) and an independent
formulation of a small case with scipy.optimize.linprog, written from the README's equations, not from pathcast's code.
"""

from __future__ import annotations

import copy
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import linprog

from pathcast.cli import main
from pathcast.model.build import build_linear_program
from pathcast.model.labels import block_labels
from pathcast.model.names import (
    MIN_STABLE_OUTPUT,
    ONLINE_CAPACITY,
    OPERATING_RESERVE,
    RAMP_DOWN,
    RAMP_UP,
    RESERVE,
    RESERVE_SHORTFALL,
    STORAGE_RESERVE,
)
from pathcast.model.solution_values import read_solution
from pathcast.pipeline import run_scenario
from pathcast.scenario.inputs import prepare_inputs
from pathcast.scenario.loader import load_scenario
from tests.conftest import tiny_mapping, write_scenario

FLEXIBILITY_BLOCKS = {ONLINE_CAPACITY, RESERVE, STORAGE_RESERVE, RESERVE_SHORTFALL}
FLEXIBILITY_ROWS = {MIN_STABLE_OUTPUT, RAMP_UP, RAMP_DOWN, OPERATING_RESERVE}


def _system(
    demand_mw: list[float], generators: dict, policy: dict | None = None, storage: dict | None = None
) -> dict:
    """One year (2030), one representative day of 365 days with the given hourly demand [MW]; gas at 6 USD/GJ."""
    energy_twh = sum(demand_mw) * 365 / 1e6
    return {
        "metadata": {
            "name": "flexibility_check",
            "base_year": 2030,
            "final_year": 2030,
            "currency": "USD",
            "price_year": 2024,
            "discount_rate": 0.05,
            "value_of_lost_load": 10000,
        },
        "time": {
            "representative_days": [
                {
                    "name": "day",
                    "weight_days": 365,
                    "demand_shape": list(demand_mw),
                    "availability": {"solar": SOLAR},
                }
            ]
        },
        "demand": {"electricity": {"yearly_twh": {2030: energy_twh}}},
        "commodities": {"gas": {"emission_factor": 0.0561}},
        "technologies": {
            "generators": generators,
            "storage": storage or {},
            "supplies": {"gas_supply": {"output": "gas", "price": GAS_PRICE}},
        },
        "policy": {"reserve_margin": 0.0, **(policy or {})},
    }


GAS_PRICE = 6.0  # USD/GJ
SOLAR = [0.0] * 6 + [0.1, 0.3, 0.55, 0.75, 0.9, 0.95, 0.95, 0.9, 0.75, 0.55, 0.3, 0.1] + [0.0] * 6


def _existing(mw: float, **fields) -> dict:
    """An existing plant of ``mw`` that is never extended (no builds) and costs nothing fixed."""
    return {
        "capex": 1000,
        "lifetime": 40,
        "existing": [{"capacity_mw": mw, "retirement_year": 2060}],
        "max_build_mw_per_year": 0,
        **fields,
    }


def _hourly(run, technology: str) -> np.ndarray:
    table = run.result.electricity_hourly
    return table[table["technology"] == technology].sort_values("hour")["power_mw"].to_numpy()


# --------------------------------------------------------------------------------------------- minimum stable output
def _stable_case(min_stable: float | None, reserve_share: float | None) -> dict:
    gas = _existing(1000, fuel="gas", efficiency=0.5, variable_om=2.0, availability=1.0, capacity_credit=1.0)
    if min_stable is not None:
        gas["min_stable_output"] = min_stable
    generators = {"gas_plant": gas, "free_plant": _existing(600, availability=1.0, capacity_credit=1.0)}
    policy = {"operating_reserve": {"demand_share": reserve_share}} if reserve_share is not None else None
    return _system([500.0] * 12 + [1400.0] * 12, generators, policy)


GAS_MARGINAL = GAS_PRICE * 3.6 / 0.5 + 2.0  # fuel (GJ/MWh = 3.6 / efficiency) + variable O&M = 45.2 USD/MWh


def test_min_stable_output_with_reserve_forces_curtailment(tmp_path):
    """Hand calculation: in the 500 MW hours the free plant (600 MW) could serve all demand, but 10 % reserve (50 MW)
    must be held by the gas plant, whose online capacity U holds it as headroom (U >= P + 50) and whose output is at
    least half of U (P >= 0.5 U): so P >= 50 MW, U = 100 MW, and the free plant gives 450 MW (150 MW curtailed). In
    the 1400 MW hours gas makes 800 MW, with U up to 1000 MW: headroom costs nothing there. The reserve price in the
    low hours is the cost of one more MW of gas output replacing free output: 6 USD/GJ x 3.6 / 0.5 + 2 USD/MWh =
    45.2 USD/MW per hour; in the high hours 0. Common practice, no source (the textbook cost of holding reserve:
    the lost margin of the plant forced to run)."""
    run = run_scenario(write_scenario(tmp_path, _stable_case(0.5, 0.1)))
    gas, free = _hourly(run, "gas_plant"), _hourly(run, "free_plant")
    np.testing.assert_allclose(gas[:12], 50.0, rtol=1e-6)
    np.testing.assert_allclose(free[:12], 450.0, rtol=1e-6)
    np.testing.assert_allclose(gas[12:], 800.0, rtol=1e-6)
    online = run.result.online_capacity.sort_values("hour")
    np.testing.assert_allclose(online["online_mw"].to_numpy()[:12], 100.0, rtol=1e-6)
    # output is never below half of the online capacity, never above it
    assert (online["generation_mw"] >= 0.5 * online["online_mw"] - 1e-6).all()
    assert (online["generation_mw"] <= online["online_mw"] + 1e-6).all()
    reserve = run.result.operating_reserve.sort_values("hour")
    np.testing.assert_allclose(reserve["requirement_mw"], [50.0] * 12 + [140.0] * 12, rtol=1e-6)
    np.testing.assert_allclose(reserve["provided_mw"], reserve["requirement_mw"], rtol=1e-6)
    assert (reserve["shortfall_mw"] == 0).all()
    np.testing.assert_allclose(reserve["price_per_mw_hour"].to_numpy()[:12], GAS_MARGINAL, rtol=1e-6)
    np.testing.assert_allclose(reserve["price_per_mw_hour"].to_numpy()[12:], 0.0, atol=1e-6)
    curtailed = run.result.electricity.set_index("technology").loc["free_plant", "curtailed_twh"]
    assert curtailed == pytest.approx(150.0 * 12 * 365 / 1e6, rel=1e-6)
    price = run.result.electricity_price.sort_values("hour")["price_per_mwh"].to_numpy()
    np.testing.assert_allclose(price[:12], 0.0, atol=1e-6)  # the free plant is curtailed at the margin
    np.testing.assert_allclose(price[12:], GAS_MARGINAL, rtol=1e-6)
    # the gas plant's reserve revenue (45.2 USD/MW-h x 50 MW x 12 h x 365 days) pays exactly for the 50 MW it must run
    # at a loss in the low hours: its operating margin, energy and reserve together, is zero (LP duality)
    flexibility = read_solution(run.model, run.solution).flexibility
    assert flexibility.reserve_holders == ("gas_plant",)
    revenue = flexibility.reserve_revenue_million[0, 0]
    assert revenue == pytest.approx(GAS_MARGINAL * 50.0 * 12 * 365 / 1e6, rel=1e-6)
    energy_revenue = (price * gas).sum() * 365 / 1e6
    running_cost = GAS_MARGINAL * gas.sum() * 365 / 1e6
    assert energy_revenue + revenue - running_cost == pytest.approx(0.0, abs=1e-6)


def test_without_reserve_the_thermal_plant_goes_offline(tmp_path):
    """Hand calculation: with no reserve to hold, nothing keeps the gas plant online in the 500 MW hours: it is
    offline (U = P = 0) and the free plant serves all 500 MW (100 MW curtailed); with reserve but no minimum stable
    output it holds the 50 MW as pure headroom (P = 0, U = 50 MW) and nothing more is curtailed."""
    run = run_scenario(write_scenario(tmp_path, _stable_case(0.5, None), name="a.yaml"))
    np.testing.assert_allclose(_hourly(run, "gas_plant")[:12], 0.0, atol=1e-6)
    np.testing.assert_allclose(
        run.result.online_capacity.sort_values("hour")["online_mw"][:12], 0.0, atol=1e-6
    )
    assert "operating_reserve" not in run.result.tables
    run = run_scenario(write_scenario(tmp_path, _stable_case(0.0, 0.1)))
    np.testing.assert_allclose(_hourly(run, "gas_plant")[:12], 0.0, atol=1e-6)
    np.testing.assert_allclose(_hourly(run, "free_plant")[:12], 500.0, rtol=1e-6)


# ------------------------------------------------------------------------------------------------------- ramp limit
def test_ramp_limit_binds_as_calculated_by_hand(tmp_path):
    """Hand calculation: demand steps from 400 MW (hours 0-11) to 1000 MW (hours 12-23) and back (the day is cyclic).
    The cheap gas plant (1000 MW, ramp 30 %/h of online capacity, online capacity at most 1000 MW) moves at most
    300 MW an hour: 400 -> 700 MW in hour 12 (the dear plant makes 300 MW), 1000 MW from hour 13; and before the
    step down it must be at most 400 + 300 = 700 MW in hour 23 (the dear plant again 300 MW). Elsewhere the dear plant
    is idle."""
    cheap = _existing(
        1000,
        fuel="gas",
        efficiency=0.55,
        variable_om=2.0,
        availability=1.0,
        capacity_credit=1.0,
        ramp_rate=0.3,
    )
    dear = _existing(
        1000, fuel="gas", efficiency=0.3, variable_om=10.0, availability=1.0, capacity_credit=1.0
    )
    scenario = _system([400.0] * 12 + [1000.0] * 12, {"cheap_plant": cheap, "dear_plant": dear})
    run = run_scenario(write_scenario(tmp_path, scenario))
    expected_dear = np.zeros(24)
    expected_dear[[12, 23]] = 300.0
    np.testing.assert_allclose(_hourly(run, "dear_plant"), expected_dear, atol=1e-6)
    cheap_out = _hourly(run, "cheap_plant")
    assert np.abs(cheap_out - np.roll(cheap_out, 1)).max() == pytest.approx(300.0, rel=1e-6)
    online = run.result.online_capacity.sort_values("hour")["online_mw"].to_numpy()
    assert online[12] == pytest.approx(1000.0, rel=1e-6)  # the ramp of hour 12 needs all of it online


def test_start_up_from_offline_within_the_ramp_rows(tmp_path):
    """A minimum stable output above the ramp rate does not lock a plant on or off: capacity brought online may go
    from 0 to its minimum output within the hour. Hand calculation: the plant (min 60 %, ramp 10 %/h) is offline in
    the hours of zero demand (demand must be met exactly, and nothing else may run) and serves 300 MW in hour 12;
    without the start-up allowance the rows would force it to stay offline (unserved energy)."""
    plant = _existing(
        1000,
        fuel="gas",
        efficiency=0.5,
        availability=1.0,
        capacity_credit=1.0,
        min_stable_output=0.6,
        ramp_rate=0.1,
    )
    demand = [0.0] * 12 + [300.0] * 12
    run = run_scenario(write_scenario(tmp_path, _system(demand, {"plant": plant})))
    np.testing.assert_allclose(_hourly(run, "plant"), demand, atol=1e-6)
    np.testing.assert_allclose(_hourly(run, "unserved"), 0.0, atol=1e-6)
    online = run.result.online_capacity.sort_values("hour")["online_mw"].to_numpy()
    np.testing.assert_allclose(online[:12], 0.0, atol=1e-6)
    assert (online[12:] >= 300.0 - 1e-6).all() and (online[12:] <= 500.0 + 1e-6).all()  # 0.6 U <= 300 <= U


# ------------------------------------------------------------------------------------------- independent linprog
LP_DEMAND = [
    520,
    500,
    490,
    490,
    500,
    560,
    650,
    720,
    760,
    780,
    800,
    810,
    800,
    790,
    780,
    790,
    840,
    920,
    980,
    960,
    880,
    780,
    660,
    580,
]  # MW
LP = {
    "gas": {
        "mw": 900.0,
        "availability": 0.95,
        "efficiency": 0.5,
        "vom": 3.0,
        "fixed": 20.0,
        "min": 0.4,
        "ramp": 0.25,
    },
    "solar_mw": 1200.0,
    "solar_fixed": 10.0,
    "solar_credit": 0.1,
    "battery": {"mw": 150.0, "mwh": 300.0, "round_trip": 0.81, "fixed": 5.0},
    "reserve": {"demand": 0.08, "variable": 0.05, "hours": 1.0},
    "voll": 10000.0,
}


def _linprog_scenario() -> dict:
    gas = LP["gas"]
    generators = {
        "gas_plant": _existing(
            gas["mw"],
            fuel="gas",
            efficiency=gas["efficiency"],
            variable_om=gas["vom"],
            fixed_om=gas["fixed"],
            availability=gas["availability"],
            capacity_credit=1.0,
            min_stable_output=gas["min"],
            ramp_rate=gas["ramp"],
        ),
        "solar_plant": _existing(
            LP["solar_mw"],
            fixed_om=LP["solar_fixed"],
            availability="solar",
            capacity_credit=LP["solar_credit"],
        ),
    }
    bat = LP["battery"]
    storage = {
        "battery": {
            "capex": 300,
            "energy_capex": 200,
            "fixed_om": bat["fixed"],
            "lifetime": 15,
            "round_trip_efficiency": bat["round_trip"],
            "capacity_credit": 0.0,
            "existing": [{"capacity_mw": bat["mw"], "energy_mwh": bat["mwh"], "retirement_year": 2060}],
            "max_build_mw_per_year": 0,
        }
    }
    reserve = LP["reserve"]
    policy = {
        "operating_reserve": {
            "demand_share": reserve["demand"],
            "variable_renewable_share": reserve["variable"],
            "duration_hours": reserve["hours"],
        }
    }
    scenario = _system(LP_DEMAND, generators, policy, storage)
    scenario["metadata"]["value_of_lost_load"] = LP["voll"]
    return scenario


def _linprog_objective() -> float:
    """min cost over the columns below, in GW, GWh, PJ and million USD (one year, discount factor 1, one day of
    365): capacities in service C (gas, solar, battery power) and battery energy E, each at most its existing fleet;
    per hour gas output P, online capacity U, gas reserve R, solar curtailment K, battery charge Q, discharge B,
    state of charge S, battery reserve RS, unserved electricity N, reserve shortfall Z; gas supply X [PJ]."""
    H, w = 24, 365.0
    gas, bat, res = LP["gas"], LP["battery"], LP["reserve"]
    demand = np.array(LP_DEMAND) / 1000.0  # GW
    solar = np.array(SOLAR)
    eta = np.sqrt(bat["round_trip"])
    names = ["Cg", "Cs", "Cb", "E", "X"]
    for key in ("P", "U", "R", "K", "Q", "B", "S", "RS", "N", "Z"):
        names += [f"{key}{h}" for h in range(H)]
    col = {name: i for i, name in enumerate(names)}
    n = len(names)
    c = np.zeros(n)
    c[col["Cg"]], c[col["Cs"]], c[col["Cb"]] = (
        gas["fixed"],
        LP["solar_fixed"],
        bat["fixed"],
    )  # million/GW = USD/kW
    c[col["X"]] = GAS_PRICE  # million/PJ = USD/GJ
    bounds = [(0, None)] * n
    bounds[col["Cg"]] = (0, gas["mw"] / 1000)
    bounds[col["Cs"]] = (0, LP["solar_mw"] / 1000)
    bounds[col["Cb"]] = (0, bat["mw"] / 1000)
    bounds[col["E"]] = (0, bat["mwh"] / 1000)
    for h in range(H):
        c[col[f"P{h}"]] = gas["vom"] / 1000 * w
        c[col[f"N{h}"]] = LP["voll"] / 1000 * w
        c[col[f"Z{h}"]] = LP["voll"] / 1000 * w
    A_ub, b_ub, A_eq, b_eq = [], [], [], []

    def row(entries: list[tuple[str, float]]) -> np.ndarray:
        r = np.zeros(n)
        for name, coef in entries:
            r[col[name]] += coef
        return r

    def le(entries, rhs=0.0):
        A_ub.append(row(entries))
        b_ub.append(rhs)

    m, ramp = gas["min"], gas["ramp"]
    for h in range(H):
        p, u, q = f"P{h}", f"U{h}", f"P{(h - 1) % H}"
        u_before = f"U{(h - 1) % H}"
        # electricity balance: P + solar - K + B - Q + N = demand
        A_eq.append(row([(p, 1), ("Cs", solar[h]), (f"K{h}", -1), (f"B{h}", 1), (f"Q{h}", -1), (f"N{h}", 1)]))
        b_eq.append(demand[h])
        le([(f"K{h}", 1), ("Cs", -solar[h])])  # curtailment <= available solar
        le([(p, 1), ("Cg", -gas["availability"])])  # output <= availability x capacity
        le([(u, 1), ("Cg", -gas["availability"])])  # online <= availability x capacity
        le([(p, 1), (f"R{h}", 1), (u, -1)])  # output + reserve <= online
        le([(u, m), (p, -1)])  # min stable output
        # ramps with the start-up / shut-down allowance m x (U[h] - U[h-1])
        le([(p, 1), (q, -1), (u, -ramp), (u, -m), (u_before, m)])
        le([(q, 1), (p, -1), (u_before, -ramp), (u, m), (u_before, -m)])
        le([(f"R{h}", 1), (u, -ramp)])  # reserve deliverable within the hour
        # battery
        le([(f"Q{h}", 1), ("Cb", -1)])
        le([(f"B{h}", 1), ("Cb", -1)])
        le([(f"S{h}", 1), ("E", -1)])
        A_eq.append(row([(f"S{h}", 1), (f"S{(h - 1) % H}", -1), (f"Q{h}", -eta), (f"B{h}", 1 / eta)]))
        b_eq.append(0.0)
        le([(f"RS{h}", 1), (f"B{h}", 1), (f"Q{h}", -1), ("Cb", -1)])  # headroom of power
        le([(f"RS{h}", res["hours"] / eta), (f"S{h}", -1)])  # energy to sustain it
        # reserve: R + RS + Z >= demand share x demand + variable share x available solar
        le(
            [(f"R{h}", -1), (f"RS{h}", -1), (f"Z{h}", -1), ("Cs", res["variable"] * solar[h])],
            -res["demand"] * demand[h],
        )
    # gas supply [PJ] >= burned = sum_h P x 365 x 0.0036 PJ/GWh / efficiency
    le([("X", -1)] + [(f"P{h}", w * 0.0036 / gas["efficiency"]) for h in range(H)])
    # reserve margin 0: credit x capacity (gas 1, solar 0.1) >= peak demand
    le([("Cg", -1.0), ("Cs", -LP["solar_credit"])], -demand.max())
    out = linprog(
        c, A_ub=np.array(A_ub), b_ub=b_ub, A_eq=np.array(A_eq), b_eq=b_eq, bounds=bounds, method="highs"
    )
    assert out.status == 0, out.message
    return float(out.fun)


def test_objective_matches_independent_linprog(tmp_path):
    """The same small system (gas with minimum stable output and ramp limit, solar, a battery, an operating reserve of
    demand and of solar) written independently with scipy.optimize.linprog: objectives equal to 1e-6."""
    run = run_scenario(write_scenario(tmp_path, _linprog_scenario()))
    assert run.solution.objective == pytest.approx(_linprog_objective(), rel=1e-6)
    reserve = run.result.operating_reserve
    assert (reserve["provided_mw"] + reserve["shortfall_mw"] >= reserve["requirement_mw"] - 1e-6).all()
    online = run.result.online_capacity
    assert (online["generation_mw"] >= online["min_output_mw"] - 1e-6).all()
    holders = set(run.result.reserve_provision["technology"])
    assert holders == {"gas_plant", "battery"}
    # the costs table adds up to the objective, reserve shortfall included
    assert run.result.costs["discounted_million"].sum() == pytest.approx(run.solution.objective, rel=1e-9)


# ------------------------------------------------------------------------------------- nothing changes without them
def _lp(path):
    return build_linear_program(prepare_inputs(load_scenario(path).scenario)).lp


def test_a_scenario_without_the_fields_builds_no_flexibility_blocks(tmp_path):
    lp = _lp(write_scenario(tmp_path, tiny_mapping()))
    assert not FLEXIBILITY_BLOCKS & set(lp.variables)
    assert not FLEXIBILITY_ROWS & set(lp.row_blocks)


def test_limits_that_never_bind_leave_the_optimum_unchanged(tmp_path):
    """A minimum stable output of 0 with no ramp limit (output <= online <= availability x capacity) and a reserve of
    share 0 relax to the plain dispatch: the same optimum (to 1e-9) as without them; and a free generator given
    operating limits leaves the pool for an output of its own with the same optimum too."""
    plain_scenario = _linprog_scenario()
    gas = plain_scenario["technologies"]["generators"]["gas_plant"]
    del gas["min_stable_output"], gas["ramp_rate"], plain_scenario["policy"]["operating_reserve"]
    plain = run_scenario(write_scenario(tmp_path, plain_scenario, name="plain.yaml"))
    relaxed_scenario = copy.deepcopy(plain_scenario)
    relaxed_scenario["technologies"]["generators"]["gas_plant"]["min_stable_output"] = 0.0
    relaxed_scenario["technologies"]["generators"]["solar_plant"]["provides_reserve"] = (
        True  # free: pooled without
    )
    relaxed_scenario["policy"]["operating_reserve"] = {"demand_share": 0.0}
    path = write_scenario(tmp_path, relaxed_scenario)
    relaxed = run_scenario(path)
    assert relaxed.solution.objective == pytest.approx(plain.solution.objective, rel=1e-9)
    assert set(relaxed.result.online_capacity["technology"]) == {"gas_plant", "solar_plant"}
    np.testing.assert_allclose(relaxed.result.operating_reserve["requirement_mw"], 0.0)
    model = build_linear_program(prepare_inputs(load_scenario(path).scenario))
    labels = block_labels(model.context)
    assert labels[ONLINE_CAPACITY].labels[0] == ("gas_plant", "solar_plant")
    assert labels[RESERVE].labels[0] == ("gas_plant", "solar_plant")
    assert labels[STORAGE_RESERVE].labels[0] == ("battery",)
    assert MIN_STABLE_OUTPUT not in model.lp.row_blocks  # a minimum of 0 adds no rows
    assert "curtailment" not in model.lp.variables  # the only free generator left the pool


# ----------------------------------------------------------------------------------------------------- bad input
@pytest.mark.parametrize(
    ("where", "field", "value", "expected"),
    [
        ("generator", "min_stable_output", 1.5, "less than or equal to 1"),
        ("generator", "min_stable_output", -0.1, "greater than or equal to 0"),
        ("generator", "ramp_rate", 1.2, "less than or equal to 1"),
        ("generator", "ramp_rate", -0.5, "greater than or equal to 0"),
        ("reserve", "demand_share", -0.1, "greater than or equal to 0"),
        ("reserve", "variable_renewable_share", -0.2, "greater than or equal to 0"),
        ("reserve", "duration_hours", 0, "greater than 0"),
    ],
)
def test_bad_flexibility_input_is_one_located_sentence(tmp_path, capsys, where, field, value, expected):
    m = tiny_mapping()
    if where == "generator":
        m["technologies"]["generators"]["gas_combined_cycle"][field] = value
        path_text = f"technologies.generators.gas_combined_cycle.{field}"
    else:
        m["policy"]["operating_reserve"] = {field: value}
        path_text = f"policy.operating_reserve.{field}"
    path = write_scenario(tmp_path, m)
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and "Traceback" not in err
    assert f"{path}: {path_text}: got {value!r}; expected {expected}." in err


# ------------------------------------------------------------------------------------------------ the demo variant
DEMO = Path(__file__).parents[2] / "scenarios" / "demo"


def test_demo_variant_is_valid_and_builds_its_flexibility_rows(capsys):
    """scenarios/demo/budget_flexible.yaml (orders of magnitude cited in the file) passes check and builds online
    capacity for coal and the combined cycle, ramp rows for coal only, and reserve held by them and the battery."""
    path = DEMO / "budget_flexible.yaml"
    assert main(["check", str(path)]) == 0
    assert "valid scenario 'arvenna_budget_flexible'" in capsys.readouterr().out
    model = build_linear_program(prepare_inputs(load_scenario(path).scenario))
    labels = block_labels(model.context)
    assert labels[ONLINE_CAPACITY].labels[0] == ("coal_steam", "gas_combined_cycle")
    assert labels[RESERVE].labels[0] == ("coal_steam", "gas_combined_cycle")
    assert labels[STORAGE_RESERVE].labels[0] == ("battery",)
    assert (
        model.lp.row_blocks[RAMP_UP].shape[0] == 1
    )  # coal only: the combined cycle's ramp cannot bind hourly
    assert OPERATING_RESERVE in model.lp.row_blocks
