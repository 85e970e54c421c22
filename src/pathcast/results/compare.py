"""Side-by-side headline table of several runs: one row per metric (unit in its name), one column per scenario.

Metrics that are in each run's ``summary`` keep the summary's key and value (``total_discounted_cost_million``,
``cumulative_emissions_mtco2``, ...; the final-year mixes as ``final_year_capacity_mw.<technology>`` and
``final_year_generation_twh.<technology>``). The others come from the budget and reduction-rate analytics:

* ``comparison_budget_mtco2`` / ``comparison_budget_of``: the budget [MtCO2] the budget rows below are measured
  against: the scenario's own, or, for a scenario without one, the first budget among the scenarios compared
  (counted over that scenario's whole horizon).
* ``budget_exhaustion_year``, ``budget_headroom_final_mtco2``: from :func:`pathcast.results.budget.budget_accounting`.
* ``required_rate_from_start_per_year`` / ``..._plus_5_per_year``: exponential rate of decline [1/yr] needed from the
  first year of the budget period (and five years later, after following the scenario's path until then), from
  :func:`pathcast.results.reduction_rates.required_rates_table`; NaN when the budget is already used up.
* ``realised_compound_rate_per_year``: compound average reduction [1/yr] from the base to the final year
  (:func:`pathcast.results.reduction_rates.realised_rates` over one period spanning the horizon).
* ``abatement_cost_per_tco2``: average cost of abatement against the first scenario [currency/tCO2] =
  (cost - cost_0) / (cumulative CO2_0 - cumulative CO2), with cost the total discounted system cost [million] and
  CO2 the cumulative emissions [MtCO2] over the horizon; NaN for the first scenario, where the emissions are equal,
  and where currency or price year differ.
* ``carbon_price_<year>_per_tco2``: the carbon price [currency/tCO2] in two milestone years (see
  :func:`milestone_years`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import pandas as pd

from ..errors import ScenarioError
from .budget import budget_accounting
from .reduction_rates import realised_rates, required_rates_table
from .run_result import RunResult

__all__ = [
    "compare",
    "scenario_labels",
    "milestone_years",
    "carbon_price_in",
    "METRIC_LABELS",
    "metric_label",
    "ABATEMENT_TOLERANCE_MT",
]

ABATEMENT_TOLERANCE_MT = (
    1e-6  # [MtCO2] emission differences below this leave the abatement cost undefined (NaN)
)

METRIC_LABELS: dict[str, str] = {
    "base_year": "base year",
    "final_year": "final year",
    "currency": "currency",
    "price_year": "price year (real money of)",
    "total_discounted_cost_million": "total discounted system cost [million]",
    "objective_million": "objective [million]",
    "cumulative_emissions_mtco2": "cumulative CO2 over the horizon [MtCO2]",
    "first_year_emissions_mtco2": "CO2 in the base year [MtCO2/yr]",
    "final_year_emissions_mtco2": "CO2 in the final year [MtCO2/yr]",
    "carbon_budget_mtco2": "carbon budget of the scenario [MtCO2]",
    "budget_first_year": "budget period from",
    "budget_last_year": "budget period to",
    "within_budget": "within its budget",
    "comparison_budget_mtco2": "budget compared against [MtCO2]",
    "comparison_budget_of": "budget compared against, of scenario",
    "budget_exhaustion_year": "year the budget is used up",
    "budget_headroom_final_mtco2": "budget left at the end of its period [MtCO2]",
    "required_rate_start_year": "required rate: from year",
    "required_rate_from_start_per_year": "required exponential reduction rate from that year [%/yr]",
    "required_rate_from_start_plus_5_per_year": "required exponential reduction rate five years later [%/yr]",
    "realised_compound_rate_per_year": "realised compound reduction rate, base to final year [%/yr]",
    "peak_build_mw_per_year": "peak build rate [MW/yr]",
    "abatement_cost_per_tco2": "average abatement cost against the first scenario [currency/tCO2]",
    "unserved_electricity_twh": "unserved electricity over the horizon [TWh]",
    "unserved_fuel_pj": "unserved fuel demand over the horizon [PJ]",
    "electricity_demand_final_year_twh": "final electricity demand in the final year [TWh/yr]",
}
_RATES = (
    "required_rate_from_start_per_year",
    "required_rate_from_start_plus_5_per_year",
    "realised_compound_rate_per_year",
)


def metric_label(metric: str) -> str:
    """Readable label of a metric row (with its unit)."""
    if metric in METRIC_LABELS:
        return METRIC_LABELS[metric]
    family, _, technology = metric.partition(".")
    if family == "final_year_capacity_mw":
        return f"capacity in the final year [MW]: {technology}"
    if family == "final_year_generation_twh":
        return f"generation in the final year [TWh/yr]: {technology}"
    if family.startswith("carbon_price_") and family.endswith("_per_tco2"):
        return f"carbon price in {family[len('carbon_price_') : -len('_per_tco2')]} [currency/tCO2]"
    return metric.replace("_", " ")


def scenario_labels(results: Sequence[RunResult]) -> list[str]:
    """Scenario names made unique ('name', 'name (2)') when the same scenario appears more than once."""
    seen: dict[str, int] = {}
    labels = []
    for result in results:
        name = str(result.scenario_name)
        seen[name] = seen.get(name, 0) + 1
        labels.append(name if seen[name] == 1 else f"{name} ({seen[name]})")
    return labels


def milestone_years(result: RunResult) -> tuple[int, int]:
    """Two years for headline carbon prices: the first decade year (2030, 2040, ...) after the base year, or the
    middle of the horizon when no decade year falls before the final year; and the final year."""
    base, final = int(result.summary["base_year"]), int(result.summary["final_year"])
    decade = (base // 10 + 1) * 10
    first = decade if decade < final else (base + final) // 2
    return first, final


def carbon_price_in(result: RunResult, year: int) -> float:
    """Carbon price [currency/tCO2] in ``year`` (NaN when the year is not modelled)."""
    price = result.carbon_price
    rows = price.loc[price["year"] == year, "carbon_price_per_tco2"]
    return float(rows.iloc[0]) if len(rows) else math.nan


def _budget_of(
    result: RunResult, results: Sequence[RunResult], labels: list[str]
) -> tuple[float | None, str | None]:
    own = result.summary.get("carbon_budget_mtco2")
    if own is not None:
        return None, None
    for other, label in zip(results, labels, strict=True):
        if other.summary.get("carbon_budget_mtco2") is not None:
            return float(other.summary["carbon_budget_mtco2"]), label
    return None, None


def _rates(result: RunResult, budget_mt: float | None) -> tuple[int | None, float, float]:
    account = budget_accounting(result, budget_mt=budget_mt)
    terms = account.terms
    if terms is None:
        return None, math.nan, math.nan
    years = result.emissions_total["year"].astype(int).tolist()
    start = max(terms.first_year, years[0])
    wanted = [y for y in (start, start + 5) if y in years and y <= terms.last_year]
    if not wanted:
        return None, math.nan, math.nan
    table = required_rates_table(result, start_years=wanted, budget_mt=budget_mt).set_index("start_year")
    rate = table["exponential_rate_per_year"]
    return start, float(rate.get(start, math.nan)), float(rate.get(start + 5, math.nan))


def _realised(result: RunResult) -> float:
    base, final = int(result.summary["base_year"]), int(result.summary["final_year"])
    if final <= base:
        return math.nan
    _, periods = realised_rates(result, period_years=final - base)
    whole = periods[(periods["period_start"] == base) & (periods["period_end"] == final)]
    return float(whole["compound_rate_per_year"].iloc[0]) if len(whole) else math.nan


def _column(
    result: RunResult, label: str, results: Sequence[RunResult], labels: list[str]
) -> dict[str, object]:
    s = result.summary
    column: dict[str, object] = {
        key: s.get(key)
        for key in (
            "base_year",
            "final_year",
            "currency",
            "price_year",
            "total_discounted_cost_million",
            "cumulative_emissions_mtco2",
            "first_year_emissions_mtco2",
            "final_year_emissions_mtco2",
            "carbon_budget_mtco2",
            "budget_first_year",
            "budget_last_year",
            "within_budget",
        )
    }
    borrowed, owner = _budget_of(result, results, labels)
    account = budget_accounting(result, budget_mt=borrowed)
    if account.terms is not None:
        column["comparison_budget_mtco2"] = account.terms.budget_mt
        column["comparison_budget_of"] = owner or label
    else:
        column["comparison_budget_mtco2"] = math.nan
        column["comparison_budget_of"] = None
    column["budget_exhaustion_year"] = account.exhaustion_year
    column["budget_headroom_final_mtco2"] = (
        account.headroom_final_mtco2 if account.headroom_final_mtco2 is not None else math.nan
    )
    start, rate0, rate5 = _rates(result, borrowed)
    column["required_rate_start_year"] = start
    column["required_rate_from_start_per_year"] = rate0
    column["required_rate_from_start_plus_5_per_year"] = rate5
    column["realised_compound_rate_per_year"] = _realised(result)
    column["peak_build_mw_per_year"] = s.get("peak_build_mw_per_year")
    for year in milestone_years(result):
        column[f"carbon_price_{year}_per_tco2"] = carbon_price_in(result, year)
    for key in ("unserved_electricity_twh", "unserved_fuel_pj"):
        column[key] = s.get(key)
    for key in ("final_year_capacity_mw", "final_year_generation_twh"):
        for technology, value in (s.get(key) or {}).items():
            column[f"{key}.{technology}"] = value
    return column


def _abatement(results: Sequence[RunResult]) -> list[float]:
    first = results[0].summary
    out = [math.nan]
    for result in results[1:]:
        s = result.summary
        comparable = s.get("currency") == first.get("currency") and s.get("price_year") == first.get(
            "price_year"
        )
        avoided = float(first["cumulative_emissions_mtco2"]) - float(s["cumulative_emissions_mtco2"])
        if not comparable or abs(avoided) < ABATEMENT_TOLERANCE_MT:
            out.append(math.nan)
        else:
            extra = float(s["total_discounted_cost_million"]) - float(first["total_discounted_cost_million"])
            out.append(extra / avoided)  # million currency / MtCO2 = currency/tCO2
    return out


def compare(results: Sequence[RunResult]) -> pd.DataFrame:
    """Headline table of ``results`` (first = the reference for abatement costs): index ``metric``, one column per
    scenario (object dtype: numbers, years, names; NaN or None where a metric does not apply)."""
    results = list(results)
    if not results:
        raise ScenarioError("compare: got no results; expected at least one scenario file or result folder.")
    labels = scenario_labels(results)
    columns = [_column(result, label, results, labels) for result, label in zip(results, labels, strict=True)]
    for column, cost in zip(columns, _abatement(results), strict=True):
        column["abatement_cost_per_tco2"] = cost
    order = list(dict.fromkeys(key for column in columns for key in column))
    fixed = [k for k in order if "." not in k and not k.startswith("carbon_price_")]
    prices = sorted(k for k in order if k.startswith("carbon_price_"))
    mixes = [k for k in order if "." in k]
    index = (
        fixed[: fixed.index("peak_build_mw_per_year") + 1]
        + ["abatement_cost_per_tco2"]
        + prices
        + [k for k in fixed[fixed.index("peak_build_mw_per_year") + 1 :] if k != "abatement_cost_per_tco2"]
        + mixes
    )
    table = pd.DataFrame(
        {
            label: [column.get(key, np.nan) for key in index]
            for label, column in zip(labels, columns, strict=True)
        },
        index=pd.Index(index, name="metric"),
        dtype=object,
    )
    return table
