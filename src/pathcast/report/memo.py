"""The planning memo: findings with the headline numbers, the headline (or comparison) table, figures with captions,
the assumptions, the cautions and the provenance of one or several runs, and a robustness section per ensemble.

Compute, then render: :func:`build_memo` turns RunResults (and their assumption tables) into a :class:`Memo` of
blocks (headings, paragraphs, tables, figures); :func:`render_markdown` and :func:`render_html` render it;
:func:`write_memo` writes ``memo.md``, a self-contained ``memo.html`` (figures embedded as base64 PNG: no external
files, no network) and ``figures/*.png|svg`` into a folder, atomically.

Each run's assumptions are the table its result carries (``result.tables["assumptions"]``, made from the loaded
scenario at run time and written as assumptions.csv, :mod:`pathcast.results.assumptions`); :class:`MemoInput` holds
it with a note when it is incomplete (a result folder of an earlier pathcast). The memo opens no scenario file.

An ensemble (:class:`MemoEnsemble`, read from a folder of ``pathcast ensemble``) adds a sentence to the findings (the
probability of staying within the carbon budget and the 5-95 % range of the total discounted system cost), its
"Robustness across an ensemble" section (the :class:`pathcast.ensemble.robustness.RobustnessSection` the ensemble
wrote as robustness.json, its paragraphs, tables and figure references turned into blocks) with the ensemble's own PNG
figures (copied, :class:`ImageFile`) and a provenance row. A memo of ensembles only has their findings, robustness
sections, the cautions and the provenance.

Numbers are rounded for display by :func:`format_value`: at least three significant digits (thousands separators
from 1,000, no decimals there; two decimals from 1 to 100; three below 1); years and counts as whole numbers.
"""

from __future__ import annotations

import base64
import html
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING

import pandas as pd

from ..ensemble.robustness import FigureReference, RobustnessSection, SectionParagraph, SectionTable
from ..results.assumptions import ASSUMPTION_COLUMNS, ASSUMPTIONS_TABLE
from ..results.budget import budget_tolerance
from ..results.compare import (
    carbon_price_in,
    compare,
    metric_label,
    milestone_years,
    scenario_labels,
)
from ..results.run_result import RunResult
from ..results.writers import atomic_folder
from .console import CAUTION
from .figures import OVERLAY_FIGURES, SCENARIO_FIGURES, save_figure

if TYPE_CHECKING:  # annotations only: matplotlib is loaded by .figures when a figure is drawn
    from matplotlib.figure import Figure

__all__ = [
    "MemoInput",
    "MemoEnsemble",
    "Memo",
    "Heading",
    "Paragraph",
    "Table",
    "FigureBlock",
    "ImageFile",
    "build_memo",
    "render_markdown",
    "render_html",
    "write_memo",
    "format_value",
    "headline_rows",
    "section_blocks",
    "MISSING",
]

MISSING = (
    "n/a"  # shown where a value does not apply (no budget, metric of another scenario's technology, ...)
)
_YEAR_ROWS = {
    "base_year",
    "final_year",
    "price_year",
    "budget_first_year",
    "budget_last_year",
    "budget_exhaustion_year",
    "required_rate_start_year",
}
_PERCENT_ROWS = {
    "required_rate_from_start_per_year",
    "required_rate_from_start_plus_5_per_year",
    "realised_compound_rate_per_year",
}


# --- blocks ----------------------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Heading:
    text: str
    level: int = 2


@dataclass(frozen=True)
class Paragraph:
    """A paragraph; ``spans`` (text, style) runs with styles plain, strong or code, when parts of it stand out (then
    ``text`` is their plain text)."""

    text: str
    kind: str = "text"  # text | notice (illustrative numbers) | caution
    spans: tuple[tuple[str, str], ...] = ()


@dataclass(frozen=True)
class Table:
    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    caption: str = ""


@dataclass(frozen=True)
class FigureBlock:
    name: str  # file stem under figures/
    figure: Figure = field(repr=False)
    caption: str = ""


@dataclass(frozen=True)
class ImageFile:
    """A figure drawn earlier as a PNG file (an ensemble's), copied into figures/ as ``<name>.png``."""

    name: str  # file stem under figures/
    source: Path
    caption: str = ""


@dataclass(frozen=True)
class Memo:
    title: str
    blocks: tuple


@dataclass(frozen=True)
class MemoInput:
    """One run for the memo: its result, its assumptions table (results.assumptions columns; None: the table the
    result carries, ``result.tables["assumptions"]``) and a note saying where the assumptions come from when they are
    incomplete (empty when complete)."""

    result: RunResult
    assumptions: pd.DataFrame | None = None
    assumptions_note: str = ""

    @property
    def assumption_rows(self) -> pd.DataFrame:
        """The assumptions table shown (empty, with its columns, when the result carries none)."""
        if self.assumptions is not None:
            return self.assumptions
        table = self.result.tables.get(ASSUMPTIONS_TABLE)
        return table if table is not None else pd.DataFrame(columns=list(ASSUMPTION_COLUMNS))


@dataclass(frozen=True)
class MemoEnsemble:
    """One ensemble folder for the memo: its robustness section (:func:`pathcast.ensemble.outputs.read_robustness`;
    its figure references name PNG files of the folder's figures/, listed in ``figure_files``), the numbers its
    finding quotes and its provenance. Costs in million currency units of the price year, budgets in
    MtCO2; ``probability_within_budget`` is a share (0-1), NaN when no member has a carbon budget."""

    folder: Path
    name: str
    section: RobustnessSection
    base: str  # the base scenario file
    base_hash: str  # its input hash (LoadedScenario.input_hash), as in a result folder's manifest
    file: str  # the ensemble file
    design: str
    inputs: tuple[str, ...]
    members: int
    solved: int
    infeasible: int
    failed_other: (
        int  # failed for another reason than infeasibility (invalid member, solver status, worker lost)
    )
    pending: int
    within_budget: int
    probability_within_budget: float
    reference_budget_mt: float | None
    cost_p5: float
    cost_p50: float
    cost_p95: float
    currency: str
    price_year: object
    figure_files: Mapping[str, Path] = field(
        default_factory=dict
    )  # figure stem -> PNG under the ensemble's figures/
    pathcast_version: str = ""
    illustrative: bool = False


# --- numbers ---------------------------------------------------------------------------------------------------------


def format_value(value: object, metric: str = "") -> str:
    """Display text of a table value (see the module docstring for the rounding)."""
    if value is None:
        return MISSING
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, str):
        return value
    try:
        number = float(value)  # type: ignore[arg-type]  # any value: what float() refuses is caught below
    except (TypeError, ValueError):
        return str(value)
    if math.isnan(number):
        return MISSING
    if math.isinf(number):
        return "infinite"
    if metric in _PERCENT_ROWS:
        return _plain(100.0 * number, 2)
    if metric in _YEAR_ROWS:
        return str(int(round(number)))
    if isinstance(value, int):
        return f"{value:,}"
    return _number(number)


def _plain(number: float, decimals: int) -> str:
    text = f"{number:,.{decimals}f}"
    return "0" if float(text.replace(",", "")) == 0 else text


def _number(number: float) -> str:
    size = abs(number)
    if size >= 1000:
        return _plain(number, 0)
    if size >= 100:
        return _plain(number, 1)
    if size >= 1:
        return _plain(number, 2)
    return _plain(number, 3)


def _money(value: float, currency: str) -> str:
    return f"{_number(value)} million {currency}"


# --- headline rows -----------------------------------------------------------------------------------------------


def headline_rows(results: Sequence[RunResult]) -> pd.DataFrame:
    """The memo's headline table: :func:`pathcast.results.compare.compare` plus every summary.json key it does not
    already hold (so the memo carries every headline number of every run); dict-valued summary keys appear as
    ``key.item`` rows. Index: metric; one column per scenario."""
    table = compare(results)
    labels = list(table.columns)
    extra: dict[str, dict[str, object]] = {}
    for result, label in zip(results, labels, strict=True):
        for key, value in result.summary.items():
            if isinstance(value, Mapping):
                for item, inner in value.items():
                    if f"{key}.{item}" not in table.index:
                        extra.setdefault(f"{key}.{item}", {})[label] = inner
            elif key not in table.index:
                extra.setdefault(key, {})[label] = value
    if extra:
        more = pd.DataFrame.from_dict(extra, orient="index", dtype=object).reindex(columns=labels)
        more.index.name = "metric"
        table = pd.concat([table, more])
    if len(results) == 1:
        table = table.drop(index=["abatement_cost_per_tco2"], errors="ignore")
    return table


def _table_from(frame: pd.DataFrame, caption: str, first_header: str = "") -> Table:
    header = (first_header, *[str(c) for c in frame.columns])
    rows = tuple(
        (metric_label(str(metric)), *[format_value(v, str(metric)) for v in row])
        for metric, row in zip(frame.index, frame.itertuples(index=False), strict=True)
    )
    return Table(header, rows, caption)


# --- findings --------------------------------------------------------------------------------------------------------


def _mix_text(mix: Mapping[str, float], unit: str, shares: bool) -> str:
    shown = sorted(
        (
            (k, float(v))
            for k, v in mix.items()
            if float(v) > 0.5e-3 * max(1.0, max(map(float, mix.values())))
        ),
        key=lambda kv: -kv[1],
    )
    total = sum(v for _, v in shown)
    parts = []
    for name, value in shown[:5]:
        share = f" ({100 * value / total:.0f} %)" if shares and total > 0 else ""
        parts.append(f"{name} {_number(value)} {unit}{share}")
    if len(shown) > 5:
        parts.append(f"{len(shown) - 5} more")
    return ", ".join(parts) if parts else "none"


def _finding(result: RunResult, label: str, column: pd.Series, results: Sequence[RunResult]) -> str:
    s = result.summary
    currency = s.get("currency", "")
    base, final = s["base_year"], s["final_year"]
    text = [
        f"{label} ({base}-{final}, {currency} of {s.get('price_year')}): the least-cost pathway costs "
        f"{_money(s['total_discounted_cost_million'], currency)} (total discounted system cost) and emits "
        f"{_number(s['cumulative_emissions_mtco2'])} MtCO2 over {base}-{final}, from "
        f"{_number(s['first_year_emissions_mtco2'])} MtCO2/yr in {base} to "
        f"{_number(s['final_year_emissions_mtco2'])} MtCO2/yr in {final}."
    ]
    budget = s.get("carbon_budget_mtco2")
    compared = column.get("comparison_budget_mtco2")
    owner = column.get("comparison_budget_of")
    period = f"{s.get('budget_first_year')}-{s.get('budget_last_year')}"
    headroom = column.get("budget_headroom_final_mtco2")
    exhaustion = column.get("budget_exhaustion_year")
    if budget is not None:
        verdict = "stays within" if s.get("within_budget") else "exceeds"
        text.append(f"It {verdict} its carbon budget of {_number(budget)} MtCO2 for {period}")
        if exhaustion is not None and not _nan(exhaustion):
            text[-1] += f", which is used up in {int(exhaustion)}"
        if headroom is not None and not _nan(headroom):
            if abs(float(headroom)) <= budget_tolerance(float(budget)):
                text[-1] += " and uses it up exactly by the end of the budget period"
            else:
                word = "headroom" if float(headroom) > 0 else "overshoot"
                text[-1] += (
                    f" ({word} of {_number(abs(float(headroom)))} MtCO2 at the end of the budget period)"
                )
        text[-1] += "."
    elif compared is not None and not _nan(compared):
        text.append(
            f"It has no carbon budget of its own; measured against the {_number(compared)} MtCO2 budget of "
            f"{owner} over its horizon, "
        )
        if exhaustion is not None and not _nan(exhaustion):
            text[-1] += f"it would use that budget up in {int(exhaustion)}"
        else:
            text[-1] += "it would stay within that budget"
        if headroom is not None and not _nan(headroom):
            word = "headroom" if float(headroom) >= 0 else "an overshoot"
            text[-1] += f", with {word} of {_number(abs(float(headroom)))} MtCO2 by {final}"
        text[-1] += "."
    else:
        text.append(
            "It has no carbon budget, and none of the scenarios in this memo has one to measure it against."
        )
    rate0 = column.get("required_rate_from_start_per_year")
    start = column.get("required_rate_start_year")
    if rate0 is not None and not _nan(rate0):
        sentence = (
            f"Staying within the budget from {int(start)} requires emissions to fall by "
            f"{format_value(rate0, 'required_rate_from_start_per_year')} %/yr (exponential decline)"
        )
        rate5 = column.get("required_rate_from_start_plus_5_per_year")
        if rate5 is not None and not _nan(rate5):
            sentence += f", or {format_value(rate5, 'required_rate_from_start_plus_5_per_year')} %/yr if the decline starts in {int(start) + 5}"
        text.append(sentence + ".")
    realised = column.get("realised_compound_rate_per_year")
    if realised is not None and not _nan(realised):
        text.append(
            f"The pathway's own compound reduction from {base} to {final} is "
            f"{format_value(realised, 'realised_compound_rate_per_year')} %/yr."
        )
    text.append(
        f"In {final} the capacity in service is {_mix_text(s.get('final_year_capacity_mw', {}), 'MW', False)}; "
        f"electricity generation is {_mix_text(s.get('final_year_generation_twh', {}), 'TWh', True)}."
    )
    first, last = milestone_years(result)
    prices = [carbon_price_in(result, year) for year in (first, last)]
    if all(abs(p) < 1e-9 for p in prices if not _nan(p)):
        text.append(f"No carbon price binds (0 {currency}/tCO2 in {first} and {last}).")
    else:
        text.append(
            f"The carbon price is {_number(prices[0])} {currency}/tCO2 in {first} and "
            f"{_number(prices[1])} {currency}/tCO2 in {last}."
        )
    cost = column.get("abatement_cost_per_tco2")
    if len(results) > 1 and cost is not None and not _nan(cost):
        text.append(
            f"Against {scenario_labels(results)[0]} it abates CO2 at an average "
            f"{_number(cost)} {currency}/tCO2."
        )
    unserved_el, unserved_fuel = (
        float(s.get("unserved_electricity_twh") or 0),
        float(s.get("unserved_fuel_pj") or 0),
    )
    if unserved_el > 1e-6 or unserved_fuel > 1e-6:
        text.append(
            f"Some demand is left unserved ({_number(unserved_el)} TWh of electricity, "
            f"{_number(unserved_fuel)} PJ of fuels over the horizon): the inputs cannot meet it at any cost "
            "within the limits set."
        )
    return " ".join(text)


def _nan(value: object) -> bool:
    try:
        return math.isnan(float(value))  # type: ignore[arg-type]  # any value: what float() refuses is caught below
    except (TypeError, ValueError):
        return False


def _ensemble_finding(ensemble: MemoEnsemble, around: str) -> str:
    """The ensemble's sentences of the findings; ``around`` names its base ("this scenario" or the file)."""
    e = ensemble
    other = f", {e.failed_other} failed otherwise" if e.failed_other else ""
    pending = f", {e.pending} not yet run" if e.pending else ""
    text = [
        f"Across the ensemble {e.name} ({e.members} members varying {len(e.inputs)} "
        f"input{'s' if len(e.inputs) != 1 else ''} around {around}; {e.solved} solved, {e.infeasible} "
        f"infeasible{other}{pending}),"
    ]
    counted = e.solved + e.infeasible
    if not _nan(e.probability_within_budget) and counted:
        budget = (
            f"the {_number(float(e.reference_budget_mt))} MtCO2 budget"
            if e.reference_budget_mt is not None
            else "the carbon budget"
        )
        text.append(
            f"the probability of staying within {budget} is {100 * float(e.probability_within_budget):.0f} % "
            f"({e.within_budget} of {counted} members)"
        )
    else:
        text.append("no member has a carbon budget, so there is no probability of staying within one")
    if not any(_nan(v) for v in (e.cost_p5, e.cost_p95)):
        money = f"million {e.currency}" + (f" of {e.price_year}" if e.price_year else "")
        text[-1] += (
            f", and the total discounted system cost ranges from {_number(e.cost_p5)} to "
            f"{_number(e.cost_p95)} {money} (5-95 %, median {_number(e.cost_p50)})."
        )
    else:
        text[-1] += "; no member solved, so there is no range of the total cost."
    return " ".join(text)


_ENSEMBLE_CAPTIONS = {
    "emissions_fan": "Yearly CO2 emissions [MtCO2/yr] and cumulative CO2 in the budget period [MtCO2] across the "
    "members: median, 25-75 % and 5-95 % bands, against the budget.",
    "capacity_fan": "Capacity in service by technology [GW] across the members: median, 25-75 % and 5-95 % bands, one "
    "panel per technology.",
    "distributions": "Distributions over the solved members of the total discounted system cost and of the required "
    "reduction rate, with the median, the 5 % and 95 % percentiles and the base scenario.",
    "budget_probability": "Budget margin (budget minus emissions in the budget period) [MtCO2] across the solved "
    "members and the probability of staying within the carbon budget.",
    "tornado": "One-at-a-time sensitivities: change of the total cost and of cumulative CO2 from the base scenario at "
    "each input's low and high value.",
}


def section_blocks(
    section: RobustnessSection, ensemble: MemoEnsemble, prefix: str, first_number: int
) -> list:
    """Blocks of an ensemble's robustness section: its title as a heading, its paragraphs and tables, and each figure
    reference as an :class:`ImageFile` named ``<prefix>_<name>`` (the PNG in the ensemble folder's figures/) with a
    numbered caption from ``first_number``, followed by the ensemble's other figures; a missing figure file becomes
    a note."""
    blocks: list = [Heading(section.title, 2)]
    number = first_number - 1
    linked: set[str] = set()
    last_image = None
    for block in section.blocks:
        if isinstance(block, SectionParagraph):
            blocks.append(Paragraph(block.text, spans=tuple((s.text, s.style) for s in block.spans)))
        elif isinstance(block, SectionTable):
            blocks.append(Table(tuple(c.name for c in block.columns), block.rows, block.caption))
        elif isinstance(block, FigureReference):
            source = Path(ensemble.folder) / block.file
            linked.add(block.name)
            if source.is_file():
                number += 1
                caption = _ENSEMBLE_CAPTIONS.get(block.name, block.caption.rstrip(".") + ".")
                blocks.append(
                    ImageFile(
                        f"{prefix}_{block.name}",
                        source,
                        f"Figure {number}. Ensemble {ensemble.name}: {caption}",
                    )
                )
            else:
                blocks.append(
                    Paragraph(
                        f"(The figure {source.name} is not in {source.parent}: the ensemble was run "
                        "without figures; run 'pathcast ensemble' again without --no-figures to draw "
                        "it.)"
                    )
                )
            last_image = len(blocks)
    extra = []
    known = list(_ENSEMBLE_CAPTIONS)
    order = sorted(
        ensemble.figure_files, key=lambda stem: (known.index(stem) if stem in known else len(known), stem)
    )
    for stem in order:
        source = ensemble.figure_files[stem]
        if stem in linked:
            continue
        number += 1
        caption = _ENSEMBLE_CAPTIONS.get(stem, f"figure {stem} of the ensemble folder.")
        extra.append(
            ImageFile(
                f"{prefix}_{stem}", Path(source), f"Figure {number}. Ensemble {ensemble.name}: {caption}"
            )
        )
    at = last_image if last_image is not None else len(blocks)
    return blocks[:at] + extra + blocks[at:]


# --- captions --------------------------------------------------------------------------------------------------------

_SCENARIO_CAPTIONS = {
    "capacity": "Capacity in service by technology; fuel converters (electrolysers, fuel synthesis, ...) in the lower "
    "panel, counted on their input side.",
    "additions": "Capacity added each year by technology (above zero) and capacity retired at the end of its life or "
    "early (lighter bars, below zero).",
    "generation": "Electricity generation by generator [TWh/yr], with final electricity demand (dashed) and demand "
    "including converters such as electrolysers (dotted); the gap to the top of the stack is storage "
    "losses.",
    "fuel_supply": "Fuel supply by source and converter output [PJ/yr], gross (a converter's output can be another "
    "converter's input), with final fuel use (dashed).",
}
_OVERLAY_CAPTIONS = {
    "emissions": "Yearly CO2 emissions [MtCO2/yr], with two reference paths for each carbon budget that spend it "
    "exactly from its first year: a constant exponential decline at the required rate (emissions after the "
    "budget period count too, as for a budget of all remaining time) and a straight line to zero.",
    "cumulative_emissions": "Cumulative CO2 emissions [MtCO2] over the budget period against the carbon budget; a "
    "cross marks the year the budget is used up. Scenarios without a budget are counted over "
    "their horizon against the first budget shown.",
    "required_rate": "Required exponential reduction rate [%/yr] if emissions follow the scenario until the year shown "
    "and then decline at a constant rate that just fits the remaining budget: the cost of delay.",
    "carbon_price": "Carbon price [currency/tCO2, real money of the price year]: the shadow price of the carbon budget "
    "and caps plus any carbon price path of the scenario.",
}


# --- assumptions -----------------------------------------------------------------------------------------------------


def _assumption_tables(inputs: Sequence[MemoInput], labels: list[str]) -> list:
    blocks: list = []
    first = inputs[0].assumption_rows
    header = ("section", "subject", "item", "value", "unit", "source")

    def rows_of(frame: pd.DataFrame) -> tuple[tuple[str, ...], ...]:
        return tuple(tuple(str(v) for v in row) for row in frame[list(header)].itertuples(index=False))

    if inputs[0].assumptions_note:
        blocks.append(Paragraph(inputs[0].assumptions_note))
    sections = list(dict.fromkeys(first["section"]))
    for section in sections:
        part = first[first["section"] == section]
        columns = header[1:] if part["subject"].astype(bool).any() else header[2:]
        rows = tuple(tuple(str(v) for v in row) for row in part[list(columns)].itertuples(index=False))
        who = f" of {labels[0]}" if len(inputs) > 1 else ""
        blocks.append(Table(columns, rows, f"Assumptions{who}: {section}."))
    key = ["section", "subject", "item"]
    for memo_input, label in zip(inputs[1:], labels[1:], strict=True):
        other = memo_input.assumption_rows
        if memo_input.assumptions_note:
            blocks.append(Paragraph(f"{label}: {memo_input.assumptions_note}"))
        merged = other.merge(first[key + ["value", "unit"]], on=key, how="left", suffixes=("", "_first"))
        differ = merged[(merged["value"] != merged["value_first"]) | (merged["unit"] != merged["unit_first"])]
        gone = first.merge(other[key], on=key, how="left", indicator=True)
        gone = gone[gone["_merge"] == "left_only"].assign(value="(not set)", unit="", source="")
        changes = pd.concat([differ[list(header)], gone[list(header)]], ignore_index=True)
        if changes.empty:
            blocks.append(Paragraph(f"{label} uses the same assumptions as {labels[0]}."))
        else:
            blocks.append(
                Table(header, rows_of(changes), f"Assumptions of {label} that differ from {labels[0]}.")
            )
    return blocks


# --- build -----------------------------------------------------------------------------------------------------------


def build_memo(inputs: Sequence[MemoInput], ensembles: Sequence[MemoEnsemble] = ()) -> Memo:
    """The memo of one or several runs (the first is the reference for abatement costs and assumption changes) and of
    any ensembles; with ensembles only, it has their findings, robustness sections, the cautions and the provenance."""
    inputs, ensembles = list(inputs), list(ensembles)
    if not inputs and not ensembles:
        raise ValueError("build_memo needs at least one run or one ensemble")
    results = [i.result for i in inputs]
    labels = scenario_labels(results) if results else []
    table = headline_rows(results) if results else None
    first_meta = results[0].metadata if results else {}
    country = first_meta.get("country") or ""
    named = labels + [f"ensemble {e.name}" for e in ensembles]
    title = (
        "Decarbonisation pathway memo" + (f": {country}" if country else "") + " (" + ", ".join(named) + ")"
    )
    blocks: list = []
    illustrative = [label for r, label in zip(results, labels, strict=True) if r.metadata.get("illustrative")]
    illustrative += [f"ensemble {e.name}" for e in ensembles if e.illustrative]
    if illustrative:
        who = "all scenarios" if len(illustrative) == len(named) else ", ".join(illustrative)
        blocks.append(
            Paragraph(
                f"Illustrative numbers: the inputs of {who} are marked illustrative (invented or "
                "rounded for demonstration); the results show how the pathway responds to them and are "
                "no estimate for any real country or system.",
                kind="notice",
            )
        )
    findings = [
        _finding(result, label, table[label], results)  # type: ignore[index]  # table is None only without results
        for result, label in zip(results, labels, strict=True)
    ]
    for ensemble in ensembles:
        hashes = [str(r.manifest.get("input_hash", "")) for r in results]
        if ensemble.base_hash and ensemble.base_hash in hashes:
            at = hashes.index(ensemble.base_hash)
            findings[at] += " " + _ensemble_finding(ensemble, "this scenario")
        else:
            findings.append(_ensemble_finding(ensemble, f"the base scenario {Path(ensemble.base).name}"))
    blocks.append(Heading("Finding" if len(findings) == 1 else "Findings"))
    blocks.extend(Paragraph(text) for text in findings)
    number = 0
    if results:
        blocks.append(Heading("Headline figures" if len(results) == 1 else "Comparison of the scenarios"))
        caption = (
            "Headline figures of the run (every number of summary.json, with the budget and reduction-rate "
            "analytics); money in million of the currency of the price year, rates in %/yr."
            if len(results) == 1
            else f"Side by side (every number of each summary.json, with the budget and reduction-rate analytics); "
            f"money in million of the currency of the price year, rates in %/yr; abatement cost against "
            f"{labels[0]}."
        )
        blocks.append(_table_from(table, caption))
        blocks.append(Heading("Figures"))
        for result, label in zip(results, labels, strict=True):
            if len(results) > 1:
                blocks.append(Heading(label, 3))
            for name, draw in SCENARIO_FIGURES.items():
                number += 1
                blocks.append(
                    FigureBlock(
                        f"{_slug(label)}_{name}",
                        draw(result),
                        f"Figure {number}. {label}: {_SCENARIO_CAPTIONS[name]}",
                    )
                )
        if len(results) > 1:
            blocks.append(Heading("All scenarios", 3))
        for name, draw in OVERLAY_FIGURES.items():
            number += 1
            blocks.append(FigureBlock(name, draw(results), f"Figure {number}. {_OVERLAY_CAPTIONS[name]}"))
    else:
        blocks.append(
            Paragraph(
                "This memo covers ensembles only: the pathway, headline figures, figures and "
                "assumptions of a base scenario are shown when its scenario file or result folder is "
                "given as well."
            )
        )
    prefixes: set[str] = set()
    for ensemble in ensembles:
        prefix = stem = f"ensemble_{_slug(ensemble.name)}"
        copy = 1
        while prefix in prefixes:  # the same ensemble name twice: figures/ensemble_<name>_2_*.png
            copy += 1
            prefix = f"{stem}_{copy}"
        prefixes.add(prefix)
        section = section_blocks(ensemble.section, ensemble, prefix, number + 1)
        number += sum(isinstance(b, ImageFile) for b in section)
        blocks.extend(section)
    if results:
        blocks.append(Heading("Assumptions"))
        blocks.extend(_assumption_tables(inputs, labels))
    blocks.append(Heading("Cautions"))
    blocks.append(Paragraph(CAUTION, kind="caution"))
    blocks.append(
        Paragraph(
            "Numbers in this memo are rounded for display; the result folders hold the exact values. "
            "A budget overshoot, unserved demand or a carbon price at the limits of the inputs signals "
            "that the targets and the technology options of a scenario do not fit together."
        )
    )
    blocks.append(Heading("Provenance"))
    if results:
        rows: list[tuple[str, ...]] = []
        for result, label in zip(results, labels, strict=True):
            manifest = result.manifest
            solver = manifest.get("solver", {}) or {}
            versions = manifest.get("versions", {}) or {}
            rows.append(
                (
                    label,
                    str(manifest.get("source", "")),
                    str(manifest.get("input_hash", ""))[:12],
                    str(solver.get("status", "")),
                    str(versions.get("pathcast", "")),
                )
            )
        blocks.append(
            Table(("scenario", "scenario file", "input hash", "solver status", "pathcast"), tuple(rows))
        )
    if ensembles:
        rows = [
            (
                e.name,
                str(e.folder),
                e.file,
                e.base,
                e.base_hash[:12],
                f"{e.solved} of {e.members}",
                e.pathcast_version,
            )
            for e in ensembles
        ]
        blocks.append(
            Table(
                (
                    "ensemble",
                    "ensemble folder",
                    "ensemble file",
                    "base scenario file",
                    "base input hash",
                    "members solved",
                    "pathcast",
                ),
                tuple(rows),
                "Ensembles: each member's record is stored in the folder's members/ (one JSON file per "
                "member, named by the hash of its scenario).",
            )
        )
    return Memo(title, tuple(blocks))


def _slug(label: str) -> str:
    return "".join(c if c.isalnum() or c in "-_" else "_" for c in label)


# --- render ----------------------------------------------------------------------------------------------------------


def _md_cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def render_markdown(memo: Memo, figure_folder: str = "figures") -> str:
    """Markdown text of ``memo``; figures are referenced as ``figure_folder/<name>.png``."""
    lines = [f"# {memo.title}", ""]
    for block in memo.blocks:
        if isinstance(block, Heading):
            lines += ["#" * block.level + " " + block.text, ""]
        elif isinstance(block, Paragraph):
            prefix = {"notice": "> **", "caution": "> "}.get(block.kind, "")
            suffix = "**" if block.kind == "notice" else ""
            text = _spans_markdown(block.spans) if block.spans else block.text
            lines += [prefix + text + suffix, ""]
        elif isinstance(block, Table):
            lines.append("| " + " | ".join(_md_cell(h) for h in block.header) + " |")
            lines.append("|" + "|".join("---" for _ in block.header) + "|")
            lines += ["| " + " | ".join(_md_cell(c) for c in row) + " |" for row in block.rows]
            lines.append("")
            if block.caption:
                lines += [f"*{block.caption}*", ""]
        elif isinstance(block, FigureBlock | ImageFile):
            lines += [
                f"![{block.caption.split('.')[0]}]({figure_folder}/{block.name}.png)",
                "",
                f"*{block.caption}*",
                "",
            ]
    return "\n".join(lines).rstrip() + "\n"


_CSS = """
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; max-width: 60rem; margin: 2rem auto;
       padding: 0 1rem; color: #1b1b1b; line-height: 1.45; }
h1 { font-size: 1.6rem; } h2 { margin-top: 2rem; border-bottom: 1px solid #ccc; } h3 { margin-top: 1.5rem; }
table { border-collapse: collapse; margin: 0.5rem 0; font-size: 0.85rem; }
th, td { border: 1px solid #d0d0d0; padding: 0.2rem 0.5rem; vertical-align: top; }
th { background: #f0f0f0; text-align: left; }
td.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
caption, figcaption { caption-side: bottom; text-align: left; font-size: 0.85rem; color: #444; padding-top: 0.3rem; }
figure { margin: 1rem 0; } figure img { max-width: 100%; height: auto; }
code { font-size: 0.9em; background: #f3f3f3; padding: 0 0.2em; }
.notice { border-left: 4px solid #d1495b; background: #fbeaec; padding: 0.6rem 0.9rem; font-weight: 600; }
.caution { border-left: 4px solid #555; background: #f3f3f3; padding: 0.6rem 0.9rem; }
@media print { figure, table { page-break-inside: avoid; } }
"""


def _is_number(text: str) -> bool:
    try:
        float(text.replace(",", ""))
        return True
    except ValueError:
        return False


def _spans_markdown(spans: Sequence[tuple[str, str]]) -> str:
    parts = []
    for text, style in spans:
        if style == "strong":
            parts.append(f"**{text}**")
        elif style == "code":
            parts.append(f"`` {text} ``" if "`" in text else f"`{text}`")
        else:
            parts.append(text)
    return "".join(parts)


def _spans_html(spans: Sequence[tuple[str, str]]) -> str:
    tags = {"strong": "strong", "code": "code"}
    return "".join(
        f"<{tags[style]}>{html.escape(text)}</{tags[style]}>" if style in tags else html.escape(text)
        for text, style in spans
    )


def render_html(memo: Memo, pngs: Mapping[str, bytes]) -> str:
    """Self-contained HTML of ``memo``: ``pngs`` maps each figure name to its PNG bytes, embedded as data URIs."""
    esc = html.escape
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en">',
        "<head>",
        '<meta charset="utf-8">',
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<title>{esc(memo.title)}</title>",
        f"<style>{_CSS}</style>",
        "</head>",
        "<body>",
        f"<h1>{esc(memo.title)}</h1>",
    ]
    for block in memo.blocks:
        if isinstance(block, Heading):
            parts.append(f"<h{block.level}>{esc(block.text)}</h{block.level}>")
        elif isinstance(block, Paragraph):
            css = f' class="{block.kind}"' if block.kind != "text" else ""
            text = _spans_html(block.spans) if block.spans else esc(block.text)
            parts.append(f"<p{css}>{text}</p>")
        elif isinstance(block, Table):
            parts.append("<table>")
            if block.caption:
                parts.append(f"<caption>{esc(block.caption)}</caption>")
            parts.append(
                "<thead><tr>" + "".join(f"<th>{esc(h)}</th>" for h in block.header) + "</tr></thead><tbody>"
            )
            for row in block.rows:
                cells = "".join(
                    f'<td class="number">{esc(c)}</td>' if i and _is_number(c) else f"<td>{esc(c)}</td>"
                    for i, c in enumerate(row)
                )
                parts.append(f"<tr>{cells}</tr>")
            parts.append("</tbody></table>")
        elif isinstance(block, FigureBlock | ImageFile):
            data = base64.b64encode(pngs[block.name]).decode("ascii")
            parts.append(
                f'<figure><img src="data:image/png;base64,{data}" alt="{esc(block.caption)}">'
                f"<figcaption>{esc(block.caption)}</figcaption></figure>"
            )
    parts += ["</body>", "</html>"]
    return "\n".join(parts) + "\n"


def write_memo(memo: Memo, folder: Path | str) -> Path:
    """Write memo.md, memo.html and figures/<name>.png|svg (an ensemble's figures: PNG only, copied) to ``folder``
    (replaced as a whole, atomically)."""
    folder = Path(folder)
    with atomic_folder(folder) as tmp:
        pngs = {}
        for block in memo.blocks:
            if isinstance(block, FigureBlock):
                png, _ = save_figure(block.figure, tmp / "figures", block.name)
                pngs[block.name] = png.read_bytes()
            elif isinstance(block, ImageFile):
                data = Path(block.source).read_bytes()
                (tmp / "figures").mkdir(parents=True, exist_ok=True)
                (tmp / "figures" / f"{block.name}.png").write_bytes(data)
                pngs[block.name] = data
        (tmp / "memo.md").write_text(render_markdown(memo), encoding="utf-8")
        (tmp / "memo.html").write_text(render_html(memo, pngs), encoding="utf-8")
    return folder
