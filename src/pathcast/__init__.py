"""pathcast: least-cost decarbonisation pathways for power and fuel supply under a carbon budget.

A screening-level planning model: results depend on their inputs, and decisions defer to regulators, grid codes and
licensed engineering studies.

The public names below are imported on first use (module ``__getattr__``), so ``import pathcast`` and the command
line's ``--help``, ``--version`` and ``check`` load neither Pyomo, HiGHS, SciPy nor matplotlib.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

from .errors import InfeasibleError, PathcastError, ScenarioError, SolverError

__version__ = "0.1.0"

if TYPE_CHECKING:  # the same names, for type checkers and editors
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

# public name -> module (under pathcast) that defines it, imported on first access
_LAZY_NAMES: dict[str, str] = {
    "load_scenario": ".scenario.loader",
    "LoadedScenario": ".scenario.loader",
    "prepare_inputs": ".scenario.inputs",
    "ModelInputs": ".scenario.inputs",
    "run_scenario": ".pipeline",
    "solve_inputs": ".pipeline",
    "Run": ".pipeline",
    "RunResult": ".results.run_result",
    "write_result": ".results.writers",
    "read_result": ".results.writers",
}


def __getattr__(name: str) -> Any:
    module_name = _LAZY_NAMES.get(name)
    if module_name is None:
        raise AttributeError(f"module 'pathcast' has no attribute {name!r}")
    value = getattr(importlib.import_module(module_name, __name__), name)
    globals()[name] = value  # later look-ups skip __getattr__
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
