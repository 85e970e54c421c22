"""Firm capacity for the reserve margin: what each technology counts toward it.

* A fixed credit: credit x capacity in service (generators with ``capacity_credit``, storage with a fixed
  ``capacity_credit``).
* Storage by duration: a firm contribution F [GW] per store and year with F <= a_j x power + b_j x energy for every
  linear piece (a_j, b_j) of its concave credit-by-duration curve (``scenario.inputs.credit_segments``), so that a
  1-hour battery counts a quarter of its power under the default 4-hour rule and a 4-hour one all of it.
* Credit tranches (wind, solar): capacity split into tranches T_i [GW], sum_i T_i <= capacity in service, each tranche
  at most its width x the year's peak demand, credit c_i each; credits fall from tranche to tranche, so the LP fills
  them in order and the credit of the last GW built falls as the technology's share of peak demand grows
  (the declining capacity credit of variable renewables: Keane et al. (2011), IEEE Trans. Power Systems 26(2),
  1308-1317, secondary).

The reserve-margin row itself lives in :mod:`pathcast.model.policy`.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .context import BuildContext, read_only
from .linear_program import RowBlock
from .names import (
    CAPACITY,
    CREDIT_TRANCHE,
    CREDIT_TRANCHE_SUM,
    ENERGY_CAPACITY,
    STORAGE_FIRM,
    STORAGE_FIRM_LIMIT,
)

__all__ = ["add_firm_capacity", "read_firm_capacity", "FirmCapacityValues"]


def add_firm_capacity(ctx: BuildContext, rows: RowBlock) -> None:
    """Add every technology's firm capacity [GW] to the reserve-margin rows ``rows`` (one per year)."""
    lp, inputs, Y = ctx.lp, ctx.inputs, ctx.Y
    year_rows = np.arange(Y)
    fixed = [t for t in ctx.capacity_techs if t.capacity_credit > 0]
    if fixed:
        capacity = ctx.capacity_columns(fixed)
        fixed_credit = np.array([[t.capacity_credit] for t in fixed])
        rows.add(
            np.broadcast_to(year_rows[None, :], capacity.shape),
            capacity,
            np.broadcast_to(fixed_credit, capacity.shape),
        )

    by_duration = [(k, t) for k, t in enumerate(ctx.storage) if t.credit_segments]
    if by_duration:
        firm = lp.add_variables(STORAGE_FIRM, ("technology", "year"), (len(by_duration), Y), "GW")
        ctx.blocks[STORAGE_FIRM] = firm
        ctx.storage_firm = [t.name for _, t in by_duration]
        pieces = [(i, a, b) for i, (_, t) in enumerate(by_duration) for a, b in t.credit_segments]
        limit = lp.add_rows(STORAGE_FIRM_LIMIT, ("piece", "year"), (len(pieces), Y), "<=", "GW")
        power = ctx.capacity_columns([t for _, t in by_duration])
        energy = ctx.blocks[ENERGY_CAPACITY].all()
        r = limit.local()
        for p, (i, a, b) in enumerate(pieces):
            k = by_duration[i][0]
            limit.add(r[p], firm.all()[i], 1.0)
            limit.add(r[p], power[i], -a)
            if b:
                limit.add(r[p], energy[k], -b)
        rows.add(np.broadcast_to(year_rows[None, :], firm.shape), firm.all(), 1.0)

    tranched = [t for t in ctx.generators if t.credit_tranches]
    if tranched:
        entries = [
            (g, i, width, credit)
            for g, t in enumerate(tranched)
            for i, (width, credit) in enumerate(t.credit_tranches)
        ]
        upper = np.array([[width] for _, _, width, _ in entries]) * inputs.peak_demand_gw[None, :]
        tranche = lp.add_variables(CREDIT_TRANCHE, ("tranche", "year"), (len(entries), Y), "GW", upper=upper)
        ctx.blocks[CREDIT_TRANCHE] = tranche
        ctx.credit_tranches = [(tranched[g].name, i) for g, i, _, _ in entries]
        total = lp.add_rows(CREDIT_TRANCHE_SUM, ("technology", "year"), (len(tranched), Y), "<=", "GW")
        capacity = ctx.capacity_columns(tranched)
        r = total.local()
        for e, (g, _i, _w, credit) in enumerate(entries):
            total.add(r[g], tranche.all()[e], 1.0)
            if credit:
                rows.add(year_rows, tranche.all()[e], credit)
        total.add(r, capacity, -1.0)


@dataclass(frozen=True)
class FirmCapacityValues:
    """Firm capacity [GW] each technology counts toward the reserve margin, by year (all zero without the row)."""

    technologies: tuple[str, ...]  # every technology, in capacity order
    years: tuple[int, ...]
    firm_gw: np.ndarray  # [T, Y] firm capacity counted [GW]
    # [T, Y] what one more GW in service earns through its credit tranches [currency/kW/yr]: the capacity price x the
    # credit of the marginal tranche (every GW of a tranche-credited technology earns it); 0 for other technologies
    tranche_value_per_kw_year: np.ndarray


def read_firm_capacity(
    ctx: BuildContext, x: np.ndarray, row_dual: np.ndarray | None = None
) -> FirmCapacityValues:
    """The firm capacity of every technology [GW] at the solution ``x`` (fixed credits x capacity, storage firm
    contributions, credited tranches) and, from the duals ``row_dual``, the value of tranche-credited capacity: the
    tranche-sum row (sum of tranches - capacity <= 0) has a dual <= 0 whose negative, undiscounted, is the value of
    one more GW [million/GW = currency/kW]."""
    techs = ctx.capacity_techs
    firm = np.zeros((len(techs), ctx.Y))
    if ctx.inputs.reserve_margin is not None:
        capacity = ctx.column_values(CAPACITY, x)
        firm += np.array([[t.capacity_credit] for t in techs]) * capacity
        if STORAGE_FIRM in ctx.blocks:
            values = ctx.column_values(STORAGE_FIRM, x)
            for i, name in enumerate(ctx.storage_firm):
                firm[ctx.position[name]] += values[i]
        if CREDIT_TRANCHE in ctx.blocks:
            values = ctx.column_values(CREDIT_TRANCHE, x)
            credits = {t.name: t.credit_tranches for t in techs}
            for e, (name, i) in enumerate(ctx.credit_tranches):
                firm[ctx.position[name]] += credits[name][i][1] * values[e]
    tranche_value = np.zeros((len(techs), ctx.Y))
    if row_dual is not None and CREDIT_TRANCHE_SUM in ctx.lp.row_blocks:
        duals = -ctx.row_values(CREDIT_TRANCHE_SUM, row_dual) / ctx.discount[None, :]
        tranched = [t.name for t in ctx.generators if t.credit_tranches]
        for g, name in enumerate(tranched):
            tranche_value[ctx.position[name]] = duals[g]
    return FirmCapacityValues(
        technologies=tuple(t.name for t in techs),
        years=tuple(int(y) for y in ctx.inputs.years),
        firm_gw=read_only(firm),
        tranche_value_per_kw_year=read_only(tranche_value),
    )
