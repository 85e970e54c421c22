"""Write a planning memo of one or several scenarios: memo.md and a self-contained memo.html (figures embedded), with
the findings and headline numbers, figures, assumptions, comparison table and cautions.

Each input is a scenario file (solved now), a result folder written by 'pathcast run' or an ensemble folder written
by 'pathcast ensemble'. For a result folder the assumptions are read from its scenario file when that file is
unchanged since the run (same input hash); otherwise only the assumptions the folder records itself are shown, and the
memo says so. Each ensemble folder adds a "Robustness across an ensemble" section with the ensemble's figures, and a
sentence to the findings (the probability of staying within the carbon budget and the 5-95 % range of the total
cost; joined to the finding of the ensemble's base scenario when that scenario is among the inputs). With ensemble
folders only, the memo has the ensembles' findings, robustness sections, the cautions and the provenance, but no
pathway, headline table, figures or assumptions of the base scenario: give its scenario file or result folder too for
those. The output folder is replaced as a whole; it must be new, empty or an earlier output of 'pathcast memo'.
"""

from __future__ import annotations

import argparse
import math
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError
from . import progress_printer
from .compare import Source, check_output_folder, gather_results

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    import pandas as pd

    from ..report.memo import MemoEnsemble

__all__ = ["add_arguments", "execute", "assumptions_of", "default_folder", "split_inputs", "read_ensemble"]


def assumptions_of(source: Source) -> tuple[pd.DataFrame, str]:
    """(assumptions table, note) of one input; the note is empty when the table is complete."""
    import pandas as pd

    from ..results.assumptions import assumptions_table, metadata_assumptions
    from ..scenario.loader import load_scenario

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
    note = (
        f"The assumptions of {result.scenario_name} are incomplete: {reason}, so only the assumptions recorded in "
        f"the result folder {source.path} are shown."
    )
    return metadata_assumptions(result.metadata, result.summary), note


def default_folder(sources: list[Source], ensembles: list[MemoEnsemble] | None = None) -> Path:
    from ..results.compare import scenario_labels

    if not sources:
        names = [e.name for e in ensembles or []]
        return Path("results") / (f"{names[0]}_memo" if len(names) == 1 else "ensemble_memo")
    labels = scenario_labels([s.result for s in sources])
    return Path("results") / (f"{labels[0]}_memo" if len(labels) == 1 else "comparison_memo")


def split_inputs(paths: list[str | Path]) -> tuple[list[Path], list[Path]]:
    """(scenario files and result folders, ensemble folders), each in the order given. A folder holding
    ensemble.json is an ensemble folder (it has a summary.json too), one holding summary.json a result folder;
    anything else is refused before anything is solved."""
    runs, ensembles = [], []
    for item in paths:
        path = Path(item)
        if path.is_dir():
            if (path / "ensemble.json").is_file():
                ensembles.append(path)
            elif (path / "summary.json").is_file():
                runs.append(path)
            else:
                raise ScenarioError(
                    f"{path}: got a folder with neither summary.json nor ensemble.json; expected a "
                    "result folder written by 'pathcast run' or an ensemble folder written by "
                    "'pathcast ensemble'.",
                    file=str(path),
                )
        elif path.is_file():
            runs.append(path)
        else:
            raise ScenarioError(
                f"{path}: got no such file or folder; expected a scenario YAML file, a result folder "
                "written by 'pathcast run' or an ensemble folder written by 'pathcast ensemble'.",
                file=str(path),
            )
    return runs, ensembles


def _base_illustrative(base: str, base_hash: str) -> bool:
    """metadata.illustrative of the ensemble's base scenario, when its file is unchanged since the ensemble ran."""
    from ..scenario.loader import load_scenario

    if not base or not Path(base).is_file():
        return False
    try:
        loaded = load_scenario(base)
    except ScenarioError:
        return False
    return loaded.input_hash == base_hash and bool(loaded.scenario.metadata.illustrative)


def read_ensemble(folder: Path) -> MemoEnsemble:
    """An ensemble folder of 'pathcast ensemble' as memo input: its robustness section (figure links into the
    folder's own figures/) and the numbers of the finding, both summarised from its member records."""
    from ..ensemble import ensemble_robustness_section
    from ..ensemble.summary import summarise_ensemble
    from ..report.memo import MemoEnsemble

    folder = Path(folder)
    summary = summarise_ensemble(folder)
    section = ensemble_robustness_section(folder, heading_level=2)
    design, stats = summary.design, summary.stats
    cost = summary.headline_percentiles.set_index("quantity")
    if "total_discounted_cost_million" in cost.index and cost.loc["total_discounted_cost_million", "members"]:
        p5, p50, p95 = (float(cost.loc["total_discounted_cost_million", k]) for k in ("p5", "p50", "p95"))
    else:
        p5 = p50 = p95 = math.nan
    probability = stats.get("probability_within_budget")
    figures = {p.stem: p for p in sorted((folder / "figures").glob("*.png"))}
    return MemoEnsemble(
        folder=folder,
        name=str(design["name"]),
        section=section,
        base=str(design.get("base", "")),
        base_hash=str(design.get("base_hash", "")),
        file=str(design.get("file", "")),
        design=str(design["design"]),
        inputs=tuple(design.get("inputs", {})),
        members=int(stats["members"]),
        solved=int(stats["solved"]),
        infeasible=int(stats["infeasible"]),
        failed_other=int(stats["failed_other"]),
        pending=int(stats["pending"]),
        within_budget=int(stats["within_budget"]),
        probability_within_budget=math.nan if probability is None else float(probability),
        reference_budget_mt=stats.get("reference_budget_mt"),
        cost_p5=p5,
        cost_p50=p50,
        cost_p95=p95,
        currency=summary.currency,
        price_year=summary.price_year,
        figure_files=figures,
        pathcast_version=str((design.get("versions") or {}).get("pathcast", "")),
        illustrative=_base_illustrative(str(design.get("base", "")), str(design.get("base_hash", ""))),
    )


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
    from ..report.memo import MemoInput, build_memo, write_memo

    progress = progress_printer(args.quiet)

    if args.out is not None:
        check_output_folder(args.out, "memo.md", "memo")
    runs, ensemble_folders = split_inputs(args.inputs)
    sources = gather_results(runs, progress)
    ensembles = []
    for folder in ensemble_folders:
        progress(f"reading the ensemble in {folder}")
        ensembles.append(read_ensemble(folder))
    out = args.out or default_folder(sources, ensembles)
    check_output_folder(out, "memo.md", "memo")
    inputs = [MemoInput(source.result, *assumptions_of(source)) for source in sources]
    progress("drawing figures and writing the memo")
    memo = build_memo(inputs, ensembles)
    write_memo(memo, out)
    print(f"Memo written to {out}/memo.md and {out}/memo.html")
    return 0
