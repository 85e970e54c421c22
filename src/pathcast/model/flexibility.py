"""Operating flexibility: minimum stable output and ramp limits of generators through an online (committed) capacity
per hour, and an hourly upward operating reserve held by online generators and storage.

The linear relaxation of clustered unit commitment (a fleet's on/off decisions summed into one continuous online
capacity: Palmintier & Webster (2011), IEEE PES General Meeting, doi:10.1109/PES.2011.6038963, secondary), with no
start-up or no-load costs and no minimum up or down times. For a generator g with operating limits, in every
representative hour [GW]:

* online capacity:  0 <= U[h] <= a[h] x C            (availability x capacity in service)
* output:           m x U[h] <= P[h] and P[h] + R[h] <= U[h]   (m: min_stable_output; R: reserve it holds)
* ramps, with r the ramp rate and the hour before h cyclic within the representative day (like storage):
      P[h] - P[h-1] <= r x U[h] + m x (U[h] - U[h-1])
      P[h-1] - P[h] <= r x U[h-1] - m x (U[h] - U[h-1])
  Capacity that stays online moves by at most r of itself; capacity brought online may jump from 0 to its minimum
  output and capacity taken offline from its minimum output to 0 within the hour, so a minimum above the ramp rate
  never locks a fleet on or off. Without starts or stops the rows are the plain limit |P[h] - P[h-1]| <= r x U.
* reserve it can deliver within the hour: R[h] <= r x U[h].

Storage k holds reserve RS[h] <= power capacity - discharge + charge (it can stop charging and discharge fully) and
RS[h] x duration / discharge efficiency <= state of charge at the end of the hour. The operating reserve, in every
representative hour: sum R + sum RS + shortfall >= demand_share x demand + variable_renewable_share x sum over
generators with an hourly profile of a[h] x C; reserve not held is costed at the value of lost load per MW-hour.
Its dual is the price of holding 1 MW of upward reserve for one hour.

A scenario without operating limits or an operating reserve gets none of these blocks: its LP is unchanged.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import OperatingReserveInputs, present
from .context import BuildContext, read_only
from .names import (
    CHARGE,
    DISCHARGE,
    GENERATION,
    MIN_STABLE_OUTPUT,
    ONLINE_CAPACITY,
    ONLINE_CAPACITY_LIMIT,
    ONLINE_OUTPUT_LIMIT,
    OPERATING_RESERVE,
    RAMP_DOWN,
    RAMP_UP,
    RESERVE,
    RESERVE_RAMP_LIMIT,
    RESERVE_SHORTFALL,
    STATE_OF_CHARGE,
    STORAGE_RESERVE,
    STORAGE_RESERVE_ENERGY_LIMIT,
    STORAGE_RESERVE_POWER_LIMIT,
)

__all__ = ["add_flexibility", "read_flexibility", "FlexibilityValues"]

DIMS = ("technology", "year", "day", "hour")


def _generation_of(ctx: BuildContext, techs: list) -> np.ndarray:
    """Columns of the generation block [len(techs), Y, D, H] of the given dispatched generators."""
    position = {t.name: i for i, t in enumerate(ctx.dispatched_generators)}
    return ctx.blocks[GENERATION].all()[[position[t.name] for t in techs]]


def _previous_hour(columns: np.ndarray) -> np.ndarray:
    """The same columns one hour earlier, cyclic within each representative day (last axis: hour)."""
    return np.roll(columns, 1, axis=-1)


def add_flexibility(ctx: BuildContext) -> None:
    """Online capacity, minimum stable output and ramp rows of generators with operating limits, and the hourly
    operating reserve when the scenario asks for one; adds nothing otherwise."""
    online_techs, reserve = ctx.online_generators, ctx.inputs.operating_reserve
    reserve_held = _add_online_limits(ctx) if online_techs else None
    if reserve is not None:
        _add_operating_reserve(ctx, reserve_held, reserve)


def _add_online_limits(ctx: BuildContext):
    """Rows of the online generators; returns the reserve block of those that hold reserve (or None)."""
    lp, Y, D, H = ctx.lp, ctx.Y, ctx.D, ctx.H
    techs = ctx.online_generators
    shape = (len(techs), Y, D, H)
    online = lp.add_variables(ONLINE_CAPACITY, DIMS, shape, "GW")
    ctx.blocks[ONLINE_CAPACITY] = online
    U = online.all()
    P = _generation_of(ctx, techs)

    # U <= availability x capacity in service
    availability = np.stack([present(t.availability) for t in techs])[:, None, :, :]  # [G, 1, D, H]
    capacity = np.broadcast_to(ctx.capacity_columns(techs)[:, :, None, None], shape)
    rows = lp.add_rows(ONLINE_CAPACITY_LIMIT, DIMS, shape, "<=", "GW")
    r = rows.local()
    rows.add(r, U, 1.0)
    rows.add(r, capacity, -np.broadcast_to(availability, shape))

    # P + R <= U (R only for the generators that hold reserve)
    reserve_block = None
    if ctx.reserve_generators:
        reserve_block = lp.add_variables(RESERVE, DIMS, (len(ctx.reserve_generators), Y, D, H), "GW")
        ctx.blocks[RESERVE] = reserve_block
    rows = lp.add_rows(ONLINE_OUTPUT_LIMIT, DIMS, shape, "<=", "GW")
    r = rows.local()
    rows.add(r, P, 1.0)
    rows.add(r, U, -1.0)
    position = {t.name: i for i, t in enumerate(techs)}
    if reserve_block is not None:
        holders = [position[t.name] for t in ctx.reserve_generators]
        rows.add(r[holders], reserve_block.all(), 1.0)

    # m x U - P <= 0 for the generators with a minimum stable output
    stable = [i for i, t in enumerate(techs) if t.min_stable_output > 0]
    if stable:
        m = np.array([techs[i].min_stable_output for i in stable])[:, None, None, None]
        sub = (len(stable), Y, D, H)
        rows = lp.add_rows(MIN_STABLE_OUTPUT, DIMS, sub, "<=", "GW")
        r = rows.local()
        rows.add(r, U[stable], np.broadcast_to(m, sub))
        rows.add(r, P[stable], -1.0)

    # ramps of the generators with a ramp rate
    ramping = [i for i, t in enumerate(techs) if t.ramp_rate is not None]
    if ramping:
        sub = (len(ramping), Y, D, H)
        ramp = np.broadcast_to(np.array([techs[i].ramp_rate for i in ramping])[:, None, None, None], sub)
        m = np.broadcast_to(np.array([techs[i].min_stable_output for i in ramping])[:, None, None, None], sub)
        u_now, p_now = U[ramping], P[ramping]
        u_before, p_before = _previous_hour(u_now), _previous_hour(p_now)
        # P[h] - P[h-1] - (r + m) U[h] + m U[h-1] <= 0
        rows = lp.add_rows(RAMP_UP, DIMS, sub, "<=", "GW")
        r = rows.local()
        rows.add(r, p_now, 1.0)
        rows.add(r, p_before, -1.0)
        rows.add(r, u_now, -(ramp + m))
        rows.add(r, u_before, m)
        # P[h-1] - P[h] - (r + m) U[h-1] + m U[h] <= 0
        rows = lp.add_rows(RAMP_DOWN, DIMS, sub, "<=", "GW")
        r = rows.local()
        rows.add(r, p_before, 1.0)
        rows.add(r, p_now, -1.0)
        rows.add(r, u_before, -(ramp + m))
        rows.add(r, u_now, m)
        # reserve a ramp-limited generator can deliver within the hour: R <= r x U
        if reserve_block is not None:
            held = {t.name: i for i, t in enumerate(ctx.reserve_generators)}
            limited = [(held[techs[i].name], i, techs[i].ramp_rate) for i in ramping if techs[i].name in held]
            if limited:
                sub = (len(limited), Y, D, H)
                rows = lp.add_rows(RESERVE_RAMP_LIMIT, DIMS, sub, "<=", "GW")
                r = rows.local()
                rate = np.array([rate for _, _, rate in limited])[:, None, None, None]
                rows.add(r, reserve_block.all()[[k for k, _, _ in limited]], 1.0)
                rows.add(r, U[[i for _, i, _ in limited]], -np.broadcast_to(rate, sub))
    return reserve_block


def _add_operating_reserve(ctx: BuildContext, reserve_block, reserve: OperatingReserveInputs) -> None:
    lp, inputs, Y, D, H = ctx.lp, ctx.inputs, ctx.Y, ctx.D, ctx.H
    hourly = (Y, D, H)

    storage_block = None
    if ctx.reserve_storage:
        storage_techs = ctx.reserve_storage
        shape = (len(storage_techs), Y, D, H)
        storage_block = lp.add_variables(STORAGE_RESERVE, DIMS, shape, "GW")
        ctx.blocks[STORAGE_RESERVE] = storage_block
        position = {t.name: k for k, t in enumerate(ctx.storage)}
        ks = [position[t.name] for t in storage_techs]
        RS = storage_block.all()
        # RS + discharge - charge <= power capacity
        rows = lp.add_rows(STORAGE_RESERVE_POWER_LIMIT, DIMS, shape, "<=", "GW")
        r = rows.local()
        rows.add(r, RS, 1.0)
        rows.add(r, ctx.blocks[DISCHARGE].all()[ks], 1.0)
        rows.add(r, ctx.blocks[CHARGE].all()[ks], -1.0)
        rows.add(r, np.broadcast_to(ctx.capacity_columns(storage_techs)[:, :, None, None], shape), -1.0)
        # RS x duration / discharge efficiency <= state of charge at the end of the hour [GWh]
        rows = lp.add_rows(STORAGE_RESERVE_ENERGY_LIMIT, DIMS, shape, "<=", "GWh")
        r = rows.local()
        energy_per_gw = np.array([reserve.duration_h / t.discharge_efficiency for t in storage_techs])
        rows.add(r, RS, np.broadcast_to(energy_per_gw[:, None, None, None], shape))
        rows.add(r, ctx.blocks[STATE_OF_CHARGE].all()[ks], -1.0)

    shortfall = lp.add_variables(RESERVE_SHORTFALL, ("year", "day", "hour"), hourly, "GW")
    ctx.blocks[RESERVE_SHORTFALL] = shortfall
    lp.add_cost(shortfall.all(), inputs.value_of_lost_load * ctx.hour_cost_weight)

    rows = lp.add_rows(
        OPERATING_RESERVE,
        ("year", "day", "hour"),
        hourly,
        ">=",
        "GW",
        rhs=reserve.demand_share * inputs.electricity_demand_gw,
    )
    r = rows.local()
    rows.add(r, shortfall.all(), 1.0)
    for block in (reserve_block, storage_block):
        if block is not None:
            columns = block.all()
            for i in range(columns.shape[0]):
                rows.add(r, columns[i], 1.0)
    variable = [t for t in ctx.generators if t.variable_renewable]
    if reserve.variable_renewable_share > 0 and variable:
        capacity = ctx.capacity_columns(variable)  # [V, Y]
        for v, t in enumerate(variable):
            rows.add(
                r,
                np.broadcast_to(capacity[v][:, None, None], hourly),
                -reserve.variable_renewable_share * np.broadcast_to(present(t.availability)[None], hourly),
            )


@dataclass(frozen=True)
class FlexibilityValues:
    """The flexibility family's solution: online capacity and output of the generators with operating limits, the
    reserve each holder holds, the hourly requirement, shortfall and price, and the shortfall's cost (undiscounted).
    Empty arrays (and ``active`` False) for a run without operating limits or an operating reserve."""

    active: bool  # the run has operating limits or an operating reserve
    reserve_required: bool  # the scenario asks for an operating reserve
    online_generators: tuple[str, ...]  # rows of the [G, ...] arrays
    min_stable_output: tuple[float, ...]  # [share of online capacity] of each online generator
    online_gw: np.ndarray  # [G, Y, D, H] online (committed) capacity [GW]
    generation_gw: np.ndarray  # [G, Y, D, H] their output [GW]
    reserve_holders: tuple[str, ...]  # generators, then storage, holding reserve (rows of reserve_gw)
    reserve_gw: np.ndarray  # [R, Y, D, H] upward reserve held [GW]
    requirement_gw: np.ndarray  # [Y, D, H] reserve required [GW] (empty without a reserve)
    shortfall_gw: np.ndarray  # [Y, D, H] reserve not held [GW]
    reserve_price_per_mw_hour: (
        np.ndarray
    )  # [Y, D, H] undiscounted dual of the reserve row [currency/MW per hour]
    shortfall_cost_million: np.ndarray  # [Y] reserve not held at the value of lost load [million/yr]
    # [R, Y] what each holder earns at the reserve price: sum over hours of price x reserve x hours [million/yr];
    # with the energy revenue it makes a holder's operating margin (LP duality)
    reserve_revenue_million: np.ndarray


def read_flexibility(ctx: BuildContext, x: np.ndarray, row_dual: np.ndarray) -> FlexibilityValues:
    """The flexibility family's values from the primal values ``x`` (LP column order) and the row duals
    ``row_dual`` (LP row order). Reserve price [currency/MW per hour] = dual x 1000 / (w_d x discount factor), like the
    electricity price ([million/GW] = 1000 currency/MW; a representative hour stands for w_d hours)."""
    inputs, Y, D, H = ctx.inputs, ctx.Y, ctx.D, ctx.H
    empty = np.zeros((0, Y, D, H))
    online = ctx.online_generators
    online_gw = ctx.column_values(ONLINE_CAPACITY, x) if online else empty
    generation = x[_generation_of(ctx, online)] if online else empty
    parts, holders = [], []
    if RESERVE in ctx.blocks:
        parts.append(ctx.column_values(RESERVE, x))
        holders += [t.name for t in ctx.reserve_generators]
    if STORAGE_RESERVE in ctx.blocks:
        parts.append(ctx.column_values(STORAGE_RESERVE, x))
        holders += [t.name for t in ctx.reserve_storage]
    reserve_gw = np.concatenate(parts) if parts else empty
    reserve = inputs.operating_reserve
    if reserve is not None:
        requirement = reserve.demand_share * inputs.electricity_demand_gw
        variable = [t for t in ctx.generators if t.variable_renewable]
        if variable and reserve.variable_renewable_share > 0:
            capacity = x[ctx.capacity_columns(variable)]  # [V, Y]
            available = (
                capacity[:, :, None, None] * np.stack([present(t.availability) for t in variable])[:, None]
            )
            requirement = requirement + reserve.variable_renewable_share * available.sum(axis=0)
        shortfall = ctx.column_values(RESERVE_SHORTFALL, x)
        dual = ctx.row_values(OPERATING_RESERVE, row_dual)
        weight = inputs.day_weights[None, :, None] * ctx.discount[:, None, None]
        price = dual * 1000.0 / weight + 0.0  # + 0.0: a price of -0 shows as 0
        cost = inputs.value_of_lost_load * (shortfall * ctx.hour_weight).sum(axis=(1, 2))
        # [currency/MW per hour] x [GW] x [h] = 1000 currency -> / 1000 for million
        revenue = (price[None] * reserve_gw * ctx.hour_weight[None]).sum(axis=(2, 3)) / 1000.0
    else:
        requirement = shortfall = price = np.zeros((0, D, H))
        cost = np.zeros(Y)
        revenue = np.zeros((0, Y))
    return FlexibilityValues(
        active=bool(online) or reserve is not None,
        reserve_required=reserve is not None,
        online_generators=tuple(t.name for t in online),
        min_stable_output=tuple(float(t.min_stable_output) for t in online),
        online_gw=read_only(online_gw),
        generation_gw=read_only(generation),
        reserve_holders=tuple(holders),
        reserve_gw=read_only(reserve_gw),
        requirement_gw=read_only(requirement),
        shortfall_gw=read_only(shortfall),
        reserve_price_per_mw_hour=read_only(price),
        shortfall_cost_million=read_only(cost),
        reserve_revenue_million=read_only(revenue),
    )
