"""Figures of one or several runs, drawn from RunResult tables only (never the model).

One function per figure; each takes a RunResult (or, for the overlay figures, one or several) and returns a
matplotlib :class:`~matplotlib.figure.Figure` built without pyplot (no global state, Agg canvas when saved).
:func:`save_figure` writes it as PNG and SVG.

Every technology is drawn with its colour and hatch from :mod:`pathcast.report.colours` (hatches keep stacked areas
and bars readable in black and white); scenarios in overlay figures use ``scenario_style``. Units are on every axis;
legends sit outside the plotting area; layout is constrained and saving uses a tight bounding box, so nothing is clipped.

==========================  ====================================================================================
figure                      content
==========================  ====================================================================================
capacity_figure             capacity in service by technology, stacked areas [MW or GW]; converters apart [of input]
additions_figure            yearly additions (above zero) and retirements (below zero) by technology, stacked bars
generation_figure           electricity generation by generator, stacked areas [TWh/yr], final demand as a line
fuel_supply_figure          fuel supply and converter output by source, stacked areas [PJ/yr], final fuel use line
emissions_figure            yearly CO2 [MtCO2/yr] per scenario with budget-consistent exponential and linear paths
cumulative_emissions_figure cumulative CO2 [MtCO2] per scenario against each carbon budget, exhaustion years marked
required_rate_figure        required exponential reduction rate [%/yr] by start year (the cost of delay)
carbon_price_figure         carbon price [currency/tCO2 of the price year] per scenario
==========================  ====================================================================================
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from pathlib import Path

import matplotlib
import numpy as np
import pandas as pd
from matplotlib.colors import to_rgb
from matplotlib.figure import Figure
from matplotlib.patches import Patch
from matplotlib.ticker import FuncFormatter, MaxNLocator

from ..results.budget import budget_accounting
from ..results.compare import scenario_labels
from ..results.reduction_rates import required_rates_table
from ..results.run_result import RunResult
from .colours import scenario_style, technology_style

__all__ = [
    "capacity_figure",
    "additions_figure",
    "generation_figure",
    "fuel_supply_figure",
    "emissions_figure",
    "cumulative_emissions_figure",
    "required_rate_figure",
    "carbon_price_figure",
    "save_figure",
    "scenario_figures",
    "overlay_figures",
    "SCENARIO_FIGURES",
    "OVERLAY_FIGURES",
    "DPI",
]

DPI = 150
_SIZE = (8.0, 4.6)  # [inch]
_HATCH_ON_LIGHT = (0.0, 0.0, 0.0, 0.45)  # hatch lines on light fills
_HATCH_ON_DARK = (1.0, 1.0, 1.0, 0.55)  # and on dark fills (coal, storage), so they stay visible in greyscale
_SHOWN_MW = 0.5  # technologies whose capacity or additions never reach this [MW] are left out of the picture
_SHOWN_ENERGY = 1e-4  # [TWh/yr] or [PJ/yr], likewise
_GW_FROM_MW = 10_000.0  # axes switch from MW to GW when the largest stacked value reaches this [MW]

Results = RunResult | Sequence[RunResult]


# --- helpers ---------------------------------------------------------------------------------------------------------


def _as_list(results: Results) -> list[RunResult]:
    return [results] if isinstance(results, RunResult) else list(results)


def _new_figure(rows: int = 1, height_ratios: Sequence[float] | None = None, height: float | None = None):
    fig = Figure(figsize=(_SIZE[0], height or _SIZE[1]), layout="constrained")
    axes = fig.subplots(rows, 1, sharex=True, squeeze=False, gridspec_kw={"height_ratios": height_ratios})[
        :, 0
    ]
    for ax in axes:
        ax.xaxis.set_major_locator(MaxNLocator(integer=True, steps=[1, 2, 5, 10]))
        ax.yaxis.set_major_formatter(FuncFormatter(_tick))
        ax.grid(axis="y", color="#d9d9d9", linewidth=0.6)
        ax.set_axisbelow(True)
        ax.spines[["top", "right"]].set_visible(False)
    axes[-1].set_xlabel("Year")
    return fig, list(axes)


def _hatch_colour(colour: str) -> tuple[float, float, float, float]:
    red, green, blue = to_rgb(colour)
    return _HATCH_ON_DARK if 0.299 * red + 0.587 * green + 0.114 * blue < 0.35 else _HATCH_ON_LIGHT


def _tick(value: float, _position=None) -> str:
    """Axis numbers with thousands separators (12,000) and no needless decimals."""
    if float(value).is_integer():
        return f"{value:,.0f}"
    return f"{value:,.3f}".rstrip("0").rstrip(".")


def _label(name: str) -> str:
    return str(name).replace("_", " ")


def _money(result: RunResult) -> str:
    """'USD of 2024': the currency and price year every money amount of ``result`` is in."""
    currency = result.summary.get("currency") or result.metadata.get("currency") or "currency"
    year = result.summary.get("price_year") or result.metadata.get("price_year")
    return f"{currency} of {year}" if year else str(currency)


def _legend(
    fig: Figure, handles: list, labels: list[str], title: str | None = None, below: bool = False
) -> None:
    """Legend outside the axes: at the right (stacked charts, many technologies) or below (overlays)."""
    if not handles:
        return
    if below:
        fig.legend(
            handles,
            labels,
            loc="outside lower center",
            frameon=False,
            fontsize="small",
            ncols=2 if len(handles) > 1 else 1,
        )
    else:
        fig.legend(
            handles,
            labels,
            loc="outside right upper",
            frameon=False,
            title=title,
            fontsize="small",
            title_fontsize="small",
            alignment="left",
        )


def _title(ax, text: str) -> None:
    ax.set_title(text, fontsize="large")


def _wide(frame: pd.DataFrame, columns: str, values: str, keep: float) -> pd.DataFrame:
    """Year x ``columns`` table of ``values`` (summed), columns in order of first appearance, negligible ones dropped."""
    if frame.empty:
        return pd.DataFrame()
    order = list(dict.fromkeys(frame[columns]))
    wide = frame.pivot_table(index="year", columns=columns, values=values, aggfunc="sum", fill_value=0.0)
    wide = wide.reindex(columns=order).fillna(0.0).sort_index()
    return wide.loc[:, wide.abs().max() >= keep]


def _stack(ax, years: np.ndarray, wide: pd.DataFrame, scale: float, style_key: Callable[[str], str]) -> list:
    """Stacked areas with the technology colours and hatches; returns one legend handle per column."""
    handles = []
    base = np.zeros(len(years))
    for column in wide.columns:
        values = np.clip(wide[column].to_numpy(dtype=float), 0.0, None) / scale
        colour, hatch = technology_style(style_key(column))
        ax.fill_between(
            years,
            base,
            base + values,
            facecolor=colour,
            hatch=hatch,
            hatchcolor=_hatch_colour(colour),
            edgecolor="white",
            linewidth=0.4,
        )
        handles.append(
            Patch(facecolor=colour, hatch=hatch, hatchcolor=_hatch_colour(colour), edgecolor="white")
        )
        base = base + values
    ax.set_xlim(years[0], years[-1]) if len(years) > 1 else None
    ax.set_ylim(bottom=0)
    return handles


def _power_unit(largest_mw: float) -> tuple[str, float]:
    return ("GW", 1000.0) if largest_mw >= _GW_FROM_MW else ("MW", 1.0)


def _span(ax, results: list[RunResult]) -> None:
    """x axis from the first to the last modelled year of the scenarios shown."""
    first = min(int(r.emissions_total["year"].min()) for r in results)
    last = max(int(r.emissions_total["year"].max()) for r in results)
    if last > first:
        ax.set_xlim(first, last)


def _no_data(ax, text: str) -> None:
    ax.text(0.5, 0.5, text, transform=ax.transAxes, ha="center", va="center", color="#555555")


# --- one scenario ----------------------------------------------------------------------------------------------------


def capacity_figure(result: RunResult) -> Figure:
    """Capacity in service by technology [MW or GW], stacked; fuel converters (electrolysers, ...) in a lower panel
    because their capacity is counted on their input side and does not add to power capacity."""
    cap = result.capacity
    power = _wide(cap[cap["kind"].isin(["generator", "storage"])], "technology", "capacity_mw", _SHOWN_MW)
    conv = _wide(cap[cap["kind"] == "converter"], "technology", "capacity_mw", _SHOWN_MW)
    years = np.sort(cap["year"].unique())
    power = power.reindex(years, fill_value=0.0)
    unit, scale = _power_unit(float(power.clip(lower=0).sum(axis=1).max()) if not power.empty else 0.0)
    if conv.empty:
        fig, axes = _new_figure()
    else:
        fig, axes = _new_figure(2, height_ratios=[3, 1.3], height=_SIZE[1] + 1.2)
    handles = _stack(axes[0], years, power, scale, str)
    labels = [_label(c) for c in power.columns]
    axes[0].set_ylabel(f"Generation and storage\ncapacity [{unit}]")
    if power.empty:
        _no_data(axes[0], "no generation capacity")
    if not conv.empty:
        conv = conv.reindex(years, fill_value=0.0)
        conv_unit, conv_scale = _power_unit(float(conv.clip(lower=0).sum(axis=1).max()))
        handles += _stack(axes[1], years, conv, conv_scale, str)
        labels += [_label(c) for c in conv.columns]
        axes[1].set_ylabel(f"Converters\n[{conv_unit} of input]")
    _title(axes[0], f"Capacity in service: {result.scenario_name}")
    _legend(fig, handles, labels, "Technology")
    return fig


def additions_figure(result: RunResult) -> Figure:
    """New capacity by technology and year [MW/yr or GW/yr] as stacked bars above zero; retirements (end of life and
    early) as lighter bars below zero."""
    cap = result.capacity
    new = _wide(cap, "technology", "new_mw", _SHOWN_MW)
    retired = _wide(cap, "technology", "retired_mw", _SHOWN_MW)
    years = np.sort(cap["year"].unique())
    new = new.reindex(years, fill_value=0.0)
    retired = retired.reindex(years, fill_value=0.0)
    largest = max(
        float(new.clip(lower=0).sum(axis=1).max()) if not new.empty else 0.0,
        float(retired.clip(lower=0).sum(axis=1).max()) if not retired.empty else 0.0,
    )
    unit, scale = _power_unit(largest)
    fig, (ax,) = _new_figure()
    handles, labels = [], []
    names = list(dict.fromkeys([*new.columns, *retired.columns]))
    up = np.zeros(len(years))
    down = np.zeros(len(years))
    for name in names:
        colour, hatch = technology_style(name)
        if name in new.columns:
            values = np.clip(new[name].to_numpy(dtype=float), 0.0, None) / scale
            ax.bar(
                years,
                values,
                bottom=up,
                width=0.8,
                color=colour,
                hatch=hatch,
                hatchcolor=_hatch_colour(colour),
                edgecolor="white",
                linewidth=0.3,
            )
            up = up + values
        if name in retired.columns:
            values = np.clip(retired[name].to_numpy(dtype=float), 0.0, None) / scale
            ax.bar(
                years,
                -values,
                bottom=-down,
                width=0.8,
                color=colour,
                alpha=0.45,
                hatch=hatch,
                hatchcolor=_hatch_colour(colour),
                edgecolor="white",
                linewidth=0.3,
            )
            down = down + values
        handles.append(
            Patch(facecolor=colour, hatch=hatch, hatchcolor=_hatch_colour(colour), edgecolor="white")
        )
        labels.append(_label(name))
    if not retired.empty:
        handles.append(Patch(facecolor="#9a9a9a", alpha=0.45, edgecolor="white"))
        labels.append("(lighter, below zero:\nretirements)")
    ax.axhline(0.0, color="#333333", linewidth=0.8)
    ax.set_ylabel(f"Additions (+) and retirements (-)\n[{unit}/yr]")
    if not names:
        _no_data(ax, "no capacity added or retired")
    _title(ax, f"Yearly capacity additions: {result.scenario_name}")
    _legend(fig, handles, labels, "Technology")
    return fig


def _hourly_twh(result: RunResult, technology: str) -> pd.Series:
    """Yearly energy of one row family of the hourly table [TWh/yr] (MW x 1 h x weight days / 1e6)."""
    hourly = result.electricity_hourly
    rows = hourly[hourly["technology"] == technology]
    energy = (rows["power_mw"] * rows["weight_days"]).groupby(rows["year"]).sum() / 1e6
    return energy


def generation_figure(result: RunResult) -> Figure:
    """Electricity generation by generator [TWh/yr], stacked, with unserved energy on top when there is any; the
    final electricity demand (and demand including converters such as electrolysers) as lines."""
    el = result.electricity
    gen = _wide(el[el["kind"] == "generator"], "technology", "generation_twh", _SHOWN_ENERGY)
    years = np.sort(el["year"].unique()) if len(el) else np.sort(result.emissions_total["year"].unique())
    gen = gen.reindex(years, fill_value=0.0)
    unserved = _hourly_twh(result, "unserved").reindex(years, fill_value=0.0)
    if float(unserved.max()) >= _SHOWN_ENERGY:
        gen["unserved"] = unserved.to_numpy()
    fig, (ax,) = _new_figure()
    handles = _stack(ax, years, gen, 1.0, str)
    labels = [_label(c) for c in gen.columns]
    demand = -_hourly_twh(result, "final_demand").reindex(years, fill_value=0.0)
    (line,) = ax.plot(years, demand.to_numpy(), color="#111111", linestyle="--", linewidth=1.6)
    handles.append(line)
    labels.append("final electricity demand")
    converters = (
        el[el["kind"] == "converter"].groupby("year")["consumption_twh"].sum().reindex(years, fill_value=0.0)
    )
    if float(converters.max()) >= _SHOWN_ENERGY:
        (line,) = ax.plot(
            years, (demand + converters).to_numpy(), color="#111111", linestyle=":", linewidth=1.6
        )
        handles.append(line)
        labels.append("demand incl. converters\n(electrolysers, ...)")
    ax.set_ylabel("Electricity generation [TWh/yr]")
    _title(ax, f"Electricity generation mix: {result.scenario_name}")
    _legend(fig, handles, labels, "Generator")
    return fig


def fuel_supply_figure(result: RunResult) -> Figure:
    """Fuel supply by source and converter output [PJ/yr], stacked (gross: a converter's output may be another
    converter's input), with the final fuel use as a line."""
    flows = result.fuel_flows
    years = np.sort(result.emissions_total["year"].unique())
    fig, (ax,) = _new_figure()
    sources = flows[flows["role"].isin(["supply", "conversion_output"])].copy()
    if sources.empty:
        _no_data(ax, "no fuels in this scenario")
        ax.set_ylabel("Fuel supply [PJ/yr]")
        _title(ax, f"Fuel supply mix: {result.scenario_name}")
        return fig
    sources["source"] = sources["technology"] + " (" + sources["commodity"] + ")"
    # supplies take their style from name and commodity (forest_residues (wood_chips)); converters from their name
    # alone, so a converter looks the same here as in the capacity figures
    keys = {
        row.source: row.technology if row.role == "conversion_output" else f"{row.technology} {row.commodity}"
        for row in sources[["source", "technology", "commodity", "role"]].drop_duplicates().itertuples()
    }
    wide = _wide(sources, "source", "energy_pj", _SHOWN_ENERGY).reindex(years, fill_value=0.0)
    handles = _stack(ax, years, wide, 1.0, lambda column: keys[column])
    labels = [_label(c) for c in wide.columns]
    final = (
        flows[flows["role"] == "final_use"].groupby("year")["energy_pj"].sum().reindex(years, fill_value=0.0)
    )
    if float(final.max()) >= _SHOWN_ENERGY:
        (line,) = ax.plot(years, final.to_numpy(), color="#111111", linestyle="--", linewidth=1.6)
        handles.append(line)
        labels.append("final fuel use")
    ax.set_ylabel("Fuel supply and converter output [PJ/yr]")
    _title(ax, f"Fuel supply mix: {result.scenario_name}")
    _legend(fig, handles, labels, "Source (commodity)")
    return fig


# --- overlays (one or several scenarios) ---------------------------------------------------------------------------


def _has_budget(result: RunResult) -> bool:
    budget = result.summary.get("carbon_budget_mtco2")
    return budget is not None and np.isfinite(float(budget))


def _budget_key(result: RunResult) -> tuple[float, object, object]:
    s = result.summary
    return float(s["carbon_budget_mtco2"]), s.get("budget_first_year"), s.get("budget_last_year")


def _first_budget(results: list[RunResult]) -> tuple[RunResult, str] | None:
    """The first scenario with a carbon budget and its legend label: the budget a scenario without its own is
    measured against in the overlays (as in results.compare)."""
    for result, label in zip(results, scenario_labels(results), strict=True):
        if _has_budget(result):
            return result, label
    return None


def _style(index: int, count: int, markevery: int = 5) -> dict:
    style = scenario_style(index)
    style["linewidth"] = 2.0
    style["markevery"] = markevery
    if count == 1:
        style["marker"] = None
    return style


def emissions_figure(results: Results) -> Figure:
    """Yearly CO2 emissions [MtCO2/yr] per scenario. For each distinct carbon budget, two reference paths from the
    budget's first year that spend exactly that budget, starting from the emissions of the first scenario holding it
    (reduction_rates.required_rates_table): the exponential decline at the required rate, E0 (1 - r)^t, and the
    straight line to zero in its linear end year."""
    results = _as_list(results)
    labels = scenario_labels(results)
    fig, (ax,) = _new_figure()
    handles, names = [], []
    paths = []
    drawn: set[tuple] = set()
    for i, (result, label) in enumerate(zip(results, labels, strict=True)):
        et = result.emissions_total
        (line,) = ax.plot(et["year"], et["emissions_mtco2"], **_style(i, len(results)))
        handles.append(line)
        names.append(label)
        if not _has_budget(result) or _budget_key(result) in drawn:
            continue
        drawn.add(_budget_key(result))
        final = int(et["year"].iloc[-1])
        start = max(
            int(et["year"].iloc[0]), int(result.summary.get("budget_first_year") or et["year"].iloc[0])
        )
        if start > final:
            continue
        row = required_rates_table(result, start_years=[start]).iloc[0]
        if row["budget_exhausted"] or not np.isfinite(row["exponential_rate_per_year"]):
            continue
        paths.append((result, label, start, final, row))
    shades = ("#6f6f6f", "#a0a0a0", "#3f3f3f")
    for k, (result, label, start, final, row) in enumerate(paths):
        colour = shades[k % len(shades)]
        budget = float(result.summary["carbon_budget_mtco2"])
        owner = f" ({label})" if len(paths) > 1 else ""
        e0, rate = float(row["emissions_at_start_mtco2"]), float(row["exponential_rate_per_year"])
        years = np.arange(start, final + 1)
        (exp_line,) = ax.plot(
            years,
            e0 * (1.0 - rate) ** (years - start),
            color=colour,
            linestyle=(0, (5, 2)),
            linewidth=1.3,
            gid=f"exponential_path_{k}",
        )
        handles.append(exp_line)
        names.append(
            f"exponential path within the {budget:,.0f} MtCO2\nbudget{owner}: {100 * rate:.1f} % less each year"
        )
        end = float(row["linear_end_year"])
        if np.isfinite(end) and end > start:
            stop = min(end, float(final))
            (lin_line,) = ax.plot(
                [start, stop],
                [e0, e0 * (1.0 - (stop - start) / (end - start))],
                color=colour,
                linestyle=(0, (1, 1.5)),
                linewidth=1.6,
                gid=f"linear_path_{k}",
            )
            handles.append(lin_line)
            names.append(f"straight line within the {budget:,.0f} MtCO2\nbudget{owner}: zero in {end:.0f}")
    ax.set_ylim(bottom=0)
    _span(ax, results)
    ax.set_ylabel("CO2 emissions [MtCO2/yr]")
    _title(ax, "CO2 emissions against budget-consistent paths")
    _legend(fig, handles, names, below=True)
    return fig


def cumulative_emissions_figure(results: Results) -> Figure:
    """Cumulative CO2 [MtCO2] counted over each scenario's budget period (budget.budget_accounting), against the
    budget (a horizontal line per distinct budget), with the year the budget is used up marked. A scenario without a
    budget of its own is counted over its horizon against the first budget among the scenarios shown."""
    results = _as_list(results)
    labels = scenario_labels(results)
    reference = _first_budget(results)
    fig, (ax,) = _new_figure()
    handles, names = [], []
    budgets: dict[tuple, str] = {}
    for i, (result, label) in enumerate(zip(results, labels, strict=True)):
        style = _style(i, len(results))
        borrowed = (
            None
            if _has_budget(result) or reference is None
            else float(reference[0].summary["carbon_budget_mtco2"])
        )
        account = budget_accounting(result, budget_mt=borrowed)
        table = account.table
        (line,) = ax.plot(table["year"], table["cumulative_mtco2"], **style)
        handles.append(line)
        names.append(label)
        if _has_budget(result):
            budgets.setdefault(_budget_key(result), label)
        if account.exhaustion_year is not None:
            year = int(account.exhaustion_year)
            value = float(table.loc[table["year"] == year, "cumulative_mtco2"].iloc[0])
            ax.plot(
                [year],
                [value],
                marker="X",
                markersize=10,
                color=style["color"],
                linestyle="none",
                markeredgecolor="white",
                zorder=5,
            )
            ax.annotate(
                f"budget used up in {year}",
                (year, value),
                xytext=(10, -14),
                textcoords="offset points",
                ha="left",
                va="top",
                fontsize="small",
                color=style["color"],
                bbox={"facecolor": "white", "edgecolor": "none", "alpha": 0.85, "pad": 1.5},
            )
    for (budget, first, last), owner in budgets.items():
        line = ax.axhline(budget, color="#555555", linestyle=(0, (6, 3)), linewidth=1.2)
        handles.append(line)
        period = f" {first}-{last}" if first is not None else ""
        names.append(
            f"carbon budget{period}: {budget:,.0f} MtCO2" + (f" ({owner})" if len(budgets) > 1 else "")
        )
    ax.set_ylim(bottom=0)
    _span(ax, results)
    ax.set_ylabel("Cumulative CO2 emissions [MtCO2]")
    _title(ax, "Cumulative CO2 emissions against the carbon budget")
    _legend(fig, handles, names, below=True)
    return fig


_RATE_CAP = (
    40.0  # [%/yr] the rate axis stops here when some rates go far beyond (they are written at the top)
)


def required_rate_figure(results: Results) -> Figure:
    """Exponential reduction rate [%/yr] needed to stay within the carbon budget when the decline starts in a given
    year after following the scenario's path until then: the cost of delay (reduction_rates.required_rates_table,
    every five years). A scenario without a budget of its own is measured against the first budget among the
    scenarios shown, counted over its own horizon (labelled so). Rates above 50 %/yr are written at the top of an
    axis cut at 40 %/yr; where no decline fits any more the line ends with 'budget used up'."""
    results = _as_list(results)
    labels = scenario_labels(results)
    reference = _first_budget(results)
    fig, (ax,) = _new_figure()
    handles, names, lines = [], [], []
    for i, (result, label) in enumerate(zip(results, labels, strict=True)):
        style = _style(i, len(results), markevery=1)
        style["marker"] = scenario_style(i)["marker"]
        if _has_budget(result):
            table = required_rates_table(result)
            name = label
        elif reference is not None:
            budget = float(reference[0].summary["carbon_budget_mtco2"])
            table = required_rates_table(result, budget_mt=budget)
            name = f"{label} (against the {budget:,.0f} MtCO2\nbudget of {reference[1]})"
        else:
            continue
        rate = 100 * pd.to_numeric(table["exponential_rate_per_year"], errors="coerce").to_numpy(dtype=float)
        years = table["start_year"].to_numpy(dtype=int)
        shown = np.isfinite(rate)
        if not shown.any():
            continue
        (line,) = ax.plot(years[shown], rate[shown], **style)
        handles.append(line)
        names.append(name)
        lines.append((years, rate, shown, table["budget_exhausted"].to_numpy(dtype=bool), style["color"]))
    if not handles:
        _no_data(ax, "no carbon budget in these scenarios")
    top = max((float(np.nanmax(rate[shown])) for _, rate, shown, _, _ in lines), default=0.0)
    cap = _RATE_CAP if top > 1.25 * _RATE_CAP else None
    written: set[tuple[int, str]] = set()
    for years, rate, shown, exhausted, colour in lines:
        if cap is not None:
            for year, value in zip(years[shown], rate[shown], strict=True):
                if value > cap and (int(year), f"{value:.0f}") not in written:
                    written.add((int(year), f"{value:.0f}"))
                    ax.annotate(
                        f"{value:.0f} %",
                        (year, cap),
                        xytext=(0, 2),
                        textcoords="offset points",
                        ha="center",
                        va="bottom",
                        fontsize="small",
                        color=colour,
                        annotation_clip=False,
                    )
        if exhausted.any():
            last = np.flatnonzero(shown)[-1]
            value = min(rate[last], cap) if cap is not None else rate[last]
            ax.annotate(
                f"budget used up\nbefore {years[exhausted][0]}",
                (years[last], value),
                xytext=(6, 0),
                textcoords="offset points",
                ha="left",
                va="center",
                fontsize="small",
                color=colour,
            )
    ax.set_ylim(0, cap) if cap is not None else ax.set_ylim(bottom=0)
    _span(ax, results)
    ax.set_xlabel("Year the decline starts")
    ax.set_ylabel(
        "Required reduction rate [%/yr]" + (f"\n(axis cut at {cap:.0f} %/yr)" if cap is not None else "")
    )
    _title(ax, "Required CO2 reduction rate by start year (cost of delay)")
    _legend(fig, handles, names, below=True)
    return fig


def carbon_price_figure(results: Results) -> Figure:
    """Carbon price [currency/tCO2 in money of the price year]: the budget's and caps' shadow prices plus any carbon
    price path of the scenario."""
    results = _as_list(results)
    labels = scenario_labels(results)
    fig, (ax,) = _new_figure()
    handles, names = [], []
    money = sorted({_money(r) for r in results})
    for i, (result, label) in enumerate(zip(results, labels, strict=True)):
        price = result.carbon_price
        (line,) = ax.plot(price["year"], price["carbon_price_per_tco2"], **_style(i, len(results)))
        handles.append(line)
        names.append(label if len(money) == 1 else f"{label} ({_money(result)})")
    top = max(
        float(r.carbon_price["carbon_price_per_tco2"].max()) if len(r.carbon_price) else 0.0 for r in results
    )
    if not top > 1e-9:
        ax.set_ylim(0, 1)
        _no_data(ax, "no carbon price: no budget, cap or price path binds")
    else:
        ax.set_ylim(bottom=0)
    _span(ax, results)
    if len(money) == 1 and " of " in money[0]:
        currency, year = money[0].split(" of ")
        ax.set_ylabel(f"Carbon price [{currency}/tCO2]\n(real, {year} money)")
    else:
        ax.set_ylabel("Carbon price [currency/tCO2]\n(real, money of each price year)")
    _title(ax, "Carbon price")
    _legend(fig, handles, names, below=True)
    return fig


# --- saving and sets --------------------------------------------------------------------------------------------------


def save_figure(fig: Figure, folder: Path | str, name: str) -> tuple[Path, Path]:
    """Write ``fig`` as ``folder/name.png`` (DPI dots per inch) and ``folder/name.svg``; returns both paths. The files
    carry no creation date, so the same figure gives the same bytes."""
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    png, svg = folder / f"{name}.png", folder / f"{name}.svg"
    with matplotlib.rc_context({"svg.hashsalt": "pathcast", "svg.fonttype": "path"}):
        fig.savefig(png, dpi=DPI, bbox_inches="tight", metadata={"Software": None})
        fig.savefig(svg, bbox_inches="tight", metadata={"Date": None, "Creator": None})
    return png, svg


SCENARIO_FIGURES: dict[str, Callable[[RunResult], Figure]] = {
    "capacity": capacity_figure,
    "additions": additions_figure,
    "generation": generation_figure,
    "fuel_supply": fuel_supply_figure,
}
OVERLAY_FIGURES: dict[str, Callable[[Results], Figure]] = {
    "emissions": emissions_figure,
    "cumulative_emissions": cumulative_emissions_figure,
    "required_rate": required_rate_figure,
    "carbon_price": carbon_price_figure,
}


def scenario_figures(result: RunResult) -> dict[str, Figure]:
    """The figures of one scenario, by name."""
    return {name: draw(result) for name, draw in SCENARIO_FIGURES.items()}


def overlay_figures(results: Results) -> dict[str, Figure]:
    """The overlay figures of one or several scenarios, by name."""
    return {name: draw(results) for name, draw in OVERLAY_FIGURES.items()}
