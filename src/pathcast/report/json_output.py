"""JSON renderings for scripts: what every ``--json`` prints. Each document is an object whose first key is
``"schema_version"`` (:data:`SCHEMA_VERSION`, raised when a key is renamed or removed; new keys may appear without
it). NaN is written as null, numpy numbers as plain numbers. The shapes are listed in README, Commands.

Light at import (``pathcast check --json`` uses it): the table modules are imported only for type checking."""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

    from ..analysis.delay import DelayStudy
    from ..results.rates_report import RatesReport
    from ..results.run_result import RunResult

__all__ = [
    "SCHEMA_VERSION",
    "plain",
    "records",
    "render_document",
    "render_run_json",
    "render_check_json",
    "render_rates_json",
    "render_delay_json",
    "render_comparison_json",
]

SCHEMA_VERSION = 1


def plain(value: object) -> object:
    """A JSON-ready value: numpy scalars become Python numbers, NaN becomes None."""
    if hasattr(value, "item"):
        value = value.item()
    if isinstance(value, float) and math.isnan(value):
        return None
    return value


def records(frame: pd.DataFrame) -> list[dict[str, object]]:
    """The rows of ``frame`` as JSON-ready mappings (:func:`plain` on every cell)."""
    return [{str(k): plain(v) for k, v in row.items()} for row in frame.to_dict(orient="records")]


def _default(value: object) -> object:
    if hasattr(value, "item"):
        return value.item()
    return str(value)


def render_document(payload: Mapping[str, Any]) -> str:
    """``payload`` as indented JSON with ``"schema_version"`` first."""
    return json.dumps({"schema_version": SCHEMA_VERSION, **payload}, indent=2, default=_default)


def render_run_json(result: RunResult, folder: Path) -> str:
    """``pathcast run --json``: {schema_version, result_folder, summary (summary.json), stage_times_s}."""
    return render_document(
        {
            "result_folder": str(folder),
            "summary": dict(result.summary),
            "stage_times_s": result.manifest.get("stage_times_s"),
        }
    )


def render_check_json(facts: Mapping[str, Any]) -> str:
    """``pathcast check --json``: the facts of a valid scenario file (file, valid, scenario, years, representative_days,
    technologies, supplies, files, input_hash) or of an ensemble file (kind 'ensemble', command, sentence, ...)."""
    return render_document(facts)


def render_rates_json(report: RatesReport) -> str:
    """``pathcast rates --json``: {schema_version, scenario, budget, conventions, required_rates, realised_yearly,
    realised_periods, budget_account}; rates in 1/yr, CO2 in MtCO2, warming in C."""
    a = report.account
    terms = a.terms
    return render_document(
        {
            "scenario": report.result.scenario_name,
            "budget": None
            if terms is None
            else {
                "budget_mtco2": terms.budget_mt,
                "first_year": terms.first_year,
                "last_year": terms.last_year,
            },
            "conventions": {
                "exponential": "E_t = E0 (1-r)^t, start year counted: cumulative E0/r over t >= 0",
                "linear": "E_t = E0 (1 - t/N), t = 0..N, start year counted: cumulative E0 (N+1)/2",
            },
            "required_rates": records(report.required),
            "realised_yearly": records(report.yearly),
            "realised_periods": records(report.periods),
            "budget_account": {
                "exhaustion_year": a.exhaustion_year,
                "headroom_final_mtco2": a.headroom_final_mtco2,
                "warming": a.warming,
                "warming_source": a.warming_source,
            },
        }
    )


def render_delay_json(study: DelayStudy) -> str:
    """``pathcast delay --json`` (and delay.json): {schema_version, scenario, currency, budget, method, table (one
    row per start year, the columns of pathcast.analysis.delay.DELAY_COLUMNS), diagnoses (by start year)}."""
    return render_document(
        {
            "scenario": study.scenario,
            "currency": study.currency,
            "budget": {
                "budget_mtco2": study.terms.budget_mt,
                "first_year": study.terms.first_year,
                "last_year": study.terms.last_year,
            },
            "method": "reference pathway (no budget, caps or carbon price) fixed before each start year; least-cost "
            "under the budget from then on; stranded capex = remaining annuity of model-built vintages",
            "table": records(study.table),
            "diagnoses": {str(c.start_year): c.diagnosis.as_dict() for c in study.cases},
        }
    )


def render_comparison_json(table: pd.DataFrame) -> str:
    """``pathcast compare --json``: {schema_version, scenarios: {scenario: {metric: value}}}, the scenarios in the
    order given (the first is the reference for abatement costs)."""
    return render_document(
        {
            "scenarios": {
                str(column): {str(metric): plain(value) for metric, value in table[column].items()}
                for column in table.columns
            }
        }
    )
