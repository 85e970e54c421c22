"""Domain exceptions. The CLI catches :class:`PathcastError` and turns each kind into its exit code."""

from __future__ import annotations

import difflib
from collections.abc import Iterable
from pathlib import Path
from typing import Any

__all__ = [
    "PathcastError",
    "ScenarioError",
    "InfeasibleError",
    "SolverError",
    "did_you_mean",
    "located_error",
    "EXIT_OK",
    "EXIT_BAD_INPUT",
    "EXIT_INFEASIBLE",
    "EXIT_SOLVER_FAILURE",
]

EXIT_OK = 0
EXIT_BAD_INPUT = 2
EXIT_INFEASIBLE = 3
EXIT_SOLVER_FAILURE = 4


class PathcastError(Exception):
    """Base of every error pathcast reports to a user as one sentence."""

    exit_code = 1


class ScenarioError(PathcastError, ValueError):
    """A scenario (or ensemble, or result folder) is not valid input.

    The message names the file, the field path, the value and what was expected.
    """

    exit_code = EXIT_BAD_INPUT

    def __init__(self, message: str, *, file: str | None = None, field: str | None = None):
        super().__init__(message)
        self.file = file
        self.field = field


class InfeasibleError(PathcastError, RuntimeError):
    """The scenario's targets cannot all be met; ``diagnosis`` says by how much and why."""

    exit_code = EXIT_INFEASIBLE

    def __init__(self, message: str, diagnosis: dict | None = None):
        super().__init__(message)
        self.diagnosis = diagnosis or {}


class SolverError(PathcastError, RuntimeError):
    """HiGHS stopped without an optimal solution for a reason other than infeasibility."""

    exit_code = EXIT_SOLVER_FAILURE


def did_you_mean(name: str, choices: Iterable[str]) -> str:
    """Return ``" (did you mean 'x'?)"`` for the closest of ``choices``, or ``""`` when none is close."""
    choices = list(choices)
    close = difflib.get_close_matches(str(name), choices, n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


def located_error(file: Path | str, path: tuple | str, value: Any, expected: str) -> ScenarioError:
    """Build the one-sentence error: ``file: field.path: got value; expected ...`` (the value shown with ``!r``,
    cut to 80 characters)."""
    where = path if isinstance(path, str) else ".".join(str(p) for p in path)
    text = repr(value)
    shown = text if len(text) <= 80 else text[:77] + "..."
    return ScenarioError(f"{file}: {where}: got {shown}; expected {expected}.", file=str(file), field=where)
