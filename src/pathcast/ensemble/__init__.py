"""Ensembles for sensitivity and uncertainty: many variants of one base scenario, sampled from the inputs' stated
distributions (Latin hypercube), on a full grid, or one at a time (tornado), solved in parallel with dask.distributed,
stored member by member (resumable) and summarised as tidy tables, percentiles, fan charts and a memo section.

==================  ==================================================================================================
module              content
==================  ==================================================================================================
spec                the ensemble file (pydantic), field paths into the merged base scenario, located errors
validity            finite and plausible numbers; every value an input can take inside its scenario field's rule
sampling            designs: Latin hypercube + inverse CDFs, grid, one-at-a-time
members             a member's scenario mapping (samples applied to the base) and its SHA-256
worker              one member's build and solve in a worker (warm start from the base basis), compact record
store               DIR/members/<hash>.json written atomically; the base basis; leftovers of killed writes
scheduler           the --scheduler address: malformed ones refused, a scheduler that must answer within a timeout
runner              run_ensemble(): plan, skip what is stored, connect, serial or dask, progress, outputs
summary             tidy tables, percentiles, probability within budget, tornado, rank correlations
figures             fan charts, distributions, budget probability, tornado
outputs             DIR/tables (CSV, Parquet), DIR/figures (PNG), DIR/summary.json, DIR/robustness.json as one set,
                    DIR/outputs.json; read_robustness() and ensemble_robustness_section(ensemble_dir) -> Markdown
robustness          the memo's robustness section as data (paragraphs, tables, figure references) and its Markdown
==================  ==================================================================================================

The public names below are imported on first use (module ``__getattr__``), so that ``pathcast check`` can look at an
ensemble file's spec without loading pandas, SciPy or dask.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the same names, for type checkers and editors
    from .outputs import ensemble_robustness_section
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

# public name -> module (under pathcast.ensemble) that defines it
_LAZY_NAMES: dict[str, str] = {
    "load_ensemble": ".spec",
    "EnsembleSpec": ".spec",
    "run_ensemble": ".runner",
    "EnsembleRun": ".runner",
    "summarise_ensemble": ".summary",
    "EnsembleSummary": ".summary",
    "ensemble_robustness_section": ".outputs",
}


def __getattr__(name: str) -> Any:
    module_name = _LAZY_NAMES.get(name)
    if module_name is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(module_name, __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
