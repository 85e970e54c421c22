"""Fuels: supply per year, fuel burned in power plants, converters (electrolysers draw electricity in the hours they
run; fuel-to-fuel converters run on a yearly basis), deliveries to final demand, and a yearly balance per fuel.

Energy flows of fuels are in PJ/yr. Hourly electricity drawn over a year is sum_d w_d sum_h P [GWh] x 0.0036 PJ/GWh.
The yearly balance lets a fuel made in one hour be used in another within the year: fuel storage within the year is
assumed available at no cost (documented simplification).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import PJ_PER_GW_YEAR, PJ_PER_GWH, present
from .context import BuildContext, read_only
from .names import (
    CONVERTER_INPUT,
    CONVERTER_INPUT_LIMIT,
    CONVERTER_POWER,
    CONVERTER_POWER_LIMIT,
    DELIVERY,
    FUEL_BALANCE,
    FUEL_DEMAND,
    FUEL_USE,
    FUEL_USE_DEFINITION,
    GENERATION,
    SUPPLY,
    UNSERVED_FUEL,
)

__all__ = ["add_fuels", "read_fuels", "FuelValues"]


def add_fuels(ctx: BuildContext) -> None:
    lp, inputs, Y, D, H = ctx.lp, ctx.inputs, ctx.Y, ctx.D, ctx.H
    fuels = list(inputs.fuels)
    fuel_index = {f: i for i, f in enumerate(fuels)}
    hw = ctx.hour_weight  # [Y, D, H] hours of the year per representative hour

    # --- fuel burned by power plants [PJ/yr] -------------------------------------------------------------------
    burners = ctx.fuel_generators
    gen_pos = {t.name: i for i, t in enumerate(ctx.dispatched_generators)}  # fuel burners are never pooled
    fuel_use = lp.add_variables(FUEL_USE, ("technology", "year"), (len(burners), Y), "PJ/yr")
    ctx.blocks[FUEL_USE] = fuel_use
    if burners:
        rows = lp.add_rows(FUEL_USE_DEFINITION, ("technology", "year"), (len(burners), Y), "==", "PJ/yr")
        r = rows.local()
        rows.add(r, fuel_use.all(), 1.0)
        generation = ctx.blocks[GENERATION].all()
        for i, t in enumerate(burners):
            coef = -hw * PJ_PER_GWH / t.efficiency
            rows.add(np.broadcast_to(r[i][:, None, None], (Y, D, H)), generation[gen_pos[t.name]], coef)

    # --- converters ----------------------------------------------------------------------------------------------
    electric = ctx.electric_converters
    power = lp.add_variables(
        CONVERTER_POWER, ("technology", "year", "day", "hour"), (len(electric), Y, D, H), "GW"
    )
    ctx.blocks[CONVERTER_POWER] = power
    if electric:
        shape = (len(electric), Y, D, H)
        rows = lp.add_rows(CONVERTER_POWER_LIMIT, ("technology", "year", "day", "hour"), shape, "<=", "GW")
        r = rows.local()
        rows.add(r, power.all(), 1.0)
        availability = np.stack([present(t.availability) for t in electric])
        capacity = ctx.capacity_columns(electric)
        rows.add(
            r,
            np.broadcast_to(capacity[:, :, None, None], shape),
            -np.broadcast_to(availability[:, None], shape),
        )
        vom = np.array([t.variable_om for t in electric])
        lp.add_cost(power.all(), vom[:, None, None, None] * ctx.hour_cost_weight[None])

    fuel_conv = ctx.fuel_converters
    conv_input = lp.add_variables(CONVERTER_INPUT, ("technology", "year"), (len(fuel_conv), Y), "PJ/yr")
    ctx.blocks[CONVERTER_INPUT] = conv_input
    if fuel_conv:
        rows = lp.add_rows(CONVERTER_INPUT_LIMIT, ("technology", "year"), (len(fuel_conv), Y), "<=", "PJ/yr")
        r = rows.local()
        rows.add(r, conv_input.all(), 1.0)
        capacity = ctx.capacity_columns(fuel_conv)
        avail = np.array([[t.converter_availability * PJ_PER_GW_YEAR] for t in fuel_conv])
        rows.add(r, capacity, -np.broadcast_to(avail, capacity.shape))
        vom_per_pj = np.array(
            [[t.variable_om / PJ_PER_GWH] for t in fuel_conv]
        )  # [million/GWh] -> [million/PJ]
        lp.add_cost(conv_input.all(), vom_per_pj * ctx.discount[None, :])

    # --- supplies ------------------------------------------------------------------------------------------------
    supplies = inputs.supplies
    supply = lp.add_variables(
        SUPPLY,
        ("supply", "year"),
        (len(supplies), Y),
        "PJ/yr",
        upper=np.array([s.potential_pj for s in supplies]).reshape(len(supplies), Y),
    )
    ctx.blocks[SUPPLY] = supply
    for i, s in enumerate(supplies):
        lp.add_cost(supply.all()[i], s.price * ctx.discount)

    # --- final demand for fuels ------------------------------------------------------------------------------------
    demands = inputs.fuel_demands
    pairs = [(i, fuel_index[c]) for i, d in enumerate(demands) for c in d.served_by]
    ctx.delivery_pairs = pairs
    delivery = lp.add_variables(DELIVERY, ("pair", "year"), (len(pairs), Y), "PJ/yr")
    unserved_fuel = lp.add_variables(UNSERVED_FUEL, ("demand", "year"), (len(demands), Y), "PJ/yr")
    ctx.blocks.update({DELIVERY: delivery, UNSERVED_FUEL: unserved_fuel})
    if demands:
        rows = lp.add_rows(
            FUEL_DEMAND,
            ("demand", "year"),
            (len(demands), Y),
            "==",
            "PJ/yr",
            rhs=np.array([d.demand_pj for d in demands]),
        )
        r = rows.local()
        for p, (d, _c) in enumerate(pairs):
            rows.add(r[d], delivery.all()[p], 1.0)
        rows.add(r, unserved_fuel.all(), 1.0)
        lp.add_cost(unserved_fuel.all(), inputs.value_of_unserved_fuel * ctx.discount[None, :])

    # --- yearly balance per fuel: supply + conversion output >= burned + conversion input + delivered -----------
    if fuels:
        balance = lp.add_rows(FUEL_BALANCE, ("fuel", "year"), (len(fuels), Y), ">=", "PJ/yr")
        r = balance.local()
        for i, s in enumerate(supplies):
            balance.add(r[fuel_index[s.output]], supply.all()[i], 1.0)
        for i, t in enumerate(burners):
            balance.add(r[fuel_index[present(t.fuel)]], fuel_use.all()[i], -1.0)
        for i, t in enumerate(electric):
            out = np.broadcast_to(r[fuel_index[present(t.output)]][:, None, None], (Y, D, H))
            balance.add(out, power.all()[i], t.efficiency * hw * PJ_PER_GWH)
        for i, t in enumerate(fuel_conv):
            balance.add(r[fuel_index[present(t.output)]], conv_input.all()[i], t.efficiency)
            balance.add(r[fuel_index[present(t.input)]], conv_input.all()[i], -1.0)
        for p, (_d, c) in enumerate(pairs):
            balance.add(r[c], delivery.all()[p], -1.0)


@dataclass(frozen=True)
class FuelValues:
    """The fuels family's solution: supplies, fuel burned in power plants, converters, deliveries to final demand,
    the costs it adds to the objective (undiscounted) and the yearly fuel prices from the fuel balance duals."""

    commodities: tuple[str, ...]  # fuels, in scenario order (rows of fuel_price_per_gj)
    years: tuple[int, ...]
    # supplies (rows of the [S, Y] arrays)
    supplies: tuple[str, ...]
    supply_commodities: tuple[str, ...]  # the fuel each supply delivers
    supply_origins: tuple[str, ...]  # "domestic", "import", ... as given in the scenario
    supply_pj: np.ndarray  # [S, Y] fuel supplied [PJ/yr]
    supply_price_per_gj: np.ndarray  # [S, Y] price paid for the supply [currency/GJ]
    # generators that burn fuel (rows of fuel_use_pj)
    burners: tuple[str, ...]
    burner_fuels: tuple[str, ...]
    fuel_use_pj: np.ndarray  # [B, Y] fuel burned [PJ/yr]
    # converters drawing electricity in the hours they run (rows of the [C, ...] arrays)
    electric_converters: tuple[str, ...]
    electric_converter_outputs: tuple[str, ...]  # the fuel each one makes
    converter_power_gw: np.ndarray  # [C, Y, D, H] electricity drawn [GW]
    electric_conversion_output_pj: np.ndarray  # [C, Y] fuel made [PJ/yr]
    # converters from one fuel to another, run on a yearly basis (rows of the [K, Y] arrays)
    fuel_converters: tuple[str, ...]
    fuel_converter_inputs: tuple[str, ...]  # the fuel each one takes
    fuel_converter_outputs: tuple[str, ...]  # the fuel each one makes
    converter_input_pj: np.ndarray  # [K, Y] fuel taken [PJ/yr]
    fuel_conversion_output_pj: np.ndarray  # [K, Y] fuel made [PJ/yr]
    # final fuel demand: one delivery per (demand, fuel) pair that may serve it (rows of delivery_pj)
    delivery_demands: tuple[str, ...]
    delivery_commodities: tuple[str, ...]
    delivery_pj: np.ndarray  # [P, Y] fuel delivered to final demand [PJ/yr]
    demands: tuple[str, ...]  # rows of unserved_fuel_pj
    unserved_fuel_pj: np.ndarray  # [N, Y] final fuel demand not served [PJ/yr]
    # costs and prices
    converter_variable_om_million: (
        np.ndarray
    )  # [C + K, Y] electric converters, then fuel converters [million/yr]
    fuel_cost_million: np.ndarray  # [Y] all supplies at their prices [million/yr]
    unserved_fuel_cost_million: np.ndarray  # [Y] unserved fuel at its value [million/yr]
    fuel_price_per_gj: np.ndarray  # [F, Y] undiscounted dual of the fuel balance [currency/GJ]


def read_fuels(ctx: BuildContext, x: np.ndarray, row_dual: np.ndarray) -> FuelValues:
    """The fuels family's values from the primal values ``x`` (LP column order) and the row duals ``row_dual``
    (LP row order)."""
    inputs, Y, hw = ctx.inputs, ctx.Y, ctx.hour_weight
    fuels = list(inputs.fuels)
    supplies, demands = inputs.supplies, inputs.fuel_demands
    electric, fuel_conv = ctx.electric_converters, ctx.fuel_converters
    supply = ctx.column_values(SUPPLY, x)  # [S, Y] PJ/yr
    power = ctx.column_values(CONVERTER_POWER, x)  # [C, Y, D, H] GW
    conv_input = ctx.column_values(CONVERTER_INPUT, x)  # [K, Y] PJ/yr
    unserved_fuel = ctx.column_values(UNSERVED_FUEL, x)
    electric_output = np.zeros((len(electric), Y))
    variable_om = np.zeros((len(electric) + len(fuel_conv), Y))
    for c, t in enumerate(electric):
        drawn_gwh = (power[c] * hw).sum(axis=(1, 2))
        electric_output[c] = t.efficiency * drawn_gwh * PJ_PER_GWH
        variable_om[c] = t.variable_om * drawn_gwh
    fuel_output = np.zeros((len(fuel_conv), Y))
    for c, t in enumerate(fuel_conv):
        fuel_output[c] = t.efficiency * conv_input[c]
        variable_om[len(electric) + c] = t.variable_om / PJ_PER_GWH * conv_input[c]
    fuel_cost = sum((supply[i] * s.price for i, s in enumerate(supplies)), np.zeros(Y))
    unserved_cost = (
        inputs.value_of_unserved_fuel * unserved_fuel.sum(axis=0) if unserved_fuel.size else np.zeros(Y)
    )
    if fuels:
        price = ctx.row_values(FUEL_BALANCE, row_dual) / ctx.discount[None, :]
    else:
        price = np.zeros((0, Y))
    return FuelValues(
        commodities=tuple(fuels),
        years=tuple(int(year) for year in inputs.years),
        supplies=tuple(s.name for s in supplies),
        supply_commodities=tuple(s.output for s in supplies),
        supply_origins=tuple(s.origin for s in supplies),
        supply_pj=read_only(supply),
        supply_price_per_gj=read_only(
            np.array([np.broadcast_to(s.price, (Y,)) for s in supplies], dtype=float).reshape(
                len(supplies), Y
            )
        ),
        burners=tuple(t.name for t in ctx.fuel_generators),
        burner_fuels=tuple(present(t.fuel) for t in ctx.fuel_generators),
        fuel_use_pj=read_only(ctx.column_values(FUEL_USE, x)),
        electric_converters=tuple(t.name for t in electric),
        electric_converter_outputs=tuple(present(t.output) for t in electric),
        converter_power_gw=read_only(power),
        electric_conversion_output_pj=read_only(electric_output),
        fuel_converters=tuple(t.name for t in fuel_conv),
        fuel_converter_inputs=tuple(present(t.input) for t in fuel_conv),
        fuel_converter_outputs=tuple(present(t.output) for t in fuel_conv),
        converter_input_pj=read_only(conv_input),
        fuel_conversion_output_pj=read_only(fuel_output),
        delivery_demands=tuple(demands[d].name for d, _c in ctx.delivery_pairs),
        delivery_commodities=tuple(fuels[c] for _d, c in ctx.delivery_pairs),
        delivery_pj=read_only(ctx.column_values(DELIVERY, x)),
        demands=tuple(d.name for d in demands),
        unserved_fuel_pj=read_only(unserved_fuel),
        converter_variable_om_million=read_only(variable_om),
        fuel_cost_million=read_only(fuel_cost),
        unserved_fuel_cost_million=read_only(unserved_cost),
        fuel_price_per_gj=read_only(price),
    )
