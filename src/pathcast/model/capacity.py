"""Capacity: yearly builds, capacity in service, lifetimes, build limits, potentials and phase-outs; investment and
fixed O&M costs; the starting year (committed projects, lead times) and the speed of change (build growth, early
retirement).

Capacity in service C[t,y] may stay below what is installed (existing fleet still before its retirement year plus
builds still inside their lifetime): that is early retirement. It can only grow through new builds, so retired
capacity never returns: C[t,y] <= C[t,y-1] + N[t,y].

The base year is the country as it is (unless ``metadata.new_builds_in_base_year``): its builds are the committed
projects of that year and nothing else, and its whole power fleet is in service (C = existing + committed, within
the potential; a row, so that its dual joins the value of capacity): no plant is retired early in it. The builds of the years of a technology's lead time are its committed
projects too. Committed projects are builds of their in-service year (lower bounds on N, above any other upper
bound).

Speed of change, both optional per technology:

* Build growth: N[t,y] <= seed + factor x N[t,y-1] + committed[t,y]. A limit on the yearly build rate (the size of
  the industry that makes, ships and installs a technology) rather than on the capacity in service: in the
  formative phase new energy technologies have grown exponentially, at about 26 %/yr (Kramer & Haigh (2009), No
  quick switch to low-carbon energy, Nature 462, 568-569; secondary), and in an exponential phase the yearly
  additions grow at the same rate as the stock; after it, growth turns linear (constant additions), which
  ``max_build_mw_per_year`` caps. A limit on capacity in service would instead let a technology with a large
  fleet add any amount in one year and would count retirements as negative growth. Growth and duration of
  historical scale-up are compared with scenarios in Wilson et al. (2013), Climatic Change 118, 381-395
  (secondary).
* Early retirement: stranded capacity E[t,y] = installed - C[t,y] grows by at most X a year:
  E[t,y] - E[t,y-1] <= X with E[t,-1] = 0, written on the columns as
  C[t,y-1] - C[t,y] + N[t,y] - N[t,y-L] <= X - (existing[t,y] - existing[t,y-1]). Vintages are not tracked, so
  which plant went early is left open; the volume retired early each year is what is limited.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import present
from .context import BuildContext, read_only
from .names import (
    BASE_YEAR_FLEET,
    BUILD_GROWTH_LIMIT,
    CAPACITY,
    CAPACITY_INSTALLED,
    CAPACITY_NO_RETURN,
    EARLY_RETIREMENT_LIMIT,
    ENERGY_CAPACITY,
    ENERGY_CAPACITY_INSTALLED,
    ENERGY_CAPACITY_NO_RETURN,
    ENERGY_NEW,
    NEW,
    STORAGE_DURATION_MAX,
    STORAGE_DURATION_MIN,
)

__all__ = ["add_capacity", "read_capacity", "CapacityValues", "retirement_duals", "growth_limit_binds"]

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


def _committed(t, attribute: str, Y: int) -> np.ndarray:
    """Committed projects of ``t`` by in-service year [GW/yr or GWh/yr] (zeros where it has none)."""
    values = getattr(t, attribute)
    return np.zeros(Y) if values is None else np.asarray(values, dtype=float)


def _build_allowed(t, years: np.ndarray) -> np.ndarray:
    """Years in which ``t`` may be built beyond its committed projects: from its earliest new year and its first
    build year, before its phase-out year."""
    allowed = np.ones(len(years), dtype=bool)
    if t.earliest_new_year is not None:
        allowed &= years >= t.earliest_new_year
    if t.first_build_year is not None:
        allowed &= years >= t.first_build_year
    if t.phase_out_year is not None:
        allowed &= years < t.phase_out_year
    return allowed


def _add_pace_limits(ctx: BuildContext, techs, committed: np.ndarray) -> None:
    """Build growth and early-retirement rows of the technologies that have them, and the base year's fleet in
    service (see the module docstring)."""
    lp, Y = ctx.lp, ctx.Y
    build, service = ctx.blocks[NEW].all(), ctx.blocks[CAPACITY].all()
    growing = [i for i, t in enumerate(techs) if t.build_growth_factor is not None]
    if growing and Y > 1:
        rows = lp.add_rows(
            BUILD_GROWTH_LIMIT,
            ("technology", "year"),
            (len(growing), Y - 1),
            "<=",
            "GW/yr",
            rhs=np.array([[techs[i].build_growth_seed_gw] for i in growing]) + committed[growing, 1:],
        )
        r = rows.local()
        rows.add(r, build[growing, 1:], 1.0)
        rows.add(r, build[growing, :-1], -np.array([[techs[i].build_growth_factor] for i in growing]))
    if not ctx.inputs.new_builds_in_base_year and techs:
        # the base year's fleet is in service as it is: C[t,0] >= existing + committed (N[t,0]), less what exceeds
        # the potential; on the columns -C[t,0] + N[t,0] <= allowance - existing[t,0]
        existing = np.array([t.existing_gw[0] for t in techs], dtype=float)
        potential = np.array([t.max_total_gw[0] for t in techs], dtype=float)
        allowance = np.maximum(existing + committed[:, 0] - potential, 0.0)
        rows = lp.add_rows(
            BASE_YEAR_FLEET, ("technology",), (len(techs),), "<=", "GW", rhs=allowance - existing
        )
        r = rows.local()
        rows.add(r, service[:, 0], -1.0)
        rows.add(r, build[:, 0], 1.0)
    limited = [i for i, t in enumerate(techs) if np.isfinite(t.max_early_retirement_gw)]
    if limited:
        existing = np.array([techs[i].existing_gw for i in limited], dtype=float)
        change = np.diff(existing, axis=1, prepend=0.0)  # existing[y] - existing[y-1], existing[-1] = 0
        rows = lp.add_rows(
            EARLY_RETIREMENT_LIMIT,
            ("technology", "year"),
            (len(limited), Y),
            "<=",
            "GW/yr",
            rhs=np.array([[techs[i].max_early_retirement_gw] for i in limited]) - change,
        )
        r = rows.local()
        rows.add(r, service[limited], -1.0)
        rows.add(r[:, 1:], service[limited, :-1], 1.0)
        rows.add(r, build[limited], 1.0)
        for k, i in enumerate(limited):
            lifetime = techs[i].lifetime
            if lifetime < Y:  # builds of year y - L leave service in y
                rows.add(r[k, lifetime:], build[i, : Y - lifetime], -1.0)


def add_capacity(ctx: BuildContext) -> None:
    techs = ctx.capacity_techs
    stack = lambda attr: np.array([getattr(t, attr) for t in techs], dtype=float).reshape(len(techs), ctx.Y)  # noqa: E731
    committed = np.array([_committed(t, "committed_gw", ctx.Y) for t in techs]).reshape(len(techs), ctx.Y)
    _add_fleet(
        ctx,
        techs,
        _POWER_FLEET,
        stack("existing_gw"),
        np.maximum(stack("min_build_gw"), committed),
        np.maximum(stack("max_build_gw"), committed),
        stack("max_total_gw"),
        stack("capex"),
        np.array([t.fixed_om for t in techs]),
        "GW",
    )
    _add_pace_limits(ctx, techs, committed)
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
            max_power
            * np.where(np.isfinite(duration), duration, 1.0),  # (1.0: no inf x 0 where not selected)
            np.where(max_power == 0.0, 0.0, np.inf),
        )
        # storage energy is built where power may be (committed energy in the other years)
        energy_committed = np.array([_committed(t, "committed_energy_gwh", Y) for t in storage])
        energy_allowed = np.array([_build_allowed(t, ctx.inputs.years) for t in storage])
        _add_fleet(
            ctx,
            storage,
            _ENERGY_FLEET,
            np.array([t.existing_energy_gwh for t in storage]),
            energy_committed,
            np.where(energy_allowed, np.inf, energy_committed),
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


def retirement_duals(ctx: BuildContext, row_dual: np.ndarray) -> np.ndarray:
    """Duals of the rows that keep power capacity in service (the base year's fleet, the early-retirement limits)
    as rho[t, y] (<= 0) of the row written for year y, shaped [T, Y + 1] with rho[:, Y] = 0 [million currency,
    discounted, per GW]. Capacity in service C[t,y] enters the row of year y with -1 and that of y + 1 with +1, and
    a build N[t,b] the row of b with +1 and that of b + L with -1, so they add rho[y] - rho[y+1] to the value of C
    and rho[b] - rho[b+L] to the value of a build (the same reading as the installed-capacity duals)."""
    techs, Y = ctx.capacity_techs, ctx.Y
    rho = np.zeros((len(techs), Y + 1))
    if BASE_YEAR_FLEET in ctx.lp.row_blocks:
        rho[:, 0] += ctx.row_values(BASE_YEAR_FLEET, row_dual)
    if EARLY_RETIREMENT_LIMIT in ctx.lp.row_blocks:
        limited = [i for i, t in enumerate(techs) if np.isfinite(t.max_early_retirement_gw)]
        rho[limited, :Y] += ctx.row_values(EARLY_RETIREMENT_LIMIT, row_dual)
    return rho


def growth_limit_binds(ctx: BuildContext, row_dual: np.ndarray, tolerance: float = 1e-9) -> np.ndarray:
    """[T, Y] True where a build-growth row with a non-zero dual holds the build of the year (its own row, or the
    next year's, which the build raises): the build is at a limit and need not recover exactly its cost."""
    techs, Y = ctx.capacity_techs, ctx.Y
    held = np.zeros((len(techs), Y), dtype=bool)
    if BUILD_GROWTH_LIMIT in ctx.lp.row_blocks:
        growing = [i for i, t in enumerate(techs) if t.build_growth_factor is not None]
        binds = np.abs(ctx.row_values(BUILD_GROWTH_LIMIT, row_dual)) > tolerance  # rows of years 1..Y-1
        held[growing, 1:] |= binds
        held[growing, :-1] |= binds
    return held


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
    committed_gw: np.ndarray  # [T, Y] committed projects in service from each year (part of new_gw) [GW/yr]


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
        committed_gw=read_only(
            np.array([_committed(t, "committed_gw", Y) for t in techs]).reshape(len(techs), Y)
        ),
    )
