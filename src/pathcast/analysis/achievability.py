"""Is a carbon budget achievable, and if not, by how much is it short and which limits stand in the way?

With unserved energy allowed at the value of lost load, almost any budget is "feasible" by shedding demand. So a
budget counts as **not achievable** when the least-cost pathway under it either is infeasible in HiGHS or needs more
unserved electricity or fuel than the same scenario without the budget (beyond :data:`UNSERVED_TOLERANCE`).

For a budget that is not achievable, the **tightest feasible budget** is the minimum of cumulative budget-period
emissions under the scenario's other limits (build-rate limits, potentials, phase-outs, reserve margin, caps, clean
share, any fixed history), with unserved energy capped hour by hour at the no-budget pathway's level: an LP with a
pure emissions objective (:func:`pathcast.analysis.variants.emissions_only`). The **binding limits** are read from
that LP: columns at a finite bound whose reduced cost d = c - A'y is nonzero, and policy rows with a nonzero dual. The
reduced cost is in MtCO2 per unit of the bound (GW, GWh or PJ/yr). That LP has no costs and is degenerate, so one
dual solution can show a limit as binding that is not (relaxing it changes nothing); the candidates are therefore
confirmed by re-solving with each relaxed by :data:`RELAXATION_STEP` of its value (:data:`RELAXATION_AT_ZERO` where it
is zero) and keeping those whose relaxation lowers the minimum, ranked by how much it does.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from ..errors import InfeasibleError
from ..pipeline import Run, run_scenario, solve_inputs
from ..results.budget import budget_tolerance
from ..scenario.extensions import ExtensionSpec
from ..scenario.inputs import ModelInputs, present
from ..scenario.loader import LoadedScenario
from .variants import cap_unserved, emissions_only, without_budget

__all__ = [
    "BindingLimit",
    "BudgetDiagnosis",
    "CheckedRun",
    "diagnose_budget",
    "run_checking_budget",
    "minimum_budget_emissions",
    "binding_limits",
    "confirm_limits",
    "RELAXATION_STEP",
    "RELAXATION_AT_ZERO",
    "CONFIRM_AT_MOST",
    "explain",
    "raise_if_not_achievable",
    "UNSERVED_TOLERANCE",
    "extra_unserved",
]

UNSERVED_TOLERANCE = (
    1e-6  # [TWh] and [PJ]: unserved energy beyond the no-budget case that still counts as none
)
RELAXATION_STEP = (
    0.05  # a binding limit is confirmed by relaxing it by 5 % of its value (common practice, no source)
)
RELAXATION_AT_ZERO = {"GW": 0.1, "PJ/yr": 1.0, "share": 0.01}  # steps where a limit is zero [GW, PJ/yr, -]
CONFIRM_AT_MOST = 8  # candidates re-solved, largest reduced cost first
_MARGINAL_TOLERANCE = 1e-7  # [MtCO2 per unit of a bound]: smaller reduced costs are solver noise

Progress = Callable[[str], None]


@dataclass(frozen=True)
class BindingLimit:
    """One limit that holds the minimum of cumulative emissions up.

    kind: 'build-rate limit', 'no new builds', 'minimum build', 'potential', 'phase-out', 'supply potential',
    'no extra unserved energy', 'fixed history', 'reserve margin', 'clean-electricity share', 'storage duration'.
    marginal_mtco2_per_unit: MtCO2 the minimum falls per unit more of the bound (GW, GWh, PJ/yr), summed over the
    binding years (from the reduced costs of one dual solution). relaxation / cut_mtco2: the re-solve that confirmed
    it, as a text (e.g. '+5 %') and the MtCO2 by which it lowered the minimum; None where not re-solved (the fixed
    history and the cap on unserved energy bind by construction).
    """

    kind: str
    name: str
    years: tuple[int, ...]
    bound: float | None
    unit: str
    marginal_mtco2_per_unit: float
    relaxation: str | None = None
    cut_mtco2: float | None = None

    def describe(self) -> str:
        span = _span(self.years)
        if self.kind in ("build-rate limit", "potential", "supply potential") and self.bound is not None:
            text = f"{self.kind} of {self.name} ({self.bound:,.0f} {self.unit}) in {span}"
        elif self.kind in ("no extra unserved energy", "fixed history"):
            text = f"{self.name} ({span})"
        else:
            text = f"{self.kind} of {self.name} in {span}"
        if self.cut_mtco2 is not None:
            text += f" ({self.relaxation} lowers the minimum by {self.cut_mtco2:,.2f} MtCO2)"
        return text


@dataclass(frozen=True)
class BudgetDiagnosis:
    """Whether a scenario's budget is achievable (see the module docstring), with figures in MtCO2, TWh and PJ.

    shortfall_mtco2 = tightest_budget_mtco2 - requested_mtco2 (> 0: the requested budget is that much too tight);
    NaN when the minimum was not computed (an achievable budget)."""

    scenario: str
    requested_mtco2: float
    first_year: int
    last_year: int
    achievable: bool
    infeasible_in_solver: bool = False
    extra_unserved_electricity_twh: float = 0.0
    extra_unserved_fuel_pj: float = 0.0
    tightest_budget_mtco2: float = math.nan
    binding: tuple[BindingLimit, ...] = field(default_factory=tuple)
    budget_run: Run | None = field(default=None, repr=False)
    no_budget_run: Run | None = field(default=None, repr=False)

    @property
    def shortfall_mtco2(self) -> float:
        return self.tightest_budget_mtco2 - self.requested_mtco2

    def as_dict(self) -> dict:
        return {
            "scenario": self.scenario,
            "requested_budget_mtco2": self.requested_mtco2,
            "first_year": self.first_year,
            "last_year": self.last_year,
            "achievable": self.achievable,
            "infeasible_in_solver": self.infeasible_in_solver,
            "extra_unserved_electricity_twh": self.extra_unserved_electricity_twh,
            "extra_unserved_fuel_pj": self.extra_unserved_fuel_pj,
            "tightest_feasible_budget_mtco2": None
            if math.isnan(self.tightest_budget_mtco2)
            else self.tightest_budget_mtco2,
            "shortfall_mtco2": None if math.isnan(self.tightest_budget_mtco2) else self.shortfall_mtco2,
            "binding_limits": [b.describe() for b in self.binding],
        }


def _span(years: tuple[int, ...]) -> str:
    if not years:
        return "all years"
    if len(years) == 1:
        return str(years[0])
    if list(years) == list(range(years[0], years[-1] + 1)):
        return f"{years[0]}-{years[-1]}"
    return ", ".join(str(y) for y in years)


def extra_unserved(run: Run, reference: Run) -> tuple[float, float]:
    """Unserved electricity [TWh] and fuel [PJ] of ``run`` beyond ``reference`` (>= 0)."""
    s, r = run.result.summary, reference.result.summary
    return (
        max(0.0, float(s["unserved_electricity_twh"]) - float(r["unserved_electricity_twh"])),
        max(0.0, float(s["unserved_fuel_pj"]) - float(r["unserved_fuel_pj"])),
    )


def _solve(inputs: ModelInputs, solver: dict | None) -> Run | InfeasibleError:
    """The run of ``inputs``, or the InfeasibleError HiGHS's verdict raised (with the conflicting limits)."""
    try:
        return solve_inputs(inputs, solver=solver)
    except InfeasibleError as error:
        return error


def minimum_budget_emissions(inputs: ModelInputs, no_budget_run: Run, *, solver: dict | None = None) -> Run:
    """Solve for the minimum cumulative emissions over the budget period [MtCO2] under ``inputs``' other limits with
    unserved energy capped at ``no_budget_run``'s level; the run's objective is that minimum."""
    return solve_inputs(emissions_only(cap_unserved(inputs, no_budget_run)), solver=solver)


def binding_limits(run: Run, *, top: int | None = None) -> tuple[BindingLimit, ...]:
    """Limits that bind in a minimum-emissions run (:func:`minimum_budget_emissions`), largest marginal first."""
    model, solution = run.model, run.solution
    lp, inputs, ctx = model.lp, model.inputs, model.context
    matrix, _, _ = lp.matrix()
    x = solution.x
    reduced = (
        lp.cost_vector() - matrix.T @ solution.row_dual
    )  # [objective units per column unit] = MtCO2 per unit
    lower, upper = lp.column_bounds()
    years = inputs.years.tolist()
    scale = np.maximum(1.0, np.abs(x))
    found: dict[tuple[str, str], dict] = {}

    def note(kind: str, name: str, year: int | None, bound: float | None, unit: str, marginal: float) -> None:
        entry = found.setdefault(
            (kind, name), {"years": set(), "bound": bound, "unit": unit, "marginal": 0.0}
        )
        if year is not None:
            entry["years"].add(int(year))
        entry["marginal"] += float(marginal)

    fixed = inputs.column_bounds
    for block_name, block in lp.variables.items():
        cols = block.all()
        if cols.size == 0:
            continue
        d = reduced[cols]
        at_upper = (
            np.isfinite(upper[cols])
            & (x[cols] >= upper[cols] - 1e-7 * scale[cols])
            & (d < -_MARGINAL_TOLERANCE)
        )
        at_lower = (
            (x[cols] <= lower[cols] + 1e-7 * scale[cols]) & (lower[cols] > 0) & (d > _MARGINAL_TOLERANCE)
        )
        given = fixed.get(block_name)
        pinned = np.zeros(cols.shape, dtype=bool)
        if given is not None:
            pinned = ~np.isnan(np.broadcast_to(np.asarray(given[1], dtype=float), cols.shape))
        for index in zip(*np.nonzero(at_upper | at_lower), strict=True):
            marginal = abs(float(d[index]))
            bound = float(upper[cols][index]) if at_upper[index] else float(lower[cols][index])
            kind, name, year, shown, unit = _classify(
                block_name,
                block,
                index,
                bound,
                bool(at_upper[index]),
                bool(pinned[index]),
                ctx,
                inputs,
                years,
            )
            if kind is not None:
                note(kind, name, year, shown, unit, marginal)

    offsets = lp.row_offsets()
    for row_name, kind in (
        ("reserve_margin", "reserve margin"),
        ("clean_electricity_share", "clean-electricity share"),
        ("storage_duration_max", "storage duration"),
        ("storage_duration_min", "storage duration"),
    ):
        row_block = lp.row_blocks.get(row_name)
        if row_block is None or row_block.size == 0:
            continue
        dual = solution.row_dual[offsets[row_name] : offsets[row_name] + row_block.size]
        for i in np.flatnonzero(np.abs(dual) > _MARGINAL_TOLERANCE):
            year = years[i % len(years)] if row_block.size % len(years) == 0 else None
            note(kind, row_name.replace("_", " "), year, None, "", abs(float(dual[i])))

    limits = [
        BindingLimit(
            kind=k,
            name=n,
            years=tuple(sorted(v["years"])),
            bound=v["bound"],
            unit=v["unit"],
            marginal_mtco2_per_unit=v["marginal"],
        )
        for (k, n), v in found.items()
    ]
    # largest marginal first; the cap on unserved energy (binding by construction) last
    limits.sort(key=lambda b: (b.kind == "no extra unserved energy", -b.marginal_mtco2_per_unit))
    return tuple(limits[:top] if top else limits)


def _classify(block_name, block, index, bound, at_upper, pinned, ctx, inputs, years):
    """(kind, name, year, bound shown, unit) of a column at a bound, or kind None for columns that are no limit."""
    if block_name in ("unserved", "unserved_fuel"):
        year = (
            years[index[0]] if block_name == "unserved" else years[index[1]]
        )  # [year, day, hour] or [demand, year]
        return "no extra unserved energy", "no more unserved energy than without the budget", year, None, ""
    if pinned:
        return (
            "fixed history",
            "builds, capacity and emissions fixed to the reference pathway before the start year",
            years[index[-1]],
            None,
            "",
        )
    if block_name in ("new", "capacity", "energy_new", "energy_capacity"):
        techs = ctx.capacity_techs if block_name in ("new", "capacity") else ctx.storage
        tech = techs[index[0]]
        year = years[index[1]]
        power = block_name in ("new", "capacity")
        unit = ("MW" if power else "MWh") + ("/yr" if block_name.endswith("new") else "")
        shown = bound * 1000.0
        if block_name.endswith("new"):
            if not at_upper:
                return "minimum build", tech.name, year, shown, unit
            return ("build-rate limit" if bound > 0 else "no new builds"), tech.name, year, shown, unit
        if bound <= 0:
            return "phase-out", tech.name, year, None, unit
        return "potential", tech.name, year, shown, unit
    if block_name == "supply":
        supply = inputs.supplies[index[0]]
        return "supply potential", supply.name, years[index[1]], bound, "PJ/yr"
    return None, None, None, None, None


def _relaxed(inputs: ModelInputs, limit: BindingLimit) -> tuple[ModelInputs, str] | None:
    """``inputs`` with ``limit`` relaxed in its binding years, and the relaxation as a text; None if not relaxable."""
    mask = np.isin(inputs.years, limit.years)

    def up(values: np.ndarray, at_zero: float) -> np.ndarray:
        values = np.asarray(values, dtype=float)
        step = np.where(values > 0, RELAXATION_STEP * values, at_zero)
        return np.where(mask & np.isfinite(values), values + step, values)

    step_text = f"+{100 * RELAXATION_STEP:.0f} %"
    techs = {t.name: i for i, t in enumerate(inputs.technologies)}
    if limit.kind in ("build-rate limit", "no new builds", "potential", "phase-out", "minimum build"):
        i = techs[limit.name]
        t = inputs.technologies[i]
        if limit.kind in ("build-rate limit", "no new builds"):
            changed = replace(t, max_build_gw=up(t.max_build_gw, RELAXATION_AT_ZERO["GW"]))
        elif limit.kind in ("potential", "phase-out"):
            changed = replace(t, max_total_gw=up(t.max_total_gw, RELAXATION_AT_ZERO["GW"]))
        else:
            changed = replace(
                t, min_build_gw=np.where(mask, (1 - RELAXATION_STEP) * t.min_build_gw, t.min_build_gw)
            )
            step_text = f"-{100 * RELAXATION_STEP:.0f} %"
        if limit.kind in ("no new builds", "phase-out"):
            step_text = f"+{1000 * RELAXATION_AT_ZERO['GW']:,.0f} MW"
        techs_new = list(inputs.technologies)
        techs_new[i] = changed
        return replace(inputs, technologies=tuple(techs_new)), step_text
    if limit.kind == "supply potential":
        supplies = list(inputs.supplies)
        i = next(k for k, sup in enumerate(supplies) if sup.name == limit.name)
        supplies[i] = replace(
            supplies[i], potential_pj=up(supplies[i].potential_pj, RELAXATION_AT_ZERO["PJ/yr"])
        )
        return replace(inputs, supplies=tuple(supplies)), step_text
    if limit.kind == "reserve margin" and inputs.reserve_margin is not None and inputs.reserve_margin > 0:
        step = RELAXATION_AT_ZERO["share"]
        return replace(
            inputs, reserve_margin=max(0.0, inputs.reserve_margin - step)
        ), f"-{100 * step:.0f} points"
    if limit.kind == "clean-electricity share" and inputs.clean_share is not None:
        step = RELAXATION_AT_ZERO["share"]
        share = np.where(mask, np.maximum(inputs.clean_share - step, 0.0), inputs.clean_share)
        return replace(inputs, clean_share=share), f"-{100 * step:.0f} points"
    return None


def confirm_limits(
    inputs: ModelInputs,
    no_budget_run: Run,
    minimum_mt: float,
    candidates: tuple[BindingLimit, ...],
    *,
    solver: dict | None = None,
    at_most: int = CONFIRM_AT_MOST,
) -> tuple[BindingLimit, ...]:
    """Keep the candidate limits whose relaxation (:func:`_relaxed`) lowers the minimum cumulative emissions
    ``minimum_mt`` [MtCO2] by more than the solver's tolerance; ranked by that cut. Limits that bind by construction
    (fixed history, the cap on unserved energy) are kept without a re-solve, listed after the confirmed ones."""
    tolerance = 1e-6 * max(1.0, abs(minimum_mt))
    confirmed, kept, tried = [], [], 0
    for limit in candidates:
        if limit.kind in ("fixed history", "no extra unserved energy"):
            kept.append(limit)
            continue
        if tried >= at_most:
            continue
        variant = _relaxed(inputs, limit)
        if variant is None:
            continue
        tried += 1
        relaxed_inputs, text = variant
        try:
            lower = float(
                minimum_budget_emissions(relaxed_inputs, no_budget_run, solver=solver).solution.objective
            )
        except InfeasibleError:  # pragma: no cover - relaxing a limit cannot make the LP infeasible
            continue
        if minimum_mt - lower > tolerance:
            confirmed.append(replace(limit, relaxation=text, cut_mtco2=minimum_mt - lower))
    confirmed.sort(key=lambda b: -(b.cut_mtco2 or 0.0))  # every confirmed limit has its cut
    kept.sort(key=lambda b: b.kind == "no extra unserved energy")
    return tuple(confirmed + kept)


def diagnose_budget(
    inputs: ModelInputs,
    *,
    budget_run: Run | None = None,
    budget_infeasible: bool = False,
    solver: dict | None = None,
    always_minimum: bool = False,
    progress: Progress | None = None,
) -> BudgetDiagnosis | None:
    """Diagnose ``inputs``' carbon budget (None when there is none). ``budget_run`` is the least-cost run under the
    budget when already solved, ``budget_infeasible`` says HiGHS found it infeasible; with neither it is solved here
    (an infeasible solve counts as not achievable). The minimum feasible budget is solved only when the budget is not
    achievable, or when ``always_minimum``."""
    if inputs.budget_mt is None:
        return None
    say = progress or (lambda _m: None)
    first, last = present(inputs.budget_years)
    infeasible = budget_infeasible
    if budget_run is None and not infeasible:
        say("solving under the budget")
        solved = _solve(inputs, solver)
        infeasible = isinstance(solved, InfeasibleError)
        budget_run = None if isinstance(solved, InfeasibleError) else solved
    no_budget_run = None
    extra_el = extra_fuel = 0.0
    shed = budget_run is not None and (
        budget_run.result.summary["unserved_electricity_twh"] > UNSERVED_TOLERANCE
        or budget_run.result.summary["unserved_fuel_pj"] > UNSERVED_TOLERANCE
    )
    if infeasible or shed or always_minimum:
        say("solving without the budget")
        solved = _solve(without_budget(inputs), solver)
        if isinstance(solved, InfeasibleError):
            # the other limits conflict on their own: name them (HiGHS's conflicting set), not the budget
            reason = solved.diagnosis.get("reason", "its other limits cannot all be met together")
            raise InfeasibleError(
                f"scenario {inputs.name!r} is infeasible even without its carbon budget: {reason}.",
                diagnosis={"scenario": inputs.name, "infeasible_without_budget": True, **solved.diagnosis},
            )
        no_budget_run = solved
        if budget_run is not None:
            extra_el, extra_fuel = extra_unserved(budget_run, no_budget_run)
    achievable = not infeasible and extra_el <= UNSERVED_TOLERANCE and extra_fuel <= UNSERVED_TOLERANCE
    tightest = math.nan
    binding: tuple[BindingLimit, ...] = ()
    if not achievable or always_minimum:
        # solved above: without the budget whenever it is infeasible, sheds energy or always_minimum is asked
        assert no_budget_run is not None
        say("solving for the minimum cumulative emissions")
        minimum = minimum_budget_emissions(inputs, no_budget_run, solver=solver)
        tightest = float(minimum.solution.objective)
        candidates = binding_limits(minimum)
        say(f"confirming up to {CONFIRM_AT_MOST} of {len(candidates)} candidate binding limits by re-solving")
        binding = confirm_limits(inputs, no_budget_run, tightest, candidates, solver=solver)
    return BudgetDiagnosis(
        scenario=inputs.name,
        requested_mtco2=float(inputs.budget_mt),
        first_year=int(first),
        last_year=int(last),
        achievable=achievable,
        infeasible_in_solver=infeasible,
        extra_unserved_electricity_twh=extra_el,
        extra_unserved_fuel_pj=extra_fuel,
        tightest_budget_mtco2=tightest,
        binding=binding,
        budget_run=budget_run,
        no_budget_run=no_budget_run,
    )


def explain(d: BudgetDiagnosis, *, limits_shown: int = 5) -> str:
    """One paragraph for a budget that is not achievable: scenario, requested and tightest feasible budget,
    shortfall, binding limits, what to do."""
    period = f"{d.first_year}-{d.last_year}"
    if d.infeasible_in_solver:
        why = "HiGHS finds no pathway that meets it together with the scenario's other limits"
    else:
        parts = []
        if d.extra_unserved_electricity_twh > UNSERVED_TOLERANCE:
            parts.append(f"{d.extra_unserved_electricity_twh:,.3f} TWh of unserved electricity")
        if d.extra_unserved_fuel_pj > UNSERVED_TOLERANCE:
            parts.append(f"{d.extra_unserved_fuel_pj:,.3f} PJ of unserved fuel")
        why = f"the least-cost pathway under it sheds {' and '.join(parts)} more than the same scenario without the budget"
    text = f"scenario {d.scenario!r}: the carbon budget of {d.requested_mtco2:,.1f} MtCO2 for {period} is not achievable: {why}."
    if math.isnan(d.tightest_budget_mtco2):
        return text
    shortfall = d.shortfall_mtco2
    if shortfall > budget_tolerance(d.requested_mtco2):
        text += (
            f" Under the scenario's other limits the tightest feasible budget is {d.tightest_budget_mtco2:,.1f} "
            f"MtCO2, so the requested budget is {shortfall:,.1f} MtCO2 short."
        )
        # the fixed history (a delayed start) first, then the confirmed limits by their effect; the cap on unserved
        # energy binds by definition and is not repeated here
        history = [b for b in d.binding if b.kind == "fixed history"]
        others = [b for b in d.binding if b.kind not in ("fixed history", "no extra unserved energy")]
        shown = [b.describe() for b in history + others[:limits_shown]]
        if shown:
            more = f" and {len(others) - limits_shown} more" if len(others) > limits_shown else ""
            text += f" Binding limits: {'; '.join(shown)}{more}."
        text += (
            " Relax those limits, ask for a larger budget, or price an overshoot with "
            "'pathcast run --allow-overshoot PRICE'."
        )
    else:
        text += (
            f" The budget itself could be met without extra shedding (the tightest feasible budget is "
            f"{d.tightest_budget_mtco2:,.1f} MtCO2), but at the scenario's value of lost load shedding is cheaper "
            "than the remaining abatement: raise metadata.value_of_lost_load or metadata.value_of_unserved_fuel."
        )
    return text


def raise_if_not_achievable(d: BudgetDiagnosis | None) -> None:
    """Raise :class:`InfeasibleError` (exit 3) with :func:`explain` when the budget is not achievable."""
    if d is not None and not d.achievable:
        raise InfeasibleError(explain(d), diagnosis=d.as_dict())


@dataclass(frozen=True)
class CheckedRun:
    """A solved scenario and the verdict on its carbon budget. ``diagnosis`` is None when the scenario has no budget
    or an overshoot is priced (the budget is then no hard limit)."""

    run: Run
    diagnosis: BudgetDiagnosis | None = None

    @property
    def achievable(self) -> bool:
        """False when the least-cost pathway meets the budget only by shedding demand (module docstring)."""
        return self.diagnosis is None or self.diagnosis.achievable

    def raise_if_not_achievable(self) -> None:
        """Raise :class:`InfeasibleError` (exit 3) with :func:`explain` when the budget is not achievable."""
        raise_if_not_achievable(self.diagnosis)


def run_checking_budget(
    scenario: str | Path | LoadedScenario,
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
    inputs_hook: Callable[[ModelInputs], ModelInputs] | None = None,
    extensions: Sequence[ExtensionSpec] = (),
    budget_overshoot_price: float | None = None,
) -> CheckedRun:
    """What ``pathcast run`` computes: :func:`pathcast.pipeline.run_scenario` (same arguments), then the verdict on
    the carbon budget (:func:`diagnose_budget`) unless an overshoot is priced.

    A budget HiGHS finds infeasible raises :class:`InfeasibleError` with :func:`explain` (the tightest feasible budget,
    the shortfall [MtCO2] and the binding limits); a pathway that meets the budget only by shedding demand is returned
    with its not-achievable diagnosis (:attr:`CheckedRun.achievable` False), so that its tables can be kept for
    inspection before :meth:`CheckedRun.raise_if_not_achievable`."""
    captured: list[ModelInputs] = []

    def keep(inputs: ModelInputs) -> ModelInputs:
        inputs = inputs_hook(inputs) if inputs_hook is not None else inputs
        captured.append(inputs)
        return inputs

    try:
        run = run_scenario(
            scenario,
            solver=solver,
            progress=progress,
            inputs_hook=keep,
            extensions=extensions,
            budget_overshoot_price=budget_overshoot_price,
        )
    except InfeasibleError:
        if not captured or captured[-1].budget_mt is None or budget_overshoot_price is not None:
            raise
        diagnosis = diagnose_budget(captured[-1], budget_infeasible=True, solver=solver, progress=progress)
        # HiGHS said infeasible, so the budget cannot be achievable
        if diagnosis is None or diagnosis.achievable:  # pragma: no cover
            raise
        raise InfeasibleError(explain(diagnosis), diagnosis=diagnosis.as_dict()) from None
    if budget_overshoot_price is not None:
        return CheckedRun(run)
    return CheckedRun(run, diagnose_budget(captured[-1], budget_run=run, solver=solver, progress=progress))
