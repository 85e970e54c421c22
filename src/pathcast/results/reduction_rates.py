"""Reduction rates: the constant rate of decline (or the linear phase-down) that fits a remaining carbon budget, and the
rates a pathway actually realises.

Conventions (time t in years from the start year, t = 0 the start year itself):

* Exponential: E_t = E0 (1 - r)^t. Counting the start year (t >= 0, the default) the cumulative emissions are
  sum_{t>=0} E0 (1-r)^t = E0 / r, so r = E0 / B. Not counting it (t >= 1) they are E0 (1 - r) / r, so r = E0 / (E0 + B).
  Both sums run to infinity: emissions after the budget period's last year count too, as for a budget of all
  remaining time (e.g. the AR6 remaining budgets). The idea of a constant-rate decline that exhausts a quota is used
  e.g. by Raupach et al. (2014), Sharing a quota on cumulative carbon emissions, Nature Climate Change 4, 873-879.
* Linear: discrete yearly steps E_t = E0 (1 - t/N) for t = 0..N (zero from year start + N on). Counting the start year,
  cumulative = E0 (N + 1) / 2, so N = 2 B / E0 - 1; not counting it, cumulative = E0 (N - 1) / 2, so N = 2 B / E0 + 1.
  The sums hold for whole N; a fractional N reads the same closed form as a continuous function of N.

Emissions in MtCO2/yr, budgets in MtCO2, rates as fractions per year (0.076 = 7.6 %/yr).
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd

from ..errors import EXIT_BAD_INPUT, EXIT_INFEASIBLE, PathcastError, ScenarioError
from .budget import BudgetTerms, budget_terms, budget_tolerance, yearly_emissions
from .run_result import RunResult

__all__ = [
    "RateDomainError",
    "BudgetExhaustedError",
    "required_rate_exponential",
    "required_linear_end_year",
    "required_rates_table",
    "realised_rates",
    "compound_reduction_rate",
    "default_start_years",
    "require_budget_terms",
]


class RateDomainError(PathcastError, ValueError):
    """Inputs outside the domain of a reduction-rate formula (negative or non-finite emissions or budget)."""

    exit_code = EXIT_BAD_INPUT


class BudgetExhaustedError(RateDomainError):
    """No decline from the start year's emissions fits into what is left of the budget."""

    exit_code = EXIT_INFEASIBLE


def _check(start_emissions_mt: float, remaining_budget_mt: float) -> tuple[float, float]:
    e0, budget = float(start_emissions_mt), float(remaining_budget_mt)
    if not math.isfinite(e0) or e0 < 0:
        raise RateDomainError(
            f"start emissions {start_emissions_mt!r} MtCO2/yr: expected a finite value >= 0."
        )
    if not math.isfinite(budget):
        raise RateDomainError(f"remaining budget {remaining_budget_mt!r} MtCO2: expected a finite value.")
    if budget <= 0:
        raise BudgetExhaustedError(
            f"the remaining budget is {budget:.6g} MtCO2, so it is exhausted: no decline from "
            f"{e0:.6g} MtCO2/yr fits into it."
        )
    return e0, budget


def _start_year_too_big(e0: float, budget: float) -> BudgetExhaustedError:
    return BudgetExhaustedError(
        f"the start year alone emits {e0:.6g} MtCO2, more than the remaining budget of "
        f"{budget:.6g} MtCO2, so the budget is exhausted within the start year."
    )


def required_rate_exponential(
    start_emissions_mt: float, remaining_budget_mt: float, *, count_start_year: bool = True
) -> float:
    """Constant annual rate of decline r [1/yr] with E_t = E0 (1 - r)^t whose cumulative emissions equal the remaining
    budget, in closed form: r = E0 / B counting the start year (sum over t >= 0 is E0 / r), r = E0 / (E0 + B) not
    counting it (sum over t >= 1 is E0 (1 - r) / r). 0 when E0 = 0.

    Raises :class:`BudgetExhaustedError` when the budget is <= 0, or (start year counted) smaller than E0, which
    would need r > 1; :class:`RateDomainError` for negative or non-finite inputs.
    """
    e0, budget = _check(start_emissions_mt, remaining_budget_mt)
    if e0 == 0:
        return 0.0
    if count_start_year:
        if e0 > budget:
            raise _start_year_too_big(e0, budget)
        return e0 / budget
    return e0 / (e0 + budget)


def required_linear_end_year(
    start_year: int, start_emissions_mt: float, remaining_budget_mt: float, *, count_start_year: bool = True
) -> float:
    """Year in which a linear decline to zero, that exactly uses the remaining budget, reaches zero.

    Discrete yearly steps: E_t = E0 (1 - t/N) for t = 0..N, t years after ``start_year``. Counting the start year the
    cumulative emissions are E0 (N + 1) / 2, so N = 2 B / E0 - 1 (needs B >= E0, i.e. N >= 1); not counting it they are
    E0 (N - 1) / 2, so N = 2 B / E0 + 1. Returns start_year + N (fractional when N is); start_year when E0 = 0.
    Errors as for :func:`required_rate_exponential`.
    """
    e0, budget = _check(start_emissions_mt, remaining_budget_mt)
    if e0 == 0:
        return float(start_year)
    if count_start_year:
        if e0 > budget:
            raise _start_year_too_big(e0, budget)
        return float(start_year) + 2.0 * budget / e0 - 1.0
    return float(start_year) + 2.0 * budget / e0 + 1.0


def require_budget_terms(result: RunResult, budget_mt: float | None) -> BudgetTerms:
    terms = budget_terms(result, budget_mt)
    if terms is None:
        raise ScenarioError(
            f"result {result.scenario_name!r}: summary carbon_budget_mtco2 is None; expected a run with "
            "a carbon budget (policy.carbon_budget) or a budget given with budget_mt (--budget MT)."
        )
    return terms


def default_start_years(result: RunResult, terms: BudgetTerms, step: int = 5) -> list[int]:
    """Every ``step`` years from the base year that lie inside the budget period and the modelled horizon (the budget's
    first modelled year when none does)."""
    years, _ = yearly_emissions(result)
    first, last = max(terms.first_year, int(years[0])), min(terms.last_year, int(years[-1]))
    starts = [int(y) for y in range(int(years[0]), int(years[-1]) + 1, step) if first <= y <= last]
    return starts or ([first] if first <= last else [])


def required_rates_table(
    result: RunResult, start_years: list[int] | None = None, *, budget_mt: float | None = None
) -> pd.DataFrame:
    """Required rates of decline from each start year, given the scenario's own emissions before it.

    For start year S: remaining budget = budget - the run's emissions in the budget period's years before S; from S on
    (S counted) the constant exponential rate (:func:`required_rate_exponential`) and the year of a linear decline to
    zero (:func:`required_linear_end_year`) that use exactly that remainder. Default start years: every 5 years from
    the base year inside the budget period. ``budget_mt`` [MtCO2] overrides the run's budget (or gives one).

    Columns: start_year, emissions_at_start_mtco2, remaining_budget_mtco2, exponential_rate_per_year, linear_end_year,
    budget_exhausted (True where no decline fits: the rate and end year are then NaN).
    """
    terms = require_budget_terms(result, budget_mt)
    years, emissions = yearly_emissions(result)
    if start_years is None:
        start_years = default_start_years(result, terms)
    rows = []
    for start in start_years:
        start = int(start)
        if start not in years:
            raise ScenarioError(
                f"start year {start!r} is not a modelled year of {result.scenario_name!r}; expected a "
                f"year from {int(years[0])} to {int(years[-1])}."
            )
        if not terms.first_year <= start <= terms.last_year:
            raise ScenarioError(
                f"start year {start!r} lies outside the budget period {terms.first_year}-"
                f"{terms.last_year} of {result.scenario_name!r}; expected a year inside it."
            )
        before = (years >= terms.first_year) & (years < start)
        remaining = terms.budget_mt - float(emissions[before].sum())
        e0 = float(emissions[years == start][0])
        if abs(remaining - e0) <= budget_tolerance(terms.budget_mt):
            remaining = max(
                remaining, e0
            )  # the budget ends exactly with this year (within the solver's tolerance)
        try:
            rate = required_rate_exponential(e0, remaining)
            end = required_linear_end_year(start, e0, remaining)
            exhausted = False
        except BudgetExhaustedError:
            rate, end, exhausted = math.nan, math.nan, True
        rows.append((start, e0, remaining, rate, end, exhausted))
    return pd.DataFrame(
        rows,
        columns=[
            "start_year",
            "emissions_at_start_mtco2",
            "remaining_budget_mtco2",
            "exponential_rate_per_year",
            "linear_end_year",
            "budget_exhausted",
        ],
    )


def compound_reduction_rate(start_emissions_mt: float, end_emissions_mt: float, years: float) -> float:
    """Compound average annual reduction r [1/yr] from E_start to E_end over ``years``: E_end = E_start (1 - r)^years,
    r = 1 - (E_end / E_start)^(1 / years). NaN when E_start <= 0 or E_end < 0; 1 when E_end = 0."""
    if years <= 0:
        raise RateDomainError(f"period of {years!r} years: expected a positive length.")
    if not start_emissions_mt > 0 or end_emissions_mt < 0:
        return math.nan
    return 1.0 - (end_emissions_mt / start_emissions_mt) ** (1.0 / years)


def realised_rates(result: RunResult, *, period_years: int = 10) -> tuple[pd.DataFrame, pd.DataFrame]:
    """Rates of reduction the run realises.

    Returns (yearly, periods). yearly: year, emissions_mtco2, reduction_mtco2 (E_{t-1} - E_t), reduction_rate
    (1 - E_t / E_{t-1}; NaN in the first year, after a year with no emissions, or where the year before is missing).
    periods: period_start, period_end, emissions_start_mtco2, emissions_end_mtco2, compound_rate_per_year over each
    decade from the base year (``period_years``; the last period ends in the final year and may be shorter).
    Positive rates are reductions, negative ones increases.
    """
    years, emissions = yearly_emissions(result)
    previous = np.concatenate([[np.nan], emissions[:-1]])
    consecutive = np.concatenate([[False], np.diff(years) == 1])
    with np.errstate(divide="ignore", invalid="ignore"):
        rate = np.where(consecutive & (previous > 0), 1.0 - emissions / previous, np.nan)
    yearly = pd.DataFrame(
        {
            "year": years,
            "emissions_mtco2": emissions,
            "reduction_mtco2": np.where(consecutive, previous - emissions, np.nan),
            "reduction_rate": rate,
        }
    )
    by_year = dict(zip(years.tolist(), emissions.tolist(), strict=True))
    rows = []
    start, final = int(years[0]), int(years[-1])
    while start < final:
        end = min(start + period_years, final)
        if start in by_year and end in by_year:
            rows.append(
                (
                    start,
                    end,
                    by_year[start],
                    by_year[end],
                    compound_reduction_rate(by_year[start], by_year[end], end - start),
                )
            )
        start = end
    periods = pd.DataFrame(
        rows,
        columns=[
            "period_start",
            "period_end",
            "emissions_start_mtco2",
            "emissions_end_mtco2",
            "compound_rate_per_year",
        ],
    )
    return yearly, periods
