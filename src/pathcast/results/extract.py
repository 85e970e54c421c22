"""Read a solved LP back into tidy tables, block by block with numpy (no value-by-value reads)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..model.build import PathwayModel
from ..model.capacity import _alive_pairs
from ..model.dispatch import available_output, generation_values
from ..scenario.inputs import PJ_PER_GWH
from ..solve import Solution

__all__ = ["extract_tables", "headline_figures"]


def _frame(values: np.ndarray, dims: dict[str, list], name: str) -> pd.DataFrame:
    """Tidy frame of an array whose axes are labelled by ``dims`` (ordered like the array axes)."""
    index = pd.MultiIndex.from_product(list(dims.values()), names=list(dims))
    return pd.DataFrame({name: np.asarray(values, dtype=float).ravel()}, index=index).reset_index()


def extract_tables(model: PathwayModel, solution: Solution) -> dict[str, pd.DataFrame]:
    ctx, inputs, lp = model.context, model.inputs, model.lp
    x = solution.x
    blocks = ctx.blocks
    years = inputs.years.tolist()
    days = list(inputs.day_names)
    hours = list(range(ctx.H))
    df = inputs.discount_factor
    w = inputs.day_weights
    hw = ctx.hour_weight
    value = lambda name: x[blocks[name].all()]  # noqa: E731
    techs = ctx.capacity_techs
    names = [t.name for t in techs]
    kinds = {t.name: t.kind for t in techs}

    # --- capacity ------------------------------------------------------------------------------------------------
    capacity = value("capacity")  # [T, Y] GW
    new = value("new")
    installed = np.zeros_like(capacity)
    for i, t in enumerate(techs):
        y, b = _alive_pairs(ctx.Y, t.lifetime)
        np.add.at(installed[i], y, new[i, b])
        installed[i] += t.existing_gw
    previous = np.empty_like(capacity)  # capacity in service the year before [GW]
    previous[:, 0] = [t.existing_gw[0] for t in techs]
    previous[:, 1:] = capacity[:, :-1]
    retired = np.maximum(previous + new - capacity, 0.0)
    cap = _frame(capacity * 1000, {"technology": names, "year": years}, "capacity_mw")
    cap["new_mw"] = (new * 1000).ravel()
    cap["retired_mw"] = (retired * 1000).ravel()
    cap["early_retired_mw"] = (np.maximum(installed - capacity, 0.0) * 1000).ravel()
    cap.insert(1, "kind", cap["technology"].map(kinds))

    storage_names = [t.name for t in ctx.storage]
    if ctx.storage:
        energy = _frame(
            value("energy_capacity") * 1000,
            {"technology": storage_names, "year": years},
            "energy_capacity_mwh",
        )
        energy["new_mwh"] = (value("energy_new") * 1000).ravel()
    else:
        energy = pd.DataFrame(columns=["technology", "year", "energy_capacity_mwh", "new_mwh"])

    # --- electricity, yearly and hourly -----------------------------------------------------------------------
    gen_names = [t.name for t in ctx.generators]
    hourly_parts = []
    yearly_rows = []

    def add_flow(name: str, kind: str, power: np.ndarray, sign: float) -> None:
        # power [Y, D, H] GW
        hourly_parts.append((name, sign * power))
        energy_twh = (power * hw).sum(axis=(1, 2)) / 1000.0
        yearly_rows.append(
            (
                name,
                kind,
                energy_twh if sign > 0 else np.zeros(ctx.Y),
                energy_twh if sign < 0 else np.zeros(ctx.Y),
            )
        )

    generation = generation_values(ctx, x)  # [G, Y, D, H] GW, pooled generators' curtailment shared out
    for g, name in enumerate(gen_names):
        add_flow(name, "generator", generation[g], 1.0)
    if ctx.storage:
        charge, discharge = value("charge"), value("discharge")
        for k, name in enumerate(storage_names):
            hourly_parts.append((name, discharge[k] - charge[k]))
            yearly_rows.append(
                (
                    name,
                    "storage",
                    (discharge[k] * hw).sum(axis=(1, 2)) / 1000.0,
                    (charge[k] * hw).sum(axis=(1, 2)) / 1000.0,
                )
            )
    conv_power = value("converter_power")
    for c, t in enumerate(ctx.electric_converters):
        add_flow(t.name, "converter", conv_power[c], -1.0)
    unserved = value("unserved")
    hourly_parts.append(("unserved", unserved))
    hourly_parts.append(("final_demand", -inputs.electricity_demand_gw))

    electricity = (
        pd.concat(
            [
                pd.DataFrame(
                    {"technology": n, "kind": k, "year": years, "generation_twh": gen, "consumption_twh": use}
                )
                for n, k, gen, use in yearly_rows
            ],
            ignore_index=True,
        )
        if yearly_rows
        else pd.DataFrame(columns=["technology", "kind", "year", "generation_twh", "consumption_twh"])
    )
    cap_lookup = cap.set_index(["technology", "year"])["capacity_mw"]
    cap_values = cap_lookup.reindex(pd.MultiIndex.from_frame(electricity[["technology", "year"]])).to_numpy()
    with np.errstate(divide="ignore", invalid="ignore"):
        cf = np.where(
            cap_values > 0,
            np.maximum(electricity["generation_twh"], electricity["consumption_twh"])
            * 1e6
            / (cap_values * 8760.0),
            np.nan,
        )
    electricity["capacity_factor"] = cf
    # curtailed energy of generators that cost nothing to run: available output less output [TWh]
    curtailed = np.zeros(len(electricity))
    free = [(g, t) for g, t in enumerate(ctx.generators) if t.fuel is None and t.variable_om == 0.0]
    if free:
        available = available_output(ctx, [t for _, t in free], x)  # [F, Y, D, H] GW
        for i, (g, t) in enumerate(free):
            spilled = np.maximum(((available[i] - generation[g]) * hw).sum(axis=(1, 2)) / 1000.0, 0.0)
            where = np.flatnonzero(
                (electricity["technology"] == t.name).to_numpy()
                & (electricity["kind"] == "generator").to_numpy()
            )
            curtailed[where] = spilled
    electricity["curtailed_twh"] = curtailed

    hourly_index = pd.MultiIndex.from_product([years, days, hours], names=["year", "day", "hour"]).to_frame(
        index=False
    )
    weight_col = np.broadcast_to(w[None, :, None], (ctx.Y, ctx.D, ctx.H)).ravel()
    hourly = pd.concat(
        [
            hourly_index.assign(weight_days=weight_col, technology=name, power_mw=(power * 1000).ravel())
            for name, power in hourly_parts
        ],
        ignore_index=True,
    )

    # --- fuels -------------------------------------------------------------------------------------------------
    flows = []
    supply = value("supply")
    for i, s in enumerate(inputs.supplies):
        flows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "commodity": s.output,
                    "technology": s.name,
                    "role": "supply",
                    "energy_pj": supply[i],
                }
            )
        )
    fuel_use = value("fuel_use")
    for i, t in enumerate(ctx.fuel_generators):
        flows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "commodity": t.fuel,
                    "technology": t.name,
                    "role": "power_input",
                    "energy_pj": fuel_use[i],
                }
            )
        )
    for c, t in enumerate(ctx.electric_converters):
        out = t.efficiency * (conv_power[c] * hw).sum(axis=(1, 2)) * PJ_PER_GWH
        flows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "commodity": t.output,
                    "technology": t.name,
                    "role": "conversion_output",
                    "energy_pj": out,
                }
            )
        )
    conv_input = value("converter_input")
    for c, t in enumerate(ctx.fuel_converters):
        flows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "commodity": t.input,
                    "technology": t.name,
                    "role": "conversion_input",
                    "energy_pj": conv_input[c],
                }
            )
        )
        flows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "commodity": t.output,
                    "technology": t.name,
                    "role": "conversion_output",
                    "energy_pj": t.efficiency * conv_input[c],
                }
            )
        )
    delivery = value("delivery")
    fuels = list(inputs.fuels)
    demand_rows = []
    unserved_fuel = value("unserved_fuel")
    for p, (d, c) in enumerate(ctx.delivery_pairs):
        demand = inputs.fuel_demands[d]
        flows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "commodity": fuels[c],
                    "technology": demand.name,
                    "role": "final_use",
                    "energy_pj": delivery[p],
                }
            )
        )
        demand_rows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "demand": demand.name,
                    "commodity": fuels[c],
                    "delivered_pj": delivery[p],
                    "unserved_pj": 0.0,
                }
            )
        )
    for d, demand in enumerate(inputs.fuel_demands):
        if unserved_fuel.size and unserved_fuel[d].any():
            demand_rows.append(
                pd.DataFrame(
                    {
                        "year": years,
                        "demand": demand.name,
                        "commodity": "(unserved)",
                        "delivered_pj": 0.0,
                        "unserved_pj": unserved_fuel[d],
                    }
                )
            )
    fuel_flows = (
        pd.concat(flows, ignore_index=True)
        if flows
        else pd.DataFrame(columns=["year", "commodity", "technology", "role", "energy_pj"])
    )
    fuel_demand = (
        pd.concat(demand_rows, ignore_index=True)
        if demand_rows
        else pd.DataFrame(columns=["year", "demand", "commodity", "delivered_pj", "unserved_pj"])
    )
    fuel_supply = (
        pd.concat(
            [
                pd.DataFrame(
                    {
                        "year": years,
                        "supply": s.name,
                        "commodity": s.output,
                        "origin": s.origin,
                        "supply_pj": supply[i],
                        "price_per_gj": s.price,
                    }
                )
                for i, s in enumerate(inputs.supplies)
            ],
            ignore_index=True,
        )
        if inputs.supplies
        else pd.DataFrame(columns=["year", "supply", "commodity", "origin", "supply_pj", "price_per_gj"])
    )

    # --- emissions by source -----------------------------------------------------------------------------------
    ef = inputs.emission_factor
    emission_parts = []
    for i, t in enumerate(ctx.fuel_generators):
        if ef.get(t.fuel, 0.0):
            emission_parts.append((t.name, "power", fuel_use[i] * ef[t.fuel]))
    for p, (d, c) in enumerate(ctx.delivery_pairs):
        if ef.get(fuels[c], 0.0):
            emission_parts.append(
                (f"{inputs.fuel_demands[d].name} ({fuels[c]})", "final use", delivery[p] * ef[fuels[c]])
            )
    for c, t in enumerate(ctx.fuel_converters):
        if t.process_emission_factor:
            emission_parts.append(
                (t.name, "conversion", conv_input[c] * t.efficiency * t.process_emission_factor)
            )
    for c, t in enumerate(ctx.electric_converters):
        if t.process_emission_factor:
            emission_parts.append(
                (
                    t.name,
                    "conversion",
                    t.efficiency
                    * (conv_power[c] * hw).sum(axis=(1, 2))
                    * PJ_PER_GWH
                    * t.process_emission_factor,
                )
            )
    emissions = (
        pd.concat(
            [
                pd.DataFrame({"year": years, "source": n, "sector": s, "emissions_mtco2": v})
                for n, s, v in emission_parts
            ],
            ignore_index=True,
        )
        if emission_parts
        else pd.DataFrame(columns=["year", "source", "sector", "emissions_mtco2"])
    )
    total = value("emissions")
    emissions_total = pd.DataFrame(
        {"year": years, "emissions_mtco2": total, "cumulative_mtco2": np.cumsum(total)}
    )
    if inputs.budget_mt is not None:
        first, last = inputs.budget_years
        inside = (inputs.years >= first) & (inputs.years <= last)
        counted = np.cumsum(np.where(inside, total, 0.0))
        emissions_total["budget_mtco2"] = inputs.budget_mt
        emissions_total["cumulative_in_budget_period_mtco2"] = counted
        emissions_total["remaining_mtco2"] = inputs.budget_mt - counted
    else:
        emissions_total["budget_mtco2"] = np.nan
        emissions_total["cumulative_in_budget_period_mtco2"] = np.nan
        emissions_total["remaining_mtco2"] = np.nan

    # --- costs by component (undiscounted and discounted) [million currency] ---------------------------------------
    annuity = np.zeros(ctx.Y)
    for i, t in enumerate(techs):
        y, b = _alive_pairs(ctx.Y, t.lifetime)
        np.add.at(annuity, y, new[i, b] * t.capex[b] * t.crf)
    fixed = (capacity * np.array([[t.fixed_om] for t in techs])).sum(axis=0) if techs else np.zeros(ctx.Y)
    if ctx.storage:
        e_new, e_cap = value("energy_new"), value("energy_capacity")
        for k, t in enumerate(ctx.storage):
            y, b = _alive_pairs(ctx.Y, t.lifetime)
            np.add.at(annuity, y, e_new[k, b] * t.energy_capex[b] * t.crf)
            fixed += e_cap[k] * t.energy_fixed_om
    variable = np.zeros(ctx.Y)
    for g, t in enumerate(ctx.generators):
        variable += t.variable_om * (generation[g] * hw).sum(axis=(1, 2))
    for k, t in enumerate(ctx.storage):
        variable += t.variable_om * (value("discharge")[k] * hw).sum(axis=(1, 2))
    for c, t in enumerate(ctx.electric_converters):
        variable += t.variable_om * (conv_power[c] * hw).sum(axis=(1, 2))
    for c, t in enumerate(ctx.fuel_converters):
        variable += t.variable_om / PJ_PER_GWH * conv_input[c]
    fuel_cost = sum((supply[i] * s.price for i, s in enumerate(inputs.supplies)), np.zeros(ctx.Y))
    carbon_cost = total * inputs.carbon_price
    lost_load = inputs.value_of_lost_load * (unserved * hw).sum(axis=(1, 2))
    lost_fuel = (
        inputs.value_of_unserved_fuel * unserved_fuel.sum(axis=0) if unserved_fuel.size else np.zeros(ctx.Y)
    )
    components = {
        "investment": annuity,
        "fixed_om": fixed,
        "variable_om": variable,
        "fuel": fuel_cost,
        "carbon_price": carbon_cost,
        "unserved_electricity": lost_load,
        "unserved_fuel": lost_fuel,
    }
    costs = pd.concat(
        [
            pd.DataFrame({"year": years, "component": k, "cost_million": v, "discounted_million": v * df})
            for k, v in components.items()
        ],
        ignore_index=True,
    )

    # --- prices from duals -------------------------------------------------------------------------------------
    offsets = lp.row_offsets()
    dual = solution.row_dual

    def row_duals(name: str) -> np.ndarray:
        block = lp.row_blocks[name]
        return dual[offsets[name] : offsets[name] + block.size].reshape(block.shape)

    balance = row_duals("electricity_balance")  # [million / GW per representative hour]
    price = balance * 1000.0 / (w[None, :, None] * df[:, None, None])  # [currency/MWh]
    electricity_price = hourly_index.assign(price_per_mwh=price.ravel())
    if "fuel_balance" in lp.row_blocks:
        fb = row_duals("fuel_balance") / df[None, :]
        fuel_price = _frame(fb, {"commodity": fuels, "year": years}, "price_per_gj")[
            ["year", "commodity", "price_per_gj"]
        ]
    else:
        fuel_price = pd.DataFrame(columns=["year", "commodity", "price_per_gj"])
    from_budget = np.zeros(ctx.Y)
    if "carbon_budget" in lp.row_blocks:
        first, last = inputs.budget_years
        inside = (inputs.years >= first) & (inputs.years <= last)
        from_budget = np.where(inside, -row_duals("carbon_budget")[0] / df, 0.0)
    from_cap = np.zeros(ctx.Y)
    if "emission_cap" in lp.row_blocks:
        positions = np.searchsorted(inputs.years, ctx.cap_years)
        from_cap[positions] = -row_duals("emission_cap") / df[positions]
    carbon_price = pd.DataFrame(
        {
            "year": years,
            "carbon_price_per_tco2": from_budget + from_cap + inputs.carbon_price,
            "from_budget_per_tco2": from_budget,
            "from_cap_per_tco2": from_cap,
            "from_path_per_tco2": inputs.carbon_price,
        }
    )

    # --- LCOE of each generator's new build in each year, at its realised capacity factor ---------------------------
    fuel_price_lookup = (
        fuel_price.set_index(["commodity", "year"])["price_per_gj"] if len(fuel_price) else None
    )
    lcoe_rows = []
    gen_yearly = electricity[electricity["kind"] == "generator"].set_index(["technology", "year"])
    for t in ctx.generators:
        for yi, year in enumerate(years):
            energy_twh = gen_yearly.loc[(t.name, year), "generation_twh"]
            cap_mw = cap_lookup.loc[(t.name, year)]
            if cap_mw <= 1e-6 or energy_twh <= 1e-9:
                continue
            factor = energy_twh * 1e6 / (cap_mw * 8760.0)
            fixed_per_mwh = (
                (t.capex[yi] * t.crf + t.fixed_om) * 1000.0 / (factor * 8760.0)
            )  # currency/kW/yr -> /MWh
            fuel_per_mwh = 0.0
            if t.fuel is not None and fuel_price_lookup is not None:
                fuel_per_mwh = (
                    float(fuel_price_lookup.loc[(t.fuel, year)]) * 3.6 / t.efficiency
                )  # currency/GJ x GJ/MWh
            lcoe_rows.append((t.name, year, fixed_per_mwh + t.variable_om * 1000.0 + fuel_per_mwh, factor))
    lcoe = pd.DataFrame(lcoe_rows, columns=["technology", "year", "lcoe_per_mwh", "capacity_factor"])

    return {
        "capacity": cap,
        "storage_energy": energy,
        "electricity": electricity,
        "electricity_hourly": hourly,
        "fuel_flows": fuel_flows,
        "fuel_supply": fuel_supply,
        "fuel_demand": fuel_demand,
        "emissions": emissions,
        "emissions_total": emissions_total,
        "costs": costs,
        "electricity_price": electricity_price,
        "fuel_price": fuel_price,
        "carbon_price": carbon_price,
        "lcoe": lcoe,
    }


def headline_figures(model: PathwayModel, solution: Solution, tables: dict[str, pd.DataFrame]) -> dict:
    inputs = model.inputs
    et = tables["emissions_total"]
    cap = tables["capacity"]
    final = int(inputs.years[-1])
    final_cap = cap[cap["year"] == final].set_index("technology")["capacity_mw"]
    gen = tables["electricity"]
    final_gen = gen[(gen["year"] == final) & (gen["kind"] == "generator")].set_index("technology")[
        "generation_twh"
    ]
    costs = tables["costs"]
    unserved_el = float(
        costs.loc[costs["component"] == "unserved_electricity", "cost_million"].sum()
        / inputs.value_of_lost_load
        / 1000.0
    )
    fuel_demand = tables["fuel_demand"]
    cumulative = float(et["emissions_mtco2"].sum())
    summary = {
        "scenario": inputs.name,
        "currency": inputs.currency,
        "price_year": inputs.price_year,
        "base_year": int(inputs.years[0]),
        "final_year": final,
        "total_discounted_cost_million": float(costs["discounted_million"].sum()),
        "objective_million": float(solution.objective),
        "cumulative_emissions_mtco2": cumulative,
        "first_year_emissions_mtco2": float(et["emissions_mtco2"].iloc[0]),
        "final_year_emissions_mtco2": float(et["emissions_mtco2"].iloc[-1]),
        "carbon_budget_mtco2": inputs.budget_mt,
        "budget_first_year": inputs.budget_years[0] if inputs.budget_years else None,
        "budget_last_year": inputs.budget_years[1] if inputs.budget_years else None,
        "within_budget": None
        if inputs.budget_mt is None
        else bool(et["cumulative_in_budget_period_mtco2"].iloc[-1] <= inputs.budget_mt * (1 + 1e-6) + 1e-6),
        "final_year_capacity_mw": {k: round(float(v), 3) for k, v in final_cap.items()},
        "final_year_generation_twh": {k: round(float(v), 4) for k, v in final_gen.items()},
        "peak_build_mw_per_year": float(cap.groupby("year")["new_mw"].sum().max()),
        "unserved_electricity_twh": unserved_el,
        "unserved_fuel_pj": float(fuel_demand["unserved_pj"].sum()) if len(fuel_demand) else 0.0,
        "electricity_demand_final_year_twh": float(inputs.electricity_demand_twh[-1]),
    }
    return summary
