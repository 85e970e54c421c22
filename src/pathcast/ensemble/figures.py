"""Figures of an ensemble, drawn from an :class:`~pathcast.ensemble.summary.EnsembleSummary` only.

Built without pyplot (no global state; Agg canvas when saved). Fans show the median as a solid line, the 25-75 %
band darker and the 5-95 % band lighter and hatched, with dotted edges, so they read in black and white. Technology
colours and hatches come from :mod:`pathcast.report.colours`; the ensemble's own lines use ``scenario_style``.

==========================  ====================================================================================
figure                      content
==========================  ====================================================================================
emissions_fan               yearly CO2 [MtCO2/yr] and cumulative CO2 in the budget period [MtCO2] against the budget
capacity_fan                capacity in service by technology [GW], one panel per technology
distributions               total discounted cost [billion currency] and required reduction rate [%/yr]
budget_probability          distribution of the budget margin [MtCO2]; the probability of staying within the budget
tornado                     one_at_a_time only: change of total cost and cumulative CO2 at each input's low and high
==========================  ====================================================================================
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pandas as pd
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.patches import Patch
from matplotlib.ticker import MaxNLocator

from ..report.colours import scenario_style, technology_style
from .store import write_atomic
from .summary import EnsembleSummary

__all__ = [
    "emissions_fan_figure",
    "capacity_fan_figure",
    "distributions_figure",
    "budget_probability_figure",
    "tornado_figure",
    "ensemble_figures",
    "save_png",
    "DPI",
]

DPI = 120
_MEDIAN = scenario_style(0)["color"]
_BUDGET = scenario_style(1)
_BASE = scenario_style(2)


def _fan(ax, years, rows: pd.DataFrame, colour: str, hatch: str = "//", scale: float = 1.0) -> list:
    p = {k: rows[k].to_numpy(dtype=float) * scale for k in ("p5", "p25", "p50", "p75", "p95")}
    outer = ax.fill_between(
        years, p["p5"], p["p95"], facecolor=colour, alpha=0.18, hatch=hatch, edgecolor=colour, linewidth=0.0
    )
    inner = ax.fill_between(years, p["p25"], p["p75"], facecolor=colour, alpha=0.38, linewidth=0.0)
    ax.plot(years, p["p5"], color=colour, linestyle=":", linewidth=0.8)
    ax.plot(years, p["p95"], color=colour, linestyle=":", linewidth=0.8)
    (median,) = ax.plot(years, p["p50"], color=colour, linewidth=2.0, linestyle="-")
    return [median, inner, outer]


_FAN_LABELS = ["median", "25-75 % of members", "5-95 % of members"]


def _money_label(summary: EnsembleSummary) -> str:
    price_year = f" of {summary.price_year}" if summary.price_year else ""
    return f"billion {summary.currency}{price_year}".strip()


def _percentiles(summary: EnsembleSummary, quantity: str, technology: str = "") -> pd.DataFrame:
    frame = summary.yearly_percentiles
    return frame[(frame["quantity"] == quantity) & (frame["technology"] == technology)].sort_values("year")


def _title(summary: EnsembleSummary) -> str:
    s = summary.stats
    return f"Ensemble {summary.design['name']}: {s['solved']} of {s['members']} members solved"


def _no_data(ax, text: str = "no solved members") -> None:
    ax.text(0.5, 0.5, text, ha="center", va="center", transform=ax.transAxes)
    ax.set_xticks([])
    ax.set_yticks([])


def emissions_fan_figure(summary: EnsembleSummary) -> Figure:
    fig = Figure(figsize=(11, 4.4), layout="constrained")
    left, right = fig.subplots(1, 2)
    yearly = _percentiles(summary, "emissions_mtco2")
    has_budget = summary.members["budget_mtco2"].notna().any()
    cumulative_name = "cumulative_in_budget_period_mtco2" if has_budget else "cumulative_mtco2"
    cumulative = _percentiles(summary, cumulative_name)
    if yearly.empty:
        _no_data(left)
        _no_data(right)
        return fig
    years = yearly["year"].to_numpy()
    handles = _fan(left, years, yearly, _MEDIAN)
    _fan(right, years, cumulative, _MEDIAN)
    base = summary.base_yearly
    extra_handles, extra_labels = [], []
    if base is not None:
        (line,) = left.plot(
            base["year"],
            base["emissions_mtco2"],
            color=_BASE["color"],
            linestyle="-.",
            marker=_BASE["marker"],
            markevery=max(1, len(years) // 6),
            markersize=4,
        )
        right.plot(
            base["year"],
            base[cumulative_name],
            color=_BASE["color"],
            linestyle="-.",
            marker=_BASE["marker"],
            markevery=max(1, len(years) // 6),
            markersize=4,
        )
        extra_handles.append(line)
        extra_labels.append("base scenario")
    if has_budget:
        budgets = summary.members["budget_mtco2"].dropna().to_numpy(dtype=float)
        low, mid, high = np.percentile(budgets, [5, 50, 95])
        line = right.axhline(mid, color=_BUDGET["color"], linestyle="--", linewidth=1.6)
        if high > low:
            right.axhspan(
                low,
                high,
                facecolor=_BUDGET["color"],
                alpha=0.12,
                edgecolor=_BUDGET["color"],
                hatch="..",
                linewidth=0.0,
            )
            label = f"carbon budget (median {mid:,.0f}, 5-95 % {low:,.0f}-{high:,.0f} MtCO2)"
        else:
            label = f"carbon budget ({mid:,.0f} MtCO2)"
        extra_handles.append(line)
        extra_labels.append(label)
        probability = summary.stats.get("probability_within_budget")
        if probability is not None and math.isfinite(probability):
            right.set_title(
                f"Cumulative emissions; P(staying within the budget) = {probability:.0%}", fontsize=10
            )
    left.set_ylabel("CO2 emissions [MtCO2/yr]")
    right.set_ylabel(
        "cumulative CO2 in the budget period [MtCO2]" if has_budget else "cumulative CO2 [MtCO2]"
    )
    left.set_title("Yearly emissions", fontsize=10)
    for ax in (left, right):
        ax.set_xlabel("year")
        ax.xaxis.set_major_locator(MaxNLocator(nbins=5, integer=True))
        ax.grid(True, alpha=0.3)
        ax.set_ylim(bottom=0)
    fig.suptitle(_title(summary))
    fig.legend(
        handles + extra_handles,
        _FAN_LABELS + extra_labels,
        loc="outside lower center",
        ncols=3,
        frameon=False,
    )
    return fig


def capacity_fan_figure(summary: EnsembleSummary) -> Figure:
    frame = summary.yearly_percentiles
    capacity = frame[frame["quantity"] == "capacity_mw"]
    peaks = (
        capacity.groupby("technology", sort=False)["p95"].max() if len(capacity) else pd.Series(dtype=float)
    )
    keep = [t for t, v in peaks.items() if v > max(1.0, 0.005 * peaks.max())]
    columns = min(3, max(1, len(keep)))
    rows = max(1, math.ceil(len(keep) / columns))
    fig = Figure(figsize=(4.0 * columns, 2.9 * rows + 0.9), layout="constrained")
    axes = np.atleast_1d(fig.subplots(rows, columns, squeeze=False)).ravel()
    if not keep:
        _no_data(axes[0], "no capacity in any solved member")
        return fig
    for ax, technology in zip(axes, keep, strict=False):
        colour, hatch = technology_style(technology)
        rows_t = capacity[capacity["technology"] == technology].sort_values("year")
        _fan(ax, rows_t["year"].to_numpy(), rows_t, colour, hatch or "//", scale=1e-3)
        ax.set_title(technology.replace("_", " "), fontsize=10)
        ax.set_ylabel("capacity [GW]")
        ax.set_xlabel("year")
        ax.xaxis.set_major_locator(MaxNLocator(nbins=5, integer=True))
        ax.set_ylim(bottom=0)
        ax.grid(True, alpha=0.3)
    for ax in axes[len(keep) :]:
        ax.set_visible(False)
    grey = "#555555"
    handles = [
        ax.plot([], [], color=grey, linewidth=2)[0],
        Patch(facecolor=grey, alpha=0.38),
        Patch(facecolor=grey, alpha=0.18, hatch="//", edgecolor=grey),
    ]
    fig.suptitle(f"Capacity in service by technology, {_title(summary).lower()}")
    fig.legend(handles, _FAN_LABELS, loc="outside lower center", ncols=3, frameon=False)
    return fig


def _histogram(ax, values: np.ndarray, colour: str, hatch: str, base: float | None, xlabel: str) -> None:
    values = values[np.isfinite(values)]
    if not len(values):
        _no_data(ax, "no values")
        return
    bins = min(30, max(5, int(math.sqrt(len(values))) + 1))
    ax.hist(values, bins=bins, facecolor=colour, alpha=0.45, hatch=hatch, edgecolor="#1b1b1b", linewidth=0.6)
    median = float(np.median(values))
    ax.axvline(median, color=_MEDIAN, linestyle="-", linewidth=1.8, label=f"median {median:,.3g}")
    low, high = np.percentile(values, [5, 95])
    ax.axvline(low, color=_MEDIAN, linestyle=":", linewidth=1.2, label=f"5 % {low:,.3g}")
    ax.axvline(high, color=_MEDIAN, linestyle=":", linewidth=1.2, label=f"95 % {high:,.3g}")
    if base is not None and math.isfinite(base):
        ax.axvline(
            base, color=_BASE["color"], linestyle="-.", linewidth=1.5, label=f"base scenario {base:,.3g}"
        )
    ax.set_xlabel(xlabel)
    ax.set_ylabel("members")
    ax.yaxis.set_major_locator(MaxNLocator(integer=True))
    ax.legend(frameon=False, fontsize=8)
    ax.grid(True, alpha=0.3)


def distributions_figure(summary: EnsembleSummary) -> Figure:
    fig = Figure(figsize=(11, 4.0), layout="constrained")
    left, right = fig.subplots(1, 2)
    solved = summary.members[summary.members["status"] == "solved"]
    base = summary.base_headline or {}
    cost = (
        pd.to_numeric(solved["total_discounted_cost_million"], errors="coerce").to_numpy(dtype=float) / 1000.0
    )
    base_cost = base.get("total_discounted_cost_million")
    _histogram(
        left,
        cost,
        scenario_style(2)["color"],
        "//",
        None if base_cost is None else base_cost / 1000.0,
        f"total discounted system cost [{_money_label(summary)}]",
    )
    rate = (
        pd.to_numeric(solved["required_reduction_rate_per_yr"], errors="coerce").to_numpy(dtype=float) * 100.0
    )
    base_rate = base.get("required_reduction_rate_per_yr")
    _histogram(
        right,
        rate,
        scenario_style(4)["color"],
        "\\\\",
        None if base_rate is None else base_rate * 100.0,
        "required exponential reduction rate [%/yr]",
    )
    left.set_title("Total discounted system cost", fontsize=10)
    right.set_title("Required reduction rate (constant decline fitting the budget)", fontsize=10)
    fig.suptitle(_title(summary))
    return fig


def budget_probability_figure(summary: EnsembleSummary) -> Figure:
    fig = Figure(figsize=(6.5, 4.2), layout="constrained")
    ax = fig.subplots()
    solved = summary.members[summary.members["status"] == "solved"]
    margin = pd.to_numeric(solved["budget_margin_mtco2"], errors="coerce").dropna().to_numpy(dtype=float)
    if not len(margin):
        _no_data(ax, "no carbon budget to compare with")
        return fig
    margin = np.sort(margin)
    share = np.arange(1, len(margin) + 1) / len(margin)
    ax.step(
        margin,
        share * 100.0,
        where="post",
        color=_MEDIAN,
        linewidth=1.8,
        label="solved members with at most this margin",
    )
    ax.axvline(0.0, color=_BUDGET["color"], linestyle="--", linewidth=1.5, label="budget exactly used")
    lo = min(float(margin.min()), 0.0)
    ax.axvspan(
        lo - 1.0 - 0.05 * abs(lo),
        0.0,
        facecolor="none",
        edgecolor=_BUDGET["color"],
        hatch="xx",
        linewidth=0.0,
        label="over budget",
    )
    s = summary.stats
    probability = s.get("probability_within_budget")
    text = (
        (
            f"P(within budget) = {probability:.0%}\n({s['within_budget']} of {s['solved'] + s['infeasible']} members"
            f"; {s['infeasible']} infeasible)"
        )
        if probability is not None and math.isfinite(probability)
        else ""
    )
    ax.text(0.98, 0.05, text, transform=ax.transAxes, ha="right", va="bottom", fontsize=9)
    ax.set_xlabel("budget margin: budget minus emissions in the budget period [MtCO2]")
    ax.set_ylabel("share of solved members [%]")
    ax.set_ylim(0, 100)
    ax.grid(True, alpha=0.3)
    ax.legend(frameon=False, fontsize=8, loc="upper left")
    ax.set_title("Staying within the carbon budget")
    return fig


def tornado_figure(summary: EnsembleSummary) -> Figure | None:
    tornado = summary.tornado
    if tornado is None or tornado.empty:
        return None
    metrics = [
        ("total_discounted_cost_million", 1e-3, _money_label(summary), "total discounted cost"),
        ("cumulative_emissions_mtco2", 1.0, "MtCO2", "cumulative CO2 emissions"),
    ]
    count = tornado["input"].nunique()
    fig = Figure(figsize=(12, 1.2 + 0.55 * count), layout="constrained")
    axes = fig.subplots(1, 2)
    low_style = {"facecolor": scenario_style(2)["color"], "hatch": "//", "edgecolor": "#1b1b1b", "alpha": 0.8}
    high_style = {
        "facecolor": scenario_style(1)["color"],
        "hatch": "..",
        "edgecolor": "#1b1b1b",
        "alpha": 0.8,
    }
    for ax, (metric, scale, unit, quantity) in zip(axes, metrics, strict=True):
        rows = tornado[tornado["metric"] == metric].sort_values("swing", ascending=True, na_position="first")
        positions = np.arange(len(rows))
        low = (rows["at_low"] - rows["base"]).to_numpy(dtype=float) * scale
        high = (rows["at_high"] - rows["base"]).to_numpy(dtype=float) * scale
        ax.barh(positions, np.nan_to_num(low), height=0.6, linewidth=0.6, **low_style)
        ax.barh(positions, np.nan_to_num(high), height=0.6, linewidth=0.6, **high_style)
        names = [
            f"{inp} ({_value(lo)} / {_value(hi)}{' x base' if mode == 'multiplier' else ''})"
            for inp, lo, hi, mode in zip(
                rows["input"], rows["low_value"], rows["high_value"], rows["as"], strict=True
            )
        ]
        ax.set_yticks(positions, names, fontsize=8)
        ax.axvline(0.0, color="#1b1b1b", linewidth=1.0)
        ax.set_xlabel(f"change of {quantity} from the base [{unit}]")
        ax.grid(True, axis="x", alpha=0.3)
        base = rows["base"].iloc[0] * scale if len(rows) else math.nan
        ax.set_title(f"{quantity[0].upper() + quantity[1:]} (base scenario: {base:,.4g} {unit})", fontsize=9)
    fig.legend(
        [Patch(**low_style), Patch(**high_style)],
        ["input at its low value", "input at its high value"],
        loc="outside lower center",
        ncols=2,
        frameon=False,
    )
    fig.suptitle(f"One-at-a-time sensitivities, ensemble {summary.design['name']}")
    return fig


def _value(value) -> str:
    try:
        return f"{float(value):.3g}"
    except (TypeError, ValueError):
        return str(value)


def ensemble_figures(summary: EnsembleSummary) -> dict[str, Figure]:
    figures = {
        "emissions_fan": emissions_fan_figure(summary),
        "capacity_fan": capacity_fan_figure(summary),
        "distributions": distributions_figure(summary),
        "budget_probability": budget_probability_figure(summary),
    }
    tornado = tornado_figure(summary)
    if tornado is not None:
        figures["tornado"] = tornado
    return figures


def save_png(fig: Figure, path: Path | str, dpi: int = DPI) -> Path:
    """Write a figure as PNG through a temporary file and ``os.replace``."""
    FigureCanvasAgg(fig)
    return write_atomic(Path(path), lambda tmp: fig.savefig(tmp, dpi=dpi, format="png"))
