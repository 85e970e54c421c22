"""Plain-text renderings of a RunResult for the terminal."""

from __future__ import annotations

from ..results.run_result import RunResult

__all__ = ["render_summary", "render_profile", "CAUTION"]

CAUTION = (
    "pathcast is a screening-level planning model: its results depend on its inputs, and decisions defer to "
    "regulators, grid codes and licensed engineering studies."
)


def render_summary(result: RunResult) -> str:
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
