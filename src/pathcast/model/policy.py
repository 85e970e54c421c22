"""Policy rows: the cumulative carbon budget, yearly caps, the reserve margin on peak demand and the minimum
clean-electricity share. (Phase-outs and build limits are column bounds, set in capacity.)"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..scenario.inputs import present
from .adequacy import add_firm_capacity
from .context import BuildContext, read_only
from .dispatch import add_pooled_output
from .names import (
    BUDGET_OVERSHOOT,
    CARBON_BUDGET,
    CLEAN_ELECTRICITY_SHARE,
    CURTAILMENT,
    EMISSION_CAP,
    EMISSIONS,
    GENERATION,
    RESERVE_MARGIN,
)

__all__ = ["add_policy", "read_policy", "PolicyValues"]


def add_policy(ctx: BuildContext) -> None:
    lp, inputs, Y = ctx.lp, ctx.inputs, ctx.Y
    years = inputs.years
    emissions = ctx.blocks[EMISSIONS].all()

    if inputs.budget_mt is not None:
        first, last = present(inputs.budget_years)  # set together with budget_mt
        inside = (years >= first) & (years <= last)
        rows = lp.add_rows(CARBON_BUDGET, ("budget",), (1,), "<=", "MtCO2", rhs=inputs.budget_mt)
        rows.add(np.zeros(int(inside.sum()), dtype=int), emissions[inside], 1.0)
        if inputs.budget_overshoot_price is not None:
            # priced overshoot [MtCO2] relaxes the budget; it is paid in the budget's last modelled year, so the budget's
            # carbon price in that year is at most the overshoot price [currency/tCO2 = million/MtCO2]
            overshoot = lp.add_variables(BUDGET_OVERSHOOT, ("budget",), (1,), "MtCO2")
            ctx.blocks[BUDGET_OVERSHOOT] = overshoot
            rows.add(np.zeros(1, dtype=int), overshoot.all(), -1.0)
            paid = int(np.flatnonzero(inside)[-1]) if inside.any() else Y - 1
            lp.add_cost(overshoot.all(), inputs.budget_overshoot_price * ctx.discount[paid])

    if inputs.emission_caps_mt:
        cap_years = sorted(inputs.emission_caps_mt)
        rows = lp.add_rows(
            EMISSION_CAP,
            ("year",),
            (len(cap_years),),
            "<=",
            "MtCO2/yr",
            rhs=np.array([inputs.emission_caps_mt[y] for y in cap_years]),
        )
        ctx.cap_years = cap_years
        rows.add(np.arange(len(cap_years)), emissions[np.searchsorted(years, cap_years)], 1.0)

    # reserve margin: firm capacity >= (1 + margin) x peak demand [GW]; no row at all without a margin
    if inputs.reserve_margin is not None:
        rows = lp.add_rows(
            RESERVE_MARGIN,
            ("year",),
            (Y,),
            ">=",
            "GW",
            rhs=(1.0 + inputs.reserve_margin) * inputs.peak_demand_gw,
        )
        add_firm_capacity(ctx, rows)

    # clean share of generation: sum_clean E - share x sum_all E >= 0 [TWh]
    if inputs.clean_share is not None and ctx.generators:
        active = np.flatnonzero(~np.isnan(inputs.clean_share))
        share = inputs.clean_share[active]
        rows = lp.add_rows(CLEAN_ELECTRICITY_SHARE, ("year",), (len(active),), ">=", "TWh")
        generation = ctx.blocks[GENERATION].all()[:, active]  # [G, A, D, H]
        weight = ctx.hour_weight[active] / 1000.0  # GWh -> TWh
        r = np.broadcast_to(np.arange(len(active))[:, None, None], weight.shape)
        for g, t in enumerate(ctx.dispatched_generators):
            coef = (float(t.clean) - share[:, None, None]) * weight
            rows.add(r, generation[g], coef)
        if ctx.pooled_generators:
            # pooled generators are clean: (1 - share) x (available output - curtailment)
            coef = (1.0 - share[:, None, None]) * weight
            add_pooled_output(ctx, rows, r, coef, years=active)
            rows.add(r, ctx.blocks[CURTAILMENT].all()[active], -coef)


@dataclass(frozen=True)
class PolicyValues:
    """The policy family's solution: the shadow prices of its rows, undiscounted to the year they fall in
    (minimisation sign convention turned into prices: a binding limit gives a price >= 0), and any priced overshoot
    of the carbon budget."""

    years: tuple[int, ...]
    budget_mtco2: float | None  # the carbon budget [MtCO2], None without one
    budget_years: tuple[int, int] | None  # first and last year it counts
    budget_carbon_price_per_tco2: (
        np.ndarray
    )  # [Y] carbon price from the budget, 0 outside its years [currency/tCO2]
    budget_overshoot_mtco2: float  # priced overshoot of the budget [MtCO2] (analysis runs only; else 0)
    cap_years: tuple[int, ...]  # years with a yearly emission cap
    cap_carbon_price_per_tco2: (
        np.ndarray
    )  # [Y] carbon price from the yearly caps, 0 in other years [currency/tCO2]
    reserve_margin_price_per_kw_year: np.ndarray  # [Y] value of one more kW of firm capacity [currency/kW/yr]
    clean_share_price_per_mwh: (
        np.ndarray
    )  # [Y] cost of the clean-share target per MWh, NaN without one [currency/MWh]


def read_policy(ctx: BuildContext, x: np.ndarray, row_dual: np.ndarray) -> PolicyValues:
    """The policy family's values from the primal values ``x`` (LP column order) and the row duals ``row_dual``
    (LP row order; a row dual is in million currency of the price year, discounted, per unit of the row).

    Carbon price [currency/tCO2] = -dual(budget or cap) / discount factor ([million/MtCO2] = [currency/tCO2]);
    reserve margin [currency/kW/yr] = dual / discount factor ([million/GW] = [currency/kW]); clean share
    [currency/MWh] = dual / discount factor ([million/TWh] = [currency/MWh])."""
    inputs, lp, Y, df = ctx.inputs, ctx.lp, ctx.Y, ctx.discount
    from_budget = np.zeros(Y)
    if CARBON_BUDGET in lp.row_blocks:
        first, last = present(inputs.budget_years)
        inside = (inputs.years >= first) & (inputs.years <= last)
        from_budget = np.where(inside, -ctx.row_values(CARBON_BUDGET, row_dual)[0] / df, 0.0)
    from_cap = np.zeros(Y)
    if EMISSION_CAP in lp.row_blocks:
        positions = np.searchsorted(inputs.years, ctx.cap_years)
        from_cap[positions] = -ctx.row_values(EMISSION_CAP, row_dual) / df[positions]
    reserve = (
        ctx.row_values(RESERVE_MARGIN, row_dual) / df if RESERVE_MARGIN in lp.row_blocks else np.zeros(Y)
    )
    clean = np.full(Y, np.nan)
    if CLEAN_ELECTRICITY_SHARE in lp.row_blocks:
        active = np.flatnonzero(~np.isnan(present(inputs.clean_share)))
        clean[active] = ctx.row_values(CLEAN_ELECTRICITY_SHARE, row_dual) / df[active]
    overshoot = float(ctx.column_values(BUDGET_OVERSHOOT, x)[0]) if BUDGET_OVERSHOOT in ctx.blocks else 0.0
    return PolicyValues(
        years=tuple(int(year) for year in inputs.years),
        budget_mtco2=inputs.budget_mt,
        budget_years=inputs.budget_years if inputs.budget_mt is not None else None,
        budget_carbon_price_per_tco2=read_only(from_budget),
        budget_overshoot_mtco2=overshoot,
        cap_years=tuple(int(year) for year in ctx.cap_years),
        cap_carbon_price_per_tco2=read_only(from_cap),
        reserve_margin_price_per_kw_year=read_only(reserve),
        clean_share_price_per_mwh=read_only(clean),
    )
