"""Compare scenarios side by side: cost, cumulative CO2 against the budget, required and realised reduction rates,
final-year mixes, build rates and abatement costs, written as comparison.csv with overlay charts.

Each input is a scenario file (solved now) or a result folder written by 'pathcast run'. The output folder is
replaced as a whole; it must be new, empty or an earlier output of 'pathcast compare'.
"""

from __future__ import annotations

import argparse
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from . import check_output_folder, progress_printer

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

    from ..results.run_result import RunResult

# computed by pathcast.results.sources.load_runs and pathcast.results.compare.compare; rendered by
# pathcast.report.comparison_text, pathcast.report.json_output and the overlay figures of pathcast.report.figures

__all__ = ["add_arguments", "execute", "write_comparison"]


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "inputs",
        nargs="+",
        metavar="FILE|RESULTDIR",
        help="scenario YAML files (solved now) or result folders of 'pathcast run'; the first is the "
        "reference for abatement costs",
    )
    parser.add_argument(
        "--out",
        type=Path,
        default=Path("results") / "comparison",
        help="output folder for comparison.csv and the overlay charts (default: results/comparison)",
    )
    parser.add_argument(
        "--json",
        action="store_true",
        help="print the table as JSON {schema_version, scenarios: {scenario: {metric: value}}}",
    )
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def write_comparison(table: pd.DataFrame, results: Sequence[RunResult], folder: Path) -> Path:
    """comparison.csv and the overlay charts (PNG + SVG) of ``results``, swapped into ``folder`` as a whole."""
    from ..report.figures import overlay_figures, save_figure
    from ..results.writers import atomic_folder

    with atomic_folder(Path(folder)) as tmp:
        table.to_csv(tmp / "comparison.csv")
        for name, figure in overlay_figures(results).items():
            save_figure(figure, tmp, name)
    return Path(folder)


def execute(args: argparse.Namespace) -> int:
    from ..report.comparison_text import render_comparison
    from ..report.json_output import render_comparison_json
    from ..results.compare import compare
    from ..results.sources import load_runs

    progress = progress_printer(args.quiet)

    check_output_folder(args.out, "comparison.csv", "compare")
    results = [source.result for source in load_runs(args.inputs, progress=progress)]
    table = compare(results)
    progress(f"writing comparison.csv and overlay charts to {args.out}")
    write_comparison(table, results, args.out)
    print(render_comparison_json(table) if args.json else render_comparison(table, args.out))
    return 0
