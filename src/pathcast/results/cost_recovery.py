"""Cost recovery: what each technology earns and pays, year by year, and whether each year's builds recover their
cost over their life.

``cost_recovery`` (technology, year; million currency of the price year, undiscounted, per year):
energy revenue (hourly electricity prices x output; storage: discharge less charge; electricity-input converters pay
for what they draw), fuel revenue (converters: output at the fuel's price less fuel input at its price), fuel cost and
carbon cost of generators (fuel at its price, emissions at the full carbon price: path + budget + caps), variable O&M,
the clean-share rent (clean generators earn, others pay, the target's shadow price per MWh), operating-reserve
revenue (reserve held at the hourly reserve price; variable renewables pay for the reserve their output calls for),
capacity revenue (the
capacity price x firm capacity; for tranche-credited generators every GW earns the marginal tranche's credit),
fixed O&M and investment annuities of the vintages in service, and the net. ``capacity_value_million`` is the same
capacity valued at the duals of its installed-capacity rows: at the optimum, operating margin + capacity revenue -
fixed O&M equals it wherever capacity in service is not held at a limit (LP complementary slackness; see
:mod:`pathcast.model.cost_recovery`).

``cost_recovery_vintages`` (technology, part, build year): the discounted value over the years a build is alive
inside the horizon against its discounted annuities [currency per kW (power) or kWh (storage energy), money of the
price year discounted to the base year]; the ratio is 1 for every build not at a build limit (the proof a regulator
asks for), above 1 where a limit holds builds back (a scarcity rent), below 1 where a minimum build forces more.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..model.solution_values import SolutionValues
from ..scenario.inputs import present

__all__ = ["cost_recovery_tables", "capacity_price_table", "COST_RECOVERY_COLUMNS", "VINTAGE_COLUMNS"]

COST_RECOVERY_COLUMNS = [
    "technology",
    "kind",
    "year",
    "capacity_mw",
    "energy_revenue_million",
    "fuel_revenue_million",
    "fuel_cost_million",
    "carbon_cost_million",
    "variable_om_million",
    "clean_share_rent_million",
    "reserve_revenue_million",
    "operating_margin_million",
    "capacity_revenue_million",
    "fixed_om_million",
    "annuity_million",
    "net_million",
    "capacity_value_million",
]
VINTAGE_COLUMNS = [
    "technology",
    "part",
    "build_year",
    "new",
    "unit",
    "pv_value_per_unit",
    "pv_annuity_per_unit",
    "recovery_ratio",
    "at_build_limit",
]
TOLERANCE_GW = (
    1e-9  # below this a build or a capacity counts as zero (solver tolerance; common practice, no source)
)


def capacity_price_table(values: SolutionValues) -> pd.DataFrame:
    """``capacity_price`` by year: the reserve margin's shadow price [currency/kW/yr], the firm capacity required
    and counted [MW]; price 0 and no requirement without a reserve-margin row."""
    inputs, firm = values.inputs, values.firm
    margin = inputs.reserve_margin
    required = (
        (1.0 + margin) * inputs.peak_demand_gw * 1000.0 if margin is not None else np.zeros(len(inputs.years))
    )
    return pd.DataFrame(
        {
            "year": [int(y) for y in inputs.years],
            "capacity_price_per_kw_year": values.policy.reserve_margin_price_per_kw_year,
            "required_firm_mw": required,
            "firm_capacity_mw": firm.firm_gw.sum(axis=0) * 1000.0,
            "peak_demand_mw": inputs.peak_demand_gw * 1000.0,
        }
    )


def _annuities(values: SolutionValues) -> tuple[np.ndarray, np.ndarray]:
    """Investment annuities of the builds in service [T, Y] and storage energy builds [S, Y] [million/yr]."""
    techs, cap, worth = values.inputs.technologies, values.capacity, values.capacity_value
    Y = len(cap.years)
    power = np.zeros((len(techs), Y))
    for i, t in enumerate(techs):
        for b in range(Y):
            power[i, b : min(b + t.lifetime, Y)] += worth.annuity_per_kw[i, b] * cap.new_gw[i, b]
    energy = np.zeros((len(cap.storage_technologies), Y))
    storage = [t for t in techs if t.kind == "storage"]
    for k, t in enumerate(storage):
        for b in range(Y):
            energy[k, b : min(b + t.lifetime, Y)] += (
                worth.energy_annuity_per_kwh[k, b] * cap.energy_new_gwh[k, b]
            )
    return power, energy


def cost_recovery_tables(values: SolutionValues) -> tuple[pd.DataFrame, pd.DataFrame]:
    """``cost_recovery`` by technology and year and ``cost_recovery_vintages`` by build (module docstring)."""
    inputs, cap, dispatch, storage, fuels, policy = (
        values.inputs,
        values.capacity,
        values.dispatch,
        values.storage,
        values.fuels,
        values.policy,
    )
    techs = inputs.technologies
    Y = len(cap.years)
    w = dispatch.hour_weight  # [Y, D, H] h
    price = dispatch.electricity_price_per_mwh  # [Y, D, H] currency/MWh
    to_million = w * price / 1000.0  # GW in an hour x price -> million currency
    carbon = (
        policy.budget_carbon_price_per_tco2 + policy.cap_carbon_price_per_tco2 + inputs.carbon_price
    )  # [Y]
    fuel_price = {c: fuels.fuel_price_per_gj[i] for i, c in enumerate(fuels.commodities)}  # [Y] currency/GJ
    clean_price = np.nan_to_num(policy.clean_share_price_per_mwh)  # [Y] currency/MWh
    share = np.nan_to_num(inputs.clean_share) if inputs.clean_share is not None else np.zeros(Y)
    capacity_price = policy.reserve_margin_price_per_kw_year  # [Y] currency/kW/yr = million/GW
    annuity, energy_annuity = _annuities(values)
    worth = values.capacity_value
    generator_row = {n: g for g, n in enumerate(dispatch.generators)}
    storage_row = {n: k for k, n in enumerate(storage.technologies)}
    burner_row = {n: b for b, n in enumerate(fuels.burners)}
    electric_row = {n: c for c, n in enumerate(fuels.electric_converters)}
    fuel_conv_row = {n: c for c, n in enumerate(fuels.fuel_converters)}
    zeros = np.zeros(Y)
    flexibility = values.flexibility
    reserve_revenue = (  # operating reserve held, at the hourly reserve price [million/yr]
        {n: flexibility.reserve_revenue_million[r] for r, n in enumerate(flexibility.reserve_holders)}
        if flexibility is not None and flexibility.reserve_required
        else {}
    )
    operating_reserve = getattr(inputs, "operating_reserve", None)
    reserve_share = operating_reserve.variable_renewable_share if operating_reserve is not None else 0.0

    rows = []
    for i, t in enumerate(techs):
        capacity = cap.capacity_gw[i]
        energy = fuel_revenue = fuel_cost = carbon_cost = vom = clean = zeros
        fixed = t.fixed_om * capacity
        value = worth.power_value_per_kw_year[i] * capacity
        ann = annuity[i]
        if t.kind == "generator":
            g = generator_row[t.name]
            output = dispatch.generation_gw[g]
            energy = (output * to_million).sum(axis=(1, 2))
            vom = dispatch.variable_om_million[g]
            if t.name in burner_row:
                burned = fuels.fuel_use_pj[burner_row[t.name]]
                fuel = present(t.fuel)
                fuel_cost = burned * fuel_price[fuel]
                carbon_cost = burned * inputs.emission_factor.get(fuel, 0.0) * carbon
            generation_twh = (output * w).sum(axis=(1, 2)) / 1000.0
            clean = clean_price * generation_twh * (float(t.clean) - share)
        elif t.kind == "storage":
            k = storage_row[t.name]
            energy = ((storage.discharge_gw[k] - storage.charge_gw[k]) * to_million).sum(axis=(1, 2))
            vom = storage.variable_om_million[k]
            fixed = fixed + t.energy_fixed_om * cap.energy_capacity_gwh[k]
            value = value + worth.energy_value_per_kwh_year[k] * cap.energy_capacity_gwh[k]
            ann = ann + energy_annuity[k]
        elif t.name in electric_row:
            c = electric_row[t.name]
            energy = -(fuels.converter_power_gw[c] * to_million).sum(axis=(1, 2))
            made = fuels.electric_conversion_output_pj[c]
            fuel_revenue = made * fuel_price[present(t.output)]
            carbon_cost = made * t.process_emission_factor * carbon
            vom = fuels.converter_variable_om_million[c]
        else:
            c = fuel_conv_row[t.name]
            made, taken = fuels.fuel_conversion_output_pj[c], fuels.converter_input_pj[c]
            fuel_revenue = made * fuel_price[present(t.output)] - taken * fuel_price[present(t.input)]
            carbon_cost = made * t.process_emission_factor * carbon
            vom = fuels.converter_variable_om_million[len(fuels.electric_converters) + c]
        if t.credit_tranches:  # every GW earns the capacity price x the marginal tranche's credit
            capacity_revenue = values.firm.tranche_value_per_kw_year[i] * capacity
        else:
            capacity_revenue = capacity_price * values.firm.firm_gw[i]
        reserve = reserve_revenue.get(t.name, zeros)
        if (
            flexibility is not None
            and reserve_revenue
            and t.kind == "generator"
            and t.variable_renewable
            and reserve_share
        ):
            # variable output raises the reserve requirement: share x available output x the hourly reserve price
            price_h = flexibility.reserve_price_per_mw_hour  # [Y, D, H] currency/MW per hour
            available = present(t.availability)[None] * capacity[:, None, None]  # [Y, D, H] GW
            reserve = reserve - reserve_share * (price_h * available * w).sum(axis=(1, 2)) / 1000.0
        margin = energy + fuel_revenue - fuel_cost - carbon_cost - vom + clean + reserve
        net = margin + capacity_revenue - fixed - ann
        for y, year in enumerate(cap.years):
            rows.append(
                (
                    t.name,
                    t.kind,
                    int(year),
                    capacity[y] * 1000.0,
                    energy[y],
                    fuel_revenue[y],
                    fuel_cost[y],
                    carbon_cost[y],
                    vom[y],
                    clean[y],
                    reserve[y],
                    margin[y],
                    capacity_revenue[y],
                    fixed[y],
                    ann[y],
                    net[y],
                    value[y],
                )
            )
    recovery = pd.DataFrame(rows, columns=COST_RECOVERY_COLUMNS)
    return recovery, _vintages(values)


def _vintages(values: SolutionValues) -> pd.DataFrame:
    inputs, cap, worth = values.inputs, values.capacity, values.capacity_value
    df = inputs.discount_factor
    Y = len(cap.years)
    rows = []
    storage = [t for t in inputs.technologies if t.kind == "storage"]
    parts = [
        (t, "power", cap.new_gw[i], worth.build_value_per_kw[i], worth.annuity_per_kw[i], "MW")
        for i, t in enumerate(inputs.technologies)
    ]
    parts += [
        (
            t,
            "energy",
            cap.energy_new_gwh[k],
            worth.energy_build_value_per_kwh[k],
            worth.energy_annuity_per_kwh[k],
            "MWh",
        )
        for k, t in enumerate(storage)
    ]
    held = (
        dict(zip(worth.technologies, worth.build_held_by_growth, strict=True))
        if worth.build_held_by_growth is not None
        else {}
    )
    for t, part, new, value, annuity, unit in parts:
        committed = t.committed_gw if part == "power" else t.committed_energy_gwh
        committed = committed if committed is not None else np.zeros(Y)  # committed projects [GW or GWh]
        for b in range(Y):
            if new[b] <= TOLERANCE_GW:
                continue
            alive = slice(b, min(b + t.lifetime, Y))
            pv_value = float(value[b])  # discounted value of the build over its years alive (duals)
            pv_annuity = float(annuity[b] * df[alive].sum())
            limits = new[b] <= committed[b] + 1e-7 or (
                part == "power"
                and (
                    new[b] >= t.max_build_gw[b] - 1e-7 * max(1.0, new[b])
                    or new[b] <= t.min_build_gw[b] + 1e-7
                    or bool(held[t.name][b] if t.name in held else False)
                )
            )
            rows.append(
                (
                    t.name,
                    part,
                    int(cap.years[b]),
                    new[b] * 1000.0,
                    unit,
                    pv_value,
                    pv_annuity,
                    pv_value / pv_annuity if pv_annuity > 0 else np.nan,
                    bool(limits),
                )
            )
    return pd.DataFrame(rows, columns=VINTAGE_COLUMNS)
