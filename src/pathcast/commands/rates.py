"""Required and realised rates of CO2 reduction under a carbon budget.

For each start year: what is left of the budget after the pathway's own emissions before that year, and the constant
exponential rate of decline, or the year of a linear decline to zero, that would use exactly that remainder. Also the
pathway's own year-on-year and per-decade reduction rates, the year it exhausts the budget and the warming its
cumulative CO2 implies (TCRE, IPCC AR6 WG1 SPM D.1.1). FILE is a scenario (solved first); RESULTDIR is a folder
written by 'pathcast run'.
"""

from __future__ import annotations

import argparse
import json
import math
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError
from . import progress_printer

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

    from ..results.budget import BudgetAccount
    from ..results.run_result import RunResult

__all__ = [
    "add_arguments",
    "execute",
    "RatesReport",
    "compute_rates",
    "render_text",
    "render_json",
    "load_result",
]


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "source", metavar="FILE|RESULTDIR", help="scenario YAML file, or a result folder of 'pathcast run'"
    )
    parser.add_argument(
        "--from", dest="from_year", type=int, default=None, help="first start year (default: base year)"
    )
    parser.add_argument(
        "--to", dest="to_year", type=int, default=None, help="last start year (default: budget's last year)"
    )
    parser.add_argument("--step", type=int, default=5, help="years between start years (default 5)")
    parser.add_argument(
        "--budget",
        type=float,
        default=None,
        metavar="MT",
        help="carbon budget [MtCO2] to use instead of the scenario's (needed when it has none)",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of a text table")
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


@dataclass(frozen=True)
class RatesReport:
    """Everything ``pathcast rates`` shows, computed before any rendering."""

    result: RunResult
    required: pd.DataFrame
    yearly: pd.DataFrame
    periods: pd.DataFrame
    account: BudgetAccount


def load_result(source: str | Path, progress=None) -> RunResult:
    """A RunResult from a result folder (read back) or a scenario file (solved now)."""
    path = Path(source)
    if path.is_dir():
        from ..results.writers import read_result

        return read_result(path)
    if not path.is_file():
        raise ScenarioError(
            f"{source}: (path): got no such file or folder; expected a scenario YAML file or a result "
            "folder written by 'pathcast run'.",
            file=str(source),
        )
    from ..pipeline import run_scenario

    return run_scenario(path, progress=progress).result


def start_years_from(
    result: RunResult, terms, from_year: int | None, to_year: int | None, step: int
) -> list[int]:
    if step < 1:
        raise ScenarioError(f"--step {step!r}: expected a whole number of years >= 1.")
    if from_year is None and to_year is None and step == 5:
        from ..results.reduction_rates import default_start_years

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
    from ..results.budget import budget_accounting
    from ..results.reduction_rates import realised_rates, require_budget_terms, required_rates_table

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


def _records(frame: pd.DataFrame) -> list[dict]:
    out = []
    for record in frame.to_dict(orient="records"):
        out.append(
            {
                k: (
                    None
                    if isinstance(v, float) and math.isnan(v)
                    else (v.item() if hasattr(v, "item") else v)
                )
                for k, v in record.items()
            }
        )
    return out


def render_json(report: RatesReport) -> str:
    a = report.account
    terms = a.terms
    payload = {
        "scenario": report.result.scenario_name,
        "budget": None
        if terms is None
        else {"budget_mtco2": terms.budget_mt, "first_year": terms.first_year, "last_year": terms.last_year},
        "conventions": {
            "exponential": "E_t = E0 (1-r)^t, start year counted: cumulative E0/r over t >= 0",
            "linear": "E_t = E0 (1 - t/N), t = 0..N, start year counted: cumulative E0 (N+1)/2",
        },
        "required_rates": _records(report.required),
        "realised_yearly": _records(report.yearly),
        "realised_periods": _records(report.periods),
        "budget_account": {
            "exhaustion_year": a.exhaustion_year,
            "headroom_final_mtco2": a.headroom_final_mtco2,
            "warming": a.warming,
            "warming_source": a.warming_source,
        },
    }
    return json.dumps(payload, indent=2)


def _pct(value: float) -> str:
    return (
        "       -"
        if value is None or (isinstance(value, float) and math.isnan(value))
        else f"{100 * value:8.2f}"
    )


def render_text(report: RatesReport) -> str:
    a, terms = report.account, report.account.terms
    lines = [
        f"Required reduction rates, scenario {report.result.scenario_name!r}: budget {terms.budget_mt:,.1f} MtCO2 "
        f"for {terms.first_year}-{terms.last_year}",
        "",
    ]
    lines.append("  start   emissions   remaining budget   exponential   linear decline")
    lines.append("  year     MtCO2/yr              MtCO2          %/yr     zero in year")
    for row in report.required.itertuples(index=False):
        end = "exhausted" if row.budget_exhausted else f"{row.linear_end_year:.1f}"
        lines.append(
            f"  {row.start_year:<6}{row.emissions_at_start_mtco2:>11,.2f}{row.remaining_budget_mtco2:>19,.1f}"
            f"{_pct(row.exponential_rate_per_year):>14}{end:>17}"
        )
    lines.append(
        "  (start year counted: exponential E0/r = remaining budget; linear E0 (N+1)/2 = remaining budget;"
        " emissions after the budget period count too)"
    )
    lines.append("")
    lines.append("  realised compound reduction [%/yr]")
    for row in report.periods.itertuples(index=False):
        lines.append(f"    {row.period_start}-{row.period_end}  {_pct(row.compound_rate_per_year)}")
    steepest = report.yearly.dropna(subset=["reduction_rate"])
    if len(steepest):
        best = steepest.loc[steepest["reduction_rate"].idxmax()]
        lines.append(
            f"    steepest yearly cut {100 * best['reduction_rate']:.2f} %/yr "
            f"({best['reduction_mtco2']:,.2f} MtCO2) into {int(best['year'])}"
        )
    lines.append("")
    headroom = round(a.headroom_final_mtco2, 1) + 0.0
    if a.exhaustion_year is not None:
        lines.append(
            f"  budget exhausted in {a.exhaustion_year}; headroom at the end of the period {headroom:,.1f} MtCO2"
        )
    else:
        lines.append(f"  budget not exhausted; headroom at the end of the period {headroom:,.1f} MtCO2")
    w = a.warming
    lines.append(
        f"  warming from {w['cumulative_mtco2']:,.1f} MtCO2 cumulative CO2 (TCRE): best {w['warming_best_c']:.3g} C, "
        f"likely {w['warming_low_c']:.3g}-{w['warming_high_c']:.3g} C"
    )
    lines.append(f"  ({a.warming_source})")
    return "\n".join(lines)


def execute(args: argparse.Namespace) -> int:
    progress = progress_printer(args.quiet or args.json)

    result = load_result(args.source, progress)
    report = compute_rates(
        result, from_year=args.from_year, to_year=args.to_year, step=args.step, budget_mt=args.budget
    )
    print(render_json(report) if args.json else render_text(report))
    return 0
