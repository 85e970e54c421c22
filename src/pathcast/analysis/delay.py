"""Delayed action, optimised: what waiting costs under a carbon budget.

For each start year S, the **reference pathway** (the scenario without its budget, yearly caps and carbon price;
build limits, potentials, phase-outs, reserve margin and clean-electricity share kept) is followed until S: its builds,
capacity in service (power and storage energy) and yearly emissions are fixed for every year before S
(:func:`pathcast.analysis.variants.fix_history`, through ``ModelInputs.column_bounds``). From S on, the least-cost
pathway under the scenario's budget (and its caps and carbon price from S on) is solved. S = base year is immediate
action, the comparison for the extra cost.

Each start year reports: the reference's emissions in the last year before action (S - 1; for S = base year, the
base year's own) and what is left of the budget at S, the constant exponential rate that would use exactly that
remainder from that level on (E_t = E0 (1 - r)^t with t = 0 the year before action, not counted, so the years from S
on sum to E0 (1 - r) / r: :func:`required_rate_exponential` with ``count_start_year=False``, the same footing as the
optimised pathway, which is free from S itself), the total
discounted system cost and its increase over immediate action, the steepest yearly cut of the optimised pathway
(largest year-on-year reduction in %/yr and, separately, in MtCO2), stranded capacity (MW retired before the end of
its lifetime, and undepreciated capex as the remaining annuity of the model-built vintages:
:mod:`pathcast.analysis.stranded`), the budget's carbon price in S, and whether the budget can still be met
(:mod:`pathcast.analysis.achievability`: otherwise the tightest feasible budget and the shortfall).

A later start only adds fixed years, so its feasible set lies inside an earlier start's: cost never falls with a
later start.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import pandas as pd

from ..errors import ScenarioError
from ..pipeline import Run, solve_inputs
from ..results.budget import BudgetTerms
from ..results.reduction_rates import BudgetExhaustedError, realised_rates, required_rate_exponential
from ..scenario.inputs import ModelInputs, present
from .achievability import BudgetDiagnosis, diagnose_budget
from .stranded import stranded_capacity
from .variants import fix_history, reference_inputs

__all__ = ["DelayCase", "DelayStudy", "delayed_action", "delay_study", "default_start_years", "DELAY_COLUMNS"]

Progress = Callable[[str], None]

DELAY_COLUMNS = (
    "start_year",
    "emissions_before_action_mtco2",
    "remaining_budget_mtco2",
    "required_rate_per_year",
    "total_discounted_cost_million",
    "cost_increase_million",
    "cumulative_budget_period_mtco2",
    "steepest_cut_pct_per_year",
    "steepest_cut_year",
    "steepest_cut_mtco2",
    "stranded_mw",
    "stranded_capex_million",
    "carbon_price_at_start_per_tco2",
    "achievable",
    "tightest_budget_mtco2",
    "shortfall_mtco2",
)


@dataclass(frozen=True)
class DelayCase:
    """One start year: the optimised delayed pathway (None when HiGHS finds it infeasible), its diagnosis and its
    early retirements (:func:`pathcast.analysis.stranded.stranded_capacity`)."""

    start_year: int
    inputs: ModelInputs = field(repr=False)
    run: Run | None = field(repr=False)
    diagnosis: BudgetDiagnosis
    stranded: pd.DataFrame = field(repr=False)


@dataclass(frozen=True)
class DelayStudy:
    """All start years of a delayed-action study; ``table`` has the columns :data:`DELAY_COLUMNS` (money in million
    currency of the price year, discounted to the base year where it says so; CO2 in MtCO2)."""

    scenario: str
    currency: str
    terms: BudgetTerms
    reference: Run = field(repr=False)
    immediate: DelayCase = field(repr=False)
    cases: tuple[DelayCase, ...] = field(repr=False)
    table: pd.DataFrame

    def pathways(self) -> pd.DataFrame:
        """Yearly emissions [MtCO2/yr] and budget carbon price [currency/tCO2] of the reference and of each start."""
        parts = [
            self.reference.result.emissions_total[["year", "emissions_mtco2"]].assign(
                start_year="reference", carbon_price_per_tco2=0.0
            )
        ]
        for case in self.cases:
            if case.run is None:
                continue
            r = case.run.result
            frame = r.emissions_total[["year", "emissions_mtco2"]].merge(
                r.carbon_price[["year", "carbon_price_per_tco2"]], on="year"
            )
            parts.append(frame.assign(start_year=str(case.start_year)))
        return pd.concat(parts, ignore_index=True)[
            ["start_year", "year", "emissions_mtco2", "carbon_price_per_tco2"]
        ]

    def stranded(self) -> pd.DataFrame:
        """Early retirements of every start year, with a start_year column."""
        parts = [c.stranded.assign(start_year=c.start_year) for c in self.cases if len(c.stranded)]
        if not parts:
            return pd.DataFrame(
                columns=[
                    "start_year",
                    "technology",
                    "vintage",
                    "year",
                    "stranded_mw",
                    "remaining_life_years",
                    "undepreciated_capex_million",
                ]
            )
        frame = pd.concat(parts, ignore_index=True)
        return frame[["start_year"] + [c for c in frame.columns if c != "start_year"]]


def _check_starts(inputs: ModelInputs, start_years: Sequence[int]) -> list[int]:
    first_model, last_model = int(inputs.years[0]), int(inputs.years[-1])
    first, last = present(inputs.budget_years)
    latest = min(last, last_model)
    starts = sorted({int(s) for s in start_years})
    if not starts:
        raise ScenarioError("--start: got no start year; expected one or more years, e.g. 2025,2030,2035.")
    for s in starts:
        if not first_model <= s <= latest:
            raise ScenarioError(
                f"start year {s!r} of scenario {inputs.name!r}: expected a year from the base year "
                f"{first_model} to {latest} (the budget period {first}-{last} within the horizon)."
            )
    return starts


def _case(inputs: ModelInputs, reference: Run, start: int, solver: dict | None, say: Progress) -> DelayCase:
    case_inputs = inputs if start <= int(inputs.years[0]) else fix_history(inputs, reference, start)
    say(f"start {start}: least-cost pathway under the budget from {start} on")
    diagnosis = diagnose_budget(case_inputs, solver=solver, progress=say)
    assert diagnosis is not None  # None only without a budget, which the study refuses first
    run = diagnosis.budget_run
    stranded = stranded_capacity(run.result, case_inputs) if run is not None else stranded_capacity_empty()
    return DelayCase(start_year=start, inputs=case_inputs, run=run, diagnosis=diagnosis, stranded=stranded)


def stranded_capacity_empty() -> pd.DataFrame:
    return pd.DataFrame(
        columns=[
            "technology",
            "vintage",
            "year",
            "stranded_mw",
            "remaining_life_years",
            "undepreciated_capex_million",
        ]
    )


def delayed_action(
    inputs: ModelInputs,
    start_years: Sequence[int],
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
) -> DelayStudy:
    """Solve the delayed-action study of ``inputs`` (a scenario with a carbon budget) for each start year; see the
    module docstring."""
    say = progress or (lambda _m: None)
    if inputs.budget_mt is None:
        raise ScenarioError(
            f"scenario {inputs.name!r}: policy.carbon_budget: got none; expected a carbon budget for "
            "the delayed-action study.",
            field="policy.carbon_budget",
        )
    starts = _check_starts(inputs, start_years)
    first, last = present(inputs.budget_years)
    terms = BudgetTerms(float(inputs.budget_mt), int(first), int(last))
    say("solving the reference pathway (no budget, caps or carbon price)")
    reference = solve_inputs(reference_inputs(inputs), solver=solver)
    cases = {s: _case(inputs, reference, s, solver, say) for s in starts}
    base = int(inputs.years[0])
    immediate = cases.get(base) or _case(inputs, reference, base, solver, say)
    ref_years = inputs.years
    ref_emissions = reference.result.emissions_total["emissions_mtco2"].to_numpy(dtype=float)
    base_cost = immediate.run.result.summary["total_discounted_cost_million"] if immediate.run else math.nan
    rows = []
    for s in starts:
        case = cases[s]
        e0 = float(ref_emissions[ref_years == max(s - 1, base)][0])
        before = (ref_years >= first) & (ref_years < s)
        remaining = terms.budget_mt - float(ref_emissions[before].sum())
        try:
            rate = required_rate_exponential(e0, remaining, count_start_year=False)
        except BudgetExhaustedError:
            rate = math.nan
        row: dict[str, float | None] = {
            "start_year": s,
            "emissions_before_action_mtco2": e0,
            "remaining_budget_mtco2": remaining,
            "required_rate_per_year": rate,
            "achievable": case.diagnosis.achievable,
            "tightest_budget_mtco2": case.diagnosis.tightest_budget_mtco2,
            "shortfall_mtco2": case.diagnosis.shortfall_mtco2,
        }
        if case.run is not None:
            r = case.run.result
            yearly, _ = realised_rates(r)
            cuts = yearly.dropna(subset=["reduction_rate"])
            steepest = cuts.loc[cuts["reduction_rate"].idxmax()] if len(cuts) else None
            price = r.carbon_price.set_index("year")["from_budget_per_tco2"]
            total = r.emissions_total
            inside = (total["year"] >= first) & (total["year"] <= last)
            row.update(
                {
                    "total_discounted_cost_million": float(r.summary["total_discounted_cost_million"]),
                    "cost_increase_million": float(r.summary["total_discounted_cost_million"]) - base_cost,
                    "cumulative_budget_period_mtco2": float(total.loc[inside, "emissions_mtco2"].sum()),
                    "steepest_cut_pct_per_year": 100.0 * float(steepest["reduction_rate"])
                    if steepest is not None
                    else math.nan,
                    "steepest_cut_year": int(steepest["year"]) if steepest is not None else None,
                    "steepest_cut_mtco2": float(cuts["reduction_mtco2"].max()) if len(cuts) else math.nan,
                    "stranded_mw": float(case.stranded["stranded_mw"].sum()),
                    "stranded_capex_million": float(
                        case.stranded["undepreciated_capex_million"].sum(min_count=0)
                    ),
                    "carbon_price_at_start_per_tco2": float(price.get(s, math.nan)),
                }
            )
        rows.append(row)
    table = pd.DataFrame(rows).reindex(columns=list(DELAY_COLUMNS))
    return DelayStudy(
        scenario=inputs.name,
        currency=inputs.currency,
        terms=terms,
        reference=reference,
        immediate=immediate,
        cases=tuple(cases[s] for s in starts),
        table=table,
    )


def default_start_years(inputs: ModelInputs) -> list[int]:
    """Every 5th year from the base year that lies inside the budget period (at least the budget's first year in the
    horizon); none when the scenario has no budget."""
    if inputs.budget_years is None:
        return []
    base, last = int(inputs.years[0]), min(inputs.budget_years[1], int(inputs.years[-1]))
    return [y for y in range(base, last + 1, 5) if y >= inputs.budget_years[0]] or [
        max(base, inputs.budget_years[0])
    ]


def delay_study(
    scenario: str | Path,
    start_years: Sequence[int] | None = None,
    *,
    solver: dict | None = None,
    progress: Progress | None = None,
) -> DelayStudy:
    """What ``pathcast delay`` computes: the scenario file read, then :func:`delayed_action` for ``start_years``
    (default :func:`default_start_years`)."""
    from ..scenario.inputs import prepare_inputs
    from ..scenario.loader import load_scenario

    say = progress or (lambda _m: None)
    say(f"reading {scenario}")
    inputs = prepare_inputs(load_scenario(scenario).scenario)
    starts = default_start_years(inputs) if start_years is None else list(start_years)
    return delayed_action(inputs, starts, solver=solver, progress=progress)
