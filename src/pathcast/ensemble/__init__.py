"""Ensembles for sensitivity and uncertainty: many variants of one base scenario, sampled from the inputs' stated
distributions (Latin hypercube), on a full grid, or one at a time (tornado), solved in parallel with dask.distributed,
stored member by member (resumable) and summarised as tidy tables, percentiles, fan charts and a memo section.

==================  ==================================================================================================
module              content
==================  ==================================================================================================
spec                the ensemble file (pydantic), field paths into the merged base scenario, located errors
sampling            designs: Latin hypercube + inverse CDFs, grid, one-at-a-time
members             a member's scenario mapping (samples applied to the base) and its SHA-256
worker              one member's build and solve in a worker (warm start from the base basis), compact record
store               DIR/members/<hash>.json written atomically; the base basis
runner              run_ensemble(): plan, skip what is stored, serial or dask, progress, outputs
summary             tidy tables, percentiles, probability within budget, tornado, rank correlations
figures             fan charts, distributions, budget probability, tornado
outputs             DIR/tables (CSV, Parquet), DIR/figures (PNG), DIR/summary.json
robustness          ensemble_robustness_section(ensemble_dir) -> Markdown for a memo
==================  ==================================================================================================
"""

from .robustness import ensemble_robustness_section
from .runner import EnsembleRun, run_ensemble
from .spec import EnsembleSpec, load_ensemble
from .summary import EnsembleSummary, summarise_ensemble

__all__ = [
    "load_ensemble",
    "EnsembleSpec",
    "run_ensemble",
    "EnsembleRun",
    "summarise_ensemble",
    "EnsembleSummary",
    "ensemble_robustness_section",
]
