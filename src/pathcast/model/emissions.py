"""Emissions [MtCO2/yr], counted once where fossil carbon is burned: in power plants for the fuel they burn, in final
use for the fuel delivered to final demand, plus any process emissions of converters. Fuel turned into another fuel is
not combustion. Emission factors [tCO2/GJ] equal [MtCO2/PJ]."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import PJ_PER_GWH, present
from .context import BuildContext, read_only
from .names import CONVERTER_INPUT, CONVERTER_POWER, DELIVERY, EMISSIONS, EMISSIONS_DEFINITION, FUEL_USE

__all__ = ["add_emissions", "read_emissions", "EmissionsValues"]


def add_emissions(ctx: BuildContext) -> None:
    lp, inputs, Y = ctx.lp, ctx.inputs, ctx.Y
    ef = inputs.emission_factor
    emissions = lp.add_variables(EMISSIONS, ("year",), (Y,), "MtCO2/yr")
    ctx.blocks[EMISSIONS] = emissions
    rows = lp.add_rows(EMISSIONS_DEFINITION, ("year",), (Y,), "==", "MtCO2/yr")
    r = rows.local()
    rows.add(r, emissions.all(), 1.0)
    for i, t in enumerate(ctx.fuel_generators):
        fuel = present(t.fuel)
        if ef.get(fuel, 0.0):
            rows.add(r, ctx.blocks[FUEL_USE].all()[i], -ef[fuel])
    fuels = list(inputs.fuels)
    for p, (_d, c) in enumerate(ctx.delivery_pairs):
        if ef.get(fuels[c], 0.0):
            rows.add(r, ctx.blocks[DELIVERY].all()[p], -ef[fuels[c]])
    for i, t in enumerate(ctx.fuel_converters):
        if t.process_emission_factor:
            rows.add(r, ctx.blocks[CONVERTER_INPUT].all()[i], -t.process_emission_factor * t.efficiency)
    for i, t in enumerate(ctx.electric_converters):
        if t.process_emission_factor:
            coef = -t.process_emission_factor * t.efficiency * ctx.hour_weight * PJ_PER_GWH
            rows.add(
                np.broadcast_to(r[:, None, None], coef.shape), ctx.blocks[CONVERTER_POWER].all()[i], coef
            )
    # a carbon price path [currency/tCO2] = [million currency / MtCO2]
    lp.add_cost(emissions.all(), inputs.carbon_price * ctx.discount)


@dataclass(frozen=True)
class EmissionsValues:
    """The emissions family's solution: total emissions by year, the same split by source, and the carbon price
    path's cost it adds to the objective (undiscounted)."""

    years: tuple[int, ...]
    total_mtco2: np.ndarray  # [Y] emissions [MtCO2/yr]
    sources: tuple[
        str, ...
    ]  # each emitting source (rows of by_source_mtco2): a technology, or "demand (fuel)"
    sectors: tuple[str, ...]  # "power", "final use" or "conversion", per source
    by_source_mtco2: np.ndarray  # [E, Y] emissions of each source [MtCO2/yr]; rows sum to total_mtco2
    carbon_price_cost_million: np.ndarray  # [Y] emissions at the scenario's carbon price path [million/yr]


def read_emissions(ctx: BuildContext, x: np.ndarray) -> EmissionsValues:
    """The emissions family's values from the primal values ``x`` (LP column order); sources in the order the
    emissions rows count them (power plants, final use, fuel converters, electric converters)."""
    inputs, Y = ctx.inputs, ctx.Y
    ef = inputs.emission_factor
    fuels = list(inputs.fuels)
    fuel_use = ctx.column_values(FUEL_USE, x)
    delivery = ctx.column_values(DELIVERY, x)
    conv_input = ctx.column_values(CONVERTER_INPUT, x)
    conv_power = ctx.column_values(CONVERTER_POWER, x)
    parts: list[tuple[str, str, np.ndarray]] = []
    for i, t in enumerate(ctx.fuel_generators):
        fuel = present(t.fuel)
        if ef.get(fuel, 0.0):
            parts.append((t.name, "power", fuel_use[i] * ef[fuel]))
    for p, (d, c) in enumerate(ctx.delivery_pairs):
        if ef.get(fuels[c], 0.0):
            parts.append(
                (f"{inputs.fuel_demands[d].name} ({fuels[c]})", "final use", delivery[p] * ef[fuels[c]])
            )
    for c, t in enumerate(ctx.fuel_converters):
        if t.process_emission_factor:
            parts.append((t.name, "conversion", conv_input[c] * t.efficiency * t.process_emission_factor))
    for c, t in enumerate(ctx.electric_converters):
        if t.process_emission_factor:
            drawn_gwh = (conv_power[c] * ctx.hour_weight).sum(axis=(1, 2))
            parts.append(
                (t.name, "conversion", t.efficiency * drawn_gwh * PJ_PER_GWH * t.process_emission_factor)
            )
    total = ctx.column_values(EMISSIONS, x)
    return EmissionsValues(
        years=tuple(int(year) for year in inputs.years),
        total_mtco2=read_only(total),
        sources=tuple(name for name, _sector, _values in parts),
        sectors=tuple(sector for _name, sector, _values in parts),
        by_source_mtco2=read_only(
            np.array([values for _name, _sector, values in parts], dtype=float).reshape(len(parts), Y)
        ),
        carbon_price_cost_million=read_only(total * inputs.carbon_price),
    )
