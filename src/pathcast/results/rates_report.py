"""What ``pathcast rates`` shows, computed before any rendering: required reduction rates by start year, the
pathway's realised rates and its budget account (:mod:`pathcast.results.reduction_rates`,
:mod:`pathcast.results.budget`). Rendered by :func:`pathcast.report.console.render_rates` and
:func:`pathcast.report.json_output.render_rates_json`."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

    from .budget import BudgetAccount, BudgetTerms
    from .run_result import RunResult

__all__ = ["RatesReport", "rates_report", "compute_rates", "start_years_from"]


@dataclass(frozen=True)
class RatesReport:
    """Everything ``pathcast rates`` shows: the run, the required rates by start year (exponential [1/yr] and the
    year of a linear decline to zero), the realised yearly and per-period rates [1/yr] and the budget account
    (exhaustion year, headroom [MtCO2], TCRE warming [C])."""

    result: RunResult
    required: pd.DataFrame
    yearly: pd.DataFrame
    periods: pd.DataFrame
    account: BudgetAccount


def _check_step(step: int) -> None:
    if step < 1:
        raise ScenarioError(f"--step {step!r}: expected a whole number of years >= 1.")


def start_years_from(
    result: RunResult, terms: BudgetTerms, from_year: int | None, to_year: int | None, step: int
) -> list[int]:
    """The start years of the required-rates table: from ``from_year`` (default: the later of the base year and the
    budget's first year) to ``to_year`` (default: the earlier of the final year and the budget's last year) every
    ``step`` years; with no option given, :func:`pathcast.results.reduction_rates.default_start_years`."""
    _check_step(step)
    if from_year is None and to_year is None and step == 5:
        from .reduction_rates import default_start_years

        return default_start_years(result, terms)
    first = from_year if from_year is not None else max(terms.first_year, int(result.summary["base_year"]))
    last = to_year if to_year is not None else min(terms.last_year, int(result.summary["final_year"]))
    if first > last:
        raise ScenarioError(
            f"--from {first!r} is after --to {last!r}; expected a first start year <= the last."
        )
    return list(range(first, last + 1, step))


def compute_rates(
    result: RunResult,
    *,
    from_year: int | None = None,
    to_year: int | None = None,
    step: int = 5,
    budget_mt: float | None = None,
) -> RatesReport:
    """The rates report of ``result``; ``budget_mt`` [MtCO2] replaces the scenario's budget (needed when it has
    none)."""
    from .budget import budget_accounting
    from .reduction_rates import realised_rates, require_budget_terms, required_rates_table

    terms = require_budget_terms(result, budget_mt)
    starts = start_years_from(result, terms, from_year, to_year, step)
    required = required_rates_table(result, starts, budget_mt=budget_mt)
    yearly, periods = realised_rates(result)
    return RatesReport(
        result=result,
        required=required,
        yearly=yearly,
        periods=periods,
        account=budget_accounting(result, budget_mt=budget_mt),
    )


def rates_report(
    source: str | Path,
    *,
    from_year: int | None = None,
    to_year: int | None = None,
    step: int = 5,
    budget_mt: float | None = None,
    solver: dict | None = None,
    progress: Callable[[str], None] | None = None,
) -> RatesReport:
    """The rates report of a scenario file (solved now) or a result folder (read back,
    :func:`pathcast.results.sources.load_run`); ``--step`` is checked before anything is solved."""
    from .sources import load_run

    _check_step(step)
    result = load_run(source, solver=solver, progress=progress).result
    return compute_rates(result, from_year=from_year, to_year=to_year, step=step, budget_mt=budget_mt)
