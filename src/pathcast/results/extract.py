"""Tidy tables and headline figures of a solved run, from the values each constraint family read back
(:mod:`pathcast.model.solution_values`): one function per group of tables, whole arrays at a time with numpy.

This module never sees LP columns, rows or block names; the families own how their blocks map to values.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from ..model.solution_values import SolutionValues, read_solution
from .cost_recovery import capacity_price_table, cost_recovery_tables

if TYPE_CHECKING:
    from ..model.build import PathwayModel
    from ..solve import Solution

__all__ = [
    "extract_tables",
    "headline_figures",
    "tables_from_values",
    "base_year_calibration_table",
    "headline_from_values",
    "capacity_tables",
    "electricity_tables",
    "fuel_tables",
    "emissions_tables",
    "cost_table",
    "price_tables",
    "lcoe_table",
    "flexibility_tables",
]

ELECTRICITY_COLUMNS = ["technology", "kind", "year", "generation_twh", "consumption_twh"]
STORAGE_ENERGY_COLUMNS = ["technology", "year", "energy_capacity_mwh", "new_mwh"]
FUEL_FLOW_COLUMNS = ["year", "commodity", "technology", "role", "energy_pj"]
FUEL_DEMAND_COLUMNS = ["year", "demand", "commodity", "delivered_pj", "unserved_pj"]
FUEL_SUPPLY_COLUMNS = ["year", "supply", "commodity", "origin", "supply_pj", "price_per_gj"]
EMISSIONS_COLUMNS = ["year", "source", "sector", "emissions_mtco2"]
FUEL_PRICE_COLUMNS = ["year", "commodity", "price_per_gj"]
LCOE_COLUMNS = ["technology", "year", "lcoe_per_mwh", "capacity_factor"]


def _frame(values: np.ndarray, dims: dict[str, list], name: str) -> pd.DataFrame:
    """Tidy frame of an array whose axes are labelled by ``dims`` (ordered like the array axes)."""
    index = pd.MultiIndex.from_product(list(dims.values()), names=list(dims))
    return pd.DataFrame({name: np.asarray(values, dtype=float).ravel()}, index=index).reset_index()


def _concat(frames: list[pd.DataFrame], columns: list[str]) -> pd.DataFrame:
    """The frames one after the other, or an empty frame with ``columns`` when there are none."""
    return pd.concat(frames, ignore_index=True) if frames else pd.DataFrame(columns=columns)


def _energy_twh(power_gw: np.ndarray, hour_weight: np.ndarray) -> np.ndarray:
    """Yearly energy [TWh] of an hourly power array [Y, D, H] in GW, each hour weighted by the hours it stands for."""
    return (power_gw * hour_weight).sum(axis=(1, 2)) / 1000.0


def _hourly_index(values: SolutionValues) -> pd.DataFrame:
    """(year, day, hour) of every representative hour, in array order."""
    dispatch = values.dispatch
    return pd.MultiIndex.from_product(
        [list(dispatch.years), list(dispatch.days), list(dispatch.hours)], names=["year", "day", "hour"]
    ).to_frame(index=False)


# ---------------------------------------------------------------------------------------------------- capacity
def capacity_tables(values: SolutionValues) -> tuple[pd.DataFrame, pd.DataFrame]:
    """``capacity`` [MW, MW/yr] of every technology by year and ``storage_energy`` [MWh] of storage."""
    fleet = values.capacity
    years = list(fleet.years)
    cap = _frame(
        fleet.capacity_gw * 1000, {"technology": list(fleet.technologies), "year": years}, "capacity_mw"
    )
    cap["new_mw"] = (fleet.new_gw * 1000).ravel()
    cap["retired_mw"] = (fleet.retired_gw * 1000).ravel()
    cap["early_retired_mw"] = (np.maximum(fleet.installed_gw - fleet.capacity_gw, 0.0) * 1000).ravel()
    cap["committed_mw"] = (fleet.committed_gw * 1000).ravel()
    kinds = dict(zip(fleet.technologies, fleet.kinds, strict=True))
    cap.insert(1, "kind", cap["technology"].map(kinds))

    if fleet.storage_technologies:
        energy = _frame(
            fleet.energy_capacity_gwh * 1000,
            {"technology": list(fleet.storage_technologies), "year": years},
            "energy_capacity_mwh",
        )
        energy["new_mwh"] = (fleet.energy_new_gwh * 1000).ravel()
    else:
        energy = pd.DataFrame(columns=STORAGE_ENERGY_COLUMNS)
    return cap, energy


# ------------------------------------------------------------------------------------------------- electricity
def electricity_tables(values: SolutionValues, capacity: pd.DataFrame) -> tuple[pd.DataFrame, pd.DataFrame]:
    """``electricity`` (yearly generation and consumption [TWh], capacity factor, curtailment [TWh] of every
    generator, storage and electric converter) and ``electricity_hourly`` [MW] of every representative hour.
    ``capacity`` is the table from :func:`capacity_tables`."""
    dispatch, storage, fuels = values.dispatch, values.storage, values.fuels
    years = list(dispatch.years)
    hw = dispatch.hour_weight
    no_energy = np.zeros(len(years))
    hourly_parts: list[tuple[str, np.ndarray]] = []
    yearly_rows: list[tuple[str, str, np.ndarray, np.ndarray]] = []

    for g, name in enumerate(dispatch.generators):
        hourly_parts.append((name, 1.0 * dispatch.generation_gw[g]))
        yearly_rows.append((name, "generator", _energy_twh(dispatch.generation_gw[g], hw), no_energy))
    for k, name in enumerate(storage.technologies):
        hourly_parts.append((name, storage.discharge_gw[k] - storage.charge_gw[k]))
        yearly_rows.append(
            (name, "storage", _energy_twh(storage.discharge_gw[k], hw), _energy_twh(storage.charge_gw[k], hw))
        )
    for c, name in enumerate(fuels.electric_converters):
        hourly_parts.append((name, -1.0 * fuels.converter_power_gw[c]))
        yearly_rows.append((name, "converter", no_energy, _energy_twh(fuels.converter_power_gw[c], hw)))
    hourly_parts.append(("unserved", dispatch.unserved_gw))
    hourly_parts.append(("final_demand", -values.inputs.electricity_demand_gw))

    electricity = _concat(
        [
            pd.DataFrame(
                {"technology": n, "kind": k, "year": years, "generation_twh": gen, "consumption_twh": use}
            )
            for n, k, gen, use in yearly_rows
        ],
        ELECTRICITY_COLUMNS,
    )
    cap_lookup = capacity.set_index(["technology", "year"])["capacity_mw"]
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
    # generators come first, one row per year each, in the order of dispatch.generators
    curtailed = np.zeros(len(electricity))
    curtailed[: dispatch.curtailed_twh.size] = dispatch.curtailed_twh.ravel()
    electricity["curtailed_twh"] = curtailed

    hourly_index = _hourly_index(values)
    weight_col = hw.ravel()
    hourly = pd.concat(
        [
            hourly_index.assign(weight_days=weight_col, technology=name, power_mw=(power * 1000).ravel())
            for name, power in hourly_parts
        ],
        ignore_index=True,
    )
    return electricity, hourly


# ------------------------------------------------------------------------------------------------------- fuels
def fuel_tables(values: SolutionValues) -> tuple[pd.DataFrame, pd.DataFrame, pd.DataFrame]:
    """``fuel_flows`` [PJ/yr] (supply, power-plant input, conversion, final use), ``fuel_supply`` [PJ/yr with the
    price in currency/GJ] and ``fuel_demand`` [PJ/yr delivered and unserved]."""
    fuels = values.fuels
    years = list(fuels.years)

    def flow(commodity: str, technology: str, role: str, energy_pj: np.ndarray) -> pd.DataFrame:
        return pd.DataFrame(
            {
                "year": years,
                "commodity": commodity,
                "technology": technology,
                "role": role,
                "energy_pj": energy_pj,
            }
        )

    flows = [
        flow(commodity, name, "supply", fuels.supply_pj[i])
        for i, (name, commodity) in enumerate(zip(fuels.supplies, fuels.supply_commodities, strict=True))
    ]
    flows += [
        flow(fuel, name, "power_input", fuels.fuel_use_pj[i])
        for i, (name, fuel) in enumerate(zip(fuels.burners, fuels.burner_fuels, strict=True))
    ]
    flows += [
        flow(output, name, "conversion_output", fuels.electric_conversion_output_pj[c])
        for c, (name, output) in enumerate(
            zip(fuels.electric_converters, fuels.electric_converter_outputs, strict=True)
        )
    ]
    for c, name in enumerate(fuels.fuel_converters):
        flows.append(
            flow(fuels.fuel_converter_inputs[c], name, "conversion_input", fuels.converter_input_pj[c])
        )
        flows.append(
            flow(
                fuels.fuel_converter_outputs[c], name, "conversion_output", fuels.fuel_conversion_output_pj[c]
            )
        )
    demand_rows = []
    for p, (demand, commodity) in enumerate(
        zip(fuels.delivery_demands, fuels.delivery_commodities, strict=True)
    ):
        flows.append(flow(commodity, demand, "final_use", fuels.delivery_pj[p]))
        demand_rows.append(
            pd.DataFrame(
                {
                    "year": years,
                    "demand": demand,
                    "commodity": commodity,
                    "delivered_pj": fuels.delivery_pj[p],
                    "unserved_pj": 0.0,
                }
            )
        )
    for d, demand in enumerate(fuels.demands):
        if fuels.unserved_fuel_pj[d].any():
            demand_rows.append(
                pd.DataFrame(
                    {
                        "year": years,
                        "demand": demand,
                        "commodity": "(unserved)",
                        "delivered_pj": 0.0,
                        "unserved_pj": fuels.unserved_fuel_pj[d],
                    }
                )
            )
    fuel_supply = _concat(
        [
            pd.DataFrame(
                {
                    "year": years,
                    "supply": name,
                    "commodity": fuels.supply_commodities[i],
                    "origin": fuels.supply_origins[i],
                    "supply_pj": fuels.supply_pj[i],
                    "price_per_gj": fuels.supply_price_per_gj[i],
                }
            )
            for i, name in enumerate(fuels.supplies)
        ],
        FUEL_SUPPLY_COLUMNS,
    )
    return _concat(flows, FUEL_FLOW_COLUMNS), fuel_supply, _concat(demand_rows, FUEL_DEMAND_COLUMNS)


# --------------------------------------------------------------------------------------------------- emissions
def emissions_tables(values: SolutionValues) -> tuple[pd.DataFrame, pd.DataFrame]:
    """``emissions`` [MtCO2/yr] by source and ``emissions_total`` [MtCO2] with the budget accounting."""
    emissions, policy = values.emissions, values.policy
    years = list(emissions.years)
    by_source = _concat(
        [
            pd.DataFrame(
                {
                    "year": years,
                    "source": name,
                    "sector": sector,
                    "emissions_mtco2": emissions.by_source_mtco2[i],
                }
            )
            for i, (name, sector) in enumerate(zip(emissions.sources, emissions.sectors, strict=True))
        ],
        EMISSIONS_COLUMNS,
    )
    total = emissions.total_mtco2
    emissions_total = pd.DataFrame(
        {"year": years, "emissions_mtco2": total, "cumulative_mtco2": np.cumsum(total)}
    )
    # read_policy sets the budget and its years together, or neither
    if policy.budget_mtco2 is not None and policy.budget_years is not None:
        first, last = policy.budget_years
        year_array = np.asarray(years)
        inside = (year_array >= first) & (year_array <= last)
        counted = np.cumsum(np.where(inside, total, 0.0))
        emissions_total["budget_mtco2"] = policy.budget_mtco2
        emissions_total["cumulative_in_budget_period_mtco2"] = counted
        emissions_total["remaining_mtco2"] = policy.budget_mtco2 - counted
    else:
        emissions_total["budget_mtco2"] = np.nan
        emissions_total["cumulative_in_budget_period_mtco2"] = np.nan
        emissions_total["remaining_mtco2"] = np.nan
    return by_source, emissions_total


# ------------------------------------------------------------------------------------------------------- costs
def cost_table(values: SolutionValues) -> pd.DataFrame:
    """``costs`` by component and year [million currency of the price year], undiscounted and discounted."""
    years = list(values.capacity.years)
    variable = np.zeros(len(years))
    for per_technology in (
        values.dispatch.variable_om_million,
        values.storage.variable_om_million,
        values.fuels.converter_variable_om_million,
    ):
        for row in per_technology:
            variable += row
    components = {
        "investment": values.capacity.investment_million,
        "fixed_om": values.capacity.fixed_om_million,
        "variable_om": variable,
        "fuel": values.fuels.fuel_cost_million,
        "carbon_price": values.emissions.carbon_price_cost_million,
        "unserved_electricity": values.dispatch.unserved_cost_million,
        "unserved_fuel": values.fuels.unserved_fuel_cost_million,
    }
    flexibility = values.flexibility
    if flexibility is not None and flexibility.reserve_required:
        components["reserve_shortfall"] = flexibility.shortfall_cost_million
    df = values.inputs.discount_factor
    return pd.concat(
        [
            pd.DataFrame({"year": years, "component": k, "cost_million": v, "discounted_million": v * df})
            for k, v in components.items()
        ],
        ignore_index=True,
    )


# ------------------------------------------------------------------------------------------------------ prices
def price_tables(values: SolutionValues) -> tuple[pd.DataFrame, pd.DataFrame, pd.DataFrame]:
    """``electricity_price`` [currency/MWh] by representative hour, ``fuel_price`` [currency/GJ] and
    ``carbon_price`` [currency/tCO2] by year, all from the duals the families read back."""
    fuels, policy = values.fuels, values.policy
    electricity_price = _hourly_index(values).assign(
        price_per_mwh=values.dispatch.electricity_price_per_mwh.ravel()
    )
    if fuels.commodities:
        fuel_price = _frame(
            fuels.fuel_price_per_gj,
            {"commodity": list(fuels.commodities), "year": list(fuels.years)},
            "price_per_gj",
        )[FUEL_PRICE_COLUMNS]
    else:
        fuel_price = pd.DataFrame(columns=FUEL_PRICE_COLUMNS)
    path = values.inputs.carbon_price
    carbon_price = pd.DataFrame(
        {
            "year": list(policy.years),
            "carbon_price_per_tco2": policy.budget_carbon_price_per_tco2
            + policy.cap_carbon_price_per_tco2
            + path,
            "from_budget_per_tco2": policy.budget_carbon_price_per_tco2,
            "from_cap_per_tco2": policy.cap_carbon_price_per_tco2,
            "from_path_per_tco2": path,
        }
    )
    return electricity_price, fuel_price, carbon_price


# -------------------------------------------------------------------------------------------------------- lcoe
def lcoe_table(
    values: SolutionValues, capacity: pd.DataFrame, electricity: pd.DataFrame, fuel_price: pd.DataFrame
) -> pd.DataFrame:
    """``lcoe`` [currency/MWh] of each generator's new build in each year, at its realised capacity factor, from the
    ``capacity``, ``electricity`` and ``fuel_price`` tables."""
    technologies = {t.name: t for t in values.inputs.technologies}
    cap_lookup = capacity.set_index(["technology", "year"])["capacity_mw"]
    fuel_price_lookup = (
        fuel_price.set_index(["commodity", "year"])["price_per_gj"] if len(fuel_price) else None
    )
    gen_yearly = electricity[electricity["kind"] == "generator"].set_index(["technology", "year"])
    rows = []
    for name in values.dispatch.generators:
        t = technologies[name]
        for yi, year in enumerate(values.dispatch.years):
            energy_twh = gen_yearly.loc[(name, year), "generation_twh"]
            cap_mw = cap_lookup.loc[(name, year)]
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
            rows.append((name, year, fixed_per_mwh + t.variable_om * 1000.0 + fuel_per_mwh, factor))
    return pd.DataFrame(rows, columns=LCOE_COLUMNS)


# ------------------------------------------------------------------------------------------------- flexibility
ONLINE_CAPACITY_COLUMNS = ["year", "day", "hour", "technology", "online_mw", "generation_mw", "min_output_mw"]
RESERVE_PROVISION_COLUMNS = ["year", "day", "hour", "technology", "reserve_mw"]


def flexibility_tables(values: SolutionValues) -> dict[str, pd.DataFrame]:
    """The tables of a run with operating limits or an operating reserve (none otherwise): ``online_capacity``
    [MW] of every generator with operating limits per representative hour, with its output and minimum output;
    ``operating_reserve`` per representative hour (requirement, reserve held, shortfall [MW] and the price of
    holding reserve [currency/MW per hour]) and ``reserve_provision`` [MW] by holder, when the scenario asks for an
    operating reserve."""
    flexibility = values.flexibility
    if flexibility is None or not flexibility.active:
        return {}
    index = _hourly_index(values)

    def by_technology(
        names: tuple[str, ...], columns: dict[str, np.ndarray], order: list[str]
    ) -> pd.DataFrame:
        frames = [
            index.assign(
                technology=name, **{key: (array[i] * 1000).ravel() for key, array in columns.items()}
            )
            for i, name in enumerate(names)
        ]
        return _concat(frames, order)[order] if frames else pd.DataFrame(columns=order)

    minimum = np.asarray(flexibility.min_stable_output, dtype=float).reshape(-1, 1, 1, 1)
    tables = {
        "online_capacity": by_technology(
            flexibility.online_generators,
            {
                "online_mw": flexibility.online_gw,
                "generation_mw": flexibility.generation_gw,
                "min_output_mw": minimum * flexibility.online_gw,
            },
            ONLINE_CAPACITY_COLUMNS,
        )
    }
    if flexibility.reserve_required:
        provided = (
            flexibility.reserve_gw.sum(axis=0)
            if len(flexibility.reserve_gw)
            else 0.0 * flexibility.shortfall_gw
        )
        tables["operating_reserve"] = index.assign(
            requirement_mw=(flexibility.requirement_gw * 1000).ravel(),
            provided_mw=(provided * 1000).ravel(),
            shortfall_mw=(flexibility.shortfall_gw * 1000).ravel(),
            price_per_mw_hour=flexibility.reserve_price_per_mw_hour.ravel(),
        )
        tables["reserve_provision"] = by_technology(
            flexibility.reserve_holders, {"reserve_mw": flexibility.reserve_gw}, RESERVE_PROVISION_COLUMNS
        )
    return tables


# ------------------------------------------------------------------------------------------------ calibration
CALIBRATION_COLUMNS = [
    "quantity",
    "subject",
    "unit",
    "statistic",
    "model",
    "difference",
    "relative_difference",
    "source",
]
_FUEL_USES = ("power_input", "conversion_input", "final_use")


def base_year_calibration_table(
    values: SolutionValues,
    electricity: pd.DataFrame,
    fuel_flows: pd.DataFrame,
    emissions_total: pd.DataFrame,
) -> pd.DataFrame:
    """``base_year_calibration``: each base-year statistic of the scenario beside the model's base-year value, in
    its unit (generation TWh/yr, fuel use PJ/yr, emissions MtCO2/yr), the difference (model - statistic) and the
    relative difference (difference / statistic; NaN for a statistic of 0). Empty without statistics."""
    statistics = values.inputs.base_year_statistics
    if not statistics:
        return pd.DataFrame(columns=CALIBRATION_COLUMNS)
    base = int(values.inputs.years[0])
    generation = electricity[(electricity["year"] == base)].groupby("technology")["generation_twh"].sum()
    flows = fuel_flows[(fuel_flows["year"] == base) & fuel_flows["role"].isin(_FUEL_USES)]
    fuel_use = flows.groupby("commodity")["energy_pj"].sum()
    emissions = float(emissions_total.loc[emissions_total["year"] == base, "emissions_mtco2"].sum())
    rows = []
    for statistic in statistics:
        if statistic.quantity == "generation":
            model = float(generation.get(statistic.subject, 0.0))
        elif statistic.quantity == "fuel_use":
            model = float(fuel_use.get(statistic.subject, 0.0))
        else:
            model = emissions
        difference = model - statistic.value
        relative = difference / statistic.value if statistic.value > 0 else np.nan
        rows.append(
            (
                statistic.quantity,
                statistic.subject,
                statistic.unit + "/yr",
                statistic.value,
                model,
                difference,
                relative,
                statistic.source,
            )
        )
    return pd.DataFrame(rows, columns=CALIBRATION_COLUMNS)


# ----------------------------------------------------------------------------------------------- entry points
def tables_from_values(values: SolutionValues) -> dict[str, pd.DataFrame]:
    """Every result table of a run (the names of :mod:`pathcast.results.run_result`) from its read-back values."""
    capacity, storage_energy = capacity_tables(values)
    electricity, electricity_hourly = electricity_tables(values, capacity)
    fuel_flows, fuel_supply, fuel_demand = fuel_tables(values)
    emissions, emissions_total = emissions_tables(values)
    electricity_price, fuel_price, carbon_price = price_tables(values)
    extension = {"extension_constraints": extension_table(values)} if values.extension_rows else {}
    calibration = (
        {
            "base_year_calibration": base_year_calibration_table(
                values, electricity, fuel_flows, emissions_total
            )
        }
        if values.inputs.base_year_statistics
        else {}
    )
    recovery, vintages = cost_recovery_tables(values)
    return {
        "capacity": capacity,
        "storage_energy": storage_energy,
        "electricity": electricity,
        "electricity_hourly": electricity_hourly,
        "fuel_flows": fuel_flows,
        "fuel_supply": fuel_supply,
        "fuel_demand": fuel_demand,
        "emissions": emissions,
        "emissions_total": emissions_total,
        "costs": cost_table(values),
        "electricity_price": electricity_price,
        "fuel_price": fuel_price,
        "carbon_price": carbon_price,
        "lcoe": lcoe_table(values, capacity, electricity, fuel_price),
        **calibration,
        "capacity_price": capacity_price_table(values),
        "cost_recovery": recovery,
        "cost_recovery_vintages": vintages,
        **extension,
        **flexibility_tables(values),
    }


def extension_table(values: SolutionValues) -> pd.DataFrame:
    """The rows users' extensions added: bounds, value at the optimum, whether each binds and its dual [million
    currency of the price year, discounted, per unit of the row as written]."""
    columns = ["constraint", "index", "lower", "upper", "activity", "dual_million_per_unit", "binding"]
    return pd.DataFrame(list(values.extension_rows), columns=columns)


def extract_tables(model: PathwayModel, solution: Solution) -> dict[str, pd.DataFrame]:
    """Every result table of a solved run: reads the solution back through the model's families first."""
    return tables_from_values(read_solution(model, solution))


def headline_from_values(values: SolutionValues, tables: dict[str, pd.DataFrame]) -> dict:
    """The run's headline figures (summary.json) from its read-back values and its tables."""
    inputs = values.inputs
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
    return {
        "scenario": inputs.name,
        "currency": inputs.currency,
        "price_year": inputs.price_year,
        "base_year": int(inputs.years[0]),
        "final_year": final,
        "total_discounted_cost_million": float(costs["discounted_million"].sum()),
        "objective_million": values.objective_million,
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


def headline_figures(model: PathwayModel, solution: Solution, tables: dict[str, pd.DataFrame]) -> dict:
    """The run's headline figures (summary.json): reads the solution back through the model's families first."""
    return headline_from_values(read_solution(model, solution), tables)
