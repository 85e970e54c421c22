"""Write a planning memo of one or several scenarios: memo.md and a self-contained memo.html (figures embedded), with
the findings and headline numbers, figures, assumptions, comparison table and cautions.

Each input is a scenario file (solved now), a result folder written by 'pathcast run' or an ensemble folder written
by 'pathcast ensemble'. A result folder holds its run's assumptions (assumptions.csv); for a folder of an earlier
pathcast without it, they are read from its scenario file when that file is unchanged since the run (same input hash);
otherwise only the assumptions the folder records itself are shown, and the memo says so. Each ensemble folder adds a
"Robustness across an ensemble" section with the ensemble's figures, and a sentence to the findings (the probability
of staying within the carbon budget and the 5-95 % range of the total cost; joined to the finding of the ensemble's
base scenario when that scenario is among the inputs). With ensemble folders only, the memo has the ensembles'
findings, robustness sections, the cautions and the provenance, but no pathway, headline table, figures or assumptions
of the base scenario: give its scenario file or result folder too for those. The output folder is replaced as a
whole; it must be new, empty or an earlier output of 'pathcast memo'.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from . import check_output_folder, progress_printer

# computed by pathcast.report.memo_inputs.gather_memo and pathcast.report.memo.build_memo, rendered by
# pathcast.report.memo.write_memo

__all__ = ["add_arguments", "execute"]


def add_arguments(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "inputs",
        nargs="+",
        metavar="FILE|RESULTDIR|ENSEMBLEDIR",
        help="scenario YAML files (solved now), result folders of 'pathcast run' or ensemble folders "
        "of 'pathcast ensemble'; the first scenario or result folder is the reference for "
        "abatement costs and assumption changes. Each ensemble folder adds a 'Robustness across "
        "an ensemble' section with its figures and a sentence to the findings; with ensemble "
        "folders only, the memo has their findings, robustness sections, the cautions and the "
        "provenance, but not the base scenario's pathway (give its file or result folder too)",
    )
    parser.add_argument(
        "--out",
        type=Path,
        default=None,
        help="memo folder (default: results/<scenario>_memo, results/comparison_memo for several "
        "scenarios, results/<ensemble>_memo for one ensemble alone)",
    )
    parser.add_argument("--quiet", action="store_true", help="no progress messages")


def execute(args: argparse.Namespace) -> int:
    from ..report.console import render_memo_written
    from ..report.memo import build_memo, write_memo
    from ..report.memo_inputs import gather_memo

    progress = progress_printer(args.quiet)

    if args.out is not None:
        check_output_folder(args.out, "memo.md", "memo")
    sources = gather_memo(args.inputs, progress=progress)
    out = args.out or sources.default_folder
    check_output_folder(out, "memo.md", "memo")
    progress("drawing figures and writing the memo")
    write_memo(build_memo(sources.inputs, sources.ensembles), out)
    print(render_memo_written(out))
    return 0
