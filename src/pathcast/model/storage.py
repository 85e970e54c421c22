"""Storage: charge, discharge and state of charge in every representative hour, cyclic within each day; power and
energy capacities sized separately (see capacity)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .context import BuildContext, read_only
from .names import (
    CHARGE,
    CHARGE_LIMIT,
    DISCHARGE,
    DISCHARGE_LIMIT,
    ENERGY_CAPACITY,
    STATE_OF_CHARGE,
    STATE_OF_CHARGE_BALANCE,
    STATE_OF_CHARGE_LIMIT,
)

__all__ = ["add_storage", "read_storage", "StorageValues"]


def add_storage(ctx: BuildContext) -> None:
    storage = ctx.storage
    if not storage:
        return
    lp, Y, D, H = ctx.lp, ctx.Y, ctx.D, ctx.H
    S = len(storage)
    shape = (S, Y, D, H)
    dims = ("technology", "year", "day", "hour")
    charge = lp.add_variables(CHARGE, dims, shape, "GW")
    discharge = lp.add_variables(DISCHARGE, dims, shape, "GW")
    state = lp.add_variables(STATE_OF_CHARGE, dims, shape, "GWh")
    ctx.blocks.update({CHARGE: charge, DISCHARGE: discharge, STATE_OF_CHARGE: state})

    power = np.broadcast_to(ctx.capacity_columns(storage)[:, :, None, None], shape)
    energy = np.broadcast_to(ctx.blocks[ENERGY_CAPACITY].all()[:, :, None, None], shape)
    for name, block in ((CHARGE_LIMIT, charge), (DISCHARGE_LIMIT, discharge)):
        rows = lp.add_rows(name, dims, shape, "<=", "GW")
        r = rows.local()
        rows.add(r, block.all(), 1.0)
        rows.add(r, power, -1.0)
    rows = lp.add_rows(STATE_OF_CHARGE_LIMIT, dims, shape, "<=", "GWh")
    r = rows.local()
    rows.add(r, state.all(), 1.0)
    rows.add(r, energy, -1.0)

    # S[h] = S[h-1] + eta_c Q[h] - P[h] / eta_d, with S[-1] = S[23] of the same day (cyclic), one hour per step
    eta_c = np.array([t.charge_efficiency for t in storage])[:, None, None, None]
    eta_d = np.array([t.discharge_efficiency for t in storage])[:, None, None, None]
    rows = lp.add_rows(STATE_OF_CHARGE_BALANCE, dims, shape, "==", "GWh")
    r = rows.local()
    rows.add(r, state.all(), 1.0)
    rows.add(r, np.roll(state.all(), 1, axis=3), -1.0)
    rows.add(r, charge.all(), -np.broadcast_to(eta_c, shape))
    rows.add(r, discharge.all(), np.broadcast_to(1.0 / eta_d, shape))

    vom = np.array([t.variable_om for t in storage])
    lp.add_cost(discharge.all(), vom[:, None, None, None] * ctx.hour_cost_weight[None])


@dataclass(frozen=True)
class StorageValues:
    """The storage family's solution: hourly charge, discharge and state of charge of every storage technology, and
    the variable O&M it adds to the objective (undiscounted). Power and energy capacities are in
    :class:`~pathcast.model.capacity.CapacityValues`."""

    technologies: tuple[str, ...]  # storage technologies, in scenario order (rows of the [S, ...] arrays)
    years: tuple[int, ...]
    charge_gw: np.ndarray  # [S, Y, D, H] electricity drawn [GW]
    discharge_gw: np.ndarray  # [S, Y, D, H] electricity delivered [GW]
    state_of_charge_gwh: np.ndarray  # [S, Y, D, H] energy stored at the end of the hour [GWh]
    variable_om_million: np.ndarray  # [S, Y] variable O&M on discharge [million/yr]


def read_storage(ctx: BuildContext, x: np.ndarray) -> StorageValues:
    """The storage family's values from the primal values ``x`` (LP column order); empty arrays with no storage."""
    storage, hw = ctx.storage, ctx.hour_weight
    if storage:
        charge = ctx.column_values(CHARGE, x)
        discharge = ctx.column_values(DISCHARGE, x)
        state = ctx.column_values(STATE_OF_CHARGE, x)
    else:
        charge = discharge = state = np.zeros((0, ctx.Y, ctx.D, ctx.H))
    variable_om = np.zeros((len(storage), ctx.Y))
    for k, t in enumerate(storage):
        variable_om[k] = t.variable_om * (discharge[k] * hw).sum(axis=(1, 2))
    return StorageValues(
        technologies=tuple(t.name for t in storage),
        years=tuple(int(year) for year in ctx.inputs.years),
        charge_gw=read_only(charge),
        discharge_gw=read_only(discharge),
        state_of_charge_gwh=read_only(state),
        variable_om_million=read_only(variable_om),
    )
