"""pathcast: least-cost decarbonisation pathways for power and fuel supply under a carbon budget.

A screening-level planning model: results depend on their inputs, and decisions defer to regulators, grid codes and
licensed engineering studies.
"""

from __future__ import annotations

__version__ = "0.1.0"

from .errors import InfeasibleError, PathcastError, ScenarioError, SolverError
from .pipeline import Run, run_scenario, solve_inputs
from .results.run_result import RunResult
from .results.writers import read_result, write_result
from .scenario.inputs import ModelInputs, prepare_inputs
from .scenario.loader import LoadedScenario, load_scenario

__all__ = [
    "__version__",
    "load_scenario",
    "LoadedScenario",
    "prepare_inputs",
    "ModelInputs",
    "run_scenario",
    "solve_inputs",
    "Run",
    "RunResult",
    "write_result",
    "read_result",
    "PathcastError",
    "ScenarioError",
    "InfeasibleError",
    "SolverError",
]
