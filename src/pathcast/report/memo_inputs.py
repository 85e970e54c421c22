"""The inputs of a memo, computed before it is drawn: each argument of ``pathcast memo`` is a scenario file (solved
now), a result folder written by ``pathcast run`` (read back; both through :func:`pathcast.results.sources.load_run`)
or an ensemble folder written by ``pathcast ensemble`` (its robustness section and the numbers of its finding).
Every argument is classified, and a missing path or a folder of neither kind refused, before anything is solved."""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from ..errors import ScenarioError
from ..results.sources import ENSEMBLE_FOLDER, RESULT_FOLDER, SCENARIO_FILE

if TYPE_CHECKING:  # the heavy modules are imported where they are used
    from ..results.sources import RunSource
    from .memo import MemoEnsemble, MemoInput

__all__ = ["MemoSources", "gather_memo", "split_inputs", "read_ensemble", "default_folder"]

Progress = Callable[[str], None]


@dataclass(frozen=True)
class MemoSources:
    """Everything a memo is drawn from: the runs (the first is the reference for abatement costs and assumption
    changes) with their assumptions, the ensembles, and the memo folder used when ``--out`` is not given."""

    inputs: list[MemoInput]
    ensembles: list[MemoEnsemble]
    default_folder: Path


def gather_memo(paths: Sequence[str | Path], *, progress: Progress | None = None) -> MemoSources:
    """What ``pathcast memo`` computes before drawing: :func:`split_inputs`, then every run loaded and every ensemble
    read, each run with its assumptions (:func:`pathcast.results.assumptions.result_assumptions`)."""
    from ..results.assumptions import result_assumptions
    from ..results.sources import load_runs
    from .memo import MemoInput

    say = progress or (lambda _message: None)
    runs, ensemble_folders = split_inputs(paths)
    sources = load_runs(runs, progress=say)
    ensembles = []
    for folder in ensemble_folders:
        say(f"reading the ensemble in {folder}")
        ensembles.append(read_ensemble(folder))
    inputs = [
        MemoInput(
            source.result, *result_assumptions(source.result, source.path if source.from_folder else None)
        )
        for source in sources
    ]
    return MemoSources(inputs, ensembles, default_folder(sources, ensembles))


def default_folder(sources: Sequence[RunSource], ensembles: Sequence[MemoEnsemble] = ()) -> Path:
    """results/<scenario>_memo for one run, results/comparison_memo for several, results/<ensemble>_memo for one
    ensemble alone, results/ensemble_memo for several."""
    from ..results.compare import scenario_labels

    if not sources:
        names = [e.name for e in ensembles]
        return Path("results") / (f"{names[0]}_memo" if len(names) == 1 else "ensemble_memo")
    labels = scenario_labels([s.result for s in sources])
    return Path("results") / (f"{labels[0]}_memo" if len(labels) == 1 else "comparison_memo")


def split_inputs(paths: Sequence[str | Path]) -> tuple[list[Path], list[Path]]:
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
                    f"{path}: got a folder with neither summary.json nor ensemble.json; expected "
                    f"{RESULT_FOLDER} or {ENSEMBLE_FOLDER}.",
                    file=str(path),
                )
        elif path.is_file():
            runs.append(path)
        else:
            raise ScenarioError(
                f"{path}: got no such file or folder; expected {SCENARIO_FILE}, {RESULT_FOLDER} or "
                f"{ENSEMBLE_FOLDER}.",
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
    """An ensemble folder of 'pathcast ensemble' as memo input: its robustness section (robustness.json, figure
    references into the folder's own figures/) and the numbers of the finding, summarised from its member records."""
    from ..ensemble.outputs import read_robustness
    from ..ensemble.summary import summarise_ensemble
    from .memo import MemoEnsemble

    folder = Path(folder)
    summary = summarise_ensemble(folder)
    section = read_robustness(folder, summary)
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
