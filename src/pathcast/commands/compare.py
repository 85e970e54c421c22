"""Compare scenarios side by side: cost, cumulative CO2 against the budget, required and realised reduction rates,
final-year mixes, build rates and abatement costs, written as comparison.csv with overlay charts.

Each input is a scenario file (solved now) or a result folder written by 'pathcast run'. The output folder is
replaced as a whole; it must be new, empty or an earlier output of 'pathcast compare'.
"""

from __future__ import annotations

import argparse
import json
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError
from . import progress_printer

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

    from ..results.run_result import RunResult
    from ..scenario.loader import LoadedScenario

__all__ = ["add_arguments", "execute", "Source", "gather_results", "check_output_folder", "render_comparison"]


@dataclass(frozen=True)
class Source:
    """One input of compare or memo: the result, where it came from, and the loaded scenario when it was a file."""

    result: RunResult
    path: Path
    loaded: LoadedScenario | None = None


def gather_results(
    paths: Sequence[str | Path], progress: Callable[[str], None] | None = None
) -> list[Source]:
    """Solve each scenario file and read each result folder, in the order given."""
    from ..pipeline import run_scenario
    from ..results.writers import read_result
    from ..scenario.loader import load_scenario

    say = progress or (lambda _message: None)
    sources = []
    for item in paths:
        path = Path(item)
        if path.is_dir():
            say(f"reading results from {path}")
            sources.append(Source(read_result(path), path))
        elif path.is_file():
            loaded = load_scenario(path)
            sources.append(Source(run_scenario(loaded, progress=say).result, path, loaded))
        else:
            raise ScenarioError(
                f"{path}: got no such file or folder; expected a scenario YAML file or a result folder "
                "written by 'pathcast run'.",
                file=str(path),
            )
    return sources


def check_output_folder(folder: Path, marker: str, command: str) -> None:
    """Refuse to replace a folder that holds anything but an earlier output of ``command`` (recognised by ``marker``)."""
    folder = Path(folder)
    if not folder.exists():
        return
    if not folder.is_dir():
        raise ScenarioError(
            f"--out: got {str(folder)!r}, which is a file; expected a folder for the {command} output."
        )
    if any(folder.iterdir()) and not (folder / marker).is_file():
        raise ScenarioError(
            f"--out: got {str(folder)!r}, a folder with other files and no {marker}; expected a new or "
            f"empty folder or one written by 'pathcast {command}', because it is replaced as a whole."
        )


def _plain(value: object) -> object:
    """JSON-ready value: NaN becomes null, numpy scalars become Python numbers."""
    if hasattr(value, "item"):
        value = value.item()
    if isinstance(value, float) and math.isnan(value):
        return None
    return value


def comparison_json(table: pd.DataFrame) -> dict[str, dict[str, object]]:
    return {
        str(column): {str(metric): _plain(value) for metric, value in table[column].items()}
        for column in table.columns
    }


def render_comparison(table: pd.DataFrame) -> str:
    """Plain-text rendering of the comparison table for the terminal (rounded; comparison.csv holds exact values)."""
    from ..report.memo import format_value
    from ..results.compare import metric_label

    labels = [metric_label(str(m)) for m in table.index]
    cells = [
        [format_value(v, str(m)) for v in row]
        for m, row in zip(table.index, table.itertuples(index=False), strict=True)
    ]
    first = max(len(label) for label in labels)
    widths = [max(len(str(c)), *(len(r[i]) for r in cells)) for i, c in enumerate(table.columns)]
    lines = [
        " " * first + "  " + "  ".join(str(c).rjust(w) for c, w in zip(table.columns, widths, strict=True))
    ]
    for label, row in zip(labels, cells, strict=True):
        lines.append(
            label.ljust(first) + "  " + "  ".join(c.rjust(w) for c, w in zip(row, widths, strict=True))
        )
    return "\n".join(lines)


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
        "--json", action="store_true", help="print the table as JSON {scenario: {metric: value}}"
    )
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def execute(args: argparse.Namespace) -> int:
    from ..report.console import CAUTION
    from ..report.figures import overlay_figures, save_figure
    from ..results.compare import compare
    from ..results.writers import atomic_folder

    progress = progress_printer(args.quiet)

    check_output_folder(args.out, "comparison.csv", "compare")
    results = [source.result for source in gather_results(args.inputs, progress)]
    table = compare(results)
    progress(f"writing comparison.csv and overlay charts to {args.out}")
    with atomic_folder(args.out) as tmp:
        table.to_csv(tmp / "comparison.csv")
        for name, figure in overlay_figures(results).items():
            save_figure(figure, tmp, name)
    if args.json:
        print(json.dumps(comparison_json(table), indent=2))
    else:
        print(render_comparison(table))
        print()
        print(CAUTION)
        print(f"Comparison written to {args.out}/")
    return 0
