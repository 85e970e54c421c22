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

import numpy as np

from .context import BuildContext

__all__ = [
    "add_dispatch",
    "add_electricity_balance",
    "add_pooled_output",
    "available_output",
    "generation_values",
]


def add_dispatch(ctx: BuildContext) -> None:
    lp, Y, D, H = ctx.lp, ctx.Y, ctx.D, ctx.H
    gens = ctx.dispatched_generators
    G = len(gens)
    generation = lp.add_variables("generation", ("technology", "year", "day", "hour"), (G, Y, D, H), "GW")
    ctx.blocks["generation"] = generation
    unserved = lp.add_variables("unserved", ("year", "day", "hour"), (Y, D, H), "GW")
    ctx.blocks["unserved"] = unserved

    if G:
        limit = lp.add_rows(
            "generation_limit", ("technology", "year", "day", "hour"), (G, Y, D, H), "<=", "GW"
        )
        rows = limit.local()
        limit.add(rows, generation.all(), 1.0)
        availability = np.stack([t.availability for t in gens])  # [G, D, H]
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
        curtailment = lp.add_variables("curtailment", ("year", "day", "hour"), (Y, D, H), "GW")
        ctx.blocks["curtailment"] = curtailment
        limit = lp.add_rows("curtailment_limit", ("year", "day", "hour"), (Y, D, H), "<=", "GW")
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
            coef * np.broadcast_to(t.availability[None], rows.shape),
        )


def add_electricity_balance(ctx: BuildContext) -> None:
    """Supply = demand in every representative hour [GW]; added after storage and converters exist."""
    lp = ctx.lp
    shape = (ctx.Y, ctx.D, ctx.H)
    balance = lp.add_rows(
        "electricity_balance",
        ("year", "day", "hour"),
        shape,
        "==",
        "GW",
        rhs=ctx.inputs.electricity_demand_gw,
    )
    rows = balance.local()
    generation = ctx.blocks["generation"].all()
    for g in range(generation.shape[0]):
        balance.add(rows, generation[g], 1.0)
    if ctx.pooled_generators:
        add_pooled_output(ctx, balance, rows, 1.0)
        balance.add(rows, ctx.blocks["curtailment"].all(), -1.0)
    balance.add(rows, ctx.blocks["unserved"].all(), 1.0)
    if "discharge" in ctx.blocks:
        for k in range(ctx.blocks["discharge"].shape[0]):
            balance.add(rows, ctx.blocks["discharge"].all()[k], 1.0)
            balance.add(rows, ctx.blocks["charge"].all()[k], -1.0)
    if "converter_power" in ctx.blocks:
        for c in range(ctx.blocks["converter_power"].shape[0]):
            balance.add(rows, ctx.blocks["converter_power"].all()[c], -1.0)


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
    dispatched = x[ctx.blocks["generation"].all()]
    for i, t in enumerate(ctx.dispatched_generators):
        out[position[t.name]] = dispatched[i]
    if ctx.pooled_generators:
        potential = available_output(ctx, ctx.pooled_generators, x)
        total = potential.sum(axis=0)
        curtailed = np.clip(x[ctx.blocks["curtailment"].all()], 0.0, None)
        kept = np.where(total > 0, 1.0 - np.minimum(curtailed, total) / np.where(total > 0, total, 1.0), 0.0)
        for p, t in enumerate(ctx.pooled_generators):
            out[position[t.name]] = np.clip(potential[p] * kept, 0.0, None)
    return out
