"""Capacity: yearly builds, capacity in service, lifetimes, build limits, potentials and phase-outs; investment and
fixed O&M costs.

Capacity in service C[t,y] may stay below what is installed (existing fleet still before its retirement year plus
builds still inside their lifetime): that is early retirement. It can only grow through new builds, so retired
capacity never returns: C[t,y] <= C[t,y-1] + N[t,y].
"""

from __future__ import annotations

import numpy as np

from .context import BuildContext

__all__ = ["add_capacity"]


def _alive_pairs(Y: int, lifetime: int) -> tuple[np.ndarray, np.ndarray]:
    """(service year, build year) index pairs with 0 <= y - b < lifetime."""
    y, b = np.nonzero(np.tril(np.ones((Y, Y), dtype=bool)) & ~np.tril(np.ones((Y, Y), dtype=bool), -lifetime))
    return y, b


def _annuity_weight(discount: np.ndarray, lifetime: int) -> np.ndarray:
    """Sum of discount factors over the in-horizon years a build of each year is alive: sum_{y=b}^{min(b+L-1, Y-1)} DF_y."""
    Y = len(discount)
    cumulative = np.concatenate([[0.0], np.cumsum(discount)])
    start = np.arange(Y)
    stop = np.minimum(start + lifetime, Y)
    return cumulative[stop] - cumulative[start]


def _add_fleet(
    ctx: BuildContext,
    techs,
    prefix: str,
    existing,
    lower_build,
    upper_build,
    upper_total,
    capex,
    fixed_om,
    unit_power: str,
) -> None:
    lp, Y = ctx.lp, ctx.Y
    T = len(techs)
    build = lp.add_variables(
        f"{prefix}new",
        ("technology", "year"),
        (T, Y),
        unit_power + "/yr",
        lower=lower_build,
        upper=upper_build,
    )
    service = lp.add_variables(
        f"{prefix}capacity", ("technology", "year"), (T, Y), unit_power, upper=upper_total
    )
    ctx.blocks[f"{prefix}new"] = build
    ctx.blocks[f"{prefix}capacity"] = service

    installed = lp.add_rows(
        f"{prefix}capacity_installed", ("technology", "year"), (T, Y), "<=", unit_power, rhs=existing
    )
    rows = installed.local()
    installed.add(rows, service.all(), 1.0)
    for i, t in enumerate(techs):
        y, b = _alive_pairs(Y, t.lifetime)
        installed.add(rows[i, y], build.columns(i, b), -1.0)

    if Y > 1:
        no_return = lp.add_rows(
            f"{prefix}capacity_no_return", ("technology", "year"), (T, Y - 1), "<=", unit_power
        )
        r = no_return.local()
        no_return.add(r, service.all()[:, 1:], 1.0)
        no_return.add(r, service.all()[:, :-1], -1.0)
        no_return.add(r, build.all()[:, 1:], -1.0)

    for i, t in enumerate(techs):
        lp.add_cost(build.all()[i], capex[i] * t.crf * _annuity_weight(ctx.discount, t.lifetime))
        lp.add_cost(service.all()[i], fixed_om[i] * ctx.discount)


def add_capacity(ctx: BuildContext) -> None:
    techs = ctx.capacity_techs
    stack = lambda attr: np.array([getattr(t, attr) for t in techs], dtype=float).reshape(len(techs), ctx.Y)  # noqa: E731
    _add_fleet(
        ctx,
        techs,
        "",
        stack("existing_gw"),
        stack("min_build_gw"),
        stack("max_build_gw"),
        stack("max_total_gw"),
        stack("capex"),
        np.array([t.fixed_om for t in techs]),
        "GW",
    )
    storage = ctx.storage
    if storage:
        Y = ctx.Y
        power_rows = np.array([ctx.position[t.name] for t in storage])
        # energy potential [GWh] = power potential x longest duration; with no longest duration it is unbounded
        # (no column bound at all, rather than a 1e6-hour stand-in that widens the bound range HiGHS scales for)
        max_power = stack("max_total_gw")[power_rows]
        duration = np.array([[t.max_duration_h] for t in storage])
        upper_total = np.where(
            np.isfinite(duration),
            max_power * np.where(np.isfinite(duration), duration, 0.0),
            np.where(max_power == 0.0, 0.0, np.inf),
        )
        _add_fleet(
            ctx,
            storage,
            "energy_",
            np.array([t.existing_energy_gwh for t in storage]),
            0.0,
            np.inf,
            upper_total,
            np.array([t.energy_capex for t in storage]),
            np.array([t.energy_fixed_om for t in storage]),
            "GWh",
        )
        power = ctx.capacity_columns(storage)
        energy = ctx.blocks["energy_capacity"].all()
        with_max = [i for i, t in enumerate(storage) if np.isfinite(t.max_duration_h)]
        if with_max:
            rows = ctx.lp.add_rows(
                "storage_duration_max", ("technology", "year"), (len(with_max), Y), "<=", "GWh"
            )
            r = rows.local()
            rows.add(r, energy[with_max], 1.0)
            rows.add(r, power[with_max], -np.array([[storage[i].max_duration_h] for i in with_max]))
        with_min = [i for i, t in enumerate(storage) if t.min_duration_h > 0]
        if with_min:
            rows = ctx.lp.add_rows(
                "storage_duration_min", ("technology", "year"), (len(with_min), Y), ">=", "GWh"
            )
            r = rows.local()
            rows.add(r, energy[with_min], 1.0)
            rows.add(r, power[with_min], -np.array([[storage[i].min_duration_h] for i in with_min]))
