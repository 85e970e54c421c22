"""Why a scenario has no optimum, in the scenario's own terms.

When HiGHS finds the LP infeasible, :func:`pathcast.solve.find_conflict` asks it for an irreducible infeasible
subsystem (IIS): a set of rows and column bounds that cannot all hold, any one of which dropped makes the rest
feasible. Here each of its members is mapped back to the scenario limit that made it (the reserve margin of a year,
the potential of a technology, a phase-out, a build-rate limit, the base year's fleet, a lead time, a committed
project, a build growth or early-retirement limit, the carbon budget, a yearly cap, the clean-electricity share, a
storage duration, a supply potential, a demand) and the field that sets it. When the reserve margin of a year is in
the conflict, a second small solve finds how much firm capacity that year lacks at best (the same LP with one
slack on that year's row, minimised), so that the message says how much is short. Rows and bounds that are the
model's own physics (capacity accounting, dispatch limits, non-negativity) are left out of the sentence: they hold in
every scenario. Where HiGHS gives no IIS, the message lists only the limits that the scenario has.

An unbounded LP (the cost falls without limit) is described by the columns of HiGHS's primal ray that lower the cost:
typically a negative price.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import highspy
import numpy as np

from .model.build import PathwayModel
from .model.names import (
    BASE_YEAR_FLEET,
    BUILD_GROWTH_LIMIT,
    EARLY_RETIREMENT_LIMIT,
    ENERGY_NEW,
    NEW,
    RESERVE_MARGIN,
)
from .scenario.inputs import ModelInputs, present
from .solve import CONFLICT_TIME_LIMIT_S, Conflict, highs_lp, new_highs

__all__ = ["ConflictMember", "conflict_members", "limits_in_scenario", "explain_no_optimum", "SHOWN_AT_MOST"]

SHOWN_AT_MOST = 8  # members and field paths named in one sentence; the rest are counted

_SECTION = {"generator": "generators", "storage": "storage", "converter": "converters"}


@dataclass(frozen=True)
class ConflictMember:
    """One scenario limit in an infeasible subsystem.

    kind: 'reserve margin', 'potential', 'phase-out', 'first build year', 'build-rate limit', 'minimum build',
    'base-year fleet', 'base-year fleet in service', 'lead time', 'committed project', 'build growth limit',
    'early-retirement limit',
    'storage energy potential', 'supply potential', 'carbon budget', 'yearly emission cap', 'clean-electricity share',
    'longest storage duration', 'shortest storage duration', 'fuel demand', 'electricity demand', 'fixed history',
    'cap on unserved energy'. role: 'target' (something the scenario asks for: a margin, a share, a demand, a minimum)
    or 'limit' (something it forbids). subject: the technology, supply or demand with its figure, e.g.
    "wind_onshore (0 MW)"; detail: what a limit without a subject is, the same in every year (the firm capacity the
    reserve margin asks for, as a multiple of the peak demand); figure: its figures in the first of ``years``."""

    kind: str
    role: str
    subject: str = ""
    detail: str = ""
    years: tuple[int, ...] = ()
    fields: tuple[str, ...] = ()
    figure: str = ""  # figures of the first of ``years`` (e.g. the firm capacity the reserve margin asks for)


_PLURAL = {
    "potential": "potentials",
    "phase-out": "phase-outs",
    "first build year": "first build years",
    "build-rate limit": "build-rate limits",
    "minimum build": "minimum builds",
    "storage energy potential": "storage energy potentials",
    "supply potential": "supply potentials",
    "fuel demand": "fuel demands",
    "longest storage duration": "longest storage durations",
    "shortest storage duration": "shortest storage durations",
    "base-year fleet": "base-year fleets",
    "base-year fleet in service": "base-year fleets in service",
    "lead time": "lead times",
    "committed project": "committed projects",
    "build growth limit": "build growth limits",
    "early-retirement limit": "early-retirement limits",
}


def _span(years: tuple[int, ...]) -> str:
    if not years:
        return ""
    if len(years) == 1:
        return f" in {years[0]}"
    if list(years) == list(range(years[0], years[-1] + 1)):
        return f" in {years[0]}-{years[-1]}"
    return " in " + ", ".join(str(y) for y in years)


def _locate(lp, index: int, offsets: dict[str, int], sizes: dict[str, int]) -> tuple[str, tuple[int, ...]]:
    for name, start in offsets.items():
        if start <= index < start + sizes[name]:
            block = lp.row_blocks[name] if name in lp.row_blocks else lp.variables[name]
            return name, tuple(int(i) for i in np.unravel_index(index - start, block.shape))
    return "", ()


def conflict_members(model: PathwayModel, conflict: Conflict) -> tuple[ConflictMember, ...]:
    """The scenario limits in an infeasible subsystem, grouped by kind, subject and figures (years merged)."""
    lp, inputs, ctx = model.lp, model.inputs, model.context
    years = [int(y) for y in inputs.years]
    found: list[tuple[ConflictMember, int | None]] = []
    row_offsets = lp.row_offsets()
    row_sizes = {name: block.size for name, block in lp.row_blocks.items()}
    margin_rows: list[tuple[int, int, int]] = []  # (year, LP row, position in found) of reserve-margin rows
    for row in conflict.rows:
        name, index = _locate(lp, int(row), row_offsets, row_sizes)
        member = _row_member(name, index, inputs, ctx, years)
        if member is not None:
            if name == RESERVE_MARGIN:
                margin_rows.append((member[1], int(row), len(found)))
            found.append(member)
    if margin_rows:
        year, row, position = min(margin_rows)
        member = found[position][0]
        others = [r for _y, r, _p in sorted(margin_rows) if r != row]
        short = reserve_shortfall(model, row, others)
        if short is not None:
            figure = _shortfall_figure(member.figure, short, year, inputs)
            found[position] = (replace(member, figure=figure), year)
    col_offsets = {name: block.offset for name, block in lp.variables.items()}
    col_sizes = {name: block.size for name, block in lp.variables.items()}
    lower, upper = lp.column_bounds()
    for column, side in zip(conflict.columns, conflict.column_sides, strict=True):
        name, index = _locate(lp, int(column), col_offsets, col_sizes)
        for bound_side in ("lower", "upper"):
            if side not in (bound_side, "both"):
                continue
            bound = float(lower[column] if bound_side == "lower" else upper[column])
            member = _column_member(name, index, bound_side, bound, inputs, ctx, years)
            if member is not None:
                found.append(member)
    merged: dict[tuple, list] = {}  # key -> [member of the earliest year, that year, all years]
    for member, member_year in found:
        key = (member.kind, member.role, member.subject, member.detail, member.fields)
        entry = merged.setdefault(key, [member, member_year, set()])
        if member_year is not None:
            entry[2].add(member_year)
            if entry[1] is None or member_year < entry[1]:
                entry[0], entry[1] = member, member_year
    return tuple(
        ConflictMember(
            kind=m.kind,
            role=m.role,
            subject=m.subject,
            detail=m.detail,
            years=tuple(sorted(ys)),
            fields=m.fields,
            figure=m.figure,
        )
        for m, _first, ys in merged.values()
    )


def reserve_shortfall(
    model: PathwayModel, row: int, others: list[int] | tuple[int, ...] = ()
) -> float | None:
    """The least firm capacity [GW] by which LP row ``row`` (a reserve-margin row, ``>=``) falls short when every
    other row and bound of the model holds: the model with zero costs and a slack column s >= 0 on that row,
    minimising s. The reserve-margin rows ``others`` (later years of the same conflict) get slacks too, at a cost
    of 1e-6 per GW, so that their own shortfall does not hide the first one. None when even that has no optimum
    (the rest of the model conflicts as well)."""
    lp_model = highs_lp(model.lp)
    lp_model.col_cost_ = np.zeros(lp_model.num_col_)
    h = new_highs()
    h.setOptionValue("time_limit", float(CONFLICT_TIME_LIMIT_S))
    h.passModel(lp_model)
    first = h.getNumCol()
    for cost, where in ((1.0, row), *((1e-6, r) for r in others)):
        h.addCol(cost, 0.0, np.inf, 1, np.array([where], dtype=np.int32), np.array([1.0]))
    h.run()
    if h.getModelStatus() != highspy.HighsModelStatus.kOptimal:
        return None
    return max(0.0, float(h.getSolution().col_value[first]))


def _shortfall_figure(figure: str, short_gw: float, year: int, inputs: ModelInputs) -> str:
    """The reserve margin's figure with how much firm capacity the year lacks at best [MW]."""
    if short_gw <= 1e-9:
        return figure
    short = short_gw * 1000.0
    if year == int(inputs.years[0]) and not inputs.new_builds_in_base_year:
        return (
            f"{figure}; the existing fleet and committed projects are {short:,.0f} MW of firm capacity short"
        )
    return f"{figure}; {short:,.0f} MW of firm capacity short at best"


def _first(values) -> float:
    return 0.0 if values is None else float(values[0])


def _section_path(t) -> str:
    return f"technologies.{_SECTION[t.kind]}.{t.name}"


def _row_member(name: str, index: tuple[int, ...], inputs: ModelInputs, ctx, years: list[int]):
    """(member, year) of an IIS row, or None for the model's own rows."""
    if name == BUILD_GROWTH_LIMIT:
        t = [t for t in ctx.capacity_techs if t.build_growth_factor is not None][index[0]]
        subject = (
            f"{t.name} ({t.build_growth_seed_gw * 1000:,.0f} MW/yr + {t.build_growth_factor:g} x the year "
            "before)"
        )
        return ConflictMember(
            "build growth limit", "limit", subject=subject, fields=(f"{_section_path(t)}.max_build_growth",)
        ), years[index[1] + 1]
    if name == BASE_YEAR_FLEET:
        t = ctx.capacity_techs[index[0]]
        in_service = (float(t.existing_gw[0]) + float(_first(t.committed_gw))) * 1000.0
        return ConflictMember(
            "base-year fleet in service",
            "target",
            subject=f"{t.name} ({in_service:,.0f} MW)",
            fields=(f"{_section_path(t)}.existing", "metadata.new_builds_in_base_year"),
        ), years[0]
    if name == EARLY_RETIREMENT_LIMIT:
        t = [t for t in ctx.capacity_techs if np.isfinite(t.max_early_retirement_gw)][index[0]]
        return ConflictMember(
            "early-retirement limit",
            "limit",
            subject=f"{t.name} ({t.max_early_retirement_gw * 1000:,.0f} MW/yr)",
            fields=(f"{_section_path(t)}.max_early_retirement_mw_per_year",),
        ), years[index[1]]
    if name == "reserve_margin":
        y = index[0]
        peak = float(inputs.peak_demand_gw[y]) * 1000.0
        factor = 1.0 + (inputs.reserve_margin or 0.0)
        detail = f"firm capacity of at least {factor:.2f} x the peak demand"
        figure = f"{factor * peak:,.0f} MW for a peak of {peak:,.0f} MW in {years[y]}"
        member = ConflictMember(
            "reserve margin", "target", detail=detail, fields=("policy.reserve_margin",), figure=figure
        )
        return member, years[y]
    if name == "carbon_budget":
        first, last = present(inputs.budget_years)
        detail = f"{inputs.budget_mt:,.1f} MtCO2 for {first}-{last}"
        return ConflictMember(
            "carbon budget", "limit", detail=detail, fields=("policy.carbon_budget.total_mt",)
        ), None
    if name == "emission_cap":
        year = ctx.cap_years[index[0]]
        detail = f"{inputs.emission_caps_mt[year]:,.1f} MtCO2"
        return ConflictMember(
            "yearly emission cap", "limit", detail=detail, fields=(f"policy.emission_caps_mt.{year}",)
        ), int(year)
    if name == "clean_electricity_share":
        clean_share = present(inputs.clean_share)  # the row exists only with a clean-electricity share
        active = np.flatnonzero(~np.isnan(clean_share))
        y = int(active[index[0]])
        detail = f"{100 * clean_share[y]:.0f} % of generation"
        return ConflictMember(
            "clean-electricity share", "target", detail=detail, fields=("policy.clean_electricity_share",)
        ), years[y]
    if name in ("storage_duration_max", "storage_duration_min"):
        longest = name.endswith("max")
        storage = [
            t for t in ctx.storage if (np.isfinite(t.max_duration_h) if longest else t.min_duration_h > 0)
        ]
        t = storage[index[0]]
        hours = t.max_duration_h if longest else t.min_duration_h
        field_name = "max_duration_hours" if longest else "min_duration_hours"
        return ConflictMember(
            "longest storage duration" if longest else "shortest storage duration",
            "limit" if longest else "target",
            subject=f"{t.name} ({hours:,.1f} h)",
            fields=(f"technologies.storage.{t.name}.{field_name}",),
        ), years[index[1]]
    if name == "fuel_demand":
        demand = inputs.fuel_demands[index[0]]
        value = float(demand.demand_pj[index[1]])
        return ConflictMember(
            "fuel demand",
            "target",
            subject=f"{demand.name} ({value:,.1f} PJ/yr)",
            fields=(f"demand.fuels.{demand.name}",),
        ), years[index[1]]
    if name == "electricity_balance":
        y, d, h = index
        value = float(inputs.electricity_demand_gw[y, d, h]) * 1000.0
        detail = f"{value:,.0f} MW on day {inputs.day_names[d]!r} at hour {h}"
        return ConflictMember(
            "electricity demand", "target", detail=detail, fields=("demand.electricity",)
        ), years[y]
    return None


def _column_member(name, index, side, bound, inputs: ModelInputs, ctx, years):
    """(member, year) of a bound in an IIS, or None for the model's own bounds (non-negativity, free columns)."""
    if not np.isfinite(bound):
        return None
    pinned = inputs.column_bounds.get(name)
    if pinned is not None:
        block = ctx.lp.variables[name]
        given = np.broadcast_to(np.asarray(pinned[0 if side == "lower" else 1], dtype=float), block.shape)
        if not np.isnan(given[index]):
            year = years[index[-1]] if name not in ("unserved",) else years[index[0]]
            if name in ("unserved", "unserved_fuel"):
                kind, detail = (
                    "cap on unserved energy",
                    "no more unserved energy than the pathway without the budget",
                )
            else:
                kind, detail = "fixed history", "builds, capacity and emissions fixed before the start year"
            return ConflictMember(kind, "limit", detail=detail), int(year)
    if name in (NEW, ENERGY_NEW) and (
        side == "lower"
        or _only_committed(
            ctx.capacity_techs[index[0]] if name == NEW else ctx.storage[index[0]], years[index[1]]
        )
    ):
        t = ctx.capacity_techs[index[0]] if name == NEW else ctx.storage[index[0]]
        member = _committed_member(t, name, years[index[1]], side, bound, inputs)
        if member is not None or name == ENERGY_NEW:
            return member
    if name in ("new", "capacity"):
        t = ctx.capacity_techs[index[0]]
        year = years[index[1]]
        base = f"technologies.{_SECTION[t.kind]}.{t.name}"
        if name == "new" and side == "lower":
            if bound <= 0:
                return None
            return ConflictMember(
                "minimum build",
                "target",
                subject=f"{t.name} ({bound * 1000:,.0f} MW/yr)",
                fields=(f"{base}.min_build_mw_per_year",),
            ), year
        if side == "lower":
            return None
        if t.phase_out_year is not None and year >= t.phase_out_year and bound <= 0:
            return ConflictMember(
                "phase-out",
                "limit",
                subject=f"{t.name} (from {t.phase_out_year})",
                fields=(f"{base}.phase_out_year",),
            ), year
        if name == "new":
            if t.first_build_year is not None and year < t.first_build_year and bound <= 0:
                return ConflictMember(
                    "first build year",
                    "limit",
                    subject=f"{t.name} ({t.first_build_year})",
                    fields=(f"{base}.first_build_year",),
                ), year
            return ConflictMember(
                "build-rate limit",
                "limit",
                subject=f"{t.name} ({bound * 1000:,.0f} MW/yr)",
                fields=(f"{base}.max_build_mw_per_year",),
            ), year
        return ConflictMember(
            "potential",
            "limit",
            subject=f"{t.name} ({bound * 1000:,.0f} MW)",
            fields=(f"{base}.max_total_mw",),
        ), year
    if name in ("energy_new", "energy_capacity") and side == "upper":
        t = ctx.storage[index[0]]
        base = f"technologies.storage.{t.name}"
        return ConflictMember(
            "storage energy potential",
            "limit",
            subject=f"{t.name} ({bound * 1000:,.0f} MWh)",
            fields=(f"{base}.max_total_mw", f"{base}.max_duration_hours"),
        ), years[index[1]]
    if name == "supply" and side == "upper":
        s = inputs.supplies[index[0]]
        year = years[index[1]]
        base = f"technologies.supplies.{s.name}"
        if s.phase_out_year is not None and year >= s.phase_out_year and bound <= 0:
            return ConflictMember(
                "phase-out",
                "limit",
                subject=f"{s.name} (from {s.phase_out_year})",
                fields=(f"{base}.phase_out_year",),
            ), year
        return ConflictMember(
            "supply potential",
            "limit",
            subject=f"{s.name} ({bound:,.1f} PJ/yr)",
            fields=(f"{base}.potential_pj",),
        ), year
    return None


def _only_committed(t, year: int) -> bool:
    """True when ``t`` can have only committed projects come into service in ``year`` (the base year, its lead
    time); a first build year or a phase-out is named as such instead."""
    if t.earliest_new_year is None or year >= t.earliest_new_year:
        return False
    if t.first_build_year is not None and year < t.first_build_year:
        return False
    return not (t.phase_out_year is not None and year >= t.phase_out_year)


def _committed_member(t, name: str, year: int, side: str, bound: float, inputs: ModelInputs):
    """(member, year) of a build bound that comes from the starting year: a committed project (lower bound), the
    base year's fleet or a lead time (upper bound); None for other build bounds."""
    base = _section_path(t)
    attribute = "committed_gw" if name == NEW else "committed_energy_gwh"
    committed = getattr(t, attribute)
    value = 0.0 if committed is None else float(committed[year - int(inputs.years[0])])
    unit = "MW" if name == NEW else "MWh"
    if side == "lower":
        if value <= 0 or bound > value * (1 + 1e-9):
            return None  # a minimum build above the committed projects
        return ConflictMember(
            "committed project",
            "target",
            subject=f"{t.name} ({value * 1000:,.0f} {unit} in {year})",
            fields=(f"{base}.committed",),
        ), year
    if year == int(inputs.years[0]):
        return ConflictMember(
            "base-year fleet",
            "limit",
            subject=t.name,
            detail="existing and committed capacity only",
            fields=(f"{base}.committed", "metadata.new_builds_in_base_year"),
        ), year
    return ConflictMember(
        "lead time",
        "limit",
        subject=f"{t.name} ({t.lead_time_years} yr: new builds from {t.earliest_new_year})",
        fields=(f"{base}.lead_time_years", f"{base}.committed"),
    ), year


def limits_in_scenario(inputs: ModelInputs) -> list[str]:
    """The kinds of limit a scenario has, in words (only those present), for a message where HiGHS named none."""
    techs = inputs.technologies
    out = []
    if inputs.budget_mt is not None and inputs.budget_overshoot_price is None:
        out.append("the carbon budget")
    if inputs.emission_caps_mt:
        out.append("the yearly emission caps")
    if inputs.clean_share is not None and np.any(~np.isnan(inputs.clean_share)):
        out.append("the clean-electricity share")
    out.append("the reserve margin")
    if not inputs.new_builds_in_base_year:
        out.append("the base year's fleet (existing and committed capacity only)")
    if any(t.committed_gw is not None and np.any(t.committed_gw > 0) for t in techs):
        out.append("the committed projects")
    if any(t.lead_time_years is not None and t.lead_time_years > 1 for t in techs):
        out.append("the lead times")
    if any(t.build_growth_factor is not None for t in techs):
        out.append("the build growth limits")
    if any(np.isfinite(t.max_early_retirement_gw) for t in techs):
        out.append("the early-retirement limits")
    if any(np.any(t.min_build_gw > 0) for t in techs):
        out.append("the minimum builds")
    if any(np.any(np.isfinite(t.max_build_gw) & (t.max_build_gw > 0)) for t in techs):
        out.append("the build-rate limits")
    if any(t.first_build_year is not None for t in techs):
        out.append("the first build years")
    if any(np.any(np.isfinite(t.max_total_gw) & (t.max_total_gw > 0)) for t in techs) or any(
        np.any(np.isfinite(s.potential_pj)) for s in inputs.supplies
    ):
        out.append("the potentials")
    if any(t.phase_out_year is not None for t in techs) or any(
        s.phase_out_year is not None for s in inputs.supplies
    ):
        out.append("the phase-outs")
    if any(t.kind == "storage" and (t.min_duration_h > 0 or np.isfinite(t.max_duration_h)) for t in techs):
        out.append("the storage durations")
    if any(name not in ("unserved", "unserved_fuel") for name in inputs.column_bounds):
        out.append("the fixed history")
    if any(name in ("unserved", "unserved_fuel") for name in inputs.column_bounds):
        out.append("the cap on unserved energy")
    return out


def _join(items: list[str]) -> str:
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def _describe(members: list[ConflictMember]) -> list[str]:
    """Phrases for members, one per (kind, years, detail), subjects of one kind listed together."""
    groups: dict[tuple, list[ConflictMember]] = {}
    for m in members:
        groups.setdefault((m.kind, m.years, m.detail), []).append(m)
    phrases = []
    for (kind, years, detail), group in groups.items():
        subjects = [m.subject for m in group if m.subject]
        noun = _PLURAL.get(kind, kind) if len(subjects) > 1 else kind
        text = f"the {noun}"
        if subjects:
            shown = subjects[:SHOWN_AT_MOST]
            more = [f"{len(subjects) - SHOWN_AT_MOST} more"] if len(subjects) > SHOWN_AT_MOST else []
            text += f" of {_join(shown + more)}{_span(years)}"
        elif kind == "reserve margin":
            figure = group[0].figure
            text += f"{_span(years)} ({detail}{': ' + figure if figure else ''})"
        else:
            text += f" of {detail}{_span(years)}" if detail else _span(years)
        phrases.append(text)
    return phrases


def explain_no_optimum(
    model: PathwayModel, conflict: Conflict, status: str, where: str
) -> tuple[str, dict, bool]:
    """(one-sentence message, diagnosis, infeasible) for a model HiGHS found infeasible or unbounded.

    ``where`` starts the sentence (the scenario file or name). ``infeasible`` is False for an unbounded model. The
    diagnosis has the status, the kinds of limit in the scenario, the conflicting members and, for an infeasible
    model, ``reason``: the sentence's part after "HiGHS reports the model infeasible: " (for messages that put it in
    their own sentence)."""
    inputs = model.inputs
    present = limits_in_scenario(inputs)
    if conflict.kind == "unbounded":
        return _explain_unbounded(model, conflict, where), {"status": "unbounded"}, False
    members = list(conflict_members(model, conflict)) if conflict.kind == "infeasible" else []
    diagnosis = {
        "status": "infeasible" if conflict.kind == "infeasible" else status,
        "limits_in_scenario": present,
        "conflict": [
            {
                "kind": m.kind,
                "role": m.role,
                "subject": m.subject,
                "years": list(m.years),
                "fields": list(m.fields),
            }
            for m in members
        ],
    }
    shown_status = "infeasible" if conflict.kind == "infeasible" else status.replace("_", " ")
    if not members:
        reason = f"its limits ({_join(present)}) cannot all be met together; relax one of them"
        diagnosis["reason"] = reason
        return f"{where}: HiGHS reports the model {shown_status}: {reason}.", diagnosis, True
    targets = _describe([m for m in members if m.role == "target"])
    limits = _describe([m for m in members if m.role == "limit"])
    if targets and limits:
        clash = f"{_join(targets)} cannot be met within {_join(limits)}"
    else:
        clash = f"{_join(targets or limits)} cannot all be met together"
    fields = list(dict.fromkeys(f for m in members for f in m.fields))
    if fields:
        shown = ", ".join(fields[:SHOWN_AT_MOST])
        more = f" and {len(fields) - SHOWN_AT_MOST} more" if len(fields) > SHOWN_AT_MOST else ""
        advice = f"; relax one of them ({shown}{more})"
    else:
        advice = "; relax one of them"
    diagnosis["reason"] = clash + advice
    return f"{where}: HiGHS reports the model infeasible: {clash}{advice}.", diagnosis, True


def _explain_unbounded(model: PathwayModel, conflict: Conflict, where: str) -> str:
    lp, inputs, ctx = model.lp, model.inputs, model.context
    cost = lp.cost_vector()
    years = [int(y) for y in inputs.years]
    offsets = {name: block.offset for name, block in lp.variables.items()}
    sizes = {name: block.size for name, block in lp.variables.items()}
    items: list[str] = []
    fields: list[str] = []
    for column, value in zip(conflict.columns, conflict.ray, strict=True):
        if cost[column] * value >= 0:
            continue
        name, index = _locate(lp, int(column), offsets, sizes)
        if name == "supply":
            s = inputs.supplies[index[0]]
            items.append(
                f"supply of {s.name} (price {s.price[index[1]]:,.2f} {inputs.currency}/GJ in {years[index[1]]})"
            )
            fields.append(f"technologies.supplies.{s.name}.price")
        elif name in ("new", "capacity"):
            t = ctx.capacity_techs[index[0]]
            items.append(f"{'builds' if name == 'new' else 'capacity'} of {t.name} in {years[index[1]]}")
            fields.append(f"technologies.{_SECTION[t.kind]}.{t.name}")
        elif name == "emissions":
            items.append(f"emissions in {years[index[0]]}")
            fields.append("policy.carbon_price")
        else:
            items.append(name.replace("_", " "))
    items = list(dict.fromkeys(items))
    fields = list(dict.fromkeys(fields))
    if items:
        shown = _join(
            items[:SHOWN_AT_MOST]
            + ([f"{len(items) - SHOWN_AT_MOST} more"] if len(items) > SHOWN_AT_MOST else [])
        )
        along = f"the cost falls without limit with more {shown}"
    else:
        along = "the cost falls without limit"
    check = f" ({', '.join(fields)})" if fields else " (prices, costs and the carbon price)"
    return f"{where}: HiGHS reports the model unbounded: {along}; expected prices and costs of at least 0{check}."
