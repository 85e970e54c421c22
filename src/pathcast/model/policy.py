"""Policy rows: the cumulative carbon budget, yearly caps, the reserve margin on peak demand and the minimum
clean-electricity share. (Phase-outs and build limits are column bounds, set in capacity.)"""

from __future__ import annotations

import numpy as np

from .context import BuildContext
from .dispatch import add_pooled_output

__all__ = ["add_policy"]


def add_policy(ctx: BuildContext) -> None:
    lp, inputs, Y = ctx.lp, ctx.inputs, ctx.Y
    years = inputs.years
    emissions = ctx.blocks["emissions"].all()

    if inputs.budget_mt is not None:
        first, last = inputs.budget_years
        inside = (years >= first) & (years <= last)
        rows = lp.add_rows("carbon_budget", ("budget",), (1,), "<=", "MtCO2", rhs=inputs.budget_mt)
        rows.add(np.zeros(int(inside.sum()), dtype=int), emissions[inside], 1.0)
        if inputs.budget_overshoot_price is not None:
            # priced overshoot [MtCO2] relaxes the budget; it is paid in the budget's last modelled year, so the budget's
            # carbon price in that year is at most the overshoot price [currency/tCO2 = million/MtCO2]
            overshoot = lp.add_variables("budget_overshoot", ("budget",), (1,), "MtCO2")
            ctx.blocks["budget_overshoot"] = overshoot
            rows.add(np.zeros(1, dtype=int), overshoot.all(), -1.0)
            paid = int(np.flatnonzero(inside)[-1]) if inside.any() else Y - 1
            lp.add_cost(overshoot.all(), inputs.budget_overshoot_price * ctx.discount[paid])

    if inputs.emission_caps_mt:
        cap_years = sorted(inputs.emission_caps_mt)
        rows = lp.add_rows(
            "emission_cap",
            ("year",),
            (len(cap_years),),
            "<=",
            "MtCO2/yr",
            rhs=np.array([inputs.emission_caps_mt[y] for y in cap_years]),
        )
        ctx.cap_years = cap_years
        rows.add(np.arange(len(cap_years)), emissions[np.searchsorted(years, cap_years)], 1.0)

    # reserve margin: sum credit x capacity >= (1 + margin) x peak demand [GW]
    credited = [t for t in ctx.capacity_techs if t.capacity_credit > 0]
    rows = lp.add_rows(
        "reserve_margin",
        ("year",),
        (Y,),
        ">=",
        "GW",
        rhs=(1.0 + inputs.reserve_margin) * inputs.peak_demand_gw,
    )
    if credited:
        capacity = ctx.capacity_columns(credited)
        credit = np.array([[t.capacity_credit] for t in credited])
        rows.add(
            np.broadcast_to(np.arange(Y)[None, :], capacity.shape),
            capacity,
            np.broadcast_to(credit, capacity.shape),
        )

    # clean share of generation: sum_clean E - share x sum_all E >= 0 [TWh]
    if inputs.clean_share is not None and ctx.generators:
        active = np.flatnonzero(~np.isnan(inputs.clean_share))
        share = inputs.clean_share[active]
        rows = lp.add_rows("clean_electricity_share", ("year",), (len(active),), ">=", "TWh")
        generation = ctx.blocks["generation"].all()[:, active]  # [G, A, D, H]
        weight = ctx.hour_weight[active] / 1000.0  # GWh -> TWh
        r = np.broadcast_to(np.arange(len(active))[:, None, None], weight.shape)
        for g, t in enumerate(ctx.dispatched_generators):
            coef = (float(t.clean) - share[:, None, None]) * weight
            rows.add(r, generation[g], coef)
        if ctx.pooled_generators:
            # pooled generators are clean: (1 - share) x (available output - curtailment)
            coef = (1.0 - share[:, None, None]) * weight
            add_pooled_output(ctx, rows, r, coef, years=active)
            rows.add(r, ctx.blocks["curtailment"].all()[active], -coef)
