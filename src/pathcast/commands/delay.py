"""Delayed action under a carbon budget: follow the reference pathway (no budget, caps or carbon price) until each start
year, then the least-cost pathway under the budget. Reports, per start year, the required rate of decline, the total
discounted cost and its increase over immediate action, the steepest yearly cut, stranded capacity and whether the
budget can still be met (otherwise the tightest feasible budget and the shortfall).
"""

from __future__ import annotations

import argparse
import json
import math
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError
from . import progress_printer

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    from ..analysis.delay import DelayStudy

__all__ = ["add_arguments", "execute", "parse_years", "render_text", "render_json", "write_study"]


def parse_years(text: str) -> list[int]:
    """'2025,2030,2035' -> [2025, 2030, 2035]."""
    try:
        return [int(part) for part in text.split(",") if part.strip()]
    except ValueError:
        raise ScenarioError(
            f"--start {text!r}: expected whole years separated by commas, e.g. 2025,2030,2035."
        ) from None


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", help="scenario YAML file with a carbon budget")
    parser.add_argument(
        "--start",
        default=None,
        metavar="YEARS",
        help="start years of action, comma-separated (default: every 5 years from the base year inside "
        "the budget period)",
    )
    parser.add_argument(
        "--out",
        type=Path,
        default=None,
        metavar="DIR",
        help="also write delay.csv, delay_pathways.csv, delay_stranded.csv and delay.json to DIR",
    )
    parser.add_argument("--json", action="store_true", help="print JSON instead of a text table")
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def _clean(value):
    if hasattr(value, "item"):
        value = value.item()
    if isinstance(value, float) and math.isnan(value):
        return None
    return value


def render_json(study: DelayStudy) -> str:
    payload = {
        "scenario": study.scenario,
        "currency": study.currency,
        "budget": {
            "budget_mtco2": study.terms.budget_mt,
            "first_year": study.terms.first_year,
            "last_year": study.terms.last_year,
        },
        "method": "reference pathway (no budget, caps or carbon price) fixed before each start year; least-cost under "
        "the budget from then on; stranded capex = remaining annuity of model-built vintages",
        "table": [{k: _clean(v) for k, v in row.items()} for row in study.table.to_dict(orient="records")],
        "diagnoses": {str(c.start_year): c.diagnosis.as_dict() for c in study.cases},
    }
    return json.dumps(payload, indent=2)


def _num(value, fmt: str, width: int) -> str:
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return f"{'-':>{width}}"
    return f"{value:{width}{fmt}}"


def render_text(study: DelayStudy) -> str:
    from ..analysis.achievability import explain

    cur = study.currency
    t = study.terms
    lines = [
        f"Delayed action, scenario {study.scenario!r}: budget {t.budget_mt:,.1f} MtCO2 for {t.first_year}-{t.last_year}",
        "  the reference pathway (no budget, caps or carbon price) is followed until the start year, the least-cost",
        "  pathway under the budget from then on",
        "",
    ]
    lines.append(
        "  start  CO2 before remaining  required  discounted cost  vs immediate  steepest cut      stranded         carbon price"
    )
    lines.append(
        f"  year   MtCO2/yr  MtCO2     %/yr      million {cur:<8} million {cur:<4} %/yr   MtCO2 in  MW     million {cur:<4} {cur}/tCO2 at start"
    )
    for row in study.table.to_dict(orient="records"):
        year = (
            ""
            if row["steepest_cut_year"] is None
            or (isinstance(row["steepest_cut_year"], float) and math.isnan(row["steepest_cut_year"]))
            else str(int(row["steepest_cut_year"]))
        )
        rate = row["required_rate_per_year"]
        lines.append(
            f"  {row['start_year']:<5}{_num(row['emissions_before_action_mtco2'], ',.2f', 10)}"
            f"{_num(row['remaining_budget_mtco2'], ',.1f', 11)}{_num(None if math.isnan(rate) else 100 * rate, '.2f', 10)}"
            f"{_num(row['total_discounted_cost_million'], ',.0f', 17)}{_num(row['cost_increase_million'], ',.0f', 14)}"
            f"{_num(row['steepest_cut_pct_per_year'], '.1f', 7)}{_num(row['steepest_cut_mtco2'], ',.2f', 7)}{year:>5}"
            f"{_num(row['stranded_mw'], ',.0f', 7)}{_num(row['stranded_capex_million'], ',.0f', 14)}"
            f"{_num(row['carbon_price_at_start_per_tco2'], ',.1f', 11)}"
            + ("" if row["achievable"] else "   NOT ACHIEVABLE")
        )
    lines.append(
        "  (CO2 before: the reference's emissions in the year before the start; required: the constant exponential "
        "decline from that level that uses the remaining budget from the start year on;"
    )
    lines.append(
        "   stranded capex: remaining annuity of model-built vintages retired early; the existing fleet's MW only)"
    )
    for case in study.cases:
        if not case.diagnosis.achievable:
            lines.append("")
            lines.append(f"  start {case.start_year}: {explain(case.diagnosis)}")
    return "\n".join(lines)


def write_study(study: DelayStudy, folder: Path) -> Path:
    """delay.csv (the table), delay_pathways.csv, delay_stranded.csv and delay.json, written atomically."""
    from ..results.writers import atomic_folder

    with atomic_folder(Path(folder)) as tmp:
        study.table.to_csv(tmp / "delay.csv", index=False)
        study.pathways().to_csv(tmp / "delay_pathways.csv", index=False)
        study.stranded().to_csv(tmp / "delay_stranded.csv", index=False)
        (tmp / "delay.json").write_text(render_json(study))
    return Path(folder)


def execute(args: argparse.Namespace) -> int:
    from ..analysis.delay import delayed_action
    from ..scenario.inputs import prepare_inputs
    from ..scenario.loader import load_scenario

    progress = progress_printer(args.quiet or args.json)

    progress(f"reading {args.file}")
    inputs = prepare_inputs(load_scenario(args.file).scenario)
    if args.start is not None:
        starts = parse_years(args.start)
    elif inputs.budget_years is not None:
        base, last = int(inputs.years[0]), min(inputs.budget_years[1], int(inputs.years[-1]))
        starts = [y for y in range(base, last + 1, 5) if y >= inputs.budget_years[0]] or [
            max(base, inputs.budget_years[0])
        ]
    else:
        starts = []
    study = delayed_action(inputs, starts, progress=progress)
    if args.out is not None:
        write_study(study, args.out)
        progress(f"tables written to {args.out}/")
    print(render_json(study) if args.json else render_text(study))
    return 0
