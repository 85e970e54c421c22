"""The robustness section of a memo (Markdown), made from an ensemble folder whose outputs are one complete set
(:func:`pathcast.ensemble.outputs.verify_outputs`: the figures it links belong to the numbers it shows)."""

from __future__ import annotations

import math
from pathlib import Path

from .summary import EnsembleSummary, summarise_ensemble

__all__ = ["ensemble_robustness_section"]

_DESIGN_NAMES = {
    "latin_hypercube": "Latin hypercube sample",
    "grid": "full grid",
    "one_at_a_time": "one-at-a-time variation around the base",
}


def _fmt(value: float, digits: int = 3) -> str:
    if value is None or not math.isfinite(value):
        return "n/a"
    text = f"{value:,.{digits}g}"
    # below 1000 three significant digits; a value that rounds up to 1000 or more, or is larger, as a whole number
    return f"{value:,.0f}" if "e" in text or abs(value) >= 1000 else text


def ensemble_robustness_section(
    ensemble_dir: str | Path, *, heading_level: int = 2, figure_folder: str | Path | None = None
) -> str:
    """Markdown section on how robust the pathway is across an ensemble (from ``pathcast ensemble``'s folder):
    members solved, percentiles of the headline figures, the probability of staying within the carbon budget, the
    most influential inputs and the fan chart. Figure links point into ``figure_folder`` (default: the ensemble's
    own figures/ folder, as given). ScenarioError when the folder's tables, figures and summary.json are not the one
    set its outputs.json lists for the members stored now (an interrupted write, or members solved since)."""
    from .outputs import verify_outputs

    summary = summarise_ensemble(ensemble_dir)
    verify_outputs(ensemble_dir, summary)
    return render_robustness(
        summary,
        heading_level=heading_level,
        figure_folder=Path(figure_folder) if figure_folder else Path(ensemble_dir) / "figures",
    )


def render_robustness(
    summary: EnsembleSummary, *, heading_level: int = 2, figure_folder: Path | None = None
) -> str:
    d, s = summary.design, summary.stats
    hashes = "#" * heading_level
    money = f"million {summary.currency}" + (f" of {summary.price_year}" if summary.price_year else "")
    lines = [f"{hashes} Robustness across an ensemble", ""]
    described = ", ".join(
        f"`{label}` ({info['as']}, {info['distribution']})" for label, info in d["inputs"].items()
    )
    seed = f", seed {d['seed']}" if d.get("seed") is not None else ""
    lines.append(
        f"Ensemble **{d['name']}**: {s['members']} members ({_DESIGN_NAMES[d['design']]}{seed}) around the "
        f"base scenario `{Path(d['base']).name}`, varying {described}. {s['solved']} solved, "
        f"{s['infeasible']} infeasible, {s['failed_other']} failed otherwise"
        + (f", {s['pending']} not yet run" if s["pending"] else "")
        + "."
    )
    lines.append("")
    p = summary.headline_percentiles.set_index("quantity")
    rows = [
        ("total discounted system cost", "total_discounted_cost_million", money, 1.0),
        ("CO2 emitted in the budget period", "cumulative_in_budget_period_mtco2", "MtCO2", 1.0),
        ("CO2 in the final year", "final_year_emissions_mtco2", "MtCO2/yr", 1.0),
        ("required reduction rate", "required_reduction_rate_per_yr", "%/yr", 100.0),
        (
            "carbon price in the final year",
            "carbon_price_final_year_per_tco2",
            f"{summary.currency}/tCO2",
            1.0,
        ),
    ]
    lines += ["| quantity | unit | 5 % | median | 95 % |", "|---|---|---:|---:|---:|"]
    for name, key, unit, scale in rows:
        if key in p.index and p.loc[key, "members"]:
            lines.append(
                f"| {name} | {unit} | {_fmt(p.loc[key, 'p5'] * scale)} | {_fmt(p.loc[key, 'p50'] * scale)} | "
                f"{_fmt(p.loc[key, 'p95'] * scale)} |"
            )
    lines.append("")
    probability = s.get("probability_within_budget")
    if probability is not None and math.isfinite(probability):
        budget = s.get("reference_budget_mt")
        which = f"the {budget:,.0f} MtCO2 budget" if budget is not None else "the carbon budget"
        lines.append(
            f"Probability of staying within {which}: **{probability:.0%}**, {s['within_budget']} of the "
            f"{s['solved'] + s['infeasible']} members that solved or proved infeasible (a member counts when "
            "its emissions in the budget period stay within the budget while all demand is served)."
        )
        lines.append("")
    if summary.tornado is not None and not summary.tornado.empty:
        cost = summary.tornado[summary.tornado["metric"] == "total_discounted_cost_million"].dropna(
            subset=["swing"]
        )
        ranked = [f"`{r.input}` ({_fmt(r.swing)} {money})" for r in cost.head(3).itertuples()]
        if ranked:
            lines.append(
                "Inputs that move the total cost most (one at a time, low to high): "
                + ", ".join(ranked)
                + "."
            )
            lines.append("")
    elif summary.correlations is not None and not summary.correlations.empty:
        corr = summary.correlations[
            summary.correlations["metric"] == "total_discounted_cost_million"
        ].dropna()
        corr = corr.reindex(corr["spearman_rho"].abs().sort_values(ascending=False).index)
        ranked = [f"`{r.input}` (rho {r.spearman_rho:+.2f})" for r in corr.head(3).itertuples()]
        if ranked:
            lines.append(
                "Inputs most related to the total cost (Spearman rank correlation): "
                + ", ".join(ranked)
                + "."
            )
            lines.append("")
    if figure_folder is not None:
        lines.append(
            f"![Yearly and cumulative CO2 across the ensemble, median and 5-95 % band]"
            f"({(Path(figure_folder) / 'emissions_fan.png').as_posix()})"
        )
        lines.append("")
    lines.append(
        "Members differ only in the inputs listed; each is a least-cost pathway with perfect foresight, so the "
        "spread shows sensitivity to the assumptions, not the odds of outcomes in the world."
    )
    return "\n".join(lines) + "\n"
