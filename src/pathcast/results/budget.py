"""Carbon-budget accounting of a run: cumulative CO2 against the budget, the year the budget runs out, the headroom left
at the end of the budget period, and the warming that the pathway's cumulative CO2 implies by TCRE.

Reads only the :class:`RunResult` (its ``emissions_total`` table and the budget figures in ``summary``), so it works
on a fresh run and on a result folder read back with :func:`pathcast.results.writers.read_result` alike.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .climate_constants import TCRE_SOURCE, warming_from_cumulative_co2
from .run_result import RunResult

__all__ = [
    "BudgetAccount",
    "BudgetTerms",
    "budget_accounting",
    "budget_terms",
    "yearly_emissions",
    "budget_tolerance",
]


def budget_tolerance(budget_mt: float) -> float:
    """Slack [MtCO2] within which cumulative emissions still count as inside a budget: 1e-6 relative plus 1e-6 MtCO2,
    the same allowance as the run summary's ``within_budget`` (it absorbs the solver's feasibility tolerance)."""
    return 1e-6 * abs(budget_mt) + 1e-6


@dataclass(frozen=True)
class BudgetTerms:
    """A cumulative CO2 budget [MtCO2] over the years ``first_year``..``last_year`` (inclusive)."""

    budget_mt: float
    first_year: int
    last_year: int


@dataclass(frozen=True)
class BudgetAccount:
    """Budget accounting of one run.

    ``table`` has one row per modelled year: year, emissions_mtco2 [MtCO2/yr], cumulative_mtco2 [MtCO2] (summed over
    the budget period's years up to this year; years before the period add nothing; from the base year when there is
    no budget), budget_mtco2 [MtCO2] (NaN without a budget), remaining_mtco2 [MtCO2] (budget - cumulative; NaN without
    a budget) and in_budget_period.

    ``exhaustion_year``: first year whose cumulative emissions within the budget period exceed the budget (beyond
    :func:`budget_tolerance`); None if never or without a budget. ``headroom_final_mtco2``: budget minus cumulative
    emissions in the budget's last modelled year (negative when overshot); None without a budget.

    ``warming``: warming contribution [C] of the pathway's cumulative CO2 over the whole modelled horizon by TCRE
    (AR6 WG1 SPM D.1.1): keys ``warming_best_c``, ``warming_low_c``, ``warming_high_c`` (likely range) and
    ``cumulative_mtco2`` (the CO2 they are computed from). CO2 only.
    """

    table: pd.DataFrame
    exhaustion_year: int | None
    headroom_final_mtco2: float | None
    warming: dict
    terms: BudgetTerms | None = None
    warming_source: str = field(default=TCRE_SOURCE)


def yearly_emissions(result: RunResult) -> tuple[np.ndarray, np.ndarray]:
    """(years, emissions [MtCO2/yr]) of a run, in year order."""
    total = result.tables["emissions_total"].sort_values("year")
    return total["year"].to_numpy(dtype=int), total["emissions_mtco2"].to_numpy(dtype=float)


def budget_terms(result: RunResult, budget_mt: float | None = None) -> BudgetTerms | None:
    """The run's budget from its summary (carbon_budget_mtco2, budget_first_year, budget_last_year); ``budget_mt``
    overrides the amount (its period then defaults to the whole modelled horizon). None when there is neither."""
    summary = result.summary
    amount = summary.get("carbon_budget_mtco2") if budget_mt is None else budget_mt
    if amount is None or (isinstance(amount, float) and math.isnan(amount)):
        return None
    first = summary.get("budget_first_year")
    last = summary.get("budget_last_year")
    return BudgetTerms(
        budget_mt=float(amount),
        first_year=int(first if first is not None else summary["base_year"]),
        last_year=int(last if last is not None else summary["final_year"]),
    )


def budget_accounting(result: RunResult, *, budget_mt: float | None = None) -> BudgetAccount:
    """Cumulative CO2 against the run's carbon budget (or ``budget_mt`` [MtCO2], which overrides it), the exhaustion
    year, the final headroom and the warming implied by TCRE; see :class:`BudgetAccount` for the definitions."""
    years, emissions = yearly_emissions(result)
    terms = budget_terms(result, budget_mt)
    warming = warming_from_cumulative_co2(float(emissions.sum()))
    warming["cumulative_mtco2"] = float(emissions.sum())
    if terms is None:
        table = pd.DataFrame(
            {
                "year": years,
                "emissions_mtco2": emissions,
                "cumulative_mtco2": np.cumsum(emissions),
                "budget_mtco2": np.nan,
                "remaining_mtco2": np.nan,
                "in_budget_period": False,
            }
        )
        return BudgetAccount(table=table, exhaustion_year=None, headroom_final_mtco2=None, warming=warming)
    inside = (years >= terms.first_year) & (years <= terms.last_year)
    cumulative = np.cumsum(np.where(inside, emissions, 0.0))
    remaining = terms.budget_mt - cumulative
    table = pd.DataFrame(
        {
            "year": years,
            "emissions_mtco2": emissions,
            "cumulative_mtco2": cumulative,
            "budget_mtco2": terms.budget_mt,
            "remaining_mtco2": remaining,
            "in_budget_period": inside,
        }
    )
    over = inside & (cumulative > terms.budget_mt + budget_tolerance(terms.budget_mt))
    exhaustion = int(years[np.argmax(over)]) if over.any() else None
    headroom = float(remaining[np.flatnonzero(inside)[-1]]) if inside.any() else float(terms.budget_mt)
    return BudgetAccount(
        table=table, exhaustion_year=exhaustion, headroom_final_mtco2=headroom, warming=warming, terms=terms
    )
