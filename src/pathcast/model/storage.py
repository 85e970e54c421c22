"""Storage: charge, discharge and state of charge in every representative hour, cyclic within each day; power and
energy capacities sized separately (see capacity)."""

from __future__ import annotations

import numpy as np

from .context import BuildContext

__all__ = ["add_storage"]


def add_storage(ctx: BuildContext) -> None:
    storage = ctx.storage
    if not storage:
        return
    lp, Y, D, H = ctx.lp, ctx.Y, ctx.D, ctx.H
    S = len(storage)
    shape = (S, Y, D, H)
    dims = ("technology", "year", "day", "hour")
    charge = lp.add_variables("charge", dims, shape, "GW")
    discharge = lp.add_variables("discharge", dims, shape, "GW")
    state = lp.add_variables("state_of_charge", dims, shape, "GWh")
    ctx.blocks.update(charge=charge, discharge=discharge, state_of_charge=state)

    power = np.broadcast_to(ctx.capacity_columns(storage)[:, :, None, None], shape)
    energy = np.broadcast_to(ctx.blocks["energy_capacity"].all()[:, :, None, None], shape)
    for name, block in (("charge_limit", charge), ("discharge_limit", discharge)):
        rows = lp.add_rows(name, dims, shape, "<=", "GW")
        r = rows.local()
        rows.add(r, block.all(), 1.0)
        rows.add(r, power, -1.0)
    rows = lp.add_rows("state_of_charge_limit", dims, shape, "<=", "GWh")
    r = rows.local()
    rows.add(r, state.all(), 1.0)
    rows.add(r, energy, -1.0)

    # S[h] = S[h-1] + eta_c Q[h] - P[h] / eta_d, with S[-1] = S[23] of the same day (cyclic), one hour per step
    eta_c = np.array([t.charge_efficiency for t in storage])[:, None, None, None]
    eta_d = np.array([t.discharge_efficiency for t in storage])[:, None, None, None]
    rows = lp.add_rows("state_of_charge_balance", dims, shape, "==", "GWh")
    r = rows.local()
    rows.add(r, state.all(), 1.0)
    rows.add(r, np.roll(state.all(), 1, axis=3), -1.0)
    rows.add(r, charge.all(), -np.broadcast_to(eta_c, shape))
    rows.add(r, discharge.all(), np.broadcast_to(1.0 / eta_d, shape))

    vom = np.array([t.variable_om for t in storage])
    lp.add_cost(discharge.all(), vom[:, None, None, None] * ctx.hour_cost_weight[None])
