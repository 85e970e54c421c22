"""What each technology earns and pays, read back from the solution and its duals: the raw material of the cost
recovery table (``pathcast.results.cost_recovery``).

By LP duality, at the optimum every unit of capacity in service is worth exactly its marginal value: the dual of its
"installed capacity" row (capacity in service <= existing fleet + builds alive), here turned into a value per kW and
year undiscounted to the year [currency/kW/yr]. For a vintage whose build is not at a limit (build-rate limits,
potential, phase-out, first build year), the reduced cost of the build is zero, so the discounted value of its
capacity over the years it is alive inside the horizon equals its discounted investment annuities: it recovers its
cost exactly (complementary slackness; any LP textbook, e.g. Bertsimas & Tsitsiklis, Introduction to Linear
Optimization, 1997, ch. 4, from memory). The value of capacity in turn is what it earns in the energy, capacity,
clean-share and fuel markets less its variable, fuel and carbon costs and its fixed O&M, which the results table
spells out from prices and quantities.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import present
from .capacity import growth_limit_binds, retirement_duals
from .context import BuildContext, read_only
from .names import (
    CAPACITY,
    CAPACITY_INSTALLED,
    CAPACITY_NO_RETURN,
    ENERGY_CAPACITY_INSTALLED,
    ENERGY_CAPACITY_NO_RETURN,
)

__all__ = ["CapacityValueValues", "read_capacity_value"]


@dataclass(frozen=True)
class CapacityValueValues:
    """Marginal value of capacity, by technology and year, from the duals of the capacity rows.

    With mu_y the dual of the installed row of year y (capacity in service - builds alive <= existing fleet) and nu_y
    that of the no-return row (capacity in service - last year's capacity - builds of the year <= 0), both <= 0:
    capacity in service in year y is worth (-mu_y - nu_y + nu_{y+1}) / DF_y per GW, which at the optimum equals what
    it earns less its fixed O&M wherever capacity in service is not at a bound; a build of year b is worth
    sum over its years alive of -mu_y, less nu_b (discounted), which equals its discounted annuities wherever the build
    is not at a limit (zero reduced cost)."""

    technologies: tuple[str, ...]  # every technology, capacity order
    years: tuple[int, ...]
    power_value_per_kw_year: np.ndarray  # [T, Y] value of one more kW in service in the year [currency/kW/yr]
    storage_technologies: tuple[str, ...]
    energy_value_per_kwh_year: np.ndarray  # [S, Y] value of one more kWh of storage energy [currency/kWh/yr]
    build_value_per_kw: (
        np.ndarray
    )  # [T, Y] discounted value of a kW built in the year [currency/kW, base-year money]
    energy_build_value_per_kwh: np.ndarray  # [S, Y] the same per kWh of storage energy
    annuity_per_kw: np.ndarray  # [T, Y] investment annuity of a kW built in the year [currency/kW/yr]
    energy_annuity_per_kwh: np.ndarray  # [S, Y] the same per kWh of storage energy [currency/kWh/yr]
    # [T, Y] True where a build-growth limit holds the build of the year (model.capacity.growth_limit_binds)
    build_held_by_growth: np.ndarray | None = None


def _fleet_values(ctx: BuildContext, row_dual: np.ndarray, installed: str, no_return: str, techs) -> tuple:
    """(value in service per unit and year [undiscounted], value of a build per unit [discounted]) of one fleet."""
    T, Y, df = len(techs), ctx.Y, ctx.discount
    if not T:
        return np.zeros((0, Y)), np.zeros((0, Y))
    mu = ctx.row_values(installed, row_dual).reshape(T, Y)
    nu = np.zeros((T, Y + 1))  # nu[:, y] for y = 1..Y-1; zero at 0 and Y
    if no_return in ctx.lp.row_blocks:
        nu[:, 1:Y] = ctx.row_values(no_return, row_dual).reshape(T, Y - 1)
    in_service = (-mu - nu[:, :Y] + nu[:, 1:]) / df[None, :]
    build = np.zeros((T, Y))
    for i, t in enumerate(techs):
        cumulative = np.concatenate([[0.0], np.cumsum(-mu[i])])
        start = np.arange(Y)
        stop = np.minimum(start + t.lifetime, Y)
        build[i] = cumulative[stop] - cumulative[start] - nu[i, :Y]
    return in_service, build


def read_capacity_value(ctx: BuildContext, row_dual: np.ndarray) -> CapacityValueValues:
    """Values of capacity from the duals ``row_dual`` (LP row order, million currency discounted per unit of row;
    [million/GW] = [currency/kW])."""
    techs, storage = ctx.capacity_techs, ctx.storage
    power, build = _fleet_values(ctx, row_dual, CAPACITY_INSTALLED, CAPACITY_NO_RETURN, techs)
    # rows that keep capacity in service (base year, early-retirement limits) value it like the installed rows do
    rho, Y = retirement_duals(ctx, row_dual), ctx.Y
    power = power + (rho[:, :Y] - rho[:, 1:]) / ctx.discount[None, :]
    for i, t in enumerate(techs):
        build[i] += rho[i, :Y] - rho[i, np.minimum(np.arange(Y) + t.lifetime, Y)]
    # capacity held at a column bound (a potential, a phase-out) earns that bound's rent: its reduced cost
    matrix = ctx.lp.matrix()[0]
    reduced = ctx.lp.cost_vector() - matrix.T @ row_dual
    power = power - reduced[ctx.blocks[CAPACITY].all()] / ctx.discount[None, :]
    if storage and ENERGY_CAPACITY_INSTALLED in ctx.lp.row_blocks:
        energy, energy_build = _fleet_values(
            ctx, row_dual, ENERGY_CAPACITY_INSTALLED, ENERGY_CAPACITY_NO_RETURN, storage
        )
    else:
        energy = energy_build = np.zeros((len(storage), ctx.Y))
    annuity = np.array([t.capex * t.crf for t in techs]).reshape(len(techs), ctx.Y)
    energy_annuity = np.array([present(t.energy_capex) * t.crf for t in storage]).reshape(len(storage), ctx.Y)
    return CapacityValueValues(
        technologies=tuple(t.name for t in techs),
        years=tuple(int(y) for y in ctx.inputs.years),
        power_value_per_kw_year=read_only(power),
        storage_technologies=tuple(t.name for t in storage),
        energy_value_per_kwh_year=read_only(energy),
        build_value_per_kw=read_only(build),
        energy_build_value_per_kwh=read_only(energy_build),
        annuity_per_kw=read_only(annuity),
        energy_annuity_per_kwh=read_only(energy_annuity),
        build_held_by_growth=read_only(growth_limit_binds(ctx, row_dual)),
    )
