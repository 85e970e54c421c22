"""Write a planning memo of one or several scenarios: memo.md and a self-contained memo.html (figures embedded), with
the findings and headline numbers, figures, assumptions, comparison table and cautions.

Each input is a scenario file (solved now) or a result folder written by 'pathcast run'. For a result folder the
assumptions are read from its scenario file when that file is unchanged since the run (same input hash); otherwise
only the assumptions the folder records itself are shown, and the memo says so. The output folder is replaced as a
whole; it must be new, empty or an earlier output of 'pathcast memo'.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import pandas as pd

from ..errors import ScenarioError
from ..report.memo import MemoInput, build_memo, write_memo
from ..results.assumptions import assumptions_table, metadata_assumptions
from ..results.compare import scenario_labels
from ..scenario.loader import load_scenario
from .compare import Source, check_output_folder, gather_results

__all__ = ["add_arguments", "execute", "assumptions_of", "default_folder"]


def assumptions_of(source: Source) -> tuple[pd.DataFrame, str]:
    """(assumptions table, note) of one input; the note is empty when the table is complete."""
    if source.loaded is not None:
        return assumptions_table(source.loaded), ""
    result = source.result
    stored = source.path / "assumptions.csv"
    if stored.is_file():
        return pd.read_csv(stored, dtype=str, keep_default_na=False), ""
    scenario_file = result.manifest.get("source")
    if scenario_file and Path(scenario_file).is_file():
        try:
            loaded = load_scenario(scenario_file)
        except ScenarioError:
            loaded = None
        if loaded is not None and loaded.input_hash == result.manifest.get("input_hash"):
            return assumptions_table(loaded), ""
        reason = f"its scenario file {scenario_file} has changed since the run"
    else:
        reason = f"its scenario file {scenario_file or '(not recorded)'} cannot be found"
    note = (f"The assumptions of {result.scenario_name} are incomplete: {reason}, so only the assumptions recorded in "
            f"the result folder {source.path} are shown.")
    return metadata_assumptions(result.metadata, result.summary), note


def default_folder(sources: list[Source]) -> Path:
    labels = scenario_labels([s.result for s in sources])
    return Path("results") / (f"{labels[0]}_memo" if len(labels) == 1 else "comparison_memo")


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("inputs", nargs="+", metavar="FILE|RESULTDIR",
                        help="scenario YAML files (solved now) or result folders of 'pathcast run'; the first is the "
                             "reference for abatement costs and assumption changes")
    parser.add_argument("--out", type=Path, default=None,
                        help="memo folder (default: results/<scenario>_memo, or results/comparison_memo for several)")
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def execute(args: argparse.Namespace) -> int:
    started = time.perf_counter()

    def progress(message: str) -> None:
        if not args.quiet:
            print(f"[{time.perf_counter() - started:6.1f} s] {message}", file=sys.stderr, flush=True)

    if args.out is not None:
        check_output_folder(args.out, "memo.md", "memo")
    sources = gather_results(args.inputs, progress)
    out = args.out or default_folder(sources)
    check_output_folder(out, "memo.md", "memo")
    inputs = [MemoInput(source.result, *assumptions_of(source)) for source in sources]
    progress("drawing figures and writing the memo")
    memo = build_memo(inputs)
    write_memo(memo, out)
    print(f"Memo written to {out}/memo.md and {out}/memo.html")
    return 0
