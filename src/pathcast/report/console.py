"""Plain-text renderings for the terminal: every command prints what one of these functions returns.

Light at import (the table, solver and plotting modules are imported inside the functions that need them), so
``pathcast check`` can render with it."""

from __future__ import annotations

import math
from collections.abc import Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    from ..analysis.delay import DelayStudy
    from ..ensemble.runner import EnsembleRun
    from ..ensemble.summary import EnsembleSummary
    from ..results.rates_report import RatesReport
    from ..results.run_result import RunResult

__all__ = [
    "render_summary",
    "render_profile",
    "render_run",
    "render_check",
    "render_rates",
    "render_delay",
    "render_memo_written",
    "render_ensemble",
    "CAUTION",
]

CAUTION = (
    "pathcast is a screening-level planning model: its results depend on its inputs, and decisions defer to "
    "regulators, grid codes and licensed engineering studies."
)


def _missing(value: object) -> bool:
    return value is None or (isinstance(value, float) and math.isnan(value))


def render_summary(result: RunResult) -> str:
    """The headline figures of a run: cost [million currency], cumulative CO2 against the budget [MtCO2], the priced
    overshoot when there is one, first- and final-year CO2 [MtCO2/yr], unserved energy and the final-year mix [MW]."""
    s = result.summary
    currency = s.get("currency", "")
    lines = [
        f"Scenario {s['scenario']!r}, {s['base_year']}-{s['final_year']} ({currency} of {s.get('price_year')})",
        "",
    ]
    lines.append(
        f"  total discounted system cost   {s['total_discounted_cost_million']:>14,.0f} million {currency}"
    )
    budget = s.get("carbon_budget_mtco2")
    lines.append(f"  cumulative CO2                 {s['cumulative_emissions_mtco2']:>14,.1f} MtCO2")
    if budget is not None:
        verdict = "within" if s.get("within_budget") else "OVER"
        lines.append(
            f"  carbon budget {s['budget_first_year']}-{s['budget_last_year']}       {budget:>14,.1f} MtCO2 ({verdict} budget)"
        )
    if "budget_overshoot_mtco2" in s:
        lines.append(
            f"  budget overshoot {s['budget_overshoot_mtco2']:,.3f} MtCO2 at "
            f"{s['budget_overshoot_price_per_tco2']:,.2f} {currency}/tCO2 (paid in {s['budget_last_year']}: "
            f"{s['budget_overshoot_cost_million']:,.1f} million {currency})"
        )
    first, last = (s["first_year_emissions_mtco2"] + 0.0, s["final_year_emissions_mtco2"] + 0.0)
    first, last = (0.0 if abs(v) < 5e-7 else v for v in (first, last))  # no "-0.0" from solver tolerances
    lines.append(
        f"  CO2 in {s['base_year']} / {s['final_year']}            {first:>8,.1f} / {last:,.1f} MtCO2/yr"
    )
    if s.get("unserved_electricity_twh", 0) > 1e-6 or s.get("unserved_fuel_pj", 0) > 1e-6:
        lines.append(
            f"  UNSERVED: electricity {s['unserved_electricity_twh']:,.3f} TWh, fuels {s['unserved_fuel_pj']:,.3f} PJ over the horizon"
        )
    lines.append("")
    lines.append(f"  capacity in {s['final_year']} [MW]")
    mix = {k: v for k, v in s["final_year_capacity_mw"].items() if abs(v) > 0.5}
    for name, mw in sorted(mix.items(), key=lambda kv: -kv[1]):
        lines.append(f"    {name:<28}{mw:>12,.0f}")
    lines.append("")
    lines.append(f"  {CAUTION}")
    return "\n".join(lines)


def render_profile(result: RunResult) -> str:
    """Stage times with their share of the run, the LP size and coefficient range, the modelling overhead per LP
    row (build + hand-off + extraction, i.e. everything that is neither reading the scenario nor solving), and the
    solver method, options, iterations and residuals HiGHS reported."""
    m = result.manifest
    times = m.get("stage_times_s", {})
    lp = m.get("lp", {})
    solver = m.get("solver", {})
    total = times.get("total_s", 0.0) or 1e-12
    lines = ["Stage times [s]"]
    for key in ("load_s", "build_lp_s", "handoff_s", "solve_s", "extract_s", "total_s"):
        if key in times:
            share = "" if key == "total_s" else f"{100.0 * times[key] / total:>7.1f} %"
            lines.append(f"  {key[:-2].replace('_', ' '):<16}{times[key]:>10.3f}{share}")
    rows = lp.get("rows", 0) or 1
    overhead = sum(times.get(k, 0.0) for k in ("build_lp_s", "handoff_s", "extract_s"))
    coef = lp.get("coefficient_range", {})
    lines.append(
        f"LP: {lp.get('rows', 0):,} rows, {lp.get('columns', 0):,} columns, {lp.get('nonzeros', 0):,} nonzeros; "
        f"matrix coefficients {coef.get('min', 0):.3g} to {coef.get('max', 0):.3g}"
        + (f" (ratio {coef['max'] / coef['min']:.3g})" if coef.get("min") else "")
    )
    lines.append(
        f"modelling overhead (build + hand-off + extraction) {overhead:.3f} s = {overhead * 1e6 / rows:.1f} us per row"
    )
    iterations = solver.get("iterations") or {}
    used = ", ".join(f"{k} {v:,}" for k, v in iterations.items() if v)
    lines.append(
        f"solver: HiGHS, method {solver.get('method')} -> options {solver.get('options')}; "
        f"status {solver.get('status')}; iterations: {used or 'none'}"
    )
    pinf, dinf = solver.get("primal_infeasibility"), solver.get("dual_infeasibility")
    if pinf is not None and dinf is not None:
        lines.append(f"  max primal infeasibility {pinf:.2g}, max dual infeasibility {dinf:.2g}")
    return "\n".join(lines)


def render_run(result: RunResult, folder: Path, *, profile: bool = False) -> str:
    """What ``pathcast run`` prints: :func:`render_summary`, :func:`render_profile` when asked, and the folder."""
    parts = [render_summary(result)]
    if profile:
        parts.append(render_profile(result))
    parts.append(f"Results written to {folder}/")
    return "\n".join(parts)


def render_check(facts: Mapping[str, Any]) -> str:
    """The one-sentence outcome of ``pathcast check``: an ensemble file's own sentence, or the scenario's horizon,
    representative days, technologies and fuel supplies."""
    if "sentence" in facts:
        return str(facts["sentence"])
    years = facts["years"]
    return (
        f"{facts['file']}: valid scenario {facts['scenario']!r}, {years[0]}-{years[1]}, "
        f"{facts['representative_days']} representative days, {facts['technologies']} technologies, "
        f"{facts['supplies']} fuel supplies."
    )


def _pct(value: float | None) -> str:
    if value is None or math.isnan(value):
        return "       -"
    return f"{100 * value:8.2f}"


def render_rates(report: RatesReport) -> str:
    """The rates table of ``pathcast rates``: required rates by start year [%/yr], realised compound rates per
    period [%/yr], the steepest yearly cut, the budget's exhaustion year and headroom [MtCO2] and the TCRE warming."""
    a, terms = report.account, report.account.terms
    # compute_rates refuses a run without a budget, so the account has its terms and its final headroom
    assert terms is not None and a.headroom_final_mtco2 is not None
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


def _num(value, fmt: str, width: int) -> str:
    if _missing(value):
        return f"{'-':>{width}}"
    return f"{value:{width}{fmt}}"


def render_delay(study: DelayStudy) -> str:
    """The table of ``pathcast delay``: per start year the CO2 before action [MtCO2/yr], the remaining budget
    [MtCO2], the required rate [%/yr], the discounted cost and its increase [million currency], the steepest cut,
    stranded capacity [MW] and capex [million currency] and the carbon price at the start [currency/tCO2]; then the
    explanation of every start year whose budget is not achievable."""
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
        year = "" if _missing(row["steepest_cut_year"]) else str(int(row["steepest_cut_year"]))
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


def render_memo_written(folder: Path) -> str:
    """Where ``pathcast memo`` wrote the memo."""
    return f"Memo written to {folder}/memo.md and {folder}/memo.html"


def render_ensemble(run: EnsembleRun, summary: EnsembleSummary) -> tuple[str, str]:
    """(standard output, standard error) of ``pathcast ensemble``: members solved, failed and not run, the
    probability of staying within the carbon budget, and the first failures (standard error; empty when none)."""
    s = summary.stats
    out = [
        f"Ensemble {run.spec.name}: {s['members']} members ({run.unique} distinct scenarios), {s['solved']} solved, "
        f"{s['failed']} failed, {s['pending']} not run; this run solved {run.solved_now} and skipped "
        f"{run.skipped} in {run.wall_s:.1f} s ({run.mode}, {run.workers} worker{'s' if run.workers != 1 else ''})."
    ]
    probability = s.get("probability_within_budget")
    if probability is not None and not math.isnan(probability):
        out.append(f"Probability of staying within the carbon budget: {probability:.0%}.")
    failed = summary.members[summary.members["status"] == "failed"]
    err = [
        f"  member {row.member} ({row.role}): {row.error_type}: {row.error_message}"
        for row in failed.head(5).itertuples()
    ]
    if len(failed) > 5:
        err.append(
            f"  ... and {len(failed) - 5} more failed members (see {run.out / 'tables' / 'members.csv'})"
        )
    out.append(f"Results written to {run.out}/")
    return "\n".join(out), "\n".join(err)
