"""Emissions [MtCO2/yr], counted once where fossil carbon is burned: in power plants for the fuel they burn, in final
use for the fuel delivered to final demand, plus any process emissions of converters. Fuel turned into another fuel is
not combustion. Emission factors [tCO2/GJ] equal [MtCO2/PJ]."""

from __future__ import annotations

import numpy as np

from ..scenario.inputs import PJ_PER_GWH
from .context import BuildContext

__all__ = ["add_emissions"]


def add_emissions(ctx: BuildContext) -> None:
    lp, inputs, Y = ctx.lp, ctx.inputs, ctx.Y
    ef = inputs.emission_factor
    emissions = lp.add_variables("emissions", ("year",), (Y,), "MtCO2/yr")
    ctx.blocks["emissions"] = emissions
    rows = lp.add_rows("emissions_definition", ("year",), (Y,), "==", "MtCO2/yr")
    r = rows.local()
    rows.add(r, emissions.all(), 1.0)
    for i, t in enumerate(ctx.fuel_generators):
        if ef.get(t.fuel, 0.0):
            rows.add(r, ctx.blocks["fuel_use"].all()[i], -ef[t.fuel])
    fuels = list(inputs.fuels)
    for p, (_d, c) in enumerate(ctx.delivery_pairs):
        if ef.get(fuels[c], 0.0):
            rows.add(r, ctx.blocks["delivery"].all()[p], -ef[fuels[c]])
    for i, t in enumerate(ctx.fuel_converters):
        if t.process_emission_factor:
            rows.add(r, ctx.blocks["converter_input"].all()[i], -t.process_emission_factor * t.efficiency)
    for i, t in enumerate(ctx.electric_converters):
        if t.process_emission_factor:
            coef = -t.process_emission_factor * t.efficiency * ctx.hour_weight * PJ_PER_GWH
            rows.add(
                np.broadcast_to(r[:, None, None], coef.shape), ctx.blocks["converter_power"].all()[i], coef
            )
    # a carbon price path [currency/tCO2] = [million currency / MtCO2]
    lp.add_cost(emissions.all(), inputs.carbon_price * ctx.discount)
