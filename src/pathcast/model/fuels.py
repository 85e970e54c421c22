"""Fuels: supply per year, fuel burned in power plants, converters (electrolysers draw electricity in the hours they
run; fuel-to-fuel converters run on a yearly basis), deliveries to final demand, and a yearly balance per fuel.

Energy flows of fuels are in PJ/yr. Hourly electricity drawn over a year is sum_d w_d sum_h P [GWh] x 0.0036 PJ/GWh.
The yearly balance lets a fuel made in one hour be used in another within the year: fuel storage within the year is
assumed available at no cost (documented simplification).
"""

from __future__ import annotations

import numpy as np

from ..scenario.inputs import PJ_PER_GW_YEAR, PJ_PER_GWH
from .context import BuildContext

__all__ = ["add_fuels"]


def add_fuels(ctx: BuildContext) -> None:
    lp, inputs, Y, D, H = ctx.lp, ctx.inputs, ctx.Y, ctx.D, ctx.H
    fuels = list(inputs.fuels)
    fuel_index = {f: i for i, f in enumerate(fuels)}
    hw = ctx.hour_weight  # [Y, D, H] hours of the year per representative hour

    # --- fuel burned by power plants [PJ/yr] -------------------------------------------------------------------
    burners = ctx.fuel_generators
    gen_pos = {t.name: i for i, t in enumerate(ctx.dispatched_generators)}  # fuel burners are never pooled
    fuel_use = lp.add_variables("fuel_use", ("technology", "year"), (len(burners), Y), "PJ/yr")
    ctx.blocks["fuel_use"] = fuel_use
    if burners:
        rows = lp.add_rows("fuel_use_definition", ("technology", "year"), (len(burners), Y), "==", "PJ/yr")
        r = rows.local()
        rows.add(r, fuel_use.all(), 1.0)
        generation = ctx.blocks["generation"].all()
        for i, t in enumerate(burners):
            coef = -hw * PJ_PER_GWH / t.efficiency
            rows.add(np.broadcast_to(r[i][:, None, None], (Y, D, H)), generation[gen_pos[t.name]], coef)

    # --- converters ----------------------------------------------------------------------------------------------
    electric = ctx.electric_converters
    power = lp.add_variables(
        "converter_power", ("technology", "year", "day", "hour"), (len(electric), Y, D, H), "GW"
    )
    ctx.blocks["converter_power"] = power
    if electric:
        shape = (len(electric), Y, D, H)
        rows = lp.add_rows("converter_power_limit", ("technology", "year", "day", "hour"), shape, "<=", "GW")
        r = rows.local()
        rows.add(r, power.all(), 1.0)
        availability = np.stack([t.availability for t in electric])
        capacity = ctx.capacity_columns(electric)
        rows.add(
            r,
            np.broadcast_to(capacity[:, :, None, None], shape),
            -np.broadcast_to(availability[:, None], shape),
        )
        vom = np.array([t.variable_om for t in electric])
        lp.add_cost(power.all(), vom[:, None, None, None] * ctx.hour_cost_weight[None])

    fuel_conv = ctx.fuel_converters
    conv_input = lp.add_variables("converter_input", ("technology", "year"), (len(fuel_conv), Y), "PJ/yr")
    ctx.blocks["converter_input"] = conv_input
    if fuel_conv:
        rows = lp.add_rows(
            "converter_input_limit", ("technology", "year"), (len(fuel_conv), Y), "<=", "PJ/yr"
        )
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
        "supply",
        ("supply", "year"),
        (len(supplies), Y),
        "PJ/yr",
        upper=np.array([s.potential_pj for s in supplies]).reshape(len(supplies), Y),
    )
    ctx.blocks["supply"] = supply
    for i, s in enumerate(supplies):
        lp.add_cost(supply.all()[i], s.price * ctx.discount)

    # --- final demand for fuels ------------------------------------------------------------------------------------
    demands = inputs.fuel_demands
    pairs = [(i, fuel_index[c]) for i, d in enumerate(demands) for c in d.served_by]
    ctx.delivery_pairs = pairs
    delivery = lp.add_variables("delivery", ("pair", "year"), (len(pairs), Y), "PJ/yr")
    unserved_fuel = lp.add_variables("unserved_fuel", ("demand", "year"), (len(demands), Y), "PJ/yr")
    ctx.blocks.update(delivery=delivery, unserved_fuel=unserved_fuel)
    if demands:
        rows = lp.add_rows(
            "fuel_demand",
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
        balance = lp.add_rows("fuel_balance", ("fuel", "year"), (len(fuels), Y), ">=", "PJ/yr")
        r = balance.local()
        for i, s in enumerate(supplies):
            balance.add(r[fuel_index[s.output]], supply.all()[i], 1.0)
        for i, t in enumerate(burners):
            balance.add(r[fuel_index[t.fuel]], fuel_use.all()[i], -1.0)
        for i, t in enumerate(electric):
            out = np.broadcast_to(r[fuel_index[t.output]][:, None, None], (Y, D, H))
            balance.add(out, power.all()[i], t.efficiency * hw * PJ_PER_GWH)
        for i, t in enumerate(fuel_conv):
            balance.add(r[fuel_index[t.output]], conv_input.all()[i], t.efficiency)
            balance.add(r[fuel_index[t.input]], conv_input.all()[i], -1.0)
        for p, (_d, c) in enumerate(pairs):
            balance.add(r[c], delivery.all()[p], -1.0)
