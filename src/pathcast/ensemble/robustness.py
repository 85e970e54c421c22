"""The robustness section of an ensemble, as data: made once from the ensemble's summary when its outputs are written
(DIR/robustness.json, one file of the set that DIR/outputs.json lists), read back by the memo as blocks, and rendered
as Markdown only for readers that want text.

A :class:`RobustnessSection` is a title and a sequence of blocks:

- :class:`SectionParagraph`: text as :class:`Span` runs, each plain, strong (a name or a number to stand out) or code
  (a file or an input label);
- :class:`SectionTable`: columns (:class:`SectionColumn`, with the unit of each row in its own column and
  ``numeric`` for right-aligned number columns) and rows of display text (rounded: three significant digits below
  1,000, whole numbers from 1,000);
- :class:`FigureReference`: a figure of the ensemble folder, ``figures/<name>.png`` beside robustness.json, with a
  short caption.

robustness.json holds ``{"format": FORMAT, "title": ..., "ensemble": ..., "blocks": [...]}``, each block with a
``kind`` of ``paragraph`` (``spans``: ``[{"text", "style"}]``), ``table`` (``columns``: ``[{"name", "numeric"}]``,
``rows``) or ``figure`` (``name``, ``file``, ``caption``). :func:`robustness_section` computes it (and
:func:`pathcast.ensemble.outputs.write_ensemble_outputs` writes it with the other outputs),
:func:`read_section_file` reads one file, and :func:`render_markdown` renders it. Readers of an ensemble folder use
:func:`pathcast.ensemble.outputs.read_robustness`: the section of a folder whose outputs are one complete set (the
figures it references belong to the numbers it shows), computed from the member records when the folder holds no
robustness.json (members only, or written by an earlier pathcast).
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..errors import ScenarioError
from .summary import EnsembleSummary

__all__ = [
    "robustness_section",
    "read_section_file",
    "render_markdown",
    "RobustnessSection",
    "SectionParagraph",
    "SectionTable",
    "SectionColumn",
    "FigureReference",
    "Span",
    "ROBUSTNESS_FILE",
    "FORMAT",
    "TITLE",
]

ROBUSTNESS_FILE = "robustness.json"
FORMAT = "pathcast robustness section 1"
TITLE = "Robustness across an ensemble"
SPAN_STYLES = ("plain", "strong", "code")

_DESIGN_NAMES = {
    "latin_hypercube": "Latin hypercube sample",
    "grid": "full grid",
    "one_at_a_time": "one-at-a-time variation around the base",
}


# --- blocks ----------------------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Span:
    """A run of text in one style: plain, strong or code (see SPAN_STYLES)."""

    text: str
    style: str = "plain"


@dataclass(frozen=True)
class SectionParagraph:
    spans: tuple[Span, ...]

    @property
    def text(self) -> str:
        """The paragraph's text without styles."""
        return "".join(span.text for span in self.spans)


@dataclass(frozen=True)
class SectionColumn:
    name: str
    numeric: bool = False  # a column of numbers (right-aligned)


@dataclass(frozen=True)
class SectionTable:
    columns: tuple[SectionColumn, ...]
    rows: tuple[tuple[str, ...], ...]  # display text, one cell per column
    caption: str = ""


@dataclass(frozen=True)
class FigureReference:
    """A figure of the ensemble folder: ``figures/<name>.png``."""

    name: str
    caption: str

    @property
    def file(self) -> str:
        return f"figures/{self.name}.png"


Block = SectionParagraph | SectionTable | FigureReference


@dataclass(frozen=True)
class RobustnessSection:
    """The robustness section of the ensemble ``ensemble``: a title and blocks (see the module's description)."""

    title: str
    ensemble: str
    blocks: tuple[Block, ...]

    def as_dict(self) -> dict[str, Any]:
        """The JSON form written as robustness.json."""
        return {
            "format": FORMAT,
            "title": self.title,
            "ensemble": self.ensemble,
            "blocks": [_block_dict(block) for block in self.blocks],
        }

    @staticmethod
    def from_dict(data: Any, where: str) -> RobustnessSection:
        """The section of a robustness.json read as ``data``; ScenarioError naming ``where`` (the file) when it is
        not of this pathcast's format."""
        if not isinstance(data, Mapping) or data.get("format") != FORMAT:
            got = data.get("format") if isinstance(data, Mapping) else type(data).__name__
            raise ScenarioError(
                f"{where}: format: got {got!r}; expected {FORMAT!r}, the robustness section this pathcast writes: "
                "run 'pathcast ensemble' on the ensemble file again to rewrite the folder's outputs.",
                file=where,
            )
        try:
            blocks = tuple(_block_of(item) for item in data["blocks"])
            return RobustnessSection(str(data["title"]), str(data["ensemble"]), blocks)
        except (KeyError, TypeError, ValueError) as error:
            raise ScenarioError(
                f"{where}: blocks: got a block that cannot be read ({type(error).__name__}: {error}); expected "
                "paragraphs, tables and figures as 'pathcast ensemble' writes them: run it again to rewrite the "
                "folder's outputs.",
                file=where,
            ) from None


def _block_dict(block: Block) -> dict[str, Any]:
    if isinstance(block, SectionParagraph):
        return {"kind": "paragraph", "spans": [{"text": s.text, "style": s.style} for s in block.spans]}
    if isinstance(block, SectionTable):
        return {
            "kind": "table",
            "columns": [{"name": c.name, "numeric": c.numeric} for c in block.columns],
            "rows": [list(row) for row in block.rows],
            "caption": block.caption,
        }
    return {"kind": "figure", "name": block.name, "file": block.file, "caption": block.caption}


def _block_of(item: Mapping[str, Any]) -> Block:
    kind = item["kind"]
    if kind == "paragraph":
        spans = tuple(Span(str(s["text"]), str(s["style"])) for s in item["spans"])
        unknown = [s.style for s in spans if s.style not in SPAN_STYLES]
        if unknown:
            raise ValueError(f"span style {unknown[0]!r} is none of {', '.join(SPAN_STYLES)}")
        return SectionParagraph(spans)
    if kind == "table":
        columns = tuple(SectionColumn(str(c["name"]), bool(c["numeric"])) for c in item["columns"])
        rows = tuple(tuple(str(cell) for cell in row) for row in item["rows"])
        if any(len(row) != len(columns) for row in rows):
            raise ValueError(f"a row has not the {len(columns)} cells of the table's columns")
        return SectionTable(columns, rows, str(item.get("caption", "")))
    if kind == "figure":
        return FigureReference(str(item["name"]), str(item["caption"]))
    raise ValueError(f"block kind {kind!r} is none of paragraph, table, figure")


# --- compute ---------------------------------------------------------------------------------------------------------


def _fmt(value: float | None, digits: int = 3) -> str:
    if value is None or not math.isfinite(value):
        return "n/a"
    text = f"{value:,.{digits}g}"
    # below 1000 three significant digits; a value that rounds up to 1000 or more, or is larger, as a whole number
    return f"{value:,.0f}" if "e" in text or abs(value) >= 1000 else text


def _paragraph(spans: Sequence[Span]) -> SectionParagraph:
    """A paragraph of ``spans``, neighbours of one style joined."""
    joined: list[Span] = []
    for span in spans:
        if joined and joined[-1].style == span.style:
            joined[-1] = Span(joined[-1].text + span.text, span.style)
        elif span.text:
            joined.append(span)
    return SectionParagraph(tuple(joined))


def _listed(items: Sequence[tuple[str, str]]) -> list[Span]:
    """'`a` (x), `b` (y)' as spans: each name as code, its note plain."""
    spans: list[Span] = []
    for number, (name, note) in enumerate(items):
        if number:
            spans.append(Span(", "))
        spans += [Span(name, "code"), Span(f" ({note})")]
    return spans


def robustness_section(summary: EnsembleSummary) -> RobustnessSection:
    """The robustness section of an ensemble's summary: members solved, percentiles of the headline figures, the
    probability of staying within the carbon budget, the most influential inputs and the fan chart."""
    d, s = summary.design, summary.stats
    money = f"million {summary.currency}" + (f" of {summary.price_year}" if summary.price_year else "")
    blocks: list[Block] = []
    seed = f", seed {d['seed']}" if d.get("seed") is not None else ""
    described = _listed(
        [(label, f"{info['as']}, {info['distribution']}") for label, info in d["inputs"].items()]
    )
    blocks.append(
        _paragraph(
            (
                Span("Ensemble "),
                Span(str(d["name"]), "strong"),
                Span(
                    f": {s['members']} members ({_DESIGN_NAMES[d['design']]}{seed}) around the base scenario "
                ),
                Span(Path(d["base"]).name, "code"),
                Span(", varying "),
                *described,
                Span(
                    f". {s['solved']} solved, {s['infeasible']} infeasible, {s['failed_other']} failed otherwise"
                    + (f", {s['pending']} not yet run" if s["pending"] else "")
                    + "."
                ),
            )
        )
    )
    p = summary.headline_percentiles.set_index("quantity")
    quantities = [
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
    rows = tuple(
        (
            name,
            unit,
            _fmt(p.loc[key, "p5"] * scale),
            _fmt(p.loc[key, "p50"] * scale),
            _fmt(p.loc[key, "p95"] * scale),
        )
        for name, key, unit, scale in quantities
        if key in p.index and p.loc[key, "members"]
    )
    columns = (
        SectionColumn("quantity"),
        SectionColumn("unit"),
        SectionColumn("5 %", numeric=True),
        SectionColumn("median", numeric=True),
        SectionColumn("95 %", numeric=True),
    )
    blocks.append(SectionTable(columns, rows))
    probability = s.get("probability_within_budget")
    if probability is not None and math.isfinite(probability):
        budget = s.get("reference_budget_mt")
        which = f"the {budget:,.0f} MtCO2 budget" if budget is not None else "the carbon budget"
        blocks.append(
            _paragraph(
                (
                    Span(f"Probability of staying within {which}: "),
                    Span(f"{probability:.0%}", "strong"),
                    Span(
                        f", {s['within_budget']} of the {s['solved'] + s['infeasible']} members that solved or "
                        "proved infeasible (a member counts when its emissions in the budget period stay within the "
                        "budget while all demand is served)."
                    ),
                )
            )
        )
    if summary.tornado is not None and not summary.tornado.empty:
        cost = summary.tornado[summary.tornado["metric"] == "total_discounted_cost_million"].dropna(
            subset=["swing"]
        )
        ranked = [(str(r.input), f"{_fmt(r.swing)} {money}") for r in cost.head(3).itertuples()]
        if ranked:
            blocks.append(
                _paragraph(
                    (
                        Span("Inputs that move the total cost most (one at a time, low to high): "),
                        *_listed(ranked),
                        Span("."),
                    )
                )
            )
    elif summary.correlations is not None and not summary.correlations.empty:
        corr = summary.correlations[
            summary.correlations["metric"] == "total_discounted_cost_million"
        ].dropna()
        corr = corr.reindex(corr["spearman_rho"].abs().sort_values(ascending=False).index)
        ranked = [(str(r.input), f"rho {r.spearman_rho:+.2f}") for r in corr.head(3).itertuples()]
        if ranked:
            blocks.append(
                _paragraph(
                    (
                        Span("Inputs most related to the total cost (Spearman rank correlation): "),
                        *_listed(ranked),
                        Span("."),
                    )
                )
            )
    blocks.append(
        FigureReference(
            "emissions_fan", "Yearly and cumulative CO2 across the ensemble, median and 5-95 % band"
        )
    )
    blocks.append(
        _paragraph(
            (
                Span(
                    "Members differ only in the inputs listed; each is a least-cost pathway with perfect foresight, "
                    "so the spread shows sensitivity to the assumptions, not the odds of outcomes in the world."
                ),
            )
        )
    )
    return RobustnessSection(TITLE, str(d["name"]), tuple(blocks))


# --- read ------------------------------------------------------------------------------------------------------------


def read_section_file(path: str | Path) -> RobustnessSection:
    """The section stored in a robustness.json; ScenarioError naming the file when it cannot be read as JSON or is not
    of this pathcast's format. It does not check that the file belongs to its folder's outputs: readers of an
    ensemble folder use :func:`pathcast.ensemble.outputs.read_robustness`, which does."""
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError) as error:
        raise ScenarioError(
            f"{path}: got a file that cannot be read as JSON ({error}); expected the robustness section "
            "'pathcast ensemble' writes: run it again to rewrite the folder's outputs.",
            file=str(path),
        ) from None
    return RobustnessSection.from_dict(data, str(path))


# --- render ----------------------------------------------------------------------------------------------------------


def _span_markdown(span: Span) -> str:
    if span.style == "strong":
        return f"**{span.text}**"
    if span.style == "code":
        return f"`` {span.text} ``" if "`" in span.text else f"`{span.text}`"
    return span.text


def _cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def render_markdown(
    section: RobustnessSection, *, heading_level: int = 2, figure_folder: str | Path | None = None
) -> str:
    """Markdown of ``section``: a heading of ``heading_level``, paragraphs, pipe tables and, when ``figure_folder``
    is given, each figure as an image line linking ``figure_folder/<name>.png`` (no figure lines without it)."""
    lines = [f"{'#' * heading_level} {section.title}", ""]
    for block in section.blocks:
        if isinstance(block, SectionParagraph):
            lines += ["".join(_span_markdown(span) for span in block.spans), ""]
        elif isinstance(block, SectionTable):
            lines.append("| " + " | ".join(_cell(c.name) for c in block.columns) + " |")
            lines.append("|" + "|".join("---:" if c.numeric else "---" for c in block.columns) + "|")
            lines += ["| " + " | ".join(_cell(cell) for cell in row) + " |" for row in block.rows]
            lines.append("")
            if block.caption:
                lines += [f"*{block.caption}*", ""]
        elif figure_folder is not None:
            lines += [f"![{block.caption}]({(Path(figure_folder) / f'{block.name}.png').as_posix()})", ""]
    return "\n".join(lines).rstrip("\n") + "\n"
