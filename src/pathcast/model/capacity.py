"""Capacity: yearly builds, capacity in service, lifetimes, build limits, potentials and phase-outs; investment and
fixed O&M costs.

Capacity in service C[t,y] may stay below what is installed (existing fleet still before its retirement year plus
builds still inside their lifetime): that is early retirement. It can only grow through new builds, so retired
capacity never returns: C[t,y] <= C[t,y-1] + N[t,y].
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import present
from .context import BuildContext, read_only
from .names import (
    CAPACITY,
    CAPACITY_INSTALLED,
    CAPACITY_NO_RETURN,
    ENERGY_CAPACITY,
    ENERGY_CAPACITY_INSTALLED,
    ENERGY_CAPACITY_NO_RETURN,
    ENERGY_NEW,
    NEW,
    STORAGE_DURATION_MAX,
    STORAGE_DURATION_MIN,
)

__all__ = ["add_capacity", "read_capacity", "CapacityValues"]

# (builds, capacity in service, installed rows, no-return rows) of the two fleets
_POWER_FLEET = (NEW, CAPACITY, CAPACITY_INSTALLED, CAPACITY_NO_RETURN)
_ENERGY_FLEET = (ENERGY_NEW, ENERGY_CAPACITY, ENERGY_CAPACITY_INSTALLED, ENERGY_CAPACITY_NO_RETURN)


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
    names: tuple[str, str, str, str],
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
    build_name, service_name, installed_name, no_return_name = names
    build = lp.add_variables(
        build_name,
        ("technology", "year"),
        (T, Y),
        unit_power + "/yr",
        lower=lower_build,
        upper=upper_build,
    )
    service = lp.add_variables(service_name, ("technology", "year"), (T, Y), unit_power, upper=upper_total)
    ctx.blocks[build_name] = build
    ctx.blocks[service_name] = service

    installed = lp.add_rows(installed_name, ("technology", "year"), (T, Y), "<=", unit_power, rhs=existing)
    rows = installed.local()
    installed.add(rows, service.all(), 1.0)
    for i, t in enumerate(techs):
        y, b = _alive_pairs(Y, t.lifetime)
        installed.add(rows[i, y], build.columns(i, b), -1.0)

    if Y > 1:
        no_return = lp.add_rows(no_return_name, ("technology", "year"), (T, Y - 1), "<=", unit_power)
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
        _POWER_FLEET,
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
            _ENERGY_FLEET,
            np.array([t.existing_energy_gwh for t in storage]),
            0.0,
            np.inf,
            upper_total,
            np.array([t.energy_capex for t in storage]),
            np.array([t.energy_fixed_om for t in storage]),
            "GWh",
        )
        power = ctx.capacity_columns(storage)
        energy = ctx.blocks[ENERGY_CAPACITY].all()
        with_max = [i for i, t in enumerate(storage) if np.isfinite(t.max_duration_h)]
        if with_max:
            rows = ctx.lp.add_rows(
                STORAGE_DURATION_MAX, ("technology", "year"), (len(with_max), Y), "<=", "GWh"
            )
            r = rows.local()
            rows.add(r, energy[with_max], 1.0)
            rows.add(r, power[with_max], -np.array([[storage[i].max_duration_h] for i in with_max]))
        with_min = [i for i, t in enumerate(storage) if t.min_duration_h > 0]
        if with_min:
            rows = ctx.lp.add_rows(
                STORAGE_DURATION_MIN, ("technology", "year"), (len(with_min), Y), ">=", "GWh"
            )
            r = rows.local()
            rows.add(r, energy[with_min], 1.0)
            rows.add(r, power[with_min], -np.array([[storage[i].min_duration_h] for i in with_min]))


@dataclass(frozen=True)
class CapacityValues:
    """The capacity family's solution: the fleet of every technology by year, the storage energy fleet, and the
    yearly investment and fixed O&M costs it adds to the objective (undiscounted)."""

    technologies: tuple[str, ...]  # every technology, in scenario order (rows of the [T, Y] arrays)
    kinds: tuple[str, ...]  # "generator", "storage" or "converter", per technology
    years: tuple[int, ...]  # modelled years (columns)
    capacity_gw: np.ndarray  # [T, Y] capacity in service [GW]
    new_gw: np.ndarray  # [T, Y] new builds [GW/yr]
    retired_gw: np.ndarray  # [T, Y] capacity leaving service in the year (end of life or early) [GW]
    installed_gw: (
        np.ndarray
    )  # [T, Y] existing fleet before its retirement year + builds inside their lifetime [GW]
    storage_technologies: tuple[str, ...]  # rows of the [S, Y] storage energy arrays
    energy_capacity_gwh: np.ndarray  # [S, Y] storage energy capacity in service [GWh]
    energy_new_gwh: np.ndarray  # [S, Y] new storage energy capacity [GWh/yr]
    investment_million: (
        np.ndarray
    )  # [Y] investment annuities of builds in service, power and energy [million/yr]
    fixed_om_million: np.ndarray  # [Y] fixed O&M of capacity in service, power and energy [million/yr]


def read_capacity(ctx: BuildContext, x: np.ndarray) -> CapacityValues:
    """The capacity family's values from the primal values ``x`` (LP column order)."""
    techs, Y = ctx.capacity_techs, ctx.Y
    capacity = ctx.column_values(CAPACITY, x)  # [T, Y] GW
    new = ctx.column_values(NEW, x)
    installed = np.zeros_like(capacity)
    annuity = np.zeros(Y)
    for i, t in enumerate(techs):
        y, b = _alive_pairs(Y, t.lifetime)
        np.add.at(installed[i], y, new[i, b])
        installed[i] += t.existing_gw
        np.add.at(annuity, y, new[i, b] * t.capex[b] * t.crf)
    previous = np.empty_like(capacity)  # capacity in service the year before [GW]
    previous[:, 0] = [t.existing_gw[0] for t in techs]
    previous[:, 1:] = capacity[:, :-1]
    retired = np.maximum(previous + new - capacity, 0.0)
    fixed = (capacity * np.array([[t.fixed_om] for t in techs])).sum(axis=0) if techs else np.zeros(Y)
    if ctx.storage:
        energy_new = ctx.column_values(ENERGY_NEW, x)
        energy_capacity = ctx.column_values(ENERGY_CAPACITY, x)
        for k, t in enumerate(ctx.storage):
            y, b = _alive_pairs(Y, t.lifetime)
            np.add.at(annuity, y, energy_new[k, b] * present(t.energy_capex)[b] * t.crf)
            fixed += energy_capacity[k] * t.energy_fixed_om
    else:
        energy_new = energy_capacity = np.zeros((0, Y))
    return CapacityValues(
        technologies=tuple(t.name for t in techs),
        kinds=tuple(t.kind for t in techs),
        years=tuple(int(year) for year in ctx.inputs.years),
        capacity_gw=read_only(capacity),
        new_gw=read_only(new),
        retired_gw=read_only(retired),
        installed_gw=read_only(installed),
        storage_technologies=tuple(t.name for t in ctx.storage),
        energy_capacity_gwh=read_only(energy_capacity),
        energy_new_gwh=read_only(energy_new),
        investment_million=read_only(annuity),
        fixed_om_million=read_only(fixed),
    )
