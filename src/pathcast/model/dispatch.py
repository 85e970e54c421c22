"""Hourly dispatch in the representative days: generator output within availability x capacity, unserved energy at
the value of lost load, and the electricity balance of every representative hour.

Generators that burn no fuel and cost nothing per MWh (wind, solar, run-of-river, geothermal as usually entered) are
*pooled*: each offers availability x capacity in every hour, and one curtailment variable per hour, at most the pooled
output of that hour, takes away what the system cannot use. Curtailing any of them is free, so which one is curtailed
does not change the optimum; pooling removes one output variable and one limit row per pooled generator and hour (a
quarter of the rows of the national benchmark). Results split an hour's curtailment over the pooled generators in
proportion to their available output (:func:`generation_values`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import present
from .context import BuildContext, read_only
from .names import (
    CHARGE,
    CONVERTER_POWER,
    CURTAILMENT,
    CURTAILMENT_LIMIT,
    DISCHARGE,
    ELECTRICITY_BALANCE,
    GENERATION,
    GENERATION_LIMIT,
    UNSERVED,
)

__all__ = [
    "add_dispatch",
    "add_electricity_balance",
    "add_pooled_output",
    "available_output",
    "generation_values",
    "read_dispatch",
    "DispatchValues",
]


def add_dispatch(ctx: BuildContext) -> None:
    lp, Y, D, H = ctx.lp, ctx.Y, ctx.D, ctx.H
    gens = ctx.dispatched_generators
    G = len(gens)
    generation = lp.add_variables(GENERATION, ("technology", "year", "day", "hour"), (G, Y, D, H), "GW")
    ctx.blocks[GENERATION] = generation
    unserved = lp.add_variables(UNSERVED, ("year", "day", "hour"), (Y, D, H), "GW")
    ctx.blocks[UNSERVED] = unserved

    if G:
        limit = lp.add_rows(GENERATION_LIMIT, ("technology", "year", "day", "hour"), (G, Y, D, H), "<=", "GW")
        rows = limit.local()
        limit.add(rows, generation.all(), 1.0)
        availability = np.stack([present(t.availability) for t in gens])  # [G, D, H]
        capacity = ctx.capacity_columns(gens)  # [G, Y]
        limit.add(
            rows,
            np.broadcast_to(capacity[:, :, None, None], rows.shape),
            -np.broadcast_to(availability[:, None, :, :], rows.shape),
        )
        vom = np.array([t.variable_om for t in gens])
        lp.add_cost(generation.all(), vom[:, None, None, None] * ctx.hour_cost_weight[None])
    lp.add_cost(unserved.all(), ctx.inputs.value_of_lost_load * ctx.hour_cost_weight)

    if ctx.pooled_generators:
        # curtailment [GW] <= sum over pooled generators of availability x capacity, every hour
        curtailment = lp.add_variables(CURTAILMENT, ("year", "day", "hour"), (Y, D, H), "GW")
        ctx.blocks[CURTAILMENT] = curtailment
        limit = lp.add_rows(CURTAILMENT_LIMIT, ("year", "day", "hour"), (Y, D, H), "<=", "GW")
        rows = limit.local()
        limit.add(rows, curtailment.all(), 1.0)
        add_pooled_output(ctx, limit, rows, -1.0)


def add_pooled_output(
    ctx: BuildContext, block, rows: np.ndarray, coef: np.ndarray | float, years: np.ndarray | None = None
) -> None:
    """Add coef x availability x capacity of every pooled generator to ``rows`` [years, D, H] of ``block``
    (all years unless ``years`` gives their positions); ``coef`` broadcasts against ``rows``."""
    capacity = ctx.capacity_columns(ctx.pooled_generators)  # [P, Y]
    if years is not None:
        capacity = capacity[:, years]
    for p, t in enumerate(ctx.pooled_generators):
        block.add(
            rows,
            np.broadcast_to(capacity[p][:, None, None], rows.shape),
            coef * np.broadcast_to(present(t.availability)[None], rows.shape),
        )


def add_electricity_balance(ctx: BuildContext) -> None:
    """Supply = demand in every representative hour [GW]; added after storage and converters exist."""
    lp = ctx.lp
    shape = (ctx.Y, ctx.D, ctx.H)
    balance = lp.add_rows(
        ELECTRICITY_BALANCE,
        ("year", "day", "hour"),
        shape,
        "==",
        "GW",
        rhs=ctx.inputs.electricity_demand_gw,
    )
    rows = balance.local()
    generation = ctx.blocks[GENERATION].all()
    for g in range(generation.shape[0]):
        balance.add(rows, generation[g], 1.0)
    if ctx.pooled_generators:
        add_pooled_output(ctx, balance, rows, 1.0)
        balance.add(rows, ctx.blocks[CURTAILMENT].all(), -1.0)
    balance.add(rows, ctx.blocks[UNSERVED].all(), 1.0)
    if DISCHARGE in ctx.blocks:
        for k in range(ctx.blocks[DISCHARGE].shape[0]):
            balance.add(rows, ctx.blocks[DISCHARGE].all()[k], 1.0)
            balance.add(rows, ctx.blocks[CHARGE].all()[k], -1.0)
    if CONVERTER_POWER in ctx.blocks:
        for c in range(ctx.blocks[CONVERTER_POWER].shape[0]):
            balance.add(rows, ctx.blocks[CONVERTER_POWER].all()[c], -1.0)


def available_output(ctx: BuildContext, techs: list, x: np.ndarray) -> np.ndarray:
    """Availability x capacity [GW] of the given generators, [len(techs), Y, D, H], from the primal values ``x``."""
    if not techs:
        return np.zeros((0, ctx.Y, ctx.D, ctx.H))
    capacity = x[ctx.capacity_columns(techs)]  # [T, Y]
    availability = np.stack([t.availability for t in techs])  # [T, D, H]
    return capacity[:, :, None, None] * availability[:, None, :, :]


def generation_values(ctx: BuildContext, x: np.ndarray) -> np.ndarray:
    """Output [GW] of every generator in ``ctx.generators`` order, [G, Y, D, H], from the primal values ``x``.

    A pooled generator's output is its available output less its share of the hour's curtailment, shared in
    proportion to available output."""
    out = np.zeros((len(ctx.generators), ctx.Y, ctx.D, ctx.H))
    position = {t.name: g for g, t in enumerate(ctx.generators)}
    dispatched = ctx.column_values(GENERATION, x)
    for i, t in enumerate(ctx.dispatched_generators):
        out[position[t.name]] = dispatched[i]
    if ctx.pooled_generators:
        potential = available_output(ctx, ctx.pooled_generators, x)
        total = potential.sum(axis=0)
        curtailed = np.clip(ctx.column_values(CURTAILMENT, x), 0.0, None)
        kept = np.where(total > 0, 1.0 - np.minimum(curtailed, total) / np.where(total > 0, total, 1.0), 0.0)
        for p, t in enumerate(ctx.pooled_generators):
            out[position[t.name]] = np.clip(potential[p] * kept, 0.0, None)
    return out


@dataclass(frozen=True)
class DispatchValues:
    """The dispatch family's solution: hourly output of every generator, unserved electricity, curtailment, the
    costs the family adds to the objective (undiscounted) and the hourly electricity price from the balance duals."""

    generators: tuple[str, ...]  # every generator, in scenario order (rows of the [G, ...] arrays)
    years: tuple[int, ...]
    days: tuple[str, ...]  # representative days
    hours: tuple[int, ...]  # hours of a representative day, 0..H-1
    hour_weight: np.ndarray  # [Y, D, H] hours of the year each representative hour stands for [h]
    generation_gw: np.ndarray  # [G, Y, D, H] output [GW] (pooled generators' curtailment shared out)
    curtailed_twh: (
        np.ndarray
    )  # [G, Y] available less used output of generators with no fuel or running cost [TWh]
    unserved_gw: np.ndarray  # [Y, D, H] electricity demand not served [GW]
    variable_om_million: np.ndarray  # [G, Y] variable O&M of each generator [million/yr]
    unserved_cost_million: np.ndarray  # [Y] unserved electricity at the value of lost load [million/yr]
    electricity_price_per_mwh: (
        np.ndarray
    )  # [Y, D, H] undiscounted dual of the electricity balance [currency/MWh]


def read_dispatch(ctx: BuildContext, x: np.ndarray, row_dual: np.ndarray) -> DispatchValues:
    """The dispatch family's values from the primal values ``x`` (LP column order) and the row duals ``row_dual``
    (LP row order)."""
    inputs, hw = ctx.inputs, ctx.hour_weight
    generation = generation_values(ctx, x)  # [G, Y, D, H] GW
    curtailed = np.zeros((len(ctx.generators), ctx.Y))
    free = [(g, t) for g, t in enumerate(ctx.generators) if t.fuel is None and t.variable_om == 0.0]
    if free:
        available = available_output(ctx, [t for _, t in free], x)  # [F, Y, D, H] GW
        for i, (g, _t) in enumerate(free):
            curtailed[g] = np.maximum(((available[i] - generation[g]) * hw).sum(axis=(1, 2)) / 1000.0, 0.0)
    variable_om = np.zeros((len(ctx.generators), ctx.Y))
    for g, t in enumerate(ctx.generators):
        variable_om[g] = t.variable_om * (generation[g] * hw).sum(axis=(1, 2))
    unserved = ctx.column_values(UNSERVED, x)
    balance = ctx.row_values(
        ELECTRICITY_BALANCE, row_dual
    )  # [million / GW per representative hour], discounted
    price = balance * 1000.0 / (inputs.day_weights[None, :, None] * ctx.discount[:, None, None])
    return DispatchValues(
        generators=tuple(t.name for t in ctx.generators),
        years=tuple(int(year) for year in inputs.years),
        days=tuple(inputs.day_names),
        hours=tuple(range(ctx.H)),
        hour_weight=read_only(hw),
        generation_gw=read_only(generation),
        curtailed_twh=read_only(curtailed),
        unserved_gw=read_only(unserved),
        variable_om_million=read_only(variable_om),
        unserved_cost_million=read_only(inputs.value_of_lost_load * (unserved * hw).sum(axis=(1, 2))),
        electricity_price_per_mwh=read_only(price),
    )
