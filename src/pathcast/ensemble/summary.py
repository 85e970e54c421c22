"""Collect an ensemble folder's member records into tidy tables, percentile summaries, the probability of staying
within the carbon budget, one-at-a-time sensitivities (tornado) and rank correlations. Compute only; files and figures
are written by :mod:`pathcast.ensemble.outputs` and :mod:`pathcast.ensemble.figures`."""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import ScenarioError
from ..results.reduction_rates import RateDomainError, required_rate_exponential
from .store import MemberStore

__all__ = ["EnsembleSummary", "summarise_ensemble", "PERCENTILES", "HEADLINE_COLUMNS", "read_design"]

PERCENTILES = (5, 25, 50, 75, 95)
BUDGET_TOLERANCE = 1e-6  # relative and absolute [MtCO2], as in the headline figures' within_budget
UNSERVED_TOLERANCE = 1e-6  # [TWh] and [PJ]: demand counts as served below this; common practice, no source

HEADLINE_COLUMNS = (
    "total_discounted_cost_million",
    "cumulative_emissions_mtco2",
    "cumulative_in_budget_period_mtco2",
    "budget_mtco2",
    "budget_margin_mtco2",
    "within_budget",
    "first_year_emissions_mtco2",
    "final_year_emissions_mtco2",
    "required_reduction_rate_per_yr",
    "carbon_price_first_year_per_tco2",
    "carbon_price_final_year_per_tco2",
    "peak_build_mw_per_year",
    "unserved_electricity_twh",
    "unserved_fuel_pj",
)


@dataclass
class EnsembleSummary:
    """Everything the ensemble's files, figures and memo section are made from."""

    folder: Path
    design: dict
    members: pd.DataFrame  # one row per member: sampled inputs, status, headline figures, times
    yearly: (
        pd.DataFrame
    )  # member, year, emissions_mtco2, cumulative_mtco2, cumulative_in_budget_period_mtco2, ...
    capacity: pd.DataFrame  # member, technology, kind, year, capacity_mw
    yearly_percentiles: pd.DataFrame  # quantity, technology, year, p5 .. p95, mean, members
    headline_percentiles: pd.DataFrame  # quantity, p5 .. p95, mean, members
    stats: dict = field(default_factory=dict)
    tornado: pd.DataFrame | None = None  # one_at_a_time only
    correlations: pd.DataFrame | None = (
        None  # Spearman rank correlation of numeric inputs with the headline figures
    )
    base_headline: dict | None = None  # the base scenario's row (same columns as members), when it was solved
    base_yearly: pd.DataFrame | None = None  # the base scenario's yearly emissions

    @property
    def currency(self) -> str:
        return str(self.design.get("currency", ""))

    @property
    def price_year(self) -> Any:
        return self.design.get("price_year")


def read_design(folder: Path) -> dict:
    path = Path(folder) / "ensemble.json"
    if not path.is_file():
        raise ScenarioError(
            f"{folder}: ensemble.json: got no such file; expected an ensemble folder written by "
            "'pathcast ensemble'.",
            file=str(folder),
        )
    return json.loads(path.read_text(encoding="utf-8"))


def _input_column(label: str, info: dict) -> str:
    return f"{label}_multiplier" if info["as"] == "multiplier" else label


def _shown(value: Any) -> Any:
    return json.dumps(value, sort_keys=True) if isinstance(value, dict | list) else value


def _required_rate(start_mt: float, budget_mt: float) -> tuple[float, str]:
    if budget_mt is None or not math.isfinite(budget_mt) or start_mt is None or not math.isfinite(start_mt):
        return math.nan, ""
    try:
        return required_rate_exponential(start_mt, budget_mt, count_start_year=True), ""
    except RateDomainError as error:
        return math.nan, str(error)


def summarise_ensemble(folder: str | Path) -> EnsembleSummary:
    """Read DIR/ensemble.json and DIR/members/*.json into tables and statistics."""
    folder = Path(folder)
    design = read_design(folder)
    store = MemberStore(folder)
    inputs = design["inputs"]
    reference = design.get("reference_budget_mt")
    rows, yearly_parts, capacity_parts = [], [], []
    for member in design["members"]:
        record = store.get(member["hash"]) or {"status": "pending"}
        row, yearly_frame, capacity_frames = _member_row(member, record, inputs, reference)
        rows.append(row)
        if yearly_frame is not None:
            yearly_parts.append(yearly_frame)
        capacity_parts.extend(capacity_frames)
    members = pd.DataFrame(rows)
    for column in HEADLINE_COLUMNS:
        if column not in members:
            members[column] = np.nan
    yearly_columns = [
        "member",
        "year",
        "emissions_mtco2",
        "cumulative_mtco2",
        "cumulative_in_budget_period_mtco2",
        "budget_mtco2",
        "carbon_price_per_tco2",
    ]
    yearly = (
        pd.concat(yearly_parts, ignore_index=True) if yearly_parts else pd.DataFrame(columns=yearly_columns)
    )
    capacity = (
        pd.concat(capacity_parts, ignore_index=True)
        if capacity_parts
        else pd.DataFrame(columns=["member", "technology", "kind", "year", "capacity_mw"])
    )
    summary = EnsembleSummary(
        folder=folder,
        design=design,
        members=members,
        yearly=yearly,
        capacity=capacity,
        yearly_percentiles=_yearly_percentiles(yearly, capacity),
        headline_percentiles=_headline_percentiles(members),
    )
    summary.stats = _stats(design, members)
    if design["design"] == "one_at_a_time":
        summary.tornado = _tornado(design, members)
    summary.correlations = _correlations(design, members)
    base_record = store.get(design["base_hash"])
    if base_record is not None and base_record.get("status") == "solved":
        base_row, base_yearly, _ = _member_row(
            {"index": -1, "role": "base", "hash": design["base_hash"], "samples": {}},
            base_record,
            inputs,
            reference,
        )
        summary.base_headline, summary.base_yearly = base_row, base_yearly
    return summary


def _member_row(member: dict, record: dict, inputs: dict, reference: float | None):
    """One row of the members table, the member's yearly frame and its capacity frames."""
    row: dict[str, Any] = {"member": member["index"], "role": member["role"], "hash": member["hash"]}
    yearly_frame, capacity_frames = None, []
    for label, info in inputs.items():
        default = 1.0 if info["as"] == "multiplier" else info.get("base_value")
        row[_input_column(label, info)] = _shown(member["samples"].get(label, default))
    row["status"] = record.get("status", "pending")
    error = record.get("error") or {}
    row["error_type"] = error.get("type", "")
    row["error_message"] = error.get("message", "")
    if row["status"] == "solved":
        head = record["headline"]
        yearly = record["yearly"]
        years = np.asarray(yearly["year"], dtype=int)
        emissions = np.asarray(yearly["emissions_mtco2"], dtype=float)
        own_budget = head.get("carbon_budget_mtco2")
        budget = reference if reference is not None else own_budget
        if own_budget is not None and head.get("budget_first_year") is not None:
            inside = (years >= head["budget_first_year"]) & (years <= head["budget_last_year"])
            first_year = int(head["budget_first_year"])
        else:
            inside = np.ones(len(years), dtype=bool)
            first_year = int(years[0])
        counted = float(emissions[inside].sum())
        start = float(emissions[years == max(first_year, int(years[0]))][0])
        served = (
            head.get("unserved_electricity_twh", 0.0) <= UNSERVED_TOLERANCE
            and head.get("unserved_fuel_pj", 0.0) <= UNSERVED_TOLERANCE
        )
        rate, rate_note = _required_rate(start, budget)
        price = yearly["carbon_price_per_tco2"]
        row.update(
            {
                "total_discounted_cost_million": head["total_discounted_cost_million"],
                "cumulative_emissions_mtco2": head["cumulative_emissions_mtco2"],
                "cumulative_in_budget_period_mtco2": counted,
                "budget_mtco2": math.nan if budget is None else float(budget),
                "budget_margin_mtco2": math.nan if budget is None else float(budget) - counted,
                "within_budget": None
                if budget is None
                else bool(counted <= budget * (1 + BUDGET_TOLERANCE) + BUDGET_TOLERANCE and served),
                "first_year_emissions_mtco2": head["first_year_emissions_mtco2"],
                "final_year_emissions_mtco2": head["final_year_emissions_mtco2"],
                "required_reduction_rate_per_yr": rate,
                "required_rate_note": rate_note,
                "carbon_price_first_year_per_tco2": float(price[0]),
                "carbon_price_final_year_per_tco2": float(price[-1]),
                "peak_build_mw_per_year": head["peak_build_mw_per_year"],
                "unserved_electricity_twh": head["unserved_electricity_twh"],
                "unserved_fuel_pj": head["unserved_fuel_pj"],
            }
        )
        yearly_frame = pd.DataFrame({"member": member["index"], **yearly})
        # against the budget used here (the reference budget, when given, may belong to no member)
        yearly_frame["cumulative_in_budget_period_mtco2"] = np.cumsum(np.where(inside, emissions, 0.0))
        yearly_frame["budget_mtco2"] = math.nan if budget is None else float(budget)
        for name, tech in record["capacity"].items():
            capacity_frames.append(
                pd.DataFrame(
                    {
                        "member": member["index"],
                        "technology": name,
                        "kind": tech["kind"],
                        "year": yearly["year"],
                        "capacity_mw": tech["capacity_mw"],
                    }
                )
            )
    solver = record.get("solver") or {}
    row["warm_start"] = solver.get("warm_start")
    row["simplex_iterations"] = (solver.get("iterations") or {}).get("simplex")
    times = record.get("times") or {}
    row["solve_s"] = times.get("solve_s")
    row["member_s"] = times.get("member_s")
    return row, yearly_frame, capacity_frames


def _percentile_row(values: np.ndarray) -> dict[str, float]:
    values = values[np.isfinite(values)]
    if not len(values):
        return {**{f"p{p}": math.nan for p in PERCENTILES}, "mean": math.nan, "members": 0}
    out = {f"p{p}": float(v) for p, v in zip(PERCENTILES, np.percentile(values, PERCENTILES), strict=True)}
    out.update(mean=float(values.mean()), members=int(len(values)))
    return out


def _yearly_percentiles(yearly: pd.DataFrame, capacity: pd.DataFrame) -> pd.DataFrame:
    rows = []
    for quantity in (
        "emissions_mtco2",
        "cumulative_mtco2",
        "cumulative_in_budget_period_mtco2",
        "carbon_price_per_tco2",
    ):
        for year, group in yearly.groupby("year"):
            rows.append(
                {
                    "quantity": quantity,
                    "technology": "",
                    "year": int(year),
                    **_percentile_row(group[quantity].to_numpy(dtype=float)),
                }
            )
    for (technology, year), group in capacity.groupby(["technology", "year"], sort=False):
        rows.append(
            {
                "quantity": "capacity_mw",
                "technology": technology,
                "year": int(year),
                **_percentile_row(group["capacity_mw"].to_numpy(dtype=float)),
            }
        )
    columns = ["quantity", "technology", "year", *[f"p{p}" for p in PERCENTILES], "mean", "members"]
    return pd.DataFrame(rows, columns=columns)


def _headline_percentiles(members: pd.DataFrame) -> pd.DataFrame:
    rows = []
    solved = members[members["status"] == "solved"]
    for column in HEADLINE_COLUMNS:
        if column == "within_budget":
            continue
        rows.append(
            {
                "quantity": column,
                **_percentile_row(pd.to_numeric(solved[column], errors="coerce").to_numpy(dtype=float)),
            }
        )
    return pd.DataFrame(rows, columns=["quantity", *[f"p{p}" for p in PERCENTILES], "mean", "members"])


def _stats(design: dict, members: pd.DataFrame) -> dict:
    status = members["status"]
    solved = members[status == "solved"]
    infeasible = members[(status == "failed") & (members["error_type"] == "InfeasibleError")]
    other_failed = members[(status == "failed") & (members["error_type"] != "InfeasibleError")]
    has_budget = solved["within_budget"].notna().any() if len(solved) else False
    counted = len(solved) + len(infeasible)
    within = int(solved["within_budget"].fillna(False).astype(bool).sum()) if has_budget else 0
    probability = within / counted if has_budget and counted else math.nan
    failures = {
        f"{t}": int(n) for t, n in members.loc[status == "failed", "error_type"].value_counts().items()
    }
    return {
        "members": int(len(members)),
        "solved": int(len(solved)),
        "failed": int((status == "failed").sum()),
        "pending": int((status == "pending").sum()),
        "infeasible": int(len(infeasible)),
        "failed_other": int(len(other_failed)),
        "failures_by_type": failures,
        "within_budget": within,
        "probability_within_budget": probability,
        "probability_definition": "members whose emissions in the budget period stay within the budget while serving "
        "all demand, out of the solved and the infeasible members (other failures are left out)",
        "reference_budget_mt": design.get("reference_budget_mt"),
        "warm_started": int(solved["warm_start"].fillna(False).astype(bool).sum()) if len(solved) else 0,
    }


TORNADO_METRICS = ("total_discounted_cost_million", "cumulative_emissions_mtco2")


def _tornado(design: dict, members: pd.DataFrame) -> pd.DataFrame:
    by_role = members.set_index("role")
    rows = []
    for label, info in design["inputs"].items():
        column = _input_column(label, info)
        for metric in TORNADO_METRICS:

            def at(role: str, _metric=metric) -> float:
                if role not in by_role.index or by_role.loc[role, "status"] != "solved":
                    return math.nan
                return float(by_role.loc[role, _metric])

            base, low, high = at("base"), at(f"{label}:low"), at(f"{label}:high")
            rows.append(
                {
                    "input": label,
                    "path": info["path"],
                    "as": info["as"],
                    "metric": metric,
                    "low_value": by_role.loc[f"{label}:low", column]
                    if f"{label}:low" in by_role.index
                    else None,
                    "high_value": by_role.loc[f"{label}:high", column]
                    if f"{label}:high" in by_role.index
                    else None,
                    "base": base,
                    "at_low": low,
                    "at_high": high,
                    "swing": abs(high - low) if math.isfinite(high) and math.isfinite(low) else math.nan,
                }
            )
    frame = pd.DataFrame(rows)
    return frame.sort_values(
        ["metric", "swing"], ascending=[True, False], na_position="last", ignore_index=True
    )


def _correlations(design: dict, members: pd.DataFrame) -> pd.DataFrame | None:
    from scipy.stats import spearmanr

    solved = members[members["status"] == "solved"]
    if len(solved) < 4 or design["design"] == "one_at_a_time":
        return None
    rows = []
    for label, info in design["inputs"].items():
        x = pd.to_numeric(solved[_input_column(label, info)], errors="coerce")
        if x.isna().any() or x.nunique() < 2:
            continue
        for metric in TORNADO_METRICS + ("required_reduction_rate_per_yr",):
            y = pd.to_numeric(solved[metric], errors="coerce")
            keep = y.notna()
            if keep.sum() < 4 or y[keep].nunique() < 2:
                rho = math.nan
            else:
                rho = float(spearmanr(x[keep], y[keep]).statistic)
            rows.append({"input": label, "metric": metric, "spearman_rho": rho})
    return pd.DataFrame(rows, columns=["input", "metric", "spearman_rho"])
