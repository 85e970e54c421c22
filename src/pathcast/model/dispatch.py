"""Hourly dispatch in the representative days: generator output within availability x capacity, unserved energy at
the value of lost load, and the electricity balance of every representative hour."""

from __future__ import annotations

import numpy as np

from .context import BuildContext

__all__ = ["add_dispatch", "add_electricity_balance"]


def add_dispatch(ctx: BuildContext) -> None:
    lp, Y, D, H = ctx.lp, ctx.Y, ctx.D, ctx.H
    gens = ctx.generators
    G = len(gens)
    generation = lp.add_variables("generation", ("technology", "year", "day", "hour"), (G, Y, D, H), "GW")
    ctx.blocks["generation"] = generation
    unserved = lp.add_variables("unserved", ("year", "day", "hour"), (Y, D, H), "GW")
    ctx.blocks["unserved"] = unserved

    if G:
        limit = lp.add_rows("generation_limit", ("technology", "year", "day", "hour"), (G, Y, D, H), "<=", "GW")
        rows = limit.local()
        limit.add(rows, generation.all(), 1.0)
        availability = np.stack([t.availability for t in gens])  # [G, D, H]
        capacity = ctx.capacity_columns(gens)  # [G, Y]
        limit.add(rows, np.broadcast_to(capacity[:, :, None, None], rows.shape),
                  -np.broadcast_to(availability[:, None, :, :], rows.shape))
        vom = np.array([t.variable_om for t in gens])
        lp.add_cost(generation.all(), vom[:, None, None, None] * ctx.hour_cost_weight[None])
    lp.add_cost(unserved.all(), ctx.inputs.value_of_lost_load * ctx.hour_cost_weight)


def add_electricity_balance(ctx: BuildContext) -> None:
    """Supply = demand in every representative hour [GW]; added after storage and converters exist."""
    lp = ctx.lp
    shape = (ctx.Y, ctx.D, ctx.H)
    balance = lp.add_rows("electricity_balance", ("year", "day", "hour"), shape, "==", "GW",
                          rhs=ctx.inputs.electricity_demand_gw)
    rows = balance.local()
    generation = ctx.blocks["generation"].all()
    for g in range(generation.shape[0]):
        balance.add(rows, generation[g], 1.0)
    balance.add(rows, ctx.blocks["unserved"].all(), 1.0)
    if "discharge" in ctx.blocks:
        for k in range(ctx.blocks["discharge"].shape[0]):
            balance.add(rows, ctx.blocks["discharge"].all()[k], 1.0)
            balance.add(rows, ctx.blocks["charge"].all()[k], -1.0)
    if "converter_power" in ctx.blocks:
        for c in range(ctx.blocks["converter_power"].shape[0]):
            balance.add(rows, ctx.blocks["converter_power"].all()[c], -1.0)
