"""A small multi-year case formulated independently with scipy.optimize.linprog (HiGHS through SciPy, built here
from the equations in the README's method section, not from pathcast's code): objectives must agree to 1e-6."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import linprog

from pathcast.economics import capital_recovery_factor
from pathcast.pipeline import run_scenario
from tests.conftest import write_scenario

YEARS = [2030, 2031, 2032, 2033]
RATE = 0.08
SOLAR = [0, 0, 0, 0, 0, 0, 0.1, 0.3, 0.5, 0.7, 0.8, 0.85, 0.85, 0.8, 0.7, 0.5, 0.3, 0.1, 0, 0, 0, 0, 0, 0]
SHAPE = [0.8] * 7 + [1.0] * 10 + [1.2] * 4 + [0.9] * 3
ENERGY_TWH = [4.0, 4.2, 4.4, 4.6]
GAS = {
    "capex": 900.0,
    "fixed_om": 20.0,
    "variable_om": 4.0,
    "lifetime": 3,
    "efficiency": 0.5,
    "availability": 0.9,
    "existing_mw": 300.0,
    "retire": 2032,
}
PV = {"capex": 700.0, "fixed_om": 12.0, "variable_om": 0.0, "lifetime": 20, "max_build_mw": 400.0}
GAS_PRICE, EF, BUDGET, MARGIN, VOLL = (
    7.0,
    0.0561,
    4.0,
    0.1,
    8000.0,
)  # currency/GJ, tCO2/GJ, MtCO2, -, currency/MWh


def _scenario() -> dict:
    return {
        "metadata": {
            "name": "reference_check",
            "base_year": YEARS[0],
            "final_year": YEARS[-1],
            "currency": "USD",
            "price_year": 2024,
            "discount_rate": RATE,
            "value_of_lost_load": VOLL,
            "new_builds_in_base_year": True,  # greenfield: the first year is optimised like the others
        },
        "time": {
            "representative_days": [
                {"name": "day", "weight_days": 365, "demand_shape": SHAPE, "availability": {"solar": SOLAR}}
            ]
        },
        "demand": {"electricity": {"yearly_twh": dict(zip(YEARS, ENERGY_TWH, strict=True))}},
        "commodities": {"gas": {"emission_factor": EF}},
        "technologies": {
            "generators": {
                "gas_plant": {
                    "fuel": "gas",
                    "efficiency": GAS["efficiency"],
                    "capex": GAS["capex"],
                    "fixed_om": GAS["fixed_om"],
                    "variable_om": GAS["variable_om"],
                    "lifetime": GAS["lifetime"],
                    "availability": GAS["availability"],
                    "existing": [{"capacity_mw": GAS["existing_mw"], "retirement_year": GAS["retire"]}],
                },
                "solar_plant": {
                    "capex": PV["capex"],
                    "fixed_om": PV["fixed_om"],
                    "lifetime": PV["lifetime"],
                    "availability": "solar",
                    "max_build_mw_per_year": PV["max_build_mw"],
                },
            },
            "supplies": {"gas_supply": {"output": "gas", "price": GAS_PRICE}},
        },
        "policy": {"carbon_budget": {"total_mt": BUDGET}, "reserve_margin": MARGIN},
    }


def _independent_objective() -> float:
    """min cost over x = [N(g,y), C(g,y), P(g,y,h), U(y,h), X(y)] in GW, GW, GW, GW, PJ; money in million."""
    Y, H, G = len(YEARS), 24, 2
    w = 365.0
    df = [(1 + RATE) ** -t for t in range(Y)]
    shape = np.array(SHAPE) / (w * sum(SHAPE))
    demand = [[e * 1000 * s for s in shape] for e in ENERGY_TWH]  # GW
    techs = [GAS, PV]
    n = {}

    def var(*key):
        if key not in n:
            n[key] = len(n)
        return n[key]

    for g in range(G):
        for y in range(Y):
            var("N", g, y), var("C", g, y)
            for h in range(H):
                var("P", g, y, h)
    for y in range(Y):
        for h in range(H):
            var("U", y, h)
        var("X", y)
    c = np.zeros(len(n))
    bounds = [(0, None)] * len(n)
    A_ub, b_ub, A_eq, b_eq = [], [], [], []

    def row(entries):
        r = np.zeros(len(n))
        for key, coef in entries:
            r[n[key]] += coef
        return r

    existing = [[GAS["existing_mw"] / 1000 if YEARS[y] < GAS["retire"] else 0.0 for y in range(Y)], [0.0] * Y]
    for g, t in enumerate(techs):
        crf = capital_recovery_factor(RATE, t["lifetime"])
        for b in range(Y):
            alive = [y for y in range(b, min(b + t["lifetime"], Y))]
            c[n["N", g, b]] = t["capex"] * crf * sum(df[y] for y in alive)
            if g == 1:
                bounds[n["N", g, b]] = (0, PV["max_build_mw"] / 1000)
        for y in range(Y):
            c[n["C", g, y]] = t["fixed_om"] * df[y]
            # in service <= existing + builds alive in y
            A_ub.append(
                row(
                    [(("C", g, y), 1.0)]
                    + [(("N", g, b), -1.0) for b in range(Y) if 0 <= y - b < t["lifetime"]]
                )
            )
            b_ub.append(existing[g][y])
            if y > 0:  # retired capacity never returns
                A_ub.append(row([(("C", g, y), 1.0), (("C", g, y - 1), -1.0), (("N", g, y), -1.0)]))
                b_ub.append(0.0)
            for h in range(H):
                avail = GAS["availability"] if g == 0 else SOLAR[h]
                A_ub.append(row([(("P", g, y, h), 1.0), (("C", g, y), -avail)]))
                b_ub.append(0.0)
                c[n["P", g, y, h]] = t["variable_om"] / 1000 * w * df[y]
    for y in range(Y):
        for h in range(H):
            A_eq.append(row([(("P", 0, y, h), 1.0), (("P", 1, y, h), 1.0), (("U", y, h), 1.0)]))
            b_eq.append(demand[y][h])
            c[n["U", y, h]] = VOLL / 1000 * w * df[y]
        # gas supply [PJ] >= gas burned = sum_h P w 0.0036 / efficiency
        A_ub.append(
            row([(("X", y), -1.0)] + [(("P", 0, y, h), w * 0.0036 / GAS["efficiency"]) for h in range(H)])
        )
        b_ub.append(0.0)
        c[n["X", y]] = GAS_PRICE * df[y]
        # reserve margin: 0.9 x gas capacity (credit = availability) >= (1 + margin) x peak
        A_ub.append(row([(("C", 0, y), -GAS["availability"])]))
        b_ub.append(-(1 + MARGIN) * max(demand[y]))
    # budget: sum_y EF x gas burned <= B
    A_ub.append(
        row([(("P", 0, y, h), EF * w * 0.0036 / GAS["efficiency"]) for y in range(Y) for h in range(H)])
    )
    b_ub.append(BUDGET)
    out = linprog(
        c, A_ub=np.array(A_ub), b_ub=b_ub, A_eq=np.array(A_eq), b_eq=b_eq, bounds=bounds, method="highs"
    )
    assert out.status == 0, out.message
    return float(out.fun)


def test_objective_matches_independent_linprog(tmp_path):
    run = run_scenario(write_scenario(tmp_path, _scenario()))
    reference = _independent_objective()
    assert run.solution.objective == pytest.approx(reference, rel=1e-6)
    # the budget binds in this case, so the check covers the emission accounting too
    assert run.result.summary["cumulative_emissions_mtco2"] == pytest.approx(BUDGET, rel=1e-6)
    assert not math.isnan(run.result.carbon_price["from_budget_per_tco2"].iloc[0])
